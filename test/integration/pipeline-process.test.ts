// `driftlight process` (on the bundled example day), `status` and `config check` through the real CLI on real files: results
// validated against schemas/result.schema.json, inputs archived or quarantined, duplicates refused,
// and the committed example day matching its seeded generator.
import { cpSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv } from 'ajv';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateDemoDay } from '../../src/demo/scenario.js';
import { REPO_ROOT, runDriftlight } from '../helpers/cli.js';
import { EXIT_CODES } from '../../src/cli/exit-codes.js';
import { generateSet, listFiles, makeWorkspace, readResults, removeWorkspaces } from './pipeline-helpers.js';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';

const schema = JSON.parse(readFileSync(new URL('../../schemas/result.schema.json', import.meta.url), 'utf8')) as object;
const ajv = new Ajv({ allErrors: true, strict: false });
const validate = ajv.compile(schema);

describe('driftlight demo and process', () => {
  let workspace: string;
  let demo: ReturnType<typeof runDriftlight>;
  beforeAll(() => {
    workspace = join(mkdtempSync(join(tmpdir(), 'dl-demo-')), 'ws');
    cpSync(join(REPO_ROOT, 'examples', 'day'), workspace, { recursive: true });
    demo = runDriftlight(['process', join(workspace, 'inbox'), '--config', join(workspace, 'driftlight.yaml')]);
  });
  afterAll(() => {
    rmSync(join(workspace, '..'), { recursive: true, force: true });
    removeWorkspaces();
  });

  it('runs the example day end to end and prints where everything is', () => {
    // One input of the example day is malformed on purpose: `process` exits 3.
    expect(demo.status).toBe(EXIT_CODES.rejected.code);
    expect(demo.stdout).toContain(`results:    ${join(workspace, 'results')}`);
    expect(demo.stdout).toContain('quarantine:');
  });

  it('writes one schema-valid result per set with numbers close to the generator truth', () => {
    const results = readResults(workspace);
    expect(results.map((r) => r.result.sampleId).sort()).toEqual([
      'CTRL-teal-0314',
      'REF-R6G-0314',
      'orchid-01',
      'orchid-02',
      'scatter-0905',
    ]);
    for (const { path, result } of results) {
      expect(validate(result), `${path}: ${ajv.errorsText(validate.errors)}`).toBe(true);
    }
    const truth = generateDemoDay().truth;
    for (const sample of ['orchid-01', 'orchid-02', 'CTRL-teal-0314']) {
      const r = results.find((x) => x.result.sampleId === sample)?.result as unknown as {
        decayFit: { tauMeanIntensityNs: number };
        quantumYield: { value: number };
        partial: boolean;
      };
      const t = truth.find((x) => x.sampleId === sample);
      expect(r.partial).toBe(false);
      expect(Math.abs(r.decayFit.tauMeanIntensityNs / (t?.tauNs ?? 1) - 1)).toBeLessThan(0.03);
      expect(Math.abs(r.quantumYield.value / (t?.quantumYield ?? 1) - 1)).toBeLessThan(0.05);
    }
  });

  it("gives a Φ in every result file that a hand recomputation from the file's own numbers reproduces (issue 15)", () => {
    // Brouwer, Pure Appl. Chem. 83, 2213 (2011): Φx = Φr·(Fx/Fr)·(fr/fx)·(nx²/nr²), with the absorbed fraction the
    // result says it used (f = 1 − 10^(−A), or A when both spectra were corrected for the inner filter).
    type Inputs = {
      sampleIntegral: number;
      referenceIntegral: number;
      sampleAbsorbance: number;
      referenceAbsorbance: number;
      sampleRefractiveIndex: number;
      referenceRefractiveIndex: number;
      referenceYield: number;
      lightAbsorbed: string;
      sampleCorrections: string[];
      referenceCorrections: string[];
    };
    const withYield = readResults(workspace).filter(
      (x) => (x.result as { quantumYield?: unknown }).quantumYield !== undefined,
    );
    expect(withYield).toHaveLength(3);
    for (const { result } of withYield) {
      const q = (result as unknown as { quantumYield: { value: number; inputs: Inputs } }).quantumYield;
      const i = q.inputs;
      const f = (a: number): number => (i.lightAbsorbed === 'absorptance' ? 1 - 10 ** -a : a);
      const byHand =
        i.referenceYield *
        (i.sampleIntegral / i.referenceIntegral) *
        (f(i.referenceAbsorbance) / f(i.sampleAbsorbance)) *
        (i.sampleRefractiveIndex ** 2 / i.referenceRefractiveIndex ** 2);
      expect(byHand / q.value).toBeCloseTo(1, 12);
      // The corrections Φ's spectra went through are those the result lists for them.
      const listed = (result as unknown as { corrections: { name: string; target: string }[] }).corrections;
      expect(i.sampleCorrections).toEqual(listed.filter((c) => c.target === 'emission').map((c) => c.name));
      expect(i.referenceCorrections).toEqual(
        listed.filter((c) => c.target === 'reference-emission').map((c) => c.name),
      );
    }
  });

  it('archives every good input, quarantines the malformed one with its reason, and writes the outbox', () => {
    expect(listFiles(join(workspace, 'inbox'))).toEqual([]);
    expect(listFiles(join(workspace, 'archive'))).toHaveLength(13);
    const quarantined = listFiles(join(workspace, 'quarantine'));
    expect(quarantined.map((p) => p.split('/')[1])).toEqual(['orchid-03_em.csv', 'orchid-03_em.csv.error.json']);
    const record = JSON.parse(readFileSync(join(workspace, 'quarantine', quarantined[1] ?? ''), 'utf8')) as {
      code: string;
      line: number;
      hint: string;
    };
    expect(record.code).toBe('NON_NUMERIC');
    expect(record.line).toBeGreaterThan(1);
    expect(listFiles(join(workspace, 'outbox')).filter((p) => p.endsWith('.jdx'))).toHaveLength(4);
    const status = runDriftlight(['status', '--config', join(workspace, 'driftlight.yaml')]);
    // orchid-03's only file reads fine in its head (intake) and breaks further down (worker): the
    // set fails with the file's own reason instead of getting an empty result.
    expect(status.stdout).toContain('sets:  open 0, queued 0, done 5, failed 1');
    expect(status.stdout).toContain('NON_NUMERIC');
  });

  it('reprocess re-runs finished sets with the current config, replaces results in place and prints the changes', () => {
    const configPath = join(workspace, 'driftlight.yaml');
    writeFileSync(configPath, `${readFileSync(configPath, 'utf8')}analysis: { innerFilter: none }\n`);
    const before = readResults(workspace)
      .map((r) => r.path)
      .sort();
    const run = runDriftlight(['reprocess', '--since', '2000-01-01', '--config', configPath]);
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(
      /orchid-01-\w+: .*corrections correctInnerFilter:emission,correctInnerFilter:reference-emission → —/,
    );
    expect(run.stdout).toContain('driftlight reprocess: 5 sets since 2000-01-01T00:00:00.000Z, 5 changed');
    expect(
      readResults(workspace)
        .map((r) => r.path)
        .sort(),
    ).toEqual(before);
  });

  it('exits 3 when an input is rejected, and refuses the same content a second time', () => {
    const dir = makeWorkspace();
    const source = readFileSync(
      join(
        workspace,
        'archive',
        listFiles(join(workspace, 'archive')).find((p) => p.endsWith('orchid-01_em.csv')) ?? '',
      ),
      'utf8',
    );
    writeFileSync(join(dir, 'inbox', 'orchid-01_em.csv'), source);
    const first = runDriftlight(['process', join(dir, 'inbox'), '--config', join(dir, 'driftlight.yaml')]);
    expect(first.status).toBe(0);
    expect(first.stdout).toContain('1 sets: 1 done (1 partial)');
    writeFileSync(join(dir, 'inbox', 'copy-of-em.csv'), source);
    const second = runDriftlight(['process', join(dir, 'inbox'), '--config', join(dir, 'driftlight.yaml')]);
    expect(second.status).toBe(3);
    const errors = listFiles(join(dir, 'quarantine')).filter((p) => p.endsWith('.error.json'));
    expect(JSON.parse(readFileSync(join(dir, 'quarantine', errors[0] ?? ''), 'utf8'))).toMatchObject({
      code: 'DUPLICATE_INPUT',
    });
    expect(readResults(dir)).toHaveLength(1);
  });

  it('quarantines a file broken below its head when the worker rejects it, with its line, and archives the rest', () => {
    const dir = makeWorkspace();
    const set = generateSet('late-bad-01', 7);
    const lines = (set.files[0]?.content ?? '').split('\n');
    expect(lines.length).toBeGreaterThan(120);
    lines[99] = (lines[99] ?? '').replace(/,[^,]*$/, ',12.5.3');
    for (const f of set.files)
      writeFileSync(join(dir, 'inbox', f.name), f.name.endsWith('_em.csv') ? lines.join('\n') : f.content);
    const run = runDriftlight(['process', join(dir, 'inbox'), '--config', join(dir, 'driftlight.yaml')]);
    expect(run.status).toBe(3);
    expect(run.stdout).toContain('1 rejected');
    expect(listFiles(join(dir, 'inbox'))).toEqual([]);
    const quarantined = listFiles(join(dir, 'quarantine'));
    expect(quarantined.map((p) => p.split('/')[1])).toEqual(['late-bad-01_em.csv', 'late-bad-01_em.csv.error.json']);
    const record = JSON.parse(readFileSync(join(dir, 'quarantine', quarantined[1] ?? ''), 'utf8')) as {
      code: string;
      line: number;
      hint: string;
      file: string;
      setId: string;
    };
    expect(record).toMatchObject({ code: 'NON_NUMERIC', line: 100, file: 'late-bad-01_em.csv' });
    expect(record.hint).not.toBe('');
    expect(record.setId).toMatch(/^late-bad-01-/);
    expect(
      listFiles(join(dir, 'archive'))
        .map((p) => p.split('/')[1])
        .sort(),
    ).toEqual(['late-bad-01_abs.csv', 'late-bad-01_decay.csv']);
    const results = readResults(dir);
    expect(results).toHaveLength(1);
    expect(results[0]?.result.partial).toBe(true);
    expect(results[0]?.result.missing.find((m) => m.what === 'emission')?.reason).toMatch(/^NON_NUMERIC/);
  });

  it('config check names the bad path and exits 2', () => {
    const dir = makeWorkspace('controls: [{ id: teal, sampleIdPattern: "^CTRL", targetYield: 2 }]');
    const run = runDriftlight(['config', 'check', '--config', join(dir, 'driftlight.yaml')]);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('controls[0].targetYield: expected a number between 0 and 1');
    const ok = runDriftlight(['config', 'check', '--config', join(makeWorkspace(), 'driftlight.yaml')]);
    expect(ok.status).toBe(0);
  });

  it('ships example files identical to the seeded generator output', () => {
    const day = generateDemoDay();
    for (const file of day.files) {
      const path = new URL(`../../examples/day/inbox/${file.name}`, import.meta.url);
      expect(existsSync(path), file.name).toBe(true);
      expect(readFileSync(path, 'utf8'), file.name).toBe(file.content);
    }
    expect(JSON.parse(readFileSync(new URL('../../examples/day/truth.json', import.meta.url), 'utf8'))).toEqual(
      day.truth,
    );
  });
});
