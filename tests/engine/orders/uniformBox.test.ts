import { describe, expect, it } from 'vitest';
import { uniformBoxField, uniformBoxInverseDistanceIntegral } from '../../../engine/orders/uniformBox';
import { integrate } from '../../helpers/quadrature';

/**
 * Independent route to the homogeneous box (the divergence theorem, then numerical quadrature):
 *   ∫ (s − P)/|s − P|³ dV = −∮ n̂ / |s − P| dA,     ∫ dV/|s − P| = ½ ∮ (s − P)·n̂ / |s − P| dA,
 * so both reduce to the face integrals I_F = ∫_F dA/|s − P|. Each face is split at the foot of the
 * perpendicular from P into four signed rectangles with a corner at the foot; on each, the Duffy transform
 * (two triangles mapped to the unit square, Jacobian ∝ t) removes the 1/r singularity of points on the face,
 * and Gauss–Legendre panels graded geometrically toward t = 0 resolve points just off it.
 */
function cornerRectangle(a: number, b: number, h: number): number {
  // ∫_0^a ∫_0^b du dv / √(u² + v² + h²) for a, b ≥ 0
  if (a === 0 || b === 0) return 0;
  const tri = (p: number, q: number) =>
    integrate(
      (w) => {
        // geometric panels in t: [0, 2^-40], …, [1/2, 1]
        let s = 0;
        let hi = 1;
        for (let k = 0; k < 40; k++) {
          const lo = k === 39 ? 0 : hi / 2;
          s += integrate((t) => (p * q * t) / Math.sqrt(t * t * (p * p + q * q * w * w) + h * h), lo, hi, 1);
          hi = lo;
        }
        return s;
      },
      0,
      1,
      4,
    );
  return tri(a, b) + tri(b, a);
}

function faceIntegral(pu: number, pv: number, u1: number, u2: number, v1: number, v2: number, h: number): number {
  // ∫_{u1}^{u2} ∫_{v1}^{v2} dA / √((u − pu)² + (v − pv)² + h²), as signed rectangles from the foot (pu, pv)
  const signedSpan = (lo: number, hi: number, foot: number): [number, number][] => [
    [hi - foot, 1],
    [lo - foot, -1],
  ];
  let total = 0;
  for (const [du, su] of signedSpan(u1, u2, pu)) {
    for (const [dv, sv] of signedSpan(v1, v2, pv)) {
      total += su * sv * Math.sign(du) * Math.sign(dv) * cornerRectangle(Math.abs(du), Math.abs(dv), Math.abs(h));
    }
  }
  return total;
}

/** Field per unit Gρ and ∫dV/r of the box [lo, hi] at P by quadrature over its faces. */
function quadratureBox(P: number[], lo: number[], hi: number[]): { field: number[]; integral: number } {
  const field = [0, 0, 0];
  let integral = 0;
  for (let ax = 0; ax < 3; ax++) {
    const u = (ax + 1) % 3, v = (ax + 2) % 3;
    for (const [plane, normal] of [[hi[ax], 1], [lo[ax], -1]] as const) {
      const I = faceIntegral(P[u], P[v], lo[u], hi[u], lo[v], hi[v], plane - P[ax]);
      field[ax] -= normal * I;
      integral += 0.5 * (plane - P[ax]) * normal * I;
    }
  }
  return { field, integral };
}

const LO = [0.3, -0.2, 1.1];
const HI = [1.3, 1.8, 4.1]; // a 1 × 2 × 3 box, off the origin
const closedField = (P: number[]) => {
  const out = new Float64Array(3);
  uniformBoxField(P[0], P[1], P[2], LO[0], HI[0], LO[1], HI[1], LO[2], HI[2], out);
  return Array.from(out);
};
const closedIntegral = (P: number[]) => uniformBoxInverseDistanceIntegral(P[0], P[1], P[2], LO[0], HI[0], LO[1], HI[1], LO[2], HI[2]);

describe('uniformBoxField / uniformBoxInverseDistanceIntegral against face quadrature (divergence theorem)', () => {
  const points: [string, number[]][] = [
    ['inside, off-centre', [0.55, 0.9, 2.0]],
    ['inside, near a face (1e-6)', [1.3 - 1e-6, 0.4, 3.3]],
    ['on a face', [0.3, 0.7, 2.5]],
    ['on an edge', [1.3, -0.2, 2.2]],
    ['on a corner', [1.3, 1.8, 4.1]],
    ['outside, near', [1.9, 0.1, 0.5]],
    ['outside, beyond a corner', [-1.0, 3.0, 5.5]],
    ['outside, 20 sides away', [12.0, 15.0, -18.0]],
  ];
  for (const [name, P] of points) {
    it(`${name}: field and potential agree to 1e-11 relative`, () => {
      const q = quadratureBox(P, LO, HI);
      const f = closedField(P);
      const scale = Math.hypot(...q.field);
      for (let d = 0; d < 3; d++) expect(Math.abs(f[d] - q.field[d])).toBeLessThan(1e-11 * scale);
      expect(Math.abs(closedIntegral(P) - q.integral)).toBeLessThan(1e-11 * Math.abs(q.integral));
    });
  }
});

describe('uniformBox: physics of the closed form', () => {
  it('potential at the centre of a unit cube is 3 ln((√3+1)/(√3−1)) − π/2 = 2.3800773… (closed form, from memory; the quadrature above confirms)', () => {
    const v = uniformBoxInverseDistanceIntegral(0, 0, 0, -0.5, 0.5, -0.5, 0.5, -0.5, 0.5);
    expect(Math.abs(v - (3 * Math.log((Math.sqrt(3) + 1) / (Math.sqrt(3) - 1)) - Math.PI / 2))).toBeLessThan(1e-14);
  });

  it('Poisson: the divergence of the field is −4π inside and 0 outside (central differences, h = 1e-4)', () => {
    const h = 1e-4;
    const div = (P: number[]) => {
      let s = 0;
      for (let d = 0; d < 3; d++) {
        const a = [...P], b = [...P];
        a[d] += h;
        b[d] -= h;
        s += (closedField(a)[d] - closedField(b)[d]) / (2 * h);
      }
      return s;
    };
    expect(Math.abs(div([0.8, 0.3, 3.0]) + 4 * Math.PI)).toBeLessThan(1e-6);
    expect(Math.abs(div([2.0, 0.3, 3.0]))).toBeLessThan(1e-6);
  });

  it('the field is the gradient of the potential integral (a = −∇φ with φ = −Gρ∫dV/r; points off the surface, where ∇² jumps)', () => {
    const h = 1e-5;
    for (const P of [[0.5, 0.5, 2.0], [1.25, 0.5, 2.0], [3.0, -1.0, 0.0]]) {
      const f = closedField(P);
      for (let d = 0; d < 3; d++) {
        const a = [...P], b = [...P];
        a[d] += h;
        b[d] -= h;
        expect(Math.abs((closedIntegral(a) - closedIntegral(b)) / (2 * h) - f[d])).toBeLessThan(1e-8 * Math.hypot(...f));
      }
    }
  });

  it('is continuous across faces, edges and corners (±1e-10 around the surface point)', () => {
    for (const P of [[0.3, 0.7, 2.5], [1.3, -0.2, 2.2], [1.3, 1.8, 4.1]]) {
      const f0 = closedField(P);
      for (const e of [1e-10, -1e-10]) {
        const f1 = closedField(P.map((v) => v + e));
        for (let d = 0; d < 3; d++) expect(Math.abs(f1[d] - f0[d])).toBeLessThan(1e-8);
      }
      expect(f0.every(Number.isFinite)).toBe(true);
    }
  });

  it('far away it is the monopole field −V r̂/r² (within the quadrupole order (L/r)², here 1e-5)', () => {
    const P = [400, -300, 500];
    const c = [0.8, 0.8, 2.6];
    const r = P.map((v, d) => c[d] - v);
    const R = Math.hypot(...r);
    const f = closedField(P);
    for (let d = 0; d < 3; d++) expect(Math.abs(f[d] - (6 * r[d]) / R ** 3)).toBeLessThan(1e-5 * (6 / R ** 2));
  });
});
