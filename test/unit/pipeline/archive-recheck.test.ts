// Issue 20 item 3, the archive re-check: a writer that holds an input open and resumes after the
// commit's check of the inputs but before the archive move (the file moves grown) must still be
// caught: the re-check compares the archived copy with what the ledger says was analysed, not with
// the copy right after its move. And a file listed for the re-check stays listed across a restart.
import { appendFileSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { openPipeline, type Pipeline } from '../../../src/pipeline/runtime.js';
import { defaultResultStages } from '../../../src/pipeline/stage-table.js';
import type { ResultStage } from '../../../src/pipeline/result-stage.js';
import { generateSet, waitFor } from '../../integration/pipeline-helpers.js';

const sha256 = (text: string): string => createHash('sha256').update(text).digest('hex');
const opened: { pipeline: Pipeline; dir: string }[] = [];

afterEach(async () => {
  for (const { pipeline, dir } of opened.splice(0)) {
    await pipeline.close();
    rmSync(dir, { recursive: true, force: true });
  }
});

function decayResults(dir: string, sampleId: string): { decay: string | undefined; superseded: string[] }[] {
  const root = join(dir, 'results');
  return readdirSync(root, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && e.name.endsWith('.json'))
    .map(
      (e) =>
        JSON.parse(readFileSync(join(e.parentPath, e.name), 'utf8')) as {
          sampleId: string;
          provenance: { inputs: { part: string; sha256: string }[]; supersededInputs?: { sha256: string }[] };
        },
    )
    .filter((r) => r.sampleId === sampleId)
    .map((r) => ({
      decay: r.provenance.inputs.find((i) => i.part === 'decay')?.sha256,
      superseded: (r.provenance.supersededInputs ?? []).map((s) => s.sha256),
    }));
}

describe('archive re-check', () => {
  it('catches a file that grew between the commit check and its archive move', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'dl-arc-'));
    const config = resolveConfig(
      {
        watch: { stabilityWindowMs: 100, pollIntervalMs: 20 },
        assembly: { setTimeoutMs: 600_000 },
        queue: { concurrency: 1 },
        logging: { level: 'warn', stdout: 'off' },
      },
      { baseDir: dir },
    );
    mkdirSync(config.folders.inbox, { recursive: true });
    const set = generateSet('race-1', 91);
    const decay = set.files.find((f) => f.name.includes('decay'));
    if (decay === undefined) throw new Error('no decay file');
    const cut = decay.content.lastIndexOf('\n', Math.floor(decay.content.length * 0.6)) + 1;
    const decayPath = join(config.folders.inbox, decay.name);
    let resumed = false;
    // Runs after the commit's check of the inputs and before the archive move: the writer resumes then.
    const resume: ResultStage = {
      name: 'writer-resumes',
      apply(result) {
        if (!resumed) {
          resumed = true;
          appendFileSync(decayPath, decay.content.slice(cut));
        }
        return result;
      },
    };
    const logger = pino({ level: 'silent' });
    const pipeline = openPipeline(config, {
      softwareVersion: 'test',
      logger,
      stages: [...defaultResultStages(config, logger), resume],
    });
    opened.push({ pipeline, dir });
    await pipeline.coordinator.recover();
    const paths = set.files.map((f) => {
      const path = join(config.folders.inbox, f.name);
      writeFileSync(path, f === decay ? decay.content.slice(0, cut) : f.content);
      return path;
    });
    await pipeline.coordinator.intakeMany(paths);
    await pipeline.coordinator.drain();
    expect(resumed).toBe(true);
    // The first result was committed from the first part while the archived copy is already whole.
    expect(decayResults(dir, 'race-1')).toEqual([{ decay: sha256(decay.content.slice(0, cut)), superseded: [] }]);
    await waitFor(
      'the result from the whole file',
      () => decayResults(dir, 'race-1')[0]?.decay === sha256(decay.content),
      20_000,
      50,
    ).catch(() => undefined);
    await pipeline.coordinator.drain();
    expect(decayResults(dir, 'race-1')).toEqual([
      { decay: sha256(decay.content), superseded: [sha256(decay.content.slice(0, cut))] },
    ]);
  }, 60_000);
});
