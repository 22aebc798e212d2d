// Issue 17.3 through the pipeline: `driftlight process` on decay sets writes, in the result file, how the
// lifetime's standard errors were formed (`decayFit.errorNotes`) and the IRF-noise part of each τ error
// (`tauNsStdErrFromIrf`), schema-valid, equal to what the fit itself computes on the same file.
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv } from 'ajv';
import { afterAll, describe, expect, it } from 'vitest';
import { createDecay } from '../../src/model/decay.js';
import { fitDecay } from '../../src/decay/index.js';
import { readData, writeDecayCsv } from '../../src/formats/index.js';
import { decayHistogram } from '../../src/demo/synthetic.js';
import { createSeededRandom } from '../../src/decay/index.js';
import { runDriftlight } from '../helpers/cli.js';
import { makeWorkspace, readResults, removeWorkspaces } from './pipeline-helpers.js';

const schema = JSON.parse(readFileSync(new URL('../../schemas/result.schema.json', import.meta.url), 'utf8')) as object;
const ajv = new Ajv({ allErrors: true, strict: false });
const validate = ajv.compile(schema);

interface DecayFitInFile {
  components: { tauNs: number; tauNsStdErr?: number; tauNsStdErrFromIrf?: number }[];
  errorNotes: string[];
}

/** Runs `process` on one decay file and returns its result's decayFit. */
function processDecay(name: string, content: string): { decayFit: DecayFitInFile; result: unknown } {
  const dir = makeWorkspace('', { requiredParts: 'decay' });
  writeFileSync(join(dir, 'inbox', name), content);
  const run = runDriftlight(['process', join(dir, 'inbox'), '--config', join(dir, 'driftlight.yaml')]);
  expect(run.status, run.stderr).toBe(0);
  const results = readResults(dir);
  expect(results).toHaveLength(1);
  const result = results[0]?.result as unknown as { decayFit: DecayFitInFile };
  return { decayFit: result.decayFit, result };
}

describe('decay error notes in the result file (issue 17.3)', () => {
  afterAll(() => removeWorkspaces());

  it("writes errorNotes and the IRF-noise part of τ's error for an IRF of whole counts", () => {
    const decay = decayHistogram(
      { tauNs: [3.1], photons: 50_000, channels: 256, channelWidthNs: 0.1 },
      { sampleId: 'errnotes-01', acquiredAt: '2026-03-14T10:05:00Z' },
      createSeededRandom(1701),
    );
    const content = writeDecayCsv(decay);
    const { decayFit, result } = processDecay('errnotes-01_decay.csv', content);
    expect(validate(result), ajv.errorsText(validate.errors)).toBe(true);
    // The reference: the fit engine run in-process on the same file's contents, default options as the pipeline's.
    const parsed = readData(new TextEncoder().encode(content), { fileName: 'errnotes-01_decay.csv' });
    if (parsed.type !== 'decay' || parsed.decay.irfCounts === undefined)
      throw new Error('the written file should read back as a decay with its IRF');
    const direct = fitDecay(parsed.decay, { irfCounts: parsed.decay.irfCounts });
    expect(decayFit.errorNotes).toEqual(direct.errorNotes);
    expect(decayFit.errorNotes.some((n) => n.includes("the IRF's counting noise") && n.includes('propagated'))).toBe(
      true,
    );
    const component = decayFit.components[0];
    const directComponent = direct.components[0];
    expect(component?.tauNsStdErrFromIrf).toBeGreaterThan(0);
    expect(component?.tauNsStdErrFromIrf).toBeCloseTo(directComponent?.tauNsStdErrFromIrf ?? Number.NaN, 12);
    // Added in quadrature: the IRF part never exceeds the whole standard error.
    expect(component?.tauNsStdErrFromIrf ?? Infinity).toBeLessThan(component?.tauNsStdErr ?? 0);
  });

  it('says why the IRF noise is not propagated for a normalised IRF, and leaves tauNsStdErrFromIrf out', () => {
    const counted = decayHistogram(
      { tauNs: [3.1], photons: 50_000, channels: 256, channelWidthNs: 0.1 },
      { sampleId: 'errnotes-02', acquiredAt: '2026-03-14T10:05:00Z' },
      createSeededRandom(1702),
    );
    const peak = Math.max(...(counted.irfCounts ?? [1]));
    const normalised = createDecay({
      timeNs: counted.timeNs,
      counts: counted.counts,
      channelWidthNs: counted.channelWidthNs,
      irfCounts: Float64Array.from(counted.irfCounts ?? [], (v) => v / peak),
      metadata: counted.metadata,
    });
    const { decayFit, result } = processDecay('errnotes-02_decay.csv', writeDecayCsv(normalised));
    expect(validate(result), ajv.errorsText(validate.errors)).toBe(true);
    expect(decayFit.errorNotes.some((n) => n.includes('not whole counts') && n.includes('not propagated'))).toBe(true);
    expect(decayFit.components[0]?.tauNsStdErr).toBeGreaterThan(0);
    expect(decayFit.components[0]?.tauNsStdErrFromIrf).toBeUndefined();
  });
});
