// The demo month generator: deterministic for a seed, and its truth describes the files it wrote
// (faults on their days, the malformed export really malformed, the IRF-less decay really IRF-less).
import { describe, expect, it } from 'vitest';
import { readData } from '../../../src/formats/index.js';
import { generateDemoMonth, MONTH_DAYS, monthDate } from '../../../src/demo/month.js';
import { parseRuleSet } from '../../../src/qc/index.js';
import { InputRejected } from '../../../src/model/errors.js';

const month = generateDemoMonth();
const bytes = (content: string): Uint8Array => new TextEncoder().encode(content);
const fileNamed = (name: string) => month.arrivals.find((a) => a.file.name === name);

describe('generateDemoMonth', () => {
  it('gives the same files, times and truth for the same seed, and other files for another seed', () => {
    const again = generateDemoMonth();
    expect(again.arrivals.map((a) => [a.arriveAt, a.file.name, a.file.content])).toEqual(
      month.arrivals.map((a) => [a.arriveAt, a.file.name, a.file.content]),
    );
    expect(again.truth).toEqual(month.truth);
    const other = generateDemoMonth(7);
    expect(other.arrivals.find((a) => a.file.name.endsWith('_em.csv'))?.file.content).not.toBe(
      month.arrivals.find((a) => a.file.name.endsWith('_em.csv'))?.file.content,
    );
  });

  it('has one control with emission, absorbance, decay and IRF every day, a weekly reference and Raman scan, blanks and samples', () => {
    expect(month.truth.controls).toHaveLength(MONTH_DAYS);
    for (const control of month.truth.controls) {
      for (const suffix of ['_em.csv', '_abs.jdx', '_decay.csv', '_irf.csv']) {
        expect(fileNamed(`${control.sampleId}${suffix}`)?.day, `${control.sampleId}${suffix}`).toBe(control.day);
      }
    }
    expect(
      month.arrivals.filter((a) => a.file.name.startsWith('REF-R6G-') && a.file.name.endsWith('_em.txt')),
    ).toHaveLength(5);
    expect(month.arrivals.filter((a) => a.file.name.endsWith('_raman.csv'))).toHaveLength(4);
    expect(month.arrivals.filter((a) => a.file.name.startsWith('blank_'))).toHaveLength(MONTH_DAYS);
    expect(month.truth.quenching.sampleIds).toHaveLength(5);
    // Several layouts: CSV, decimal-comma text, tab text, JCAMP-DX, own JSON, manifests.
    const extensions = new Set(month.arrivals.map((a) => a.file.name.replace(/^.*?(\.set\.yaml|\.[a-z]+)$/, '$1')));
    expect([...extensions].sort()).toEqual(['.csv', '.jdx', '.json', '.set.yaml', '.tsv', '.txt']);
    // Arrivals in time order, each on its own day.
    const times = month.arrivals.map((a) => a.arriveAt);
    expect([...times].sort()).toEqual(times);
    for (const a of month.arrivals) expect(a.arriveAt.slice(0, 10)).toBe(monthDate(a.day));
  });

  it('injects the faults on their days: sensitivity from day 17, contamination from 24, broad IRF from 27', () => {
    for (const c of month.truth.controls) {
      expect(c.contaminated).toBe(c.day >= 24);
      expect(c.irfFwhmNs).toBe(c.day >= 27 ? 0.45 : 0.2);
      // Before day 17 only the ±0.8 % flicker (4 SD bound); from day 17 a loss of 3 % a day.
      if (c.day < 17) expect(Math.abs(c.sensitivity - 1)).toBeLessThan(0.032);
      else expect(Math.abs(c.sensitivity - (1 - 0.03 * (c.day - 16)))).toBeLessThan(0.032);
      expect(c.quantumYield).toBeCloseTo(c.day >= 24 ? 0.71 * 0.8 : 0.71, 10);
    }
    expect(month.truth.faults.map((f) => [f.id, f.fromDay])).toEqual([
      ['sensitivity-loss', 17],
      ['contaminated-control', 24],
      ['irf-broadening', 27],
    ]);
  });

  it('writes a malformed export that the readers refuse with the code the truth names', () => {
    const arrival = fileNamed(month.truth.malformed.file);
    expect(arrival?.day).toBe(month.truth.malformed.day);
    let error: unknown;
    try {
      readData(bytes(arrival?.file.content ?? ''), { fileName: month.truth.malformed.file });
    } catch (caught) {
      error = caught;
    }
    expect(error).toBeInstanceOf(InputRejected);
    expect((error as InputRejected).code).toBe(month.truth.malformed.code);
  });

  it('writes the IRF-less decay without an IRF column, the European date day-first, and the re-export late', () => {
    const decay = readData(bytes(fileNamed(month.truth.missingIrf.file)?.file.content ?? ''), {
      fileName: month.truth.missingIrf.file,
    });
    expect(decay.type).toBe('decay');
    if (decay.type === 'decay') expect(decay.decay.irfCounts).toBeUndefined();
    const european = fileNamed(month.truth.europeanDate.file);
    expect(european?.file.content).toContain(`Date: ${month.truth.europeanDate.written}`);
    expect(month.truth.europeanDate.written).toBe('15.02.2026 13:45');
    expect(month.truth.europeanDate.acquiredAt).toBe('2026-02-15T13:45:00Z');
    for (const name of month.truth.lateReExport.files)
      expect(fileNamed(name)?.day).toBe(month.truth.lateReExport.arrivesDay);
  });

  it('ships a rule set that parses and leaves the control to the config (defined once)', () => {
    const rules = parseRuleSet(month.rules, 'rules.yaml');
    expect(rules.controls).toEqual([]);
    expect(rules.rules.map((r) => r.id)).toContain('irf-width');
    expect(month.config).toContain('sampleIdPattern: "^CTRL-QL-"');
    expect(month.config).toContain('{{WEBHOOK_URL}}');
  });
});
