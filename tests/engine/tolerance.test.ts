/**
 * The promise of the tolerance option: every target's relative force error |a − a_ref| / |a_ref| ≤ tol,
 * and potentials within tol·rms φ_ref, measured against a tol = 1e-13 evaluation of the same targets.
 * Physical units (kpc, M☉, km/s; G = 4.30091e−6, PHYSICS.md "Units"), boxes of 50 kpc scale, both kinds of
 * snapshot (uniform; clustered: the engine's knots-and-filament demo), cubic and rectangular boxes, all-target
 * mode (N = 400) and a seeded sample of 300 targets out of N = 4000, seeds 1–3 (not chosen by outcome).
 */
import { describe, expect, it } from 'vitest';
import { ewaldForces, targetsResolve } from '../../engine/index';
import { type Snapshot, snapshotClustered, snapshotUniform } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError } from '../helpers/tolerance';

const G_KPC = 4.30091e-6;
const TOLS = [1e-4, 1e-6, 1e-8];
const SEEDS = [1, 2, 3];
const CUBIC: [number, number, number] = [50, 50, 50];
const RECT: [number, number, number] = [50, 80, 35];

type Make = (n: number, seed: number) => Snapshot;

interface Worst {
  force: number; // max over runs of (max relative force error) / tol
  potential: number; // max over runs of (max |Δφ| / rms φ_ref) / tol
  where: string;
}

/** Runs every seed × mode × tol and returns the worst error-to-tolerance ratios. */
function worstRatios(make: Make): Worst {
  const worst: Worst = { force: 0, potential: 0, where: '' };
  for (const seed of SEEDS) {
    for (const [n, sample] of [[400, 0], [4000, 300]] as const) {
      const s = make(n, seed);
      const targets = sample ? targetsResolve({ kind: 'sample', count: sample, seed: 100 + seed }, n) : null;
      const ref = ewaldForces(s.positions, s.masses, s.box, targets, { G: G_KPC, tol: 1e-13 });
      for (const tol of TOLS) {
        const r = ewaldForces(s.positions, s.masses, s.box, targets, { G: G_KPC, tol });
        const f = maxVectorRelativeError(r.acc, ref.acc) / tol;
        const p = maxScalarErrorOverRms(r.phi, ref.phi) / tol;
        if (f > worst.force) {
          worst.force = f;
          worst.where = `seed ${seed}, N ${n}, ${sample ? `${sample} sampled targets` : 'all targets'}, tol ${tol}`;
        }
        worst.potential = Math.max(worst.potential, p);
      }
    }
  }
  return worst;
}

const cases: [string, Make][] = [
  ['uniform, cubic 50 kpc box', (n, seed) => snapshotUniform(n, seed, CUBIC, 1e12)],
  ['uniform, rectangular 50×80×35 kpc box', (n, seed) => snapshotUniform(n, seed, RECT, 1e12)],
  ['clustered, cubic 50 kpc box', (n, seed) => snapshotClustered(n, seed, CUBIC, 1e12)],
  ['clustered, rectangular 50×80×35 kpc box', (n, seed) => snapshotClustered(n, seed, RECT, 1e12)],
];

describe('ewaldForces honours the requested tolerance (tol 1e-4, 1e-6, 1e-8; G = 4.30091e-6)', () => {
  const results = new Map<string, Worst>();
  const worstFor = (name: string, make: Make) => {
    if (!results.has(name)) results.set(name, worstRatios(make));
    return results.get(name)!;
  };

  for (const [name, make] of cases) {
    it(`potentials: max |φ − φ_ref| ≤ tol · rms φ_ref — ${name}`, () => {
      expect(worstFor(name, make).potential).toBeLessThanOrEqual(1);
    });
  }

  for (const [name, make] of cases) {
    it(`forces: every target's relative error |a − a_ref|/|a_ref| ≤ tol — ${name}`, () => {
      const w = worstFor(name, make);
      expect(w.force, `worst at ${w.where}`).toBeLessThanOrEqual(1);
    });
  }
});

describe('ewaldForces honours the tolerance at particles whose |a| lies far below the expected smallest acceleration', () => {
  // ENGINE BUG (see report): params.ts scales the budget to accelerationScale (the Holtsmark-based EXPECTED
  // smallest |a| among N), but the actual smallest |a| fluctuates well below it. Over seeds 20–39 × N 200, 400,
  // 1000 × tol 1e-4, 1e-6, 1e-8 × four snapshot kinds (720 runs) four violate tol, all at such particles.
  // This is the worst: clustered cubic, seed 25, N 200, tol 1e-4, smallest |a| = 0.16 × scale, error 1.84 × tol.
  it('clustered cubic 50 kpc box, seed 25, N = 200, all targets, tol 1e-4: every relative force error ≤ tol', () => {
    const s = snapshotClustered(200, 25, CUBIC, 1e12);
    const ref = ewaldForces(s.positions, s.masses, s.box, null, { G: G_KPC, tol: 1e-13 });
    const r = ewaldForces(s.positions, s.masses, s.box, null, { G: G_KPC, tol: 1e-4 });
    expect(maxVectorRelativeError(r.acc, ref.acc) / 1e-4).toBeLessThanOrEqual(1);
  });
});
