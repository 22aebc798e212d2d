// `driftlight rates` through the real binary.
import { describe, expect, it } from 'vitest';
import { runDriftlight } from '../helpers/cli.js';

describe('driftlight rates', () => {
  it('prints k_r, k_nr and τ0 as JSON (Birks 1976; fluorescein Φ 0.925, τ 4.0 ns, from memory)', () => {
    const run = runDriftlight(['rates', '--yield', '0.925', '--tau-ns', '4.0', '--json']);
    expect(run.status).toBe(0);
    const result = JSON.parse(run.stdout) as { krPerS: number; knrPerS: number; tau0Ns: number };
    expect(result.krPerS).toBeCloseTo(2.3125e8, -2); // 0.925/4e-9 by hand
    expect(result.knrPerS).toBeCloseTo(1.875e7, -2); // 0.075/4e-9
    expect(result.tau0Ns).toBeCloseTo(4.3243, 4); // 4.0/0.925
  });
});
