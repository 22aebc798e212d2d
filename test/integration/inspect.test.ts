// `driftlight inspect` through the real binary: text and JSON output, exit codes 0/2/3, rejections
// on stderr as FILE:LINE: CODE: message, and the size limit checked before reading.
import { describe, expect, it, beforeAll, afterAll } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runDriftlight } from '../helpers/cli.js';

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'driftlight-inspect-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

describe('driftlight inspect', () => {
  it('prints kind, points, axis, layout and metadata for each file and exits 0', () => {
    const run = runDriftlight([
      'inspect',
      'examples/formats/emission-with-header.csv',
      'examples/formats/decay-with-irf-ps.txt',
    ]);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('emission spectrum');
    expect(run.stdout).toContain('400 … 600 nm');
    expect(run.stdout).toContain('delimiter ","');
    expect(run.stdout).toContain('decay histogram');
    expect(run.stdout).toContain('time-unit-to-ns');
    expect(run.stdout).toContain('sampleId=QS-0412');
  });

  it('prints one JSON object per line per file with --json', () => {
    const run = runDriftlight([
      'inspect',
      '--json',
      'examples/formats/absorbance.jdx',
      'examples/formats/transmittance-percent.txt',
    ]);
    expect(run.status).toBe(0);
    const lines = run.stdout
      .trim()
      .split('\n')
      .map((line) => JSON.parse(line) as Record<string, unknown>);
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatchObject({
      file: 'examples/formats/absorbance.jdx',
      kind: 'absorbance',
      points: 51,
      axis: { unit: 'nm', min: 200, max: 300 },
      layout: { format: 'jcamp-dx' },
    });
    expect(lines[1]).toMatchObject({
      kind: 'absorbance',
      points: 11,
      metadata: { sampleId: 'dye-7 in ethanol' },
      layout: { delimiter: '\t', headerLineCount: 3 },
    });
  });

  it('exits 3 and reports FILE:LINE: CODE: message when an input is rejected, still reading the others', () => {
    const run = runDriftlight([
      'inspect',
      'examples/formats/malformed-truncated.csv',
      'examples/formats/emission-wavenumber.csv',
    ]);
    expect(run.status).toBe(3);
    expect(run.stderr).toContain('examples/formats/malformed-truncated.csv:15: TRUNCATED: ');
    expect(run.stderr).not.toMatch(/\n\s+at /);
    expect(run.stdout).toContain('emission-wavenumber.csv');
  });

  it('checks --max-bytes before reading', () => {
    const file = join(dir, 'big.csv');
    writeFileSync(file, `wavelength (nm),v\n${Array.from({ length: 200 }, (_, i) => `${300 + i},${i}`).join('\n')}\n`);
    const run = runDriftlight(['inspect', '--max-bytes', '100', file]);
    expect(run.status).toBe(3);
    expect(run.stderr).toContain(`${file}: FILE_TOO_LARGE: `);
  });

  it('rejects binary content with exit 3', () => {
    const file = join(dir, 'image.bin');
    writeFileSync(file, Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]));
    const run = runDriftlight(['inspect', file]);
    expect(run.status).toBe(3);
    expect(run.stderr).toContain('BINARY_CONTENT');
  });

  it('exits 2 on a usage error (bad --max-bytes, missing file) and documents exit codes in --help', () => {
    expect(runDriftlight(['inspect', '--max-bytes', 'lots', 'x.csv']).status).toBe(2);
    expect(runDriftlight(['inspect', join(dir, 'missing.csv')]).status).toBe(2);
    expect(runDriftlight(['inspect']).status).toBe(2);
    const help = runDriftlight(['inspect', '--help']);
    expect(help.status).toBe(0);
    expect(help.stdout).toContain('3  one or more inputs rejected');
  });
});
