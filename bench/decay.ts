// Benchmark of the lifetime engine (JSON lines): a bi-exponential reconvolution fit of 4,096 channels with
// an IRF, free shift and background, ~10⁵ photons — median ms per fit on one core (default multi-start and
// a single start), the same fit by scipy (test/reference/decay/time_scipy_fit.py) and the speed ratio, and
// fits per second for 1,000 such decays on a pool of 2 worker threads.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import { createSeededRandom, fitDecay, gaussianIrf, simulateDecay, type FitDecayOptions } from '../src/decay/index.js';
import type { Decay } from '../src/model/decay.js';
import { startSource } from '../src/decay/component-fit.js';
import { minimiseLevenbergMarquardt } from '../src/decay/levenberg-marquardt.js';
import { resolveFitDecayOptions } from '../src/decay/options.js';
import { localParameterCount } from '../src/decay/parameters.js';
import { prepareDecay } from '../src/decay/prepare-decay.js';

const CHANNELS = 4096;
const WINDOW_NS = 50;
const WIDTH_NS = WINDOW_NS / CHANNELS;
const PHOTONS = 1e5;
const POOL_FITS = 1000;
const POOL_WORKERS = 2;
const FIT_OPTIONS: FitDecayOptions = { components: 2, profileIntervals: false };

function makeDecay(seed: number): Decay {
  return simulateDecay(
    {
      channels: CHANNELS,
      channelWidthNs: WIDTH_NS,
      tauNs: [0.8, 4],
      intensityFractions: [0.3, 0.7],
      photons: PHOTONS,
      irf: gaussianIrf(CHANNELS, WIDTH_NS, 2, 0.2),
      backgroundPerChannel: 1,
      shiftNs: 0.02,
    },
    createSeededRandom(seed),
  );
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1
    ? (sorted[middle] as number)
    : ((sorted[middle - 1] as number) + (sorted[middle] as number)) / 2;
}

function timeFits(
  decay: Decay,
  options: FitDecayOptions,
  repeats: number,
): { medianMs: number; tauNs: number[]; iterations: number } {
  for (let i = 0; i < 20; i++) fitDecay(decay, options);
  const times: number[] = [];
  let last = fitDecay(decay, options);
  for (let i = 0; i < repeats; i++) {
    const start = performance.now();
    last = fitDecay(decay, options);
    times.push(performance.now() - start);
  }
  return { medianMs: median(times), tauNs: last.components.map((c) => c.tauNs), iterations: last.iterations };
}

function scipyTiming(decay: Decay): { medianMs: number; tauNs: number[] } | { error: string } {
  const fit = fitDecay(decay, FIT_OPTIONS);
  const directory = mkdtempSync(join(tmpdir(), 'driftlight-bench-'));
  try {
    const file = join(directory, 'decay.json');
    // scipy starts from driftlight's own automatic start (τ1, τ2, photons → amplitudes a = pΔ/τ, shift, background).
    const options = resolveFitDecayOptions(FIT_OPTIONS);
    const prepared = prepareDecay(decay, options, localParameterCount(2) + 1);
    const first = startSource([prepared], 2, options, [], true).nextStart();
    if (first === undefined) return { error: 'no start values' };
    const [tau1 = 1, tau2 = 1, photons1 = 0, photons2 = 0, shiftNs = 0, background = 0] = Array.from(first);
    const start = [tau1, tau2, (photons1 * WIDTH_NS) / tau1, (photons2 * WIDTH_NS) / tau2, shiftNs, background];
    writeFileSync(
      file,
      JSON.stringify({
        counts: Array.from(decay.counts),
        irfCounts: Array.from(decay.irfCounts ?? []),
        channelWidthNs: WIDTH_NS,
        firstChannel: fit.rangeChannels[0],
        endChannel: fit.rangeChannels[1],
        components: 2,
        start,
        shiftLimitNs: 0.4,
      }),
    );
    const script = fileURLToPath(new URL('../../test/reference/decay/time_scipy_fit.py', import.meta.url));
    const run = spawnSync('python3', [script, file, '5'], {
      encoding: 'utf8',
      env: { ...process.env, PYTHONDONTWRITEBYTECODE: '1' },
      cwd: fileURLToPath(new URL('../../test/reference/decay/', import.meta.url)),
    });
    if (run.status !== 0) return { error: `python3 exited ${run.status ?? run.signal}: ${run.stderr.slice(0, 300)}` };
    return JSON.parse(run.stdout) as { medianMs: number; tauNs: number[] };
  } finally {
    rmSync(directory, { recursive: true, force: true });
  }
}

/** The LM loop alone from the automatic start (no start-value search, no statistics): the like-for-like counterpart of the scipy timing. */
function timeCoreFit(decay: Decay, repeats: number): { medianMs: number; iterations: number } {
  const options = resolveFitDecayOptions(FIT_OPTIONS);
  const prepared = prepareDecay(decay, options, localParameterCount(2) + 1);
  const { problem, layout, nextStart } = startSource([prepared], 2, options, [], true);
  const start = nextStart();
  if (start === undefined) return { medianMs: Number.NaN, iterations: 0 };
  let iterations = 0;
  const run = (): void => {
    iterations = minimiseLevenbergMarquardt(
      problem,
      start,
      layout.lower,
      layout.upper,
      options.maxIterations,
    ).iterations;
  };
  for (let i = 0; i < 20; i++) run();
  const times: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const begin = performance.now();
    run();
    times.push(performance.now() - begin);
  }
  return { medianMs: median(times), iterations };
}

async function poolThroughput(): Promise<{ fitsPerSecond: number; wallMs: number; converged: number }> {
  const share = POOL_FITS / POOL_WORKERS;
  const workers = Array.from(
    { length: POOL_WORKERS },
    (_unused, index) =>
      new Worker(new URL(import.meta.url), { workerData: { firstSeed: 1000 + index * share, count: share } }),
  );
  await Promise.all(workers.map((worker) => new Promise<void>((resolve) => worker.once('message', () => resolve()))));
  const start = performance.now();
  const results = await Promise.all(
    workers.map(
      (worker) =>
        new Promise<number>((resolve, reject) => {
          worker.once('message', (converged: number) => resolve(converged));
          worker.once('error', reject);
          worker.postMessage('go');
        }),
    ),
  );
  const wallMs = performance.now() - start;
  await Promise.all(workers.map((worker) => worker.terminate()));
  return { fitsPerSecond: (POOL_FITS / wallMs) * 1000, wallMs, converged: results.reduce((a, b) => a + b, 0) };
}

function runWorker(): void {
  const { firstSeed, count } = workerData as { firstSeed: number; count: number };
  const decays = Array.from({ length: count }, (_unused, i) => makeDecay(firstSeed + i));
  for (let i = 0; i < 10; i++) fitDecay(decays[i % decays.length] as Decay, FIT_OPTIONS);
  parentPort?.once('message', () => {
    let converged = 0;
    for (const decay of decays) if (fitDecay(decay, FIT_OPTIONS).converged) converged++;
    parentPort?.postMessage(converged);
  });
  parentPort?.postMessage('ready');
}

async function main(): Promise<void> {
  const decay = makeDecay(7);
  const base = {
    bench: 'decay',
    channels: CHANNELS,
    photons: PHOTONS,
    components: 2,
    freeShift: true,
    freeBackground: true,
  };
  const multi = timeFits(decay, FIT_OPTIONS, 101);
  process.stdout.write(
    `${JSON.stringify({ ...base, scenario: 'single-fit, 4 starts (default), no profile', ...multi })}\n`,
  );
  const single = timeFits(decay, { ...FIT_OPTIONS, multiStart: 1 }, 101);
  process.stdout.write(`${JSON.stringify({ ...base, scenario: 'single-fit, 1 start, no profile', ...single })}\n`);
  const profiled = timeFits(decay, { components: 2 }, 21);
  process.stdout.write(
    `${JSON.stringify({ ...base, scenario: 'single-fit, defaults incl. profile intervals', ...profiled })}\n`,
  );
  const core = timeCoreFit(decay, 101);
  process.stdout.write(`${JSON.stringify({ ...base, scenario: 'LM loop only, from the automatic start', ...core })}\n`);
  const scipy = scipyTiming(decay);
  process.stdout.write(
    `${JSON.stringify({
      ...base,
      scenario: 'scipy least_squares (trf, 3-point Jacobian) from the same start on the same decay',
      ...scipy,
      ...('medianMs' in scipy
        ? { speedupFullFitDecay: scipy.medianMs / multi.medianMs, speedupLmLoop: scipy.medianMs / core.medianMs }
        : {}),
    })}\n`,
  );
  const pool = await poolThroughput();
  process.stdout.write(
    `${JSON.stringify({ ...base, scenario: `pool of ${POOL_WORKERS} worker threads, ${POOL_FITS} decays`, ...pool })}\n`,
  );
}

if (isMainThread) await main();
else runWorker();
