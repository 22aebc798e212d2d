// Issue 18.3, the QC side: a control whose decay file holds several measurements (parallel, perpendicular
// and magic-angle columns with one IRF column) through the real `driftlight process`. Control `pol-par`
// judges the file's first measurement (the default), `pol-perp` the column its config names; the third
// column is judged by no control and its result says so. Every result names what was judged in
// qc.judgement, the ledger records the judged column with each run, and the same control days
// delivered in two arrival orders give the same verdicts.
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv } from 'ajv';
import { afterAll, describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../src/analysis/result.js';
import { createSeededRandom } from '../../src/decay/index.js';
import { decayHistogram } from '../../src/demo/synthetic.js';
import { metadataEntries } from '../../src/formats/metadata-lines.js';
import { canonicalKey } from '../../src/formats/metadata-vocabulary.js';
import { openLedger } from '../../src/store/ledger.js';
import { observationHistory } from '../../src/store/qc-store.js';
import { runDriftlight } from '../helpers/cli.js';
import { makeWorkspace, readResults, removeWorkspaces } from './pipeline-helpers.js';

const schema = JSON.parse(readFileSync(new URL('../../schemas/result.schema.json', import.meta.url), 'utf8')) as object;
const ajv = new Ajv({ allErrors: true, strict: false });
const validate = ajv.compile(schema);

// Targets: 3.0 ± 0.05 ns (parallel, judged by pol-par) and 4.0 ± 0.05 ns (perpendicular, judged by pol-perp).
const CONTROLS_YAML = [
  'controls:',
  '  - { id: pol-par, sampleIdPattern: "^CTRL-pol", targetTauNs: 3.0, sdTauNs: 0.05 }',
  '  - { id: pol-perp, sampleIdPattern: "^CTRL-pol", measurement: perpendicular, targetTauNs: 4.0, sdTauNs: 0.05 }',
].join('\n');

/** Lifetimes (ns) of each column per day: day 4 the parallel decay runs 10 % long, day 6 the perpendicular 10 % short. */
const DAYS = [1, 2, 3, 4, 5, 6].map((day) => ({
  day,
  parallelNs: day === 4 ? 3.3 : 3.0,
  perpendicularNs: day === 6 ? 3.6 : 4.0,
  magicNs: 3.5,
}));

/** One control day's decay file: three count columns sharing a time axis and one IRF column (seeded, Poisson counts). */
function controlDayFile(day: (typeof DAYS)[number]): { name: string; content: string } {
  const sampleId = `CTRL-pol-03${String(day.day).padStart(2, '0')}`;
  const metadata = { sampleId, acquiredAt: `2026-03-${String(day.day + 1).padStart(2, '0')}T08:30:00Z` };
  const spec = { photons: 60_000, channels: 256, channelWidthNs: 0.1 };
  const random = createSeededRandom(1000 + day.day);
  const parallel = decayHistogram({ ...spec, tauNs: [day.parallelNs] }, metadata, random);
  const perpendicular = decayHistogram({ ...spec, tauNs: [day.perpendicularNs] }, metadata, random);
  const magic = decayHistogram({ ...spec, tauNs: [day.magicNs] }, metadata, random);
  const irf = parallel.irfCounts ?? new Float64Array(0);
  const header = [
    `# ${canonicalKey('kind')}: decay`,
    `# ${canonicalKey('channelWidthNs')}: ${parallel.channelWidthNs}`,
    ...metadataEntries(parallel.metadata).map(([key, value]) => `# ${key}: ${value}`),
    'time (ns),parallel,perpendicular,magic angle,irf',
  ];
  const rows = Array.from(
    parallel.timeNs,
    (t, i) => `${t},${parallel.counts[i]},${perpendicular.counts[i]},${magic.counts[i]},${irf[i]}`,
  );
  return { name: `${sampleId}_decay.csv`, content: `${[...header, ...rows].join('\n')}\n` };
}

type Judged = Pick<AnalysisResult, 'setId' | 'sampleId' | 'qc' | 'measurement' | 'decayFit'>;

/** Delivers the control days in `deliveries` (one `process` run per delivery) and returns the results and the ledger's runs. */
function replay(deliveries: readonly (readonly number[])[]) {
  const dir = makeWorkspace(CONTROLS_YAML, { requiredParts: 'decay' });
  const config = join(dir, 'driftlight.yaml');
  const exits: number[] = [];
  for (const days of deliveries) {
    for (const day of days) {
      const file = controlDayFile(DAYS[day - 1] as (typeof DAYS)[number]);
      writeFileSync(join(dir, 'inbox', file.name), file.content);
    }
    const run = runDriftlight(['process', join(dir, 'inbox'), '--config', config], { timeoutMs: 180_000 });
    exits.push(run.status ?? -1);
    // 4: processed, with QC flags open (README exit codes).
    expect([0, 4], run.stderr).toContain(run.status);
  }
  const results = readResults(dir).map((r) => r.result as unknown as Judged);
  const ledger = openLedger(join(dir, 'state'), { readonly: true });
  const runs = observationHistory(ledger).map((o) => `${o.controlId} ${o.setId} ${o.measurement ?? '-'}`);
  ledger.close();
  rmSync(dir, { recursive: true, force: true });
  return { results, runs, exits };
}

/** Per result: its measurement, judgement and flags (rule and severity), sorted, for comparing replays. */
function verdicts(results: readonly Judged[]): string[] {
  return results
    .map((r) =>
      JSON.stringify([r.setId, r.qc.judgement, r.qc.flags.map((flag) => `${flag.rule} ${flag.severity}`).sort()]),
    )
    .sort();
}

describe('process: QC of a control whose file holds several measurements (issue 18.3)', () => {
  afterAll(() => removeWorkspaces());

  it('judges the measurement each control names, says which, and gives the same verdicts in any arrival order', () => {
    // One backlog of six days, against the latest days first and the earlier ones arriving late.
    const inOrder = replay([[1, 2, 3, 4, 5, 6]]);
    const shuffled = replay([
      [5, 6],
      [3, 4],
      [1, 2],
    ]);

    // Three results per day (one per count column), each schema-valid.
    expect(inOrder.results).toHaveLength(18);
    for (const result of inOrder.results) expect(validate(result), ajv.errorsText(validate.errors)).toBe(true);

    const byColumn = (column: string) => inOrder.results.filter((r) => r.measurement?.column === column);
    for (const r of byColumn('parallel'))
      expect(r.qc.judgement).toMatchObject({ control: 'pol-par', judged: true, selectedBy: 'first' });
    for (const r of byColumn('perpendicular'))
      expect(r.qc.judgement).toMatchObject({
        control: 'pol-perp',
        judged: true,
        selectedBy: 'config',
        judgedMeasurement: 'perpendicular',
      });
    for (const r of byColumn('magic angle')) {
      expect(r.qc.judgement?.judged).toBe(false);
      expect(r.qc.judgement?.reason).toContain('control pol-perp judges measurement "perpendicular"');
      expect(r.qc.flags).toEqual([]);
    }
    for (const r of inOrder.results) expect(r.qc.judgement?.metrics ?? []).not.toContain('controlQuantumYield');

    // A 0.3 ns shift is 6 SD of the declared 0.05 ns: a 1-3s rejection of the judged column only (Westgard
    // et al., Clin. Chem. 27, 493, 1981); the fitted lifetimes follow the generated ones (3 %, common practice).
    const critical = (r: Judged) =>
      r.qc.flags.some((f) => f.rule === 'lifetime-westgard:1-3s' && f.severity === 'critical');
    const flaggedDays = (column: string) =>
      byColumn(column)
        .filter(critical)
        .map((r) => r.sampleId)
        .sort();
    expect(flaggedDays('parallel')).toEqual(['CTRL-pol-0304']);
    expect(flaggedDays('perpendicular')).toEqual(['CTRL-pol-0306']);
    for (const r of byColumn('parallel')) {
      const truth = r.sampleId === 'CTRL-pol-0304' ? 3.3 : 3.0;
      expect(Math.abs((r.decayFit?.tauMeanIntensityNs ?? 0) / truth - 1)).toBeLessThan(0.03);
    }

    // The ledger records each judged run with its control and column, and nothing for the magic-angle column.
    expect(inOrder.runs).toHaveLength(12);
    expect(inOrder.runs.filter((run) => run.startsWith('pol-par ')).every((run) => run.endsWith(' parallel'))).toBe(
      true,
    );
    expect(
      inOrder.runs.filter((run) => run.startsWith('pol-perp ')).every((run) => run.endsWith(' perpendicular')),
    ).toBe(true);

    // Same verdicts and the same ledger runs whatever the arrival order (issue 16.2 order independence).
    expect(verdicts(shuffled.results)).toEqual(verdicts(inOrder.results));
    expect([...shuffled.runs].sort()).toEqual([...inOrder.runs].sort());
  }, 600_000);

  it('refuses a misspelt `measurement` key and two controls judging the same measurement, naming the key', () => {
    const misspelt = makeWorkspace('controls:\n  - { id: pol, sampleIdPattern: "^CTRL-pol", measurment: parallel }');
    const run = runDriftlight(['config', 'check', '--config', join(misspelt, 'driftlight.yaml')]);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('controls[0].measurment');
    expect(run.stderr).toContain('measurement');

    const twice = makeWorkspace(
      [
        'controls:',
        '  - { id: a, sampleIdPattern: "^CTRL-pol", measurement: parallel }',
        '  - { id: b, sampleIdPattern: "^CTRL-pol", measurement: parallel }',
      ].join('\n'),
    );
    const again = runDriftlight(['config', 'check', '--config', join(twice, 'driftlight.yaml')]);
    expect(again.status).toBe(2);
    expect(again.stderr).toContain('controls[1].measurement');
    expect(again.stderr).toContain('controls[0] already judges measurement "parallel"');

    const empty = makeWorkspace('controls:\n  - { id: a, sampleIdPattern: "^CTRL-pol", measurement: "  " }');
    const blank = runDriftlight(['config', 'check', '--config', join(empty, 'driftlight.yaml')]);
    expect(blank.status).toBe(2);
    expect(blank.stderr).toContain('controls[0].measurement');
  }, 120_000);
});
