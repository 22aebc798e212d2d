// Issue 18.3 through the pipeline: `driftlight process` on a file holding several measurements writes one
// schema-valid result per measurement (the set's own id, then setId.column), each naming its column; the file
// itself is archived once and the set counts as one.
import { copyFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv } from 'ajv';
import { afterAll, describe, expect, it } from 'vitest';
import { runDriftlight } from '../helpers/cli.js';
import { listFiles, makeWorkspace, readResults, removeWorkspaces } from './pipeline-helpers.js';

const schema = JSON.parse(readFileSync(new URL('../../schemas/result.schema.json', import.meta.url), 'utf8')) as object;
const ajv = new Ajv({ allErrors: true, strict: false });
const validate = ajv.compile(schema);
const fixture = (name: string): string => new URL(`../fixtures/formats/layouts/${name}`, import.meta.url).pathname;

describe('process: one file, several measurements (issue 18.3)', () => {
  afterAll(() => removeWorkspaces());

  it('gives each decay column a result of its own, named by its column, and archives the file once', () => {
    const dir = makeWorkspace('', { requiredParts: 'decay' });
    copyFileSync(fixture('decay_two_wavelengths.csv'), join(dir, 'inbox', 'dye7_decay.csv'));
    const run = runDriftlight(['process', join(dir, 'inbox'), '--config', join(dir, 'driftlight.yaml')]);
    expect(run.status, run.stderr).toBe(0);
    const results = readResults(dir).map(
      (r) =>
        r.result as unknown as {
          setId: string;
          measurement?: { id: string; column: string; setId?: string };
          decayFit?: { tauMeanIntensityNs: number };
        },
    );
    expect(results).toHaveLength(2);
    for (const result of results) expect(validate(result), ajv.errorsText(validate.errors)).toBe(true);
    const [first, second] = [...results].sort((a, b) => a.setId.length - b.setId.length);
    expect(first?.measurement?.id).toBe('dye7_decay.csv#em 450 nm');
    expect(second?.measurement?.id).toBe('dye7_decay.csv#em 520 nm');
    expect(second?.setId).toBe(`${first?.setId ?? ''}.em-520-nm`);
    expect(second?.measurement?.setId).toBe(first?.setId);
    // make_layouts.py: τ = 2.0 ns and 4.0 ns.
    expect(Math.abs((first?.decayFit?.tauMeanIntensityNs ?? 0) / 2 - 1)).toBeLessThan(0.05);
    expect(Math.abs((second?.decayFit?.tauMeanIntensityNs ?? 0) / 4 - 1)).toBeLessThan(0.05);
    expect(listFiles(join(dir, 'archive'))).toHaveLength(1);
    expect(listFiles(join(dir, 'outbox')).filter((p) => p.endsWith('.decay.fit.csv'))).toHaveLength(2);
    const status = runDriftlight(['status', '--config', join(dir, 'driftlight.yaml')]);
    expect(status.stdout).toContain('done 1');
  });

  it('gives each of three x,y pairs of emission spectra a result of its own', () => {
    const dir = makeWorkspace('', { requiredParts: 'emission' });
    copyFileSync(fixture('emission_xy_pairs_tab.txt'), join(dir, 'inbox', 'trio_em.txt'));
    const run = runDriftlight(['process', join(dir, 'inbox'), '--config', join(dir, 'driftlight.yaml')]);
    expect(run.status, run.stderr).toBe(0);
    const results = readResults(dir).map(
      (r) =>
        r.result as unknown as {
          measurement?: { column: string };
          spectra: { emission?: { peakWavelengthNm: number } };
        },
    );
    for (const result of results) expect(validate(result), ajv.errorsText(validate.errors)).toBe(true);
    // make_layouts.py: bands centred at 440, 470 and 480 nm.
    expect(
      results.map((r) => [r.measurement?.column, Math.round(r.spectra.emission?.peakWavelengthNm ?? 0)]).sort(),
    ).toEqual([
      ['sampleA', 440],
      ['sampleB', 470],
      ['sampleC', 480],
    ]);
  });
});
