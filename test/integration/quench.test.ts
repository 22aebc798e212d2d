// `driftlight quench` through the real binary on the committed quench-series fixture.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { REPO_ROOT, runDriftlight } from '../helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'driftlight-quench-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('driftlight quench', () => {
  it('finds K_SV ≈ K_D ≈ 20 M⁻¹, k_q ≈ 5e9 M⁻¹s⁻¹ and dynamic quenching (invented series, τ0 = 4 ns)', () => {
    const run = runDriftlight(['quench', join(REPO_ROOT, 'test/fixtures/spectra/quench-dynamic.csv'), '--json']);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const result = JSON.parse(run.stdout) as {
      ksvPerM: number;
      kdPerM: number;
      kqPerMPerS: number;
      mechanism: string;
      exceedsDiffusionLimit: boolean;
    };
    expect(result.ksvPerM).toBeCloseTo(20, 0);
    expect(result.kdPerM).toBeCloseTo(20, 0);
    expect(result.kqPerMPerS / 5e9).toBeCloseTo(1, 1);
    expect(result.mechanism).toBe('dynamic');
    expect(result.exceedsDiffusionLimit).toBe(false); // water 0.890 mPa·s at 25 °C (CRC, from memory) → 7.4e9
  });

  it('flags k_q above the diffusion limit from an intensity series with τ0 in the header', () => {
    const path = join(dir, 'fast.csv');
    writeFileSync(
      path,
      [
        '# solvent: water',
        '# tau0_ns: 4.0',
        'quencher_M;intensity',
        ...[0, 0.01, 0.02, 0.03].map((q) => `${q};${1000 / (1 + 100 * q)}`),
      ].join('\n'),
    );
    const run = runDriftlight(['quench', path]);
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/exceeds the diffusion limit/);
  });

  it('rejects a series without a concentration column (exit 3, MISSING_COLUMN)', () => {
    const path = join(dir, 'bad.csv');
    writeFileSync(path, 'x,f0_over_f\n0,1\n0.1,2\n');
    const run = runDriftlight(['quench', path]);
    expect(run.status).toBe(3);
    expect(run.stderr).toContain('MISSING_COLUMN');
  });
});
