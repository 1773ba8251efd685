import { randomSeeded } from '../../engine/util/random';

/** Seeded uniform 32-bit unsigned integers (the engine's generator scaled), so that failures reproduce. */
export function uint32Seeded(seed: number): () => number {
  const r = randomSeeded(seed);
  return () => Math.floor(r() * 4294967296);
}
