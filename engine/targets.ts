/**
 * Target selection: which particles get forces. Indices are 0-based input rows.
 */
import { randomSeeded } from './util/random';

export type TargetSpec =
  | { readonly kind: 'all' }
  | { readonly kind: 'first'; readonly count: number }
  | { readonly kind: 'sample'; readonly count: number; readonly seed: number };

/** Resolves a target spec to sorted particle indices; a sample is a seeded draw without replacement. */
export function targetsResolve(spec: TargetSpec, n: number): Int32Array {
  if (spec.kind === 'all') return Int32Array.from({ length: n }, (_, i) => i);
  const k = spec.count;
  if (!Number.isInteger(k) || k < 1) throw new RangeError(`target count must be a positive integer, got ${k}`);
  if (spec.kind === 'first' || k >= n) return Int32Array.from({ length: Math.min(k, n) }, (_, i) => i);
  // Partial Fisher–Yates over an index permutation, then sort for cache-friendly order.
  const rand = randomSeeded(spec.seed);
  const perm = Int32Array.from({ length: n }, (_, i) => i);
  for (let i = 0; i < k; i++) {
    const j = i + Math.floor(rand() * (n - i));
    const t = perm[i];
    perm[i] = perm[j];
    perm[j] = t;
  }
  return perm.slice(0, k).sort();
}
