/** The target set of a run: all particles, or a seeded sample (memoised: a sample of 10⁶ takes a while). */
import { targetsResolve } from '../../../engine/targets';
import { planWork } from './planBudget';
import type { TargetSet } from './types';

const memo = new Map<string, TargetSet>();

/** All n particles (count null or ≥ n) or `count` drawn without replacement with `seed`; sorted rows. */
export function targetSetMake(n: number, count: number | null, seed: number): TargetSet {
  const all = count === null || count >= n;
  const key = all ? 'all' : `sample:${count}:${seed}`;
  const hit = memo.get(`${n}|${key}`);
  if (hit) return hit;
  planWork(n);
  let indices: Int32Array;
  if (all) {
    indices = new Int32Array(n);
    for (let i = 0; i < n; i++) indices[i] = i;
  } else indices = targetsResolve({ kind: 'sample', count: count!, seed }, n);
  const set: TargetSet = { key, all, indices };
  if (memo.size >= 8) memo.delete(memo.keys().next().value!);
  memo.set(`${n}|${key}`, set);
  return set;
}

/** Rows `rows` of a flat array with `stride` numbers per row. */
export function rowsPick(values: Float64Array, rows: Int32Array, stride: number): Float64Array {
  const out = new Float64Array(rows.length * stride);
  for (let t = 0; t < rows.length; t++) for (let d = 0; d < stride; d++) out[t * stride + d] = values[rows[t] * stride + d];
  return out;
}
