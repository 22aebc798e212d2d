// Seeded pseudo-random numbers for simulations (run-length studies, drift replays): the core never
// uses Math.random, so every simulation is reproducible from its seed.

/** A uniform generator on [0, 1) and a standard normal generator drawn from it. */
export interface SeededRandom {
  uniform(): number;
  standardNormal(): number;
}

/** mulberry32 uniform generator (T. Ettinger, public domain; 32-bit state) with Box–Muller normals. O(1) per draw. */
export function createSeededRandom(seed: number): SeededRandom {
  let state = seed >>> 0;
  let spareNormal: number | undefined;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let mixed = state;
    mixed = Math.imul(mixed ^ (mixed >>> 15), mixed | 1);
    mixed ^= mixed + Math.imul(mixed ^ (mixed >>> 7), mixed | 61);
    return ((mixed ^ (mixed >>> 14)) >>> 0) / 4294967296;
  };
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
