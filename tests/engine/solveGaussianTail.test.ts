/**
 * solveGaussianTail (the equation behind both cutoffs, params.ts) against a plain bisection from [0.5, 1]
 * run down to adjacent doubles: the Newton start only shortens the bisection, so the root must agree to a
 * couple of units in the last place (rounding noise in f near the root), over prefactors and budgets from
 * the whole range the parameter search visits.
 */
import { describe, expect, it } from 'vitest';
import { solveGaussianTail } from '../../engine/ewald/params';

function bisection(pref: number, eps: number): number {
  const target = Math.log(eps);
  const lead = Math.log(2 * pref);
  const f = (x: number) => lead - 0.5 * Math.log(x) - x * x - target;
  let lo = 0.5, hi = 1;
  if (f(lo) <= 0) return lo;
  while (f(hi) > 0) hi *= 2;
  for (let it = 0; it < 200; it++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return hi;
}

describe('solveGaussianTail', () => {
  it('agrees with plain bisection to 2 ulps for prefactors 1e-6…1e9 and budgets 1e-18…1e-1', () => {
    let worst = 0, equal = 0, total = 0;
    for (let a = -6; a <= 9; a += 0.37) {
      for (let e = -18; e <= -1; e += 0.41) {
        const pref = 10 ** a, eps = 10 ** e;
        const x = solveGaussianTail(pref, eps), y = bisection(pref, eps);
        worst = Math.max(worst, Math.abs(x - y) / (Number.EPSILON * y));
        if (x === y) equal++;
        total++;
      }
    }
    expect(worst).toBeLessThanOrEqual(2);
    expect(equal / total).toBeGreaterThan(0.9);
  });

  it('returns 0.5 when the budget is met already there, and a root x with f(x) ≤ 0 < f(x − ulp) otherwise', () => {
    expect(solveGaussianTail(1e-9, 0.5)).toBe(0.5);
    const x = solveGaussianTail(3.7, 1e-9);
    const f = (t: number) => Math.log(2 * 3.7) - 0.5 * Math.log(t) - t * t - Math.log(1e-9);
    expect(f(x)).toBeLessThanOrEqual(0);
    expect(f(x * (1 - 4 * Number.EPSILON))).toBeGreaterThan(0);
  });
});
