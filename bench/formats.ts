// Benchmark of the delimited reader: a 1,000,000-row, three-column CSV spectrum written to a temp
// file in 1 MB chunks by a child process (so generation garbage stays out of this process's RSS),
// read back as the CLI does (one readFile), then parsed once with readData.
// One JSON line out: parse throughput in MB/s (10⁶ bytes), peak resident memory, and the memory the
// read added over the baseline. Goals: ≥ 100 MB/s and peak RSS < 4 × the file size.
import { spawnSync } from 'node:child_process';
import { closeSync, mkdtempSync, openSync, readFileSync, rmSync, writeSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readData } from '../src/formats/index.js';

const ROWS = 1_000_000;
const HEADER =
  '# sample id: bench-1\n# excitation wavelength (nm): 350\n# solvent: ethanol\nwavelength (nm),intensity (cps),reference (cps)\n';

/** Writes the CSV to `path` in chunks (deterministic LCG noise, glibc constants). */
function generate(path: string): void {
  const fd = openSync(path, 'w');
  let seed = 12345;
  let chunk = HEADER;
  for (let i = 0; i < ROWS; i++) {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    const wavelengthNm = (200 + i / 1000).toFixed(3);
    const intensity = (5000 + 3000 * Math.sin(i / 50000) + seed / 2147483648).toFixed(4);
    const reference = (1000 + (seed % 1000) / 10).toFixed(1);
    chunk += `${wavelengthNm},${intensity},${reference}\n`;
    if (chunk.length > 1_000_000) {
      writeSync(fd, chunk);
      chunk = '';
    }
  }
  writeSync(fd, chunk);
  closeSync(fd);
}

/** Measures one read of a freshly generated file and prints the JSON line. */
function measure(): void {
  const dir = mkdtempSync(join(tmpdir(), 'driftlight-bench-'));
  try {
    const path = join(dir, 'spectrum.csv');
    const child = spawnSync(process.execPath, [fileURLToPath(import.meta.url), '--generate', path], {
      stdio: 'inherit',
    });
    if (child.status !== 0) throw new Error(`the generator exited with ${String(child.status ?? child.signal)}`);
    const baselineRssMb = process.memoryUsage().rss / 1e6;
    const readStarted = process.hrtime.bigint();
    const content = readFileSync(path);
    const parseStarted = process.hrtime.bigint();
    const cpuBefore = process.cpuUsage();
    const data = readData(content, { fileName: path, maxBytes: 1e9 });
    const cpu = process.cpuUsage(cpuBefore);
    const finished = process.hrtime.bigint();
    // CPU time (user + system) of this process: on a shared, loaded machine it is the steadier figure.
    const parseCpuSeconds = (cpu.user + cpu.system) / 1e6;
    const parseSeconds = Number(finished - parseStarted) / 1e9;
    const points = data.type === 'spectrum' ? data.spectrum.values.length : data.decay.counts.length;
    const fileMb = content.length / 1e6;
    const peakRssMb = process.resourceUsage().maxRSS / 1024;
    process.stdout.write(
      `${JSON.stringify({
        bench: 'formats',
        scenario: 'delimited-csv-1e6-rows-3-columns',
        rows: points,
        fileMb: Number(fileMb.toFixed(2)),
        readFileSeconds: Number((Number(parseStarted - readStarted) / 1e9).toFixed(3)),
        parseSeconds: Number(parseSeconds.toFixed(3)),
        mbPerS: Number((fileMb / parseSeconds).toFixed(1)),
        parseCpuSeconds: Number(parseCpuSeconds.toFixed(3)),
        mbPerCpuS: Number((fileMb / parseCpuSeconds).toFixed(1)),
        peakRssMb: Number(peakRssMb.toFixed(1)),
        baselineRssMb: Number(baselineRssMb.toFixed(1)),
        peakRssOverFile: Number((peakRssMb / fileMb).toFixed(2)),
        addedRssOverFile: Number(((peakRssMb - baselineRssMb) / fileMb).toFixed(2)),
      })}\n`,
    );
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[2] === '--generate') generate(process.argv[3] ?? 'spectrum.csv');
else measure();
