// Shared helpers of the pipeline integration tests: temp workspaces with a config, generated
// measurement files (small decays, seeded), the real `driftlight watch` as a child process, polling.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeDecayCsv, writeSpectrumCsv } from '../../src/formats/index.js';
import {
  absorbanceSpectrum,
  decayHistogram,
  emissionIntegralFor,
  emissionSpectrum,
  irfAsDecay,
  withoutIrf,
} from '../../src/demo/synthetic.js';
import { createSeededRandom } from '../../src/decay/index.js';
import { CLI_PATH } from '../helpers/cli.js';

const created: string[] = [];

/** Removes every workspace made by makeWorkspace in this test file (call from afterAll). */
export function removeWorkspaces(): void {
  for (const dir of created.splice(0)) rmSync(dir, { recursive: true, force: true, maxRetries: 20, retryDelay: 50 });
}

/** A temp workspace with driftlight.yaml (short windows for tests) plus `extraYaml`. */
export function makeWorkspace(
  extraYaml = '',
  options: { stabilityWindowMs?: number; setTimeoutMs?: number; concurrency?: number; requiredParts?: string } = {},
): string {
  const dir = mkdtempSync(join(tmpdir(), 'dl-pipe-'));
  created.push(dir);
  mkdirSync(join(dir, 'inbox'), { recursive: true });
  writeFileSync(
    join(dir, 'driftlight.yaml'),
    [
      `watch: { stabilityWindowMs: ${options.stabilityWindowMs ?? 150}, pollIntervalMs: 50 }`,
      `assembly: { setTimeoutMs: ${options.setTimeoutMs ?? 60000}, requiredParts: [${options.requiredParts ?? 'emission, absorbance, decay, irf'}] }`,
      `queue: { concurrency: ${options.concurrency ?? 2}, backoffMs: 50 }`,
      'logging: { level: info, stdout: off }',
      extraYaml,
      '',
    ].join('\n'),
  );
  return dir;
}

export interface GeneratedSet {
  readonly sampleId: string;
  readonly files: { readonly name: string; readonly content: string }[];
}

/** A set of files for `sampleId` (emission, absorbance, decay with or without IRF column), 256-channel mono-exponential decay. */
export function generateSet(
  sampleId: string,
  seed: number,
  options: {
    irfColumn?: boolean;
    parts?: readonly ('emission' | 'absorbance' | 'decay')[];
    nameStyle?: 'pattern' | 'opaque';
  } = {},
): GeneratedSet {
  const random = createSeededRandom(seed);
  const parts = options.parts ?? ['emission', 'absorbance', 'decay'];
  const meta = options.nameStyle === 'opaque' ? {} : { sampleId };
  const files: { name: string; content: string }[] = [];
  const a = 0.03 + (seed % 10) * 0.001;
  const name = (part: string, ext: string): string =>
    options.nameStyle === 'opaque' ? `${sampleId}-${part.slice(0, 1)}.${ext}` : `${sampleId}_${part}.${ext}`;
  if (parts.includes('emission')) {
    const em = emissionSpectrum(
      { peakNm: 540, widthNm: 40, integral: emissionIntegralFor(0.5, a, 1.3618), stepNm: 2 },
      { ...meta, excitationNm: 480, solvent: 'ethanol', acquiredAt: '2026-03-14T10:00:00Z' },
      random,
    );
    files.push({ name: name('em', 'csv'), content: writeSpectrumCsv(em) });
  }
  if (parts.includes('absorbance')) {
    const abs = absorbanceSpectrum(
      { bandPeakNm: 515, bandWidthNm: 55, excitationNm: 480, absorbanceAtExcitation: a, fromNm: 400, toNm: 740 },
      { ...meta, acquiredAt: '2026-03-14T09:55:00Z' },
      random,
    );
    files.push({ name: name('abs', 'csv'), content: writeSpectrumCsv(abs) });
  }
  if (parts.includes('decay')) {
    const decay = decayHistogram(
      { tauNs: [2 + (seed % 7) * 0.3], photons: 50_000, channels: 256, channelWidthNs: 0.1 },
      { ...meta, acquiredAt: '2026-03-14T10:05:00Z' },
      random,
    );
    files.push({
      name: name('decay', 'csv'),
      content: writeDecayCsv(options.irfColumn === false ? withoutIrf(decay) : decay),
    });
  }
  return { sampleId, files };
}

/** A stand-alone IRF file (role irf) recorded at `acquiredAt`. */
export function generateIrf(name: string, seed: number, acquiredAt: string): { name: string; content: string } {
  const decay = decayHistogram(
    { tauNs: [1], photons: 1000, channels: 256, channelWidthNs: 0.1 },
    { acquiredAt },
    createSeededRandom(seed),
  );
  return { name, content: writeDecayCsv(irfAsDecay(decay, { sampleId: `scatter-${seed}`, acquiredAt })) };
}

/** Writes the files of a set into `dir`. */
export function dropSet(dir: string, set: GeneratedSet): void {
  for (const f of set.files) writeFileSync(join(dir, f.name), f.content);
}

/** Starts `driftlight watch --config <dir>/driftlight.yaml` as a child process. */
export function startWatch(dir: string): ChildProcess {
  return spawn(process.execPath, [CLI_PATH, 'watch', '--config', join(dir, 'driftlight.yaml')], {
    cwd: dir,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
}

/** Sends SIGTERM and resolves with the exit code. */
export function stopWatch(child: ChildProcess): Promise<number | null> {
  return new Promise((resolve) => {
    if (child.exitCode !== null) {
      resolve(child.exitCode);
      return;
    }
    child.once('exit', (code) => resolve(code));
    child.kill('SIGTERM');
  });
}

/** Polls `condition` every 100 ms until it holds or `timeoutMs` passes (then throws with `what`). */
export async function waitFor(
  what: string,
  condition: () => boolean,
  timeoutMs = 30_000,
  pollIntervalMs = 100,
): Promise<void> {
  const start = Date.now();
  while (!condition()) {
    if (Date.now() - start > timeoutMs) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((r) => setTimeout(r, pollIntervalMs));
  }
}

/** Every file (relative paths) under `dir`, excluding hidden temp files. */
export function listFiles(dir: string): string[] {
  if (!existsSync(dir)) return [];
  const out: string[] = [];
  const visit = (d: string, prefix: string): void => {
    for (const entry of readdirSync(d, { withFileTypes: true })) {
      if (entry.isDirectory()) visit(join(d, entry.name), `${prefix}${entry.name}/`);
      else if (!entry.name.startsWith('.')) out.push(`${prefix}${entry.name}`);
    }
  };
  visit(dir, '');
  return out.sort();
}

/** Parsed result JSON files of a workspace. */
export function readResults(dir: string): {
  path: string;
  result: Record<string, unknown> & {
    sampleId: string;
    setId: string;
    partial: boolean;
    missing: { what: string; reason: string }[];
  };
}[] {
  return listFiles(join(dir, 'results'))
    .filter((p) => p.endsWith('.json'))
    .map((p) => ({ path: p, result: JSON.parse(readFileSync(join(dir, 'results', p), 'utf8')) }));
}
