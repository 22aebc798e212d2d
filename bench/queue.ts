// Queue benchmark (JSON lines): per-job overhead of BullMQ vs in-process on no-op jobs, and
// throughput of fit-bound jobs (~20 ms deterministic numeric loop) with 1 vs 2 `driftlight worker`
// processes, then the same with the real decay fit (fitDecay on a simulated 2-exponential histogram).
// Needs the build (dist/) and Redis at REDIS_URL (default redis://127.0.0.1:6379).
// Run: npm run build && node dist/bench/run.js queue
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import { Queue } from 'bullmq';
import { createJobQueue, type QueueBackendOptions } from '../src/queue/index.js';

const REDIS_URL = process.env['REDIS_URL'] ?? 'redis://127.0.0.1:6379';
const CLI = fileURLToPath(new URL('../../bin/driftlight.js', import.meta.url));
const NOOP = new URL('../../test/fixtures/queue/noop.mjs', import.meta.url);
const COMPUTE = new URL('../../test/fixtures/queue/compute.mjs', import.meta.url);
const DECAY_FIT = new URL('../../test/fixtures/queue/decay-fit.mjs', import.meta.url);
const TARGET_JOB_MS = 20;

function emit(record: Record<string, unknown>): void {
  process.stdout.write(`${JSON.stringify({ bench: 'queue', ...record })}\n`);
}

async function cleanup(prefix: string, queueName: string): Promise<void> {
  const queue = new Queue(queueName, { connection: { url: REDIS_URL }, prefix });
  await queue.obliterate({ force: true });
  await queue.close();
}

/** Wall time in ms to enqueue `count` jobs and receive every outcome. */
async function timeJobs(options: QueueBackendOptions, count: number, payload: (n: number) => unknown): Promise<number> {
  const queue = createJobQueue<unknown, unknown>(options);
  let outcomes = 0;
  queue.onOutcome(() => {
    outcomes += 1;
  });
  // warm-up: threads started, processor imported, connections open
  await queue.enqueue('warm-up', payload(-1));
  await queue.drain();
  const startMs = performance.now();
  for (let n = 0; n < count; n += 1) await queue.enqueue(`job-${n}`, payload(n));
  await queue.drain();
  const elapsedMs = performance.now() - startMs;
  await queue.close();
  if (outcomes !== count + 1) throw new Error(`expected ${count + 1} outcomes, got ${outcomes}`);
  return elapsedMs;
}

async function overhead(): Promise<void> {
  const count = 400;
  for (const backend of ['in-process', 'bullmq'] as const) {
    const prefix = `dlbench-${randomBytes(4).toString('hex')}`;
    const options: QueueBackendOptions = {
      backend,
      processorFile: NOOP,
      concurrency: 1,
      redisUrl: REDIS_URL,
      prefix,
      queueName: 'overhead',
      runWorker: true,
    };
    const elapsedMs = await timeJobs(options, count, (n) => ({ n }));
    if (backend === 'bullmq') await cleanup(prefix, 'overhead');
    emit({
      scenario: 'overhead',
      backend,
      jobs: count,
      concurrency: 1,
      perJobMs: +(elapsedMs / count).toFixed(3),
      totalMs: Math.round(elapsedMs),
    });
  }
}

/** Iterations of the compute fixture's numeric loop that take about TARGET_JOB_MS here. */
async function calibrateIterations(): Promise<number> {
  const { numericWork } = (await import(COMPUTE.href)) as { numericWork: (n: number, iterations: number) => number };
  const probe = 200_000;
  numericWork(0, probe);
  const startMs = performance.now();
  for (let i = 0; i < 5; i += 1) numericWork(i, probe);
  const msPerProbe = (performance.now() - startMs) / 5;
  return Math.round((probe * TARGET_JOB_MS) / msPerProbe);
}

function startWorker(prefix: string, queueName: string, processor: URL): Promise<ChildProcess> {
  const child = spawn(
    process.execPath,
    [
      CLI,
      'worker',
      '--redis',
      REDIS_URL,
      '--prefix',
      prefix,
      '--queue',
      queueName,
      '--concurrency',
      '1',
      '--processor',
      fileURLToPath(processor),
      '--heartbeat-ms',
      '0',
    ],
    { stdio: ['ignore', 'pipe', 'inherit'] },
  );
  return new Promise((resolve, reject) => {
    let output = '';
    child.stdout?.setEncoding('utf8').on('data', (chunk: string) => {
      output += chunk;
      if (output.includes('"event":"worker.started"')) resolve(child);
    });
    child.once('exit', (code) => reject(new Error(`worker exited early (${code}): ${output}`)));
  });
}

function median(values: readonly number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? (sorted[middle] ?? 0) : ((sorted[middle - 1] ?? 0) + (sorted[middle] ?? 0)) / 2;
}

/** CPU seconds (user + system, all threads) a process has used so far, from /proc (Linux). */
function cpuSeconds(pid: number | undefined): number {
  if (pid === undefined) return 0;
  try {
    const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]?.split(' ') ?? [];
    return (Number(fields[11]) + Number(fields[12])) / 100; // utime, stime in clock ticks (USER_HZ 100)
  } catch {
    return 0;
  }
}

interface ScalingRun {
  readonly jobsPerSecond: number;
  /** CPU the worker processes got during the run, in cores (CPU seconds / wall seconds). */
  readonly workerCpuCores: number;
}

/** One timed run of `count` jobs through `workers` worker processes (concurrency 1 each). */
async function scalingRun(
  workers: number,
  processor: URL,
  count: number,
  payload: (n: number) => unknown,
): Promise<ScalingRun> {
  const prefix = `dlbench-${randomBytes(4).toString('hex')}`;
  const children = await Promise.all(Array.from({ length: workers }, () => startWorker(prefix, 'scaling', processor)));
  const options: QueueBackendOptions = {
    backend: 'bullmq',
    processorFile: processor,
    redisUrl: REDIS_URL,
    prefix,
    queueName: 'scaling',
  };
  const cpuBefore = children.reduce((sum, child) => sum + cpuSeconds(child.pid), 0);
  const wallStartMs = performance.now();
  const elapsedMs = await timeJobs(options, count, payload);
  const wallSeconds = (performance.now() - wallStartMs) / 1000;
  const cpuUsed = children.reduce((sum, child) => sum + cpuSeconds(child.pid), 0) - cpuBefore;
  await Promise.all(
    children.map((child) => new Promise((resolve) => (child.once('exit', resolve), child.kill('SIGTERM')))),
  );
  await cleanup(prefix, 'scaling');
  return { jobsPerSecond: (count * 1000) / elapsedMs, workerCpuCores: cpuUsed / wallSeconds };
}

/**
 * Throughput with 1 vs 2 worker processes, alternating 1, 2, 1, 2, ... for ROUNDS rounds so that a
 * change in the machine's load hits both alike; the ratio is of the medians.
 */
async function scaling(
  scenario: string,
  processor: URL,
  count: number,
  payload: (n: number) => unknown,
  extra: Record<string, unknown>,
): Promise<void> {
  const ROUNDS = 3;
  const runs = new Map<number, number[]>([
    [1, []],
    [2, []],
  ]);
  for (let round = 0; round < ROUNDS; round += 1) {
    for (const workers of [1, 2]) {
      const run = await scalingRun(workers, processor, count, payload);
      runs.get(workers)?.push(run.jobsPerSecond);
      emit({
        scenario,
        round,
        workerProcesses: workers,
        concurrencyEach: 1,
        jobs: count,
        ...extra,
        jobsPerSecond: +run.jobsPerSecond.toFixed(2),
        workerCpuCores: +run.workerCpuCores.toFixed(2),
      });
    }
  }
  const one = median(runs.get(1) ?? []);
  const two = median(runs.get(2) ?? []);
  emit({
    scenario: `${scenario}-ratio`,
    medianJobsPerSecond1: +one.toFixed(2),
    medianJobsPerSecond2: +two.toFixed(2),
    ratio: +(two / one).toFixed(2),
    goal: 1.7,
    cores: cpus().length,
    loadAverage1m: +(loadavg()[0] ?? 0).toFixed(2),
  });
}

emit({
  scenario: 'environment',
  cores: cpus().length,
  loadAverage1m: +(loadavg()[0] ?? 0).toFixed(2),
  redisUrl: REDIS_URL,
});
await overhead();
const iterations = await calibrateIterations();
await scaling('scaling-numeric', COMPUTE, 100, (n) => ({ id: `job-${n}`, n, iterations }), {
  targetJobMs: TARGET_JOB_MS,
  iterations,
});
await scaling('scaling-decay-fit', DECAY_FIT, 100, (n) => ({ seed: n + 1 }), {
  fit: '2-exponential reconvolution, 1024 channels, 2e5 photons',
});
