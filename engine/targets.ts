/**
 * Target selection: which particles get forces. Indices are 0-based input rows.
 */
import { randomSeeded } from './util/random';

export type TargetSpec =
  | { readonly kind: 'all' }
  | { readonly kind: 'first'; readonly count: number }
  | { readonly kind: 'sample'; readonly count: number; readonly seed: number };

/** Rows 0..n−1 in order: the targets of an all-particle run. */
export function targetsAll(n: number): Int32Array {
  const t = new Int32Array(n);
  for (let i = 0; i < n; i++) t[i] = i;
  return t;
}

/** Whether `targets` are rows 0..n−1 in order. */
export function targetsAreAll(targets: Int32Array, n: number): boolean {
  if (targets.length !== n) return false;
  for (let i = 0; i < n; i++) if (targets[i] !== i) return false;
  return true;
}

/** Resolves a target spec to sorted particle indices; a sample is a seeded draw without replacement. */
export function targetsResolve(spec: TargetSpec, n: number): Int32Array {
  if (spec.kind === 'all') return targetsAll(n);
  const k = spec.count;
  if (!Number.isInteger(k) || k < 1) throw new RangeError(`target count must be a positive integer, got ${k}`);
  if (spec.kind === 'first' || k >= n) return targetsAll(Math.min(k, n));
  // Partial Fisher–Yates over an index permutation, then sort for cache-friendly order.
  const rand = randomSeeded(spec.seed);
  const perm = targetsAll(n);
  for (let i = 0; i < k; i++) {
    const j = i + Math.floor(rand() * (n - i));
    const t = perm[i];
    perm[i] = perm[j];
    perm[j] = t;
  }
  return perm.slice(0, k).sort();
}
