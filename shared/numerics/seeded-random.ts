/**
 * A small seeded pseudo-random generator for synthetic data (tests, the demo/scale seeds, the bench): never for
 * anything that must be unpredictable.
 * mulberry32 (T. Ettinger, public domain) for uniforms, Box–Muller for standard normals
 * (Box & Muller, Ann. Math. Statist. 29 (1958) 610).
 */
export interface SeededRandom {
  /** Uniform in [0, 1). */
  uniform(): number;
  /** Standard normal (mean 0, variance 1). */
  normal(): number;
}

/**
 * Makes a generator whose sequence depends only on the seed.
 * @param seed any 32-bit integer
 * @returns uniform() in [0, 1) and normal() standard normal deviates
 */
export function createSeededRandom(seed: number): SeededRandom {
  let state = seed >>> 0;
  const uniform = () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  let spare: number | null = null;
  const normal = () => {
    if (spare !== null) {
      const value = spare;
      spare = null;
      return value;
    }
    let u = 0;
    while (u === 0) u = uniform();
    const v = uniform();
    const radius = Math.sqrt(-2 * Math.log(u));
    spare = radius * Math.sin(2 * Math.PI * v);
    return radius * Math.cos(2 * Math.PI * v);
  };
  return { uniform, normal };
}
