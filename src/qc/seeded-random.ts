// Seeded pseudo-random numbers for QC simulations (run-length studies, drift replays): the one
// seeded generator (mulberry32, src/decay/random.ts) with paired Box–Muller normals. The core never
// uses Math.random, so every simulation is reproducible from its seed.
import { createSeededRandom as createUniformSource } from '../decay/random.js';

/** A uniform generator on [0, 1) and a standard normal generator drawn from it. */
export interface SeededRandom {
  uniform(): number;
  standardNormal(): number;
}

/** The seeded uniform generator of src/decay/random.ts (mulberry32) with Box–Muller normals drawn in pairs. O(1) per draw. */
export function createSeededRandom(seed: number): SeededRandom {
  const source = createUniformSource(seed);
  let spareNormal: number | undefined;
  const uniform = (): number => source.nextUniform();
  const standardNormal = (): number => {
    if (spareNormal !== undefined) {
      const value = spareNormal;
      spareNormal = undefined;
      return value;
    }
    // Box & Muller, Ann. Math. Stat. 29, 610 (1958): two uniforms → two independent N(0, 1).
    const radius = Math.sqrt(-2 * Math.log(1 - uniform()));
    const angle = 2 * Math.PI * uniform();
    spareNormal = radius * Math.sin(angle);
    return radius * Math.cos(angle);
  };
  return { uniform, standardNormal };
}
