// The QC simulations draw from the one seeded generator (mulberry32 in src/decay/random.ts): the
// same seed gives the same uniforms through either entry point.
import { describe, expect, it } from 'vitest';
import { createSeededRandom as createUniformSource } from '../../../src/decay/random.js';
import { createSeededRandom } from '../../../src/qc/seeded-random.js';

describe('QC seeded random', () => {
  it('draws the uniforms of the one generator', () => {
    const qc = createSeededRandom(20_261_205);
    const core = createUniformSource(20_261_205);
    for (let i = 0; i < 5; i++) expect(qc.uniform()).toBe(core.nextUniform());
  });
});
