/**
 * Seeded pseudo-random numbers: SplitMix32-style mixer over a 32-bit counter (a general-purpose
 * hash-based generator; common practice, no single source). Same seed → same sequence everywhere.
 */
export type Random = () => number;

/** Uniform [0, 1) generator from an integer seed. */
export function randomSeeded(seed: number): Random {
  let state = (seed >>> 0) ^ 0x9e3779b9;
  return () => {
    state = (state + 0x9e3779b9) | 0;
    let z = state;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
    z ^= z >>> 16;
    return (z >>> 0) / 4294967296;
  };
}

/** Standard normal deviate by the Box–Muller transform. */
export function randomNormal(rand: Random): number {
  let u = rand();
  while (u <= 1e-300) u = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand());
}
