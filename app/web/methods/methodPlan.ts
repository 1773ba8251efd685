/**
 * What a method will do before it runs: the parameters it will choose, its predicted error and an
 * expected time. Cheap enough for the page to call on every settings change (Ewald's parameter choice
 * is a one-pass clustering measure plus a small search; no sums are done).
 */
import type { Box } from '../../../engine/box';
import { boxVolume } from '../../../engine/box';
import { ewaldParamsChoose, type EwaldParams } from '../../../engine/ewald/params';
import type { MethodOptions } from './methodOptions';
import { orderPlan } from './orderPlan';
import { pmePlan } from './pmePlan';

/** One shown line: a label and its value (already formatted by the caller, or a number). */
export interface PlanLine {
  readonly key: string;
  readonly label: string;
  readonly value: number | string;
  readonly unit?: string;
  readonly hint?: string;
}

export interface MethodPlan {
  /** Parameters the method will use (chosen or given). */
  readonly lines: readonly PlanLine[];
  /** Predicted relative error (the method's own measure), or null when it has no estimate. */
  readonly predictedRelative: number | null;
  /** Predicted rms acceleration error (acceleration units), or null. */
  readonly predictedRms: number | null;
  /** Model cost in nanoseconds on the reference machine, before calibration; 0 for free methods. */
  readonly costNs: number;
  readonly note?: string;
}

/**
 * Time model, in nanoseconds, of the engine's methods on the project machine (2 cores; fitted to runs of
 * the demo at N = 4096 … 10⁵ with all or 10 % of the particles as targets, within about 20 %). The page
 * refines it from each finished run (calibration in the store).
 */
export const COST_NS = {
  /** Ewald: one real-space pair term of the symmetric all-particle loop; of the per-target loop. */
  pairSymmetric: 14,
  pair: 9,
  /** Ewald: one particle × one k-vector (structure factor or evaluation). */
  kTerm: 1.1,
  /** Ewald: measured ÷ modelled sums (kernel overheads), a fixed setup, and setup per particle. */
  ewaldFactor: 1.5,
  ewaldSetup: 120e6,
  ewaldPerParticle: 1000,
  /** Mesh: per mesh point per FFT pass and per factor of its log₂ size; per particle (assign + interpolate). */
  meshPoint: 8.5,
  meshParticle: 250,
} as const;

/** Ewald parameters and cost for K targets among the snapshot's N particles. */
export function ewaldPlan(positions: Float64Array, masses: Float64Array, box: Box, options: MethodOptions & { method: 'ewald' }, targets: number): { params: EwaldParams; costNs: number } {
  const n = masses.length;
  const params = ewaldParamsChoose(positions, masses, box, options.options, targets);
  const V = boxVolume(box);
  const rl = Math.max(params.rCut, params.rSoft);
  const pairs = targets * ((4 * Math.PI) / 3) * rl ** 3 * (n / V);
  const kVectors = ((2 * Math.PI) / 3) * (params.kCut / (2 * Math.PI)) ** 3 * V;
  const real = targets >= n ? 0.5 * pairs * COST_NS.pairSymmetric : pairs * COST_NS.pair;
  const sums = real + (n + targets) * kVectors * COST_NS.kTerm;
  return { params, costNs: COST_NS.ewaldFactor * sums + COST_NS.ewaldSetup + n * COST_NS.ewaldPerParticle };
}

/** The plan of one method for `targets` targets (positions flat xyz, length units). */
export function methodPlan(m: MethodOptions, positions: Float64Array, masses: Float64Array, box: Box, targets: number): MethodPlan {
  switch (m.method) {
    case 'ewald': {
      const { params: p, costNs } = ewaldPlan(positions, masses, box, m, targets);
      return {
        lines: [
          { key: 'alpha', label: 'α (splitting)', value: p.alpha, unit: '1/length' },
          { key: 'rCut', label: 'r cut', value: p.rCut, unit: 'length' },
          { key: 'kCut', label: 'k cut', value: p.kCut, unit: '1/length' },
          { key: 'clustering', label: 'clustering factor', value: p.clustering, hint: 'N_cells Σ n_c² / N²; about 1 for uniform positions' },
        ],
        predictedRelative: p.predictedRelativeError,
        predictedRms: p.predictedRmsError,
        costNs,
      };
    }
    case 'mesh': {
      const mesh = m.options.mesh ?? 32;
      const cell = Math.max(box.lx, box.ly, box.lz) / mesh;
      const points = mesh ** 3;
      return {
        lines: [
          { key: 'mesh', label: 'mesh', value: `${mesh}³` },
          { key: 'cell', label: 'cell side', value: cell, unit: 'length' },
        ],
        predictedRelative: null,
        predictedRms: null,
        costNs: points * 4 * Math.log2(points) * COST_NS.meshPoint + masses.length * COST_NS.meshParticle,
        note: `no error estimate: forces are smoothed below about 2 cells (${(2 * cell).toPrecision(2)} length units)`,
      };
    }
    case 'file':
      return { lines: [], predictedRelative: null, predictedRms: null, costNs: 0, note: 'read from the snapshot; nothing to compute' };
    case 'pme':
      return pmePlan(m, positions, masses, box);
    default:
      return orderPlan(m, positions, masses, box, targets);
  }
}
