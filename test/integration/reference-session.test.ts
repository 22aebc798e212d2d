// Issue 16.4: a control waits for the reference of its own session. In `watch`, a control whose files
// land a second before its reference's must be paired with that reference, as `process` pairs them
// from one backlog; and a reference landing after the control was analysed (past its set deadline)
// re-analyses it, recorded in provenance, the newer result superseding the older. Real runWatch on an
// accelerated clock and real runBatch over the same invented files (test/integration/qc-replay-files.ts).
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import type { AnalysisResult } from '../../src/analysis/result.js';
import { readResultFiles } from '../../src/cli/demo-run.js';
import { runBatch } from '../../src/cli/process.js';
import { runWatch } from '../../src/cli/watch.js';
import type { Pipeline } from '../../src/pipeline/runtime.js';
import { createSeededRandom } from '../../src/decay/index.js';
import { openLedger } from '../../src/store/ledger.js';
import { observationHistory } from '../../src/store/qc-store.js';
import { tempDir } from '../helpers/temp-dir.js';
import { measuredFiles, REFERENCE_YIELD, replayTime, type ReplayFile } from './qc-replay-files.js';

const CONTROL_YIELD = 0.8;

/** The reference (07:50) and control (08:10) of day `day`, the lamp at `sensitivity` that day. */
function session(day: number, sensitivity: number, seed: number): { reference: ReplayFile[]; control: ReplayFile[] } {
  const random = createSeededRandom(seed);
  const stamp = replayTime(day, '00:00').slice(5, 10).replace('-', '');
  const ref = measuredFiles(
    {
      sampleId: `REF-R6G-${stamp}`,
      acquiredAt: replayTime(day, '07:50'),
      quantumYield: REFERENCE_YIELD,
      absorbance: 0.05,
      peakNm: 552,
      bandPeakNm: 528,
      sensitivity,
    },
    random,
  );
  const ctl = measuredFiles(
    {
      sampleId: `CTRL-teal-${stamp}`,
      acquiredAt: replayTime(day, '08:10'),
      quantumYield: CONTROL_YIELD,
      absorbance: 0.05,
      peakNm: 540,
      bandPeakNm: 516,
      sensitivity,
    },
    random,
  );
  return {
    reference: [
      { name: `REF-R6G-${stamp}_em.csv`, content: ref.em },
      { name: `REF-R6G-${stamp}_abs.jdx`, content: ref.abs },
    ],
    control: [
      { name: `CTRL-teal-${stamp}_em.csv`, content: ctl.em },
      { name: `CTRL-teal-${stamp}_abs.jdx`, content: ctl.abs },
    ],
  };
}

// Day 0: a reference only, with the lamp 15 % brighter (paired with it, a control's yield is ~13 % low).
// Day 1: the control lands at 08:20:00, its reference at 08:20:01. Day 2: the control lands at 08:20,
// its reference at 09:00, after the control's set deadline (10 min): analysed with day 1's, then again.
const day0 = session(0, 1.15, 11);
const day1 = session(1, 1.0, 12);
const day2 = session(2, 0.9, 13);
const deliveries: { at: string; files: ReplayFile[] }[] = [
  { at: replayTime(0, '08:00'), files: day0.reference },
  { at: replayTime(1, '08:20'), files: day1.control },
  { at: new Date(Date.parse(replayTime(1, '08:20')) + 1000).toISOString(), files: day1.reference },
  { at: replayTime(2, '08:20'), files: day2.control },
  { at: replayTime(2, '09:00'), files: day2.reference },
];

function configText(): string {
  return [
    'folders: { inbox: inbox, archive: archive, quarantine: quarantine, results: results, outbox: outbox, state: state }',
    'references:',
    '  - { id: r6g, sampleIdPattern: "^REF-R6G", standardId: rhodamine-6g-ethanol }',
    'controls:',
    '  - { id: teal, sampleIdPattern: "^CTRL-teal" }',
    'assembly: { requiredParts: [emission, absorbance], setTimeoutMs: 600000, pairingWindowHours: { blank: 0, reference: 72 } }',
    'watch: { stabilityWindowMs: 40, pollIntervalMs: 20 }',
    'logging: { level: info, stdout: off }',
    '',
  ].join('\n');
}

async function waitUntil(what: string, condition: () => boolean, timeoutMs = 20_000): Promise<void> {
  const start = Date.now();
  while (!condition()) {
    if (Date.now() - start > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

/** The control results by sample id (the newest file of each set). */
function controlResults(dir: string): Map<string, AnalysisResult> {
  return new Map(
    readResultFiles(join(dir, 'results'))
      .filter((r) => r.role === 'control')
      .map((r) => [r.sampleId, r]),
  );
}

async function throughWatch(dir: string): Promise<Map<string, AnalysisResult>> {
  for (const folder of ['inbox', 'results']) mkdirSync(join(dir, folder), { recursive: true });
  writeFileSync(join(dir, 'driftlight.yaml'), configText());
  let nowMs = Date.parse(replayTime(0, '07:00'));
  let stopWatch: (signal: string) => void = () => undefined;
  const stop = new Promise<string>((resolve) => (stopWatch = resolve));
  let onReady: (pipeline: Pipeline) => void = () => undefined;
  const ready = new Promise<Pipeline>((resolve) => (onReady = resolve));
  const done = runWatch({ config: join(dir, 'driftlight.yaml') }, stop, {
    clock: () => new Date(nowMs),
    clockCheckIntervalMs: 20,
    tickIntervalMs: 20,
    onReady,
  });
  const { coordinator } = await Promise.race([
    ready,
    done.then((): never => {
      throw new Error('watch ended before it was ready');
    }),
  ]);
  let written = 0;
  const settled = async (what: string): Promise<void> => {
    await waitUntil(
      `intake of ${what}`,
      () => coordinator.counts.filesAccepted + coordinator.counts.filesRejected >= written,
    );
    await new Promise((r) => setTimeout(r, 100)); // a few ticks (every 20 ms)
    await waitUntil(`analyses of ${what}`, () => coordinator.pendingJobs === 0);
  };
  try {
    for (const delivery of deliveries) {
      // Between deliveries the clock runs on to just before the next one (deadlines of waiting sets pass).
      nowMs = Date.parse(delivery.at) - 1000;
      await settled(`the time before ${delivery.at}`);
      nowMs = Date.parse(delivery.at);
      for (const file of delivery.files) writeFileSync(join(dir, 'inbox', file.name), file.content);
      written += delivery.files.length;
      await settled(delivery.at);
    }
    nowMs = Date.parse(replayTime(2, '23:00'));
    await waitUntil('every set', () => coordinator.openSetCount === 0 && coordinator.pendingJobs === 0);
  } finally {
    stopWatch('test finished');
    await done;
  }
  return controlResults(dir);
}

async function throughProcess(dir: string): Promise<Map<string, AnalysisResult>> {
  const backlog = join(dir, 'backlog');
  mkdirSync(backlog, { recursive: true });
  for (const delivery of deliveries)
    for (const file of delivery.files) writeFileSync(join(backlog, file.name), file.content);
  writeFileSync(join(dir, 'driftlight.yaml'), configText());
  await runBatch(
    [backlog],
    { config: join(dir, 'driftlight.yaml') },
    new Writable({ write: (_c, _e, callback) => callback() }),
  );
  return controlResults(dir);
}

describe('a control waits for the reference of its session (issue 16.4)', () => {
  it('gives the same yield in watch as in process when the control lands a second before its reference, or after its deadline', async () => {
    const watchDir = tempDir('dl-session-watch-');
    const watched = await throughWatch(watchDir);
    const processed = await throughProcess(tempDir('dl-session-process-'));
    expect([...processed.keys()].sort()).toEqual(['CTRL-teal-0303', 'CTRL-teal-0304']);
    for (const [sampleId, expected] of processed) {
      const got = watched.get(sampleId);
      // Same inputs, same reference: the same number (not merely close).
      expect(got?.quantumYield?.value, sampleId).toBe(expected.quantumYield?.value);
      // The same reference measurement (set ids end in the hash of whichever file came first, so compare the sample id).
      const referenceOf = (result: AnalysisResult | undefined): string | undefined =>
        result?.provenance.inputs
          .find((input) => input.part === 'reference-emission')
          ?.pairedFromSetId?.replace(/-[0-9a-f]{12}$/, '');
      expect(referenceOf(got), sampleId).toBe(referenceOf(expected));
      expect(referenceOf(got), sampleId).toBe(sampleId.replace('CTRL-teal', 'REF-R6G'));
    }
    // The day-2 control was analysed at its deadline with day 1's reference, then again when its own
    // arrived: the newer result says so and names what it superseded.
    const redone = watched.get('CTRL-teal-0304');
    expect(redone?.provenance.reanalysis?.reason).toBe('reference-arrived');
    expect(redone?.provenance.reanalysis?.referenceSetId).toMatch(/^REF-R6G-0304-/);
    expect(redone?.provenance.reanalysis?.supersedes.referenceSetId).toMatch(/^REF-R6G-0303-/);
    expect(redone?.provenance.reanalysis?.supersedes.quantumYield).not.toBe(redone?.quantumYield?.value);
    expect(watched.get('CTRL-teal-0303')?.provenance.reanalysis).toBeUndefined();
    // QC judges the newer result: the ledger's observation carries the re-analysed yield.
    const ledger = openLedger(join(watchDir, 'state'));
    try {
      const observed = observationHistory(ledger).filter((o) => o.acquiredAt === replayTime(2, '08:10'));
      expect(observed.map((o) => o.metrics.controlQuantumYield)).toEqual([redone?.quantumYield?.value]);
    } finally {
      ledger.close();
    }
  }, 120_000);
});
