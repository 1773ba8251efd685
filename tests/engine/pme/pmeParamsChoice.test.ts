/**
 * The parameter choice of pmeSetup: the error factor that decides is the larger of those for the r_c
 * and 2r_c neighbourhoods (it jumps between density levels on clustered data), the budget is met, and
 * the α refinement between grid values never lengthens the cutoff the grid value would need.
 */
import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { densityStats } from '../../../engine/pme/density';
import { errorModelFactor, errorModelFieldSample, errorModelSamples } from '../../../engine/pme/errorModel';
import { meshErrorFunctional, realErrorFunctional } from '../../../engine/pme/meshError';
import { meshSpacing, pmeSetup, realCutoffFor } from '../../../engine/pme/index';
import { demoSnapshot } from '../../../engine/demo/demoSnapshot';

describe('PME parameter choice', () => {
  const d = demoSnapshot(20000, 611);
  const box = boxMake(1);
  const tol = 1e-4;
  const setup = pmeSetup(d.positions, d.masses, box, { tol });
  const p = setup.params;

  it('decides with the larger error factor of the r_c and 2r_c neighbourhoods, and meets the budget with it', () => {
    const stats = densityStats(setup.positions, d.masses, box);
    const samples = errorModelSamples(stats, d.masses, errorModelFieldSample(setup.positions, d.masses, box, 1), 1);
    const h = meshSpacing(box, p.mesh);
    const z1 = errorModelFactor(stats, d.masses, samples, 1, h, p.rCut).factor;
    const z2 = errorModelFactor(stats, d.masses, samples, 1, h, 2 * p.rCut).factor;
    // settled to 5 % (pmeSetup's criterion) on the larger of the two. On this snapshot the r_c factor is the
    // larger; the case where 2r_c decides (10^6 clumped, where the r_c factor collapses) is in the benchmark.
    expect(p.errorFactor).toBeGreaterThanOrEqual(0.95 * Math.max(z1, z2));
    const total = p.meshFunctional + p.realFunctional + p.softeningFunctional;
    expect(Math.sqrt(p.errorFactor * total)).toBeLessThanOrEqual((tol / 1.5) * (1 + 1e-9));
  });

  it('the refined α needs no longer a cutoff than the grid values 2^{±1/8} around it (same mesh, same budget)', () => {
    const budget = p.meshFunctional + p.realFunctional; // what the chosen parameters spend
    const cut = (a: number) => {
      const q = meshErrorFunctional(p.mesh, box, a, p.order, p.influence, 16);
      return q < budget ? realCutoffFor(a, budget - q) : Infinity;
    };
    expect(realErrorFunctional(p.alpha, p.rCut)).toBeCloseTo(p.realFunctional, 12);
    const step = Math.pow(2, 1 / 8);
    expect(cut(p.alpha)).toBeLessThanOrEqual(cut(p.alpha * step) * (1 + 1e-6));
    expect(cut(p.alpha)).toBeLessThanOrEqual(cut(p.alpha / step) * (1 + 1e-6));
  });
});
