// JobDispatcher: ready sets are marked queued and enqueued while in-flight slots are free; the rest
// wait in line and go out as slots are released (back-pressure). A recording queue stands in for
// the workers; real files, a real ledger. The capacity (16 per worker) is the project's own setting.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import type { AnalysisJobPayload, AnalysisOutput } from '../../../src/analysis/payload.js';
import { resolveConfig } from '../../../src/config/resolve.js';
import { ContentCache } from '../../../src/pipeline/content-cache.js';
import { dispatchSettingsFrom, JobDispatcher, MAX_IN_FLIGHT_PER_WORKER } from '../../../src/pipeline/job-dispatcher.js';
import { RunReport } from '../../../src/pipeline/run-report.js';
import { assemblyRulesFrom, SetAssembly } from '../../../src/pipeline/set-assembly.js';
import type { JobQueue } from '../../../src/queue/job-queue.js';
import { openLedger, type Ledger } from '../../../src/store/ledger.js';
import { getSet } from '../../../src/store/sets.js';
import { generateSet } from '../../integration/pipeline-helpers.js';
import { tempDir } from '../../helpers/temp-dir.js';

const ledgers: Ledger[] = [];
afterEach(() => {
  for (const ledger of ledgers.splice(0)) ledger.close();
});

function setup(sets: number): {
  dispatcher: JobDispatcher;
  assembly: SetAssembly;
  ledger: Ledger;
  enqueued: string[];
  report: RunReport;
  now: Date;
} {
  const dir = tempDir('dl-dispatcher-');
  const config = resolveConfig(
    { assembly: { setTimeoutMs: 600_000 }, queue: { concurrency: 1 }, logging: { level: 'silent', stdout: 'off' } },
    { baseDir: dir },
  );
  mkdirSync(config.folders.inbox, { recursive: true });
  const ledger = openLedger(config.folders.state);
  ledgers.push(ledger);
  const enqueued: string[] = [];
  const queue: JobQueue<AnalysisJobPayload, AnalysisOutput> = {
    enqueue: async (id) => {
      enqueued.push(id);
    },
    onOutcome: () => undefined,
    stats: async () => ({ waiting: 0, active: 0, completed: 0, failed: 0 }),
    drain: async () => undefined,
    close: async () => undefined,
  };
  const logger = pino({ level: 'silent' });
  const report = new RunReport();
  const contents = new ContentCache();
  const rules = assemblyRulesFrom(config);
  const assembly = new SetAssembly({ config, ledger, logger, rules, contents, report });
  const now = new Date('2026-03-14T12:00:00Z');
  const paths: string[] = [];
  for (let i = 0; i < sets; i += 1) {
    for (const f of generateSet(`disp-${String(i).padStart(2, '0')}`, 50 + i).files) {
      const path = join(config.folders.inbox, f.name);
      writeFileSync(path, f.content);
      paths.push(path);
    }
  }
  assembly.intakeChunk(paths, now);
  const dispatcher = new JobDispatcher({
    config,
    ledger,
    queue,
    logger,
    clock: () => now,
    softwareVersion: 'test',
    settings: dispatchSettingsFrom(config, rules),
    openSets: assembly,
    contents,
    report,
  });
  return { dispatcher, assembly, ledger, enqueued, report, now };
}

describe('JobDispatcher', () => {
  it('holds sets back in batch mode until forced', async () => {
    const { dispatcher, assembly, enqueued, now } = setup(2);
    dispatcher.holdDispatch = true;
    await dispatcher.dispatchReady(assembly.inDispatchOrder(), now);
    expect(enqueued).toEqual([]);
    await dispatcher.dispatchReady(assembly.inDispatchOrder(), now, true);
    expect(enqueued).toHaveLength(2);
    expect(assembly.size).toBe(0);
  });

  it('dispatches at most the in-flight capacity; the rest wait and go out, oldest first, as slots are released', async () => {
    const capacity = MAX_IN_FLIGHT_PER_WORKER; // queue.concurrency 1
    const { dispatcher, assembly, ledger, enqueued, report, now } = setup(capacity + 3);
    const order = assembly.inDispatchOrder().map((s) => s.id);
    await dispatcher.dispatchReady(assembly.inDispatchOrder(), now, true);
    expect(enqueued).toEqual(order.slice(0, capacity));
    expect(dispatcher.inFlight).toBe(capacity);
    expect(dispatcher.waiting).toBe(3);
    expect(getSet(ledger, order[capacity] ?? '')?.state).toBe('open');
    dispatcher.release(order[0] ?? '');
    dispatcher.release(order[1] ?? '');
    await dispatcher.dispatchWaiting();
    expect(enqueued).toEqual(order.slice(0, capacity + 2));
    expect(dispatcher.waiting).toBe(1);
    expect(getSet(ledger, order[capacity] ?? '')?.state).toBe('queued');
    expect(report.counts.setsDispatched).toBe(capacity + 2);
  });

  it('whenNoneInFlight() resolves once the last slot is released', async () => {
    const { dispatcher, assembly, enqueued, now } = setup(2);
    await dispatcher.dispatchReady(assembly.inDispatchOrder(), now, true);
    let idle = false;
    const waiting = dispatcher.whenNoneInFlight().then(() => {
      idle = true;
    });
    dispatcher.release(enqueued[0] ?? '');
    await Promise.resolve();
    expect(idle).toBe(false);
    dispatcher.release(enqueued[1] ?? '');
    await waiting;
    expect(idle).toBe(true);
  });
});
