import { describe, expect, it } from 'vitest';
import { ewaldForceP, ewaldPotQ, kernelTableBuild, kernelTableForceP, kernelTablePotQ } from '../../engine/index';
import { seriesForceP, seriesPotQ } from '../reference/ewaldKernelSeries';

// u = (α r_c)² ≈ 30–40 for the tightest tolerances the engine chooses (tol 1e-13); 45 covers them.
const U_MAX = 45;

describe('kernelTableBuild(uMax)', () => {
  it('kernelTableForceP/PotQ reproduce ewaldForceP/ewaldPotQ to 2e-15 (absolute; both are ≤ 1.13) on [0, uMax]', () => {
    const table = kernelTableBuild(U_MAX);
    let worstP = 0, worstQ = 0;
    const samples = 45001;
    for (let i = 0; i < samples; i++) {
      const u = (U_MAX * i) / (samples - 1) + (i === samples - 1 ? 0 : 3.7e-5); // off the interval nodes
      worstP = Math.max(worstP, Math.abs(kernelTableForceP(table, u) - ewaldForceP(u)));
      worstQ = Math.max(worstQ, Math.abs(kernelTablePotQ(table, u) - ewaldPotQ(u)));
    }
    expect(worstP).toBeLessThan(2e-15);
    expect(worstQ).toBeLessThan(2e-15);
  });

  it('gives the screened pair force and potential with error ≤ 1e-14 of Newton\'s 1/r³ and 1/r (exact-series reference)', () => {
    // In the pair force 1/r³ − α³P(u) an error δP weighs δP·u^{3/2} against 1/r³ = α³u^{−3/2}; in the
    // potential δQ·u^{1/2} against 1/r. 1e-14 keeps the table far below the tightest tolerance tested (1e-13).
    const table = kernelTableBuild(U_MAX);
    let worstF = 0, worstPsi = 0;
    for (let i = 0; i <= 3000; i++) {
      const u = (U_MAX * i) / 3000 * (1 - 1e-12) + 1e-9;
      worstF = Math.max(worstF, Math.abs(kernelTableForceP(table, u) - seriesForceP(u)) * Math.max(1, u ** 1.5));
      worstPsi = Math.max(worstPsi, Math.abs(kernelTablePotQ(table, u) - seriesPotQ(u)) * Math.max(1, Math.sqrt(u)));
    }
    expect(worstF).toBeLessThan(1e-14);
    expect(worstPsi).toBeLessThan(1e-14);
  });

  it('tables cut from a longer one built before (per process) hold exactly the requested intervals and the same accuracy', () => {
    const small = kernelTableBuild(3.1);
    const long = kernelTableBuild(60);
    const again = kernelTableBuild(3.1);
    expect(again.uMax).toBe(3.1);
    expect(again.coef.length).toBe((Math.ceil(3.1 * 32) + 1) * 12);
    expect(again.coef).toEqual(small.coef);
    expect(long.coef.subarray(0, small.coef.length)).toEqual(small.coef);
    again.coef[0] = NaN; // a caller's copy: changing it leaves later tables alone
    expect(kernelTableBuild(3.1).coef[0]).toBe(small.coef[0]);
    for (let i = 0; i <= 600; i++) {
      const u = (60 * i) / 600 * (1 - 1e-12);
      expect(Math.abs(kernelTableForceP(long, u) - ewaldForceP(u))).toBeLessThan(2e-15);
      expect(Math.abs(kernelTablePotQ(long, u) - ewaldPotQ(u))).toBeLessThan(2e-15);
    }
  });

  it('covers u = uMax itself and rejects uMax ≤ 0 or non-finite with a RangeError naming uMax', () => {
    const table = kernelTableBuild(7.3);
    expect(Math.abs(kernelTableForceP(table, 7.3) - ewaldForceP(7.3))).toBeLessThan(2e-15);
    expect(Math.abs(kernelTablePotQ(table, 7.3) - ewaldPotQ(7.3))).toBeLessThan(2e-15);
    for (const bad of [0, -1, NaN, Infinity]) expect(() => kernelTableBuild(bad)).toThrow(/uMax/);
    expect(() => kernelTableBuild(0)).toThrow(RangeError);
  });
});
