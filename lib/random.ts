/**
 * A small seeded pseudo-random generator (mulberry32) so that every random procedure in
 * slopebreak (bootstrap, synthetic data) is reproducible from its seed. Not for cryptography.
 */
export type RandomSource = () => number;

/** Uniform numbers in [0, 1) from a 32-bit seed; the same seed gives the same sequence. */
export function seededRandom(seed: number): RandomSource {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let mixed = state;
    mixed = Math.imul(mixed ^ (mixed >>> 15), mixed | 1);
    mixed ^= mixed + Math.imul(mixed ^ (mixed >>> 7), mixed | 61);
    return ((mixed ^ (mixed >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by the Box–Muller transform. */
export function seededNormal(seed: number): RandomSource {
  const uniform = seededRandom(seed);
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const value = spare;
      spare = null;
      return value;
    }
    let u1 = uniform();
    while (u1 <= Number.MIN_VALUE) u1 = uniform();
    const u2 = uniform();
    const radius = Math.sqrt(-2 * Math.log(u1));
    spare = radius * Math.sin(2 * Math.PI * u2);
    return radius * Math.cos(2 * Math.PI * u2);
  };
}
