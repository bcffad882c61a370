/** A seeded source of pseudo-random numbers. Same seed, same sequence, on every JavaScript engine. */
export interface RandomSource {
  /** Uniform on [0, 1). */
  uniform: () => number;
  /** Standard normal (mean 0, standard deviation 1). */
  normal: () => number;
}

/**
 * Seeded pseudo-random numbers for the shot simulator and the Monte Carlo propagation.
 *
 * Uniform numbers come from mulberry32 (T. Ettinger, public domain): 32-bit state, passes the
 * statistical tests that matter for a few million draws, and is reproducible across engines because it
 * only uses 32-bit integer arithmetic (`Math.imul`). Math.random cannot be seeded, hence this.
 * Normal numbers use the Box–Muller transform (Box & Muller, Ann. Math. Stat. 29(2) 610, 1958),
 * keeping the second value of each pair.
 *
 * @param seed - any finite number; its low 32 bits select the sequence.
 */
export function createRandom(seed: number): RandomSource {
  if (!Number.isFinite(seed)) throw new TypeError('seed must be a finite number');
  let state = seed >>> 0;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let z = state;
    z = Math.imul(z ^ (z >>> 15), z | 1);
    z ^= z + Math.imul(z ^ (z >>> 7), z | 61);
    return ((z ^ (z >>> 14)) >>> 0) / 4294967296;
  };
  let spare = Number.NaN;
  const normal = (): number => {
    if (!Number.isNaN(spare)) {
      const value = spare;
      spare = Number.NaN;
      return value;
    }
    let u1 = uniform();
    while (u1 === 0) u1 = uniform();
    const u2 = uniform();
    const radius = Math.sqrt(-2 * Math.log(u1));
    spare = radius * Math.sin(2 * Math.PI * u2);
    return radius * Math.cos(2 * Math.PI * u2);
  };
  return { uniform, normal };
}
