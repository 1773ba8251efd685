/** nonFiniteTarget: the command line's last check before writing results. */
import { describe, expect, it } from 'vitest';
import { nonFiniteTarget } from '../../app/cli/resultCheck';

describe('nonFiniteTarget', () => {
  const acc = () => Float64Array.from({ length: 3 * 50 }, (_, k) => Math.sin(k) * 1e-3);
  const phi = () => Float64Array.from({ length: 50 }, (_, t) => -1 - t);

  it('−1 when every value is finite, with or without potentials (shared memory too)', () => {
    expect(nonFiniteTarget(acc(), phi())).toBe(-1);
    expect(nonFiniteTarget(acc(), null)).toBe(-1);
    const shared = new Float64Array(new SharedArrayBuffer(8 * 150));
    shared.set(acc());
    expect(nonFiniteTarget(shared, null)).toBe(-1);
  });

  it('the first target with NaN, +∞ or −∞ in any component or in the potential', () => {
    for (const bad of [NaN, Infinity, -Infinity]) {
      const a = acc();
      a[3 * 17 + 2] = bad;
      a[3 * 40] = bad;
      expect(nonFiniteTarget(a, phi())).toBe(17);
      const p = phi();
      p[9] = bad;
      expect(nonFiniteTarget(acc(), p)).toBe(9);
      expect(nonFiniteTarget(acc(), null)).toBe(-1);
    }
  });
});
