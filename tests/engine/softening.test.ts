import { describe, expect, it } from 'vitest';
import { NO_SOFTENING, softenedForceFactor, softenedPotential, softeningSupport, softeningValidate } from '../../engine/index';
import { relativeDifference } from '../helpers/tolerance';
import {
  plummerForceFactor,
  plummerPotential,
  splineEnclosedMass,
  splineForceFactor,
  splinePotential,
} from '../reference/softKernels';

const radii = (rMax: number, n: number) => Array.from({ length: n }, (_, i) => (rMax * (i + 0.37)) / n);

describe('softenedForceFactor / softenedPotential, cubic spline (Monaghan & Lattanzio 1985)', () => {
  // The engine's piecewise polynomials sum terms up to 64/3 to values ≈ 1, so a few tens of ulp of relative
  // error are inherent; 1e-13 bounds that with margin and is far below any tolerance the engine offers.
  it('the spline density integrates to unit mass (quadrature sanity check)', () => {
    expect(Math.abs(splineEnclosedMass(0.7, 0.7) - 1)).toBeLessThan(1e-15);
  });

  it('force factor equals M(<r)/r³ of the M&L density by quadrature, at 600 radii in (0, 1.5h)', () => {
    for (const h of [0.7, 3e-3]) {
      const s = { kind: 'spline', h } as const;
      let worst = 0;
      for (const r of radii(1.5 * h, 600)) worst = Math.max(worst, relativeDifference(softenedForceFactor(s, r * r), splineForceFactor(r, h)));
      expect(worst).toBeLessThan(1e-13);
    }
  });

  it('potential kernel equals M(<r)/r + ∫_r^h 4πsW ds by quadrature, at 600 radii in (0, 1.5h), and ψ(0) = 14/(5h)', () => {
    for (const h of [0.7, 3e-3]) {
      const s = { kind: 'spline', h } as const;
      let worst = 0;
      for (const r of radii(1.5 * h, 600)) worst = Math.max(worst, relativeDifference(softenedPotential(s, r * r), splinePotential(r, h)));
      expect(worst).toBeLessThan(1e-13);
      expect(relativeDifference(softenedPotential(s, 0), 14 / (5 * h))).toBeLessThan(1e-15);
      expect(relativeDifference(softenedForceFactor(s, 0), 32 / (3 * h ** 3))).toBeLessThan(1e-15);
    }
  });

  it('is exactly Newtonian (1/r³, 1/r) at and beyond the support h, and continuous across u = ½ and u = 1', () => {
    const h = 0.25, s = { kind: 'spline', h } as const;
    for (const r of [h, 1.0001 * h, 2 * h, 17 * h]) {
      expect(relativeDifference(softenedForceFactor(s, r * r), 1 / r ** 3)).toBeLessThan(3e-16);
      expect(relativeDifference(softenedPotential(s, r * r), 1 / r)).toBeLessThan(3e-16);
    }
    for (const u of [0.5, 1]) {
      const below = (u * h * (1 - 1e-12)) ** 2, above = (u * h * (1 + 1e-12)) ** 2;
      expect(relativeDifference(softenedForceFactor(s, below), softenedForceFactor(s, above))).toBeLessThan(1e-10);
      expect(relativeDifference(softenedPotential(s, below), softenedPotential(s, above))).toBeLessThan(1e-10);
    }
  });
});

describe('softenedForceFactor / softenedPotential, Plummer', () => {
  it('equal the Plummer-sphere kernels M(<r)/r³ and M(<r)/r + ∫4πsρ (density by quadrature) and the closed forms', () => {
    for (const eps of [1, 0.013]) {
      const s = { kind: 'plummer', eps } as const;
      for (const r of radii(20 * eps, 200)) {
        expect(relativeDifference(softenedForceFactor(s, r * r), plummerForceFactor(r, eps))).toBeLessThan(1e-14);
        expect(relativeDifference(softenedPotential(s, r * r), plummerPotential(r, eps))).toBeLessThan(1e-14);
        expect(relativeDifference(softenedForceFactor(s, r * r), (r * r + eps * eps) ** -1.5)).toBeLessThan(1e-15);
      }
      expect(relativeDifference(softenedPotential(s, 0), 1 / eps)).toBeLessThan(1e-15);
    }
  });
});

describe('softening kind none, softeningValidate, softeningSupport', () => {
  it('no softening is Newton: f = 1/r³, ψ = 1/r', () => {
    for (const r of [1e-5, 0.3, 4]) {
      expect(relativeDifference(softenedForceFactor(NO_SOFTENING, r * r), 1 / r ** 3)).toBeLessThan(3e-16);
      expect(relativeDifference(softenedPotential(NO_SOFTENING, r * r), 1 / r)).toBeLessThan(3e-16);
    }
  });

  it('softeningValidate rejects ε or h that is not a positive finite number, naming the parameter', () => {
    for (const bad of [0, -1, NaN, Infinity]) {
      expect(() => softeningValidate({ kind: 'plummer', eps: bad })).toThrow(/Plummer softening length/);
      expect(() => softeningValidate({ kind: 'spline', h: bad })).toThrow(/spline softening support h/);
    }
    expect(() => softeningValidate({ kind: 'spline', h: -1 })).toThrow(RangeError);
    expect(softeningValidate({ kind: 'spline', h: 0.1 })).toEqual({ kind: 'spline', h: 0.1 });
  });

  it('softeningSupport is h for the spline, Infinity for Plummer, 0 without softening', () => {
    expect(softeningSupport({ kind: 'spline', h: 0.3 })).toBe(0.3);
    expect(softeningSupport({ kind: 'plummer', eps: 0.3 })).toBe(Infinity);
    expect(softeningSupport(NO_SOFTENING)).toBe(0);
  });
});
