// Pipeline benchmark (JSON lines): throughput and latency (file stable → result written) for 1,000
// sets of emission + absorbance + decay + IRF through the embedded default (watcher, in-process
// worker-thread pool, SQLite ledger); bare analyze() throughput for the ratio; and a 10,000-file
// backlog present at start-up with peak RSS. The measured burst runs through a pipeline warmed by
// an earlier burst of as many sets (reported as the cold figures), as bare analyze() is JIT-warmed;
// bare analyze() is measured in rounds just before and just after the measured burst. Run: `npm run build && node dist/bench/pipeline.js`
// (options: --sets N, --backlog-files N, --skip-backlog, --skip-tcspc, --keep-workspaces,
// --backlog-only [--backlog-dir DIR]). Workspaces are removed after each scenario unless kept.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyze } from '../src/analysis/analyze.js';
import { resolveConfig } from '../src/config/resolve.js';
import {
  absorbanceSpectrum,
  decayHistogram,
  emissionIntegralFor,
  emissionSpectrum,
  irfAsDecay,
  withoutIrf,
} from '../src/demo/synthetic.js';
import { createSeededRandom } from '../src/decay/index.js';
import { writeDecayCsv, writeSpectrumCsv } from '../src/formats/index.js';
import { fsyncDirectoryAsync, writeFileAtomic, writeFileAtomicAsync } from '../src/output/atomic-write.js';
import { uniqueTarget } from '../src/output/dated-path.js';
import { createLogger } from '../src/output/logger.js';
import { moveFile } from '../src/output/move-file.js';
import { buildPayload } from '../src/pipeline/dispatch.js';
import { batchStableFiles } from '../src/pipeline/intake-batcher.js';
import { ANALYZE_PROCESSOR_URL, openPipeline, type Pipeline } from '../src/pipeline/runtime.js';
import { MAX_JOBS_PER_TASK } from '../src/queue/in-process.js';
import { createTaskPool } from '../src/queue/task-pool.js';
import { watchInbox } from '../src/pipeline/watcher.js';
import { softwareVersion } from '../src/cli/version.js';

const args = process.argv.slice(2);
const argValue = (name: string, fallback: number): number => {
  const i = args.indexOf(name);
  return i >= 0 ? Number(args[i + 1]) : fallback;
};
const SETS = argValue('--sets', 1000);
const BACKLOG_FILES = argValue('--backlog-files', 10_000);
const STABILITY_MS = 200;
/** Rounds of the bare analyze() measurement on each side of the measured burst (the mean of all is the baseline). */
const BARE_ROUNDS = 3;
/**
 * Sets run through a fresh pipeline before the measured burst (reported as the cold burst), so the
 * measured burst compares a warmed pipeline with the JIT-warmed bare analyze(): a pipeline runs for
 * months, and its worker threads compile the analysis during their first few hundred sets.
 */
const WARMUP_BURST_SETS = 1000;
/** Sets sent before the latency measurement while the worker threads warm up (reported as the cold start). */
const WARMUP_SETS = 20;

/** CPU used so far: the whole process, and the main thread alone where Linux tells (/proc/self/task/PID/stat, clock ticks of 10 ms). */
function cpuNow(): { processMs: number; mainThreadMs: number | undefined } {
  const usage = process.cpuUsage();
  let mainThreadMs: number | undefined;
  try {
    const stat = readFileSync(`/proc/self/task/${process.pid}/stat`, 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    mainThreadMs = (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    mainThreadMs = undefined;
  }
  return { processMs: (usage.user + usage.system) / 1000, mainThreadMs };
}

function cpuSince(start: ReturnType<typeof cpuNow>): { processMs: number; mainThreadMs: number | undefined } {
  const end = cpuNow();
  return {
    processMs: end.processMs - start.processMs,
    mainThreadMs:
      end.mainThreadMs === undefined || start.mainThreadMs === undefined
        ? undefined
        : end.mainThreadMs - start.mainThreadMs,
  };
}

function emit(record: Record<string, unknown>): void {
  process.stdout.write(`${JSON.stringify({ bench: 'pipeline', ...record })}\n`);
}

/** Decay shapes of the burst scenarios: the main one (256 channels of 100 ps, 5·10^4 photons) and a TCSPC-typical one (4096 channels of 6.25 ps over the same 25.6 ns, 2·10^5 photons). */
const DECAY_SHAPES = {
  small: { channels: 256, channelWidthNs: 0.1, photons: 50_000 },
  tcspc: { channels: 4096, channelWidthNs: 0.00625, photons: 200_000 },
} as const;
type DecayShape = keyof typeof DECAY_SHAPES;
/** Sets in the TCSPC-typical burst (its fits are several times dearer). */
const TCSPC_SETS = 300;

/** Four files of one set (emission, absorbance, decay without IRF, separate IRF). */
function setFiles(sampleId: string, seed: number, shape: DecayShape = 'small'): { name: string; content: string }[] {
  const random = createSeededRandom(seed);
  const a = 0.03 + (seed % 10) * 0.001;
  const meta = { sampleId, acquiredAt: '2026-03-14T10:00:00Z' };
  const em = emissionSpectrum(
    { peakNm: 540, widthNm: 40, integral: emissionIntegralFor(0.5, a, 1.3618), stepNm: 2 },
    { ...meta, excitationNm: 480, solvent: 'ethanol' },
    random,
  );
  const abs = absorbanceSpectrum(
    { bandPeakNm: 515, bandWidthNm: 55, excitationNm: 480, absorbanceAtExcitation: a, fromNm: 400, toNm: 740 },
    meta,
    random,
  );
  const decay = decayHistogram({ tauNs: [2 + (seed % 7) * 0.3], ...DECAY_SHAPES[shape] }, meta, random);
  return [
    { name: `${sampleId}_em.csv`, content: writeSpectrumCsv(em) },
    { name: `${sampleId}_abs.csv`, content: writeSpectrumCsv(abs) },
    { name: `${sampleId}_decay.csv`, content: writeDecayCsv(withoutIrf(decay)) },
    {
      name: `${sampleId}_irf.csv`,
      content: writeDecayCsv(
        irfAsDecay(decay, { acquiredAt: new Date(Date.parse(meta.acquiredAt) - (seed % 3600) * 1000).toISOString() }),
      ),
    },
  ];
}

/** Workspaces to remove when the bench ends. */
const workspacesToRemove: string[] = [];

/**
 * Removes a bench workspace (results, archive, ledger) when the bench ends, unless --keep-workspaces
 * was given. Not at once: on an ext4 file system without a journal (this bench machine), the kernel
 * skips inodes freed in the last 60–360 s when it allocates new ones, scanning past each of them, so
 * thousands of files deleted just before a scenario made its file creation several times dearer.
 */
function removeWorkspace(dir: string): void {
  if (!args.includes('--keep-workspaces')) workspacesToRemove.push(dir);
}

function removeWorkspacesNow(): void {
  for (const dir of workspacesToRemove.splice(0)) rmSync(dir, { recursive: true, force: true });
}

/** Mean time to create (open, write 100 bytes, close) one new file in a new folder of the OS temp dir, in µs: how dear file creation is on this machine right now. */
function fileCreationProbeUs(files = 2000): number {
  const dir = mkdtempSync(join(tmpdir(), 'dl-bench-probe-'));
  const content = 'x'.repeat(100);
  const t0 = performance.now();
  for (let i = 0; i < files; i++) writeFileSync(join(dir, `p${i}`), content);
  const us = ((performance.now() - t0) * 1000) / files;
  removeWorkspace(dir);
  return us;
}

/** A bench workspace (new, or the existing folder `existing`) and its config. */
function workspace(existing?: string): { dir: string; config: ReturnType<typeof resolveConfig> } {
  const dir = existing ?? mkdtempSync(join(tmpdir(), 'dl-bench-'));
  mkdirSync(join(dir, 'inbox'), { recursive: true });
  const config = resolveConfig(
    {
      watch: { stabilityWindowMs: STABILITY_MS, pollIntervalMs: 50 },
      assembly: { setTimeoutMs: 600_000 },
      logging: { level: 'warn', stdout: 'off' },
    },
    { baseDir: dir },
  );
  return { dir, config };
}

async function startWatching(pipeline: Pipeline): Promise<() => Promise<void>> {
  let chain: Promise<void> = Promise.resolve();
  const serial = (work: () => Promise<void>): void => {
    chain = chain.then(work);
  };
  const watcher = watchInbox(pipeline.config.folders.inbox, pipeline.config.watch, {
    onFile: batchStableFiles(serial, (paths) => pipeline.coordinator.intakeMany(paths)),
  });
  return async () => {
    await watcher.close();
    await chain;
  };
}

function waitForDone(pipeline: Pipeline, sets: number): Promise<void> {
  return new Promise((resolve) => {
    const check = (): void => {
      const row = pipeline.ledger.database.prepare(`SELECT COUNT(*) AS n FROM sets WHERE state = 'done'`).get() as {
        n: number;
      };
      if (row.n >= sets) resolve();
      else setTimeout(check, 50);
    };
    check();
  });
}

/** Latency (last file stable → result written) of every done set whose sample id starts with `prefix`, sorted. */
function latencies(pipeline: Pipeline, prefix: string): number[] {
  const rows = pipeline.ledger.database
    .prepare(
      `SELECT s.done_at AS doneAt, MAX(f.first_seen_at) AS lastSeen FROM sets s JOIN files f ON f.set_id = s.id WHERE s.state = 'done' AND s.sample_id LIKE ? GROUP BY s.id`,
    )
    .all(`${prefix}%`) as { doneAt: string; lastSeen: string }[];
  return rows.map((r) => Date.parse(r.doneAt) - Date.parse(r.lastSeen)).sort((a, b) => a - b);
}

/**
 * Writes `files` into the inbox in one go and waits until their sets are done (`doneBefore` sets
 * were done already); returns sets per second from the first of them seen to the last result, and
 * the CPU used after the writes (this process writes the files; that is not the pipeline's cost).
 */
async function timedBurst(
  pipeline: Pipeline,
  files: readonly { name: string; content: string }[][],
  prefix: string,
  doneBefore: number,
): Promise<{ setsPerS: number; wallMs: number; firstStableToLastResultMs: number; cpu: ReturnType<typeof cpuSince> }> {
  const t0 = Date.now();
  for (const set of files) for (const f of set) writeFileSync(join(pipeline.config.folders.inbox, f.name), f.content);
  // The writes block the event loop, so the watcher has not reported anything yet.
  const cpu0 = cpuNow();
  await waitForDone(pipeline, doneBefore + files.length);
  const cpu = cpuSince(cpu0);
  const firstSeen = Date.parse(
    (
      pipeline.ledger.database
        .prepare('SELECT MIN(first_seen_at) AS t FROM files WHERE name LIKE ?')
        .get(`${prefix}%`) as { t: string }
    ).t,
  );
  const lastDone = Date.parse(
    (
      pipeline.ledger.database
        .prepare('SELECT MAX(done_at) AS t FROM sets WHERE sample_id LIKE ?')
        .get(`${prefix}%`) as { t: string }
    ).t,
  );
  return {
    setsPerS: files.length / ((lastDone - firstSeen) / 1000),
    wallMs: Date.now() - t0,
    firstStableToLastResultMs: lastDone - firstSeen,
    cpu,
  };
}

const quantile = (sorted: readonly number[], q: number): number =>
  sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] ?? Number.NaN;

/**
 * One burst of `sets` sets with decays of `shape` (throughput), then its baselines: bare analyze()
 * on one thread and the same payloads through the worker pool alone; with `floor`, the file-work
 * floor too. Returns the pipeline's sets per second and the files it used.
 */
async function burstWithBaselines(
  shape: DecayShape,
  sets: number,
  floor: boolean,
): Promise<{ setsPerS: number; files: { name: string; content: string }[][] }> {
  const burst = workspace();
  const logger = createLogger(burst.config.logging, burst.config.logFile);
  const files = Array.from({ length: sets }, (_u, i) => setFiles(`bench-${String(i).padStart(5, '0')}`, i + 1, shape));
  // Warm-up sets: seeds after the measured ones, so no IRF repeats one of theirs (acquisition offsets are seed mod 3600 s).
  const warmupSets = Math.min(sets, WARMUP_BURST_SETS);
  const warmupFiles = Array.from({ length: warmupSets }, (_u, i) =>
    setFiles(`warm-${String(i).padStart(5, '0')}`, sets + i + 1, shape),
  );
  const fsCreateUsPerFile = fileCreationProbeUs();
  const pipeline = openPipeline(burst.config, { softwareVersion: softwareVersion(), logger });
  const stop = await startWatching(pipeline);
  const cold = await timedBurst(pipeline, warmupFiles, 'warm-', 0);

  // Bare analyze(): payloads of the same shape (the warm-up sets), one thread, no I/O; JIT warmed
  // first, then BARE_ROUNDS rounds before the measured burst and BARE_ROUNDS after it. The ratio
  // uses the mean of all of them: this shared machine's speed drifts by ±25 % within minutes, and
  // rounds on one side of the burst only would carry that drift into the ratio.
  const setIds = (
    pipeline.ledger.database
      .prepare(`SELECT id FROM sets WHERE sample_id LIKE 'warm-%' ORDER BY id LIMIT 250`)
      .all() as { id: string }[]
  ).map((r) => r.id);
  const rules = {
    fileNamePatterns: [],
    referencePatterns: [],
    controlPatterns: [],
    requiredParts: burst.config.assembly.requiredParts,
    referenceRequiredParts: burst.config.assembly.referenceRequiredParts,
    setTimeoutMs: 0,
  };
  const payloads = setIds.map((id) =>
    buildPayload(
      {
        ledger: pipeline.ledger,
        config: burst.config,
        configHash: '0'.repeat(64),
        softwareVersion: softwareVersion(),
        rules,
        now: new Date(),
      },
      id,
    ),
  );
  for (const payload of payloads.slice(0, 50)) analyze(payload);
  const measured = payloads.slice(50);
  const bareRounds = (): number[] =>
    Array.from({ length: BARE_ROUNDS }, () => {
      const b0 = performance.now();
      for (const payload of measured) analyze(payload);
      return measured.length / ((performance.now() - b0) / 1000);
    });
  const roundsBefore = bareRounds();
  const warm = await timedBurst(pipeline, files, 'bench-', warmupSets);
  const roundsAfter = bareRounds();
  const pipelineSetsPerS = warm.setsPerS;
  const decay = { decayChannels: DECAY_SHAPES[shape].channels };
  emit({
    scenario: 'burst',
    ...decay,
    sets,
    files: sets * 4,
    concurrency: burst.config.queue.concurrency,
    wallMs: warm.wallMs,
    firstStableToLastResultMs: warm.firstStableToLastResultMs,
    setsPerS: Number(pipelineSetsPerS.toFixed(2)),
    processCpuMsPerSet: Number((warm.cpu.processMs / sets).toFixed(2)),
    mainThreadCpuMsPerSet:
      warm.cpu.mainThreadMs === undefined ? null : Number((warm.cpu.mainThreadMs / sets).toFixed(2)),
    warmupSets,
    coldSetsPerS: Number(cold.setsPerS.toFixed(2)),
    coldProcessCpuMsPerSet: Number((cold.cpu.processMs / warmupSets).toFixed(2)),
    fsCreateUsPerFile: Number(fsCreateUsPerFile.toFixed(1)),
  });
  const rounds = [...roundsBefore, ...roundsAfter];
  const bareSetsPerS = rounds.reduce((a, b) => a + b, 0) / rounds.length;
  // The fits alone through the same worker-thread pool (no ledger, files or watcher): what the
  // analysis can do with these threads on this machine. Payloads go MAX_JOBS_PER_TASK to a task, as
  // the in-process queue hands them out under a backlog.
  const pool = createTaskPool({
    processorHref: ANALYZE_PROCESSOR_URL.href,
    concurrency: burst.config.queue.concurrency,
    jobTimeoutMs: 60_000,
  });
  const runAll = (all: readonly unknown[]): Promise<unknown> =>
    Promise.all(
      Array.from({ length: Math.ceil(all.length / MAX_JOBS_PER_TASK) }, (_u, k) =>
        pool.runBatch(all.slice(k * MAX_JOBS_PER_TASK, (k + 1) * MAX_JOBS_PER_TASK)),
      ),
    );
  // Warmed like the pipeline's threads (each thread JIT-compiles the analysis on its own).
  for (let round = 0; round < 3; round++) await runAll(payloads);
  const p0 = performance.now();
  const poolCpu0 = cpuNow();
  await runAll([...measured, ...measured]);
  const poolSetsPerS = (2 * measured.length) / ((performance.now() - p0) / 1000);
  const poolCpuMsPerSet = cpuSince(poolCpu0).processMs / (2 * measured.length);
  await pool.close();
  emit({
    scenario: 'bare-analyze',
    ...decay,
    sets: measured.length,
    roundsBeforeBurst: roundsBefore.map((r) => Number(r.toFixed(1))),
    roundsAfterBurst: roundsAfter.map((r) => Number(r.toFixed(1))),
    setsPerSOneThread: Number(bareSetsPerS.toFixed(2)),
    ratioPipelineToOneThread: Number((pipelineSetsPerS / bareSetsPerS).toFixed(3)),
    poolThreads: burst.config.queue.concurrency,
    setsPerSPoolOnly: Number(poolSetsPerS.toFixed(2)),
    ratioPipelineToPoolOnly: Number((pipelineSetsPerS / poolSetsPerS).toFixed(3)),
    poolCpuMsPerSet: Number(poolCpuMsPerSet.toFixed(2)),
  });
  if (floor) {
    // The file work the pipeline must do per set, alone: what no coordinator design can avoid.
    const work = await ioFloor(
      files.slice(0, 500),
      payloads[0] === undefined ? [] : analyze(payloads[0]).artifacts.map((a) => a.content),
    );
    const cores = availableParallelism();
    const ceilingSetsPerS = (cores * 1000) / (poolCpuMsPerSet + work.cpuMsPerSet);
    emit({
      scenario: 'io-floor',
      ...decay,
      sets: work.sets,
      cpuMsPerSet: Number(work.cpuMsPerSet.toFixed(2)),
      wallMsPerSet: Number(work.wallMsPerSet.toFixed(2)),
      cores,
      ceilingSetsPerS: Number(ceilingSetsPerS.toFixed(1)),
      ceilingRatioToOneThread: Number((ceilingSetsPerS / bareSetsPerS).toFixed(3)),
    });
  }
  await stop();
  await pipeline.coordinator.drain();
  await pipeline.close();
  removeWorkspace(burst.dir);
  return { setsPerS: pipelineSetsPerS, files };
}

async function throughputAndLatency(): Promise<void> {
  // Phase 1: the burst of SETS sets (the throughput figure), then a TCSPC-typical burst.
  const main = await burstWithBaselines('small', SETS, true);
  if (!args.includes('--skip-tcspc')) await burstWithBaselines('tcspc', Math.min(SETS, TCSPC_SETS), false);
  const pipelineSetsPerS = main.setsPerS;
  const files = main.files;

  // Phase 2: steady arrivals at 60 % of the measured throughput (latency). WARMUP_SETS sets go first
  // and are waited for (worker threads loading the analysis modules); they are reported apart as the
  // cold start and do not count in the steady latency.
  const steady = workspace();
  const steadyPipeline = openPipeline(steady.config, {
    softwareVersion: softwareVersion(),
    logger: createLogger(steady.config.logging, steady.config.logFile),
  });
  const stopSteady = await startWatching(steadyPipeline);
  const steadySets = Math.min(SETS, 300);
  const intervalMs = 1000 / (0.6 * pipelineSetsPerS);
  // Seeds 92,000+ give IRF acquisition offsets (seed mod 3600 s) that no measured set uses: no duplicate IRFs.
  const warmup = Array.from({ length: WARMUP_SETS }, (_u, i) =>
    setFiles(`warmup-${String(i).padStart(3, '0')}`, 92_000 + i),
  );
  for (const set of warmup) for (const f of set) writeFileSync(join(steady.config.folders.inbox, f.name), f.content);
  await waitForDone(steadyPipeline, WARMUP_SETS);
  for (const set of files.slice(0, steadySets)) {
    for (const f of set) writeFileSync(join(steady.config.folders.inbox, f.name), f.content);
    await new Promise((r) => setTimeout(r, intervalMs));
  }
  await waitForDone(steadyPipeline, WARMUP_SETS + steadySets);
  const lat = latencies(steadyPipeline, 'bench-');
  const cold = latencies(steadyPipeline, 'warmup-');
  emit({
    scenario: 'latency',
    sets: steadySets,
    arrivalIntervalMs: Number(intervalMs.toFixed(1)),
    stabilityWindowMs: STABILITY_MS,
    latencyBeyondStabilityP50Ms: quantile(lat, 0.5),
    latencyBeyondStabilityP95Ms: quantile(lat, 0.95),
    latencyMaxMs: lat[lat.length - 1],
    coldStartSets: WARMUP_SETS,
    coldStartLatencyP50Ms: quantile(cold, 0.5),
    coldStartLatencyMaxMs: cold[cold.length - 1],
  });
  await stopSteady();
  await steadyPipeline.coordinator.drain();
  await steadyPipeline.close();
  removeWorkspace(steady.dir);
}

/**
 * The per-set file work the issue requires, with no parsing, ledger or analysis: read and hash 4
 * inputs, write the result durably (fdatasync; one folder fsync per 8 sets, as the group commit
 * does), write the outbox files atomically and move the 4 inputs to the archive. Returns CPU and wall
 * time per set: a floor under any coordinator's cost on this machine.
 */
async function ioFloor(
  sets: readonly { name: string; content: string }[][],
  artifacts: readonly string[],
): Promise<{ sets: number; cpuMsPerSet: number; wallMsPerSet: number }> {
  const dir = mkdtempSync(join(tmpdir(), 'dl-bench-floor-'));
  const inbox = join(dir, 'inbox');
  mkdirSync(inbox, { recursive: true });
  for (const set of sets) for (const f of set) writeFileSync(join(inbox, f.name), f.content);
  const result = JSON.stringify({ schema: 'driftlight.result/1', padding: 'x'.repeat(2400) });
  const cpu0 = cpuNow();
  const t0 = performance.now();
  const group = 8;
  for (let start = 0; start < sets.length; start += group) {
    const batch = sets.slice(start, start + group);
    await Promise.all(
      batch.map(async (set, k) => {
        for (const f of set) {
          statSync(join(inbox, f.name));
          createHash('sha256')
            .update(readFileSync(join(inbox, f.name)))
            .digest('hex');
        }
        await writeFileAtomicAsync(join(dir, 'results', `r${start + k}.json`), result, { syncFolder: false });
      }),
    );
    await fsyncDirectoryAsync(join(dir, 'results'));
    batch.forEach((_set, k) =>
      artifacts.forEach((content, a) =>
        writeFileAtomic(join(dir, 'outbox', `s${start + k}`, `a${a}.txt`), content, { durable: false }),
      ),
    );
    for (const set of batch)
      for (const f of set)
        moveFile(join(inbox, f.name), uniqueTarget(join(dir, 'archive'), f.name), { syncFolder: false });
    await fsyncDirectoryAsync(join(dir, 'archive'));
  }
  const wallMs = performance.now() - t0;
  const cpu = cpuSince(cpu0);
  removeWorkspace(dir);
  return { sets: sets.length, cpuMsPerSet: cpu.processMs / sets.length, wallMsPerSet: wallMs / sets.length };
}

/** Writes the backlog's files (BACKLOG_FILES, 4 per set) into the inbox of a new workspace; returns the folder and the number of sets. */
function writeBacklog(): { dir: string; sets: number } {
  const { dir, config } = workspace();
  const sets = Math.ceil(BACKLOG_FILES / 4);
  for (let i = 0; i < sets; i++)
    for (const f of setFiles(`backlog-${String(i).padStart(5, '0')}`, 50_000 + i))
      writeFileSync(join(config.folders.inbox, f.name), f.content);
  return { dir, sets };
}

/** Processes the backlog in `dir` (written by writeBacklog, in another process unless run alone) and reports peak RSS. */
async function backlog(dirArg: string | undefined): Promise<void> {
  const written = dirArg === undefined ? writeBacklog() : { dir: dirArg, sets: Math.ceil(BACKLOG_FILES / 4) };
  const { config } = workspace(written.dir);
  const sets = written.sets;
  (globalThis as { gc?: () => void }).gc?.();
  const rssBefore = process.memoryUsage().rss;
  const pipeline = openPipeline(config, {
    softwareVersion: softwareVersion(),
    logger: createLogger(config.logging, config.logFile),
  });
  await pipeline.coordinator.recover();
  let peakRss = 0;
  const sampler = setInterval(() => {
    peakRss = Math.max(peakRss, process.memoryUsage().rss);
  }, 100);
  const t0 = Date.now();
  const stop = await startWatching(pipeline);
  await waitForDone(pipeline, sets);
  const wallMs = Date.now() - t0;
  clearInterval(sampler);
  await stop();
  await pipeline.coordinator.drain();
  await pipeline.close();
  const maxRssBytes = process.resourceUsage().maxRSS * 1024;
  emit({
    scenario: 'backlog',
    files: sets * 4,
    sets,
    wallMs,
    setsPerS: Number((sets / (wallMs / 1000)).toFixed(2)),
    peakRssMbSampled: Math.round(peakRss / 1e6),
    maxRssMbProcess: Math.round(maxRssBytes / 1e6),
    rssBeforeMb: Math.round(rssBefore / 1e6),
    ledgerBytes: statSync(join(config.folders.state, 'ledger.sqlite')).size,
  });
  removeWorkspace(written.dir);
}

// The backlog runs in a child process of its own so its peak RSS is neither the earlier phases' nor
// that of generating the 10,000 files (written here, before the child starts).
if (args.includes('--backlog-only')) {
  const i = args.indexOf('--backlog-dir');
  await backlog(i >= 0 ? args[i + 1] : undefined);
} else {
  await throughputAndLatency();
  if (!args.includes('--skip-backlog')) {
    const { dir } = writeBacklog();
    const child = spawnSync(
      process.execPath,
      [
        fileURLToPath(import.meta.url),
        '--backlog-only',
        '--backlog-files',
        String(BACKLOG_FILES),
        '--backlog-dir',
        dir,
        ...args.filter((a) => a === '--keep-workspaces'),
      ],
      { stdio: 'inherit' },
    );
    if (child.status !== 0) process.exitCode = 1;
    removeWorkspace(dir);
  }
}
removeWorkspacesNow();
