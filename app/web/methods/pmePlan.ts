/**
 * The plan of particle-mesh Ewald before it runs: the parameters the engine will choose for the
 * tolerance (α, cutoff, mesh, B-spline order), its a-priori predicted rms relative error, and the
 * expected time from the engine's own cost model.
 */
import type { Box } from '../../../engine/box';
import { pmeChoose } from '../../../engine/pme/pme';
import type { PmeOptions, PmeParams } from '../../../engine/pme/pmeParams';
import type { MethodPlan } from './methodPlan';
import type { PmeMethodOptions } from './moreOptions';

/**
 * Measured ÷ modelled time and the fixed and per-particle setup (error model, tables) that the
 * engine's cost model leaves out, in ns; from pmeForces on the demo on the project machine (CPU time:
 * N = 4096 0.42–0.67 s against a model of 0.03–0.05 s; N = 10⁵ 3.7 s and 5.1 s against 3.2 s and 5.1 s
 * at tol 1e-4 and 1e-6).
 */
export const PME_COST = { factor: 1.05, setupNs: 300e6, perParticleNs: 2000 } as const;

/**
 * The parameters pmeForces will use: the first half of the engine's own setup (pmeChoose: the same
 * clustering measure, error model and choice; no cell list or tables are built).
 */
export function pmeParamsPlan(positions: Float64Array, masses: Float64Array, box: Box, options: PmeOptions): PmeParams {
  return pmeChoose(positions, masses, box, options).params;
}

/** Expected one-core time (ns) of a run with these parameters on n particles. */
export function pmeCostNs(params: PmeParams, n: number): number {
  return params.modelSeconds * 1e9 * PME_COST.factor + PME_COST.setupNs + n * PME_COST.perParticleNs;
}

/** The plan of PME (every particle is computed; `targets` only picks rows, so it does not change the cost). */
export function pmePlan(m: PmeMethodOptions, positions: Float64Array, masses: Float64Array, box: Box): MethodPlan {
  const p = pmeParamsPlan(positions, masses, box, m.options);
  return {
    lines: [
      { key: 'alpha', label: 'α (splitting)', value: p.alpha, unit: '1/length' },
      { key: 'rCut', label: 'r cut', value: p.rCut, unit: 'length' },
      { key: 'mesh', label: 'mesh', value: p.mesh.join(' × ') },
      { key: 'order', label: 'B-spline order p', value: p.order },
      { key: 'influence', label: 'influence function', value: p.influence === 'optimal' ? 'optimal' : 'plain B-spline' },
      { key: 'predictedRms', label: 'predicted rms error', value: p.predictedRmsError, unit: 'acceleration', hint: 'at the mean Σm²/V; clustered regions are worse' },
    ],
    predictedRelative: p.predictedRelativeError,
    predictedRms: p.predictedRmsError,
    costNs: pmeCostNs(p, masses.length),
    note: 'computes every particle (the targets are picked from them); its tolerance bounds the rms relative error over all particles, not each one',
  };
}
