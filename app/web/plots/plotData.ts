/** The plots' inputs from the store's comparison and convergence results. */
import { vectorNorms } from '../../../engine/stats/relativeError';
import { ERROR_PERCENTILES } from '../../../engine/stats/errorSummary';
import type { Comparison, ConvergenceRun, ConvergenceSeries } from '../state/types';
import type { ScatterAxis } from '../state/settings';
import type { DistributionData } from './distributionPlot';
import type { ScatterData } from './scatterPlot';
import type { ConvergenceData } from './convergencePlot';
import type { OrderConvergenceData } from './orderConvergencePlot';
import type { OrderTrace } from '../state/orderRuns';

export function distributionData(c: Comparison): DistributionData {
  return {
    edges: c.histogram.edges,
    counts: c.histogram.counts,
    cdfX: c.cdf.x,
    cdfF: c.cdf.f,
    levels: [...ERROR_PERCENTILES],
    percentiles: c.summary.percentiles,
    max: c.summary.max,
    zeros: c.histogram.zeros,
  };
}

const normsMemo = new WeakMap<Float64Array, Float64Array>();

/** |a_B| per target (memoised per acceleration array). */
export function referenceNorms(c: Comparison): Float64Array {
  let v = normsMemo.get(c.runB.acc);
  if (!v) {
    v = vectorNorms(c.runB.acc);
    normsMemo.set(c.runB.acc, v);
  }
  return v;
}

/** Relative error against |a_B|. */
export function scatterByAcceleration(c: Comparison, selected: number | null): ScatterData {
  return {
    x: referenceNorms(c),
    y: c.relative,
    xLabel: '|a_B| (acceleration units)',
    yLabel: 'relative error',
    title: 'Relative error against |a_B|',
    emphasis: c.summary.worst,
    selected,
  };
}

const densityMemo = new WeakMap<Float64Array, Float64Array>();

/** Relative error against nearest-neighbour distance, or against local density over the mean. */
export function scatterByNeighbours(c: Comparison, axis: ScatterAxis, selected: number | null): ScatterData | null {
  const nb = c.neighbours;
  if (!nb) return null;
  if (axis === 'nearest') {
    return { x: nb.nearest, y: c.relative, xLabel: 'nearest-neighbour distance (length units)', yLabel: 'relative error', title: 'Relative error against nearest-neighbour distance', emphasis: c.summary.worst, selected };
  }
  let rel = densityMemo.get(nb.density);
  if (!rel) {
    rel = nb.density.map((v) => v / nb.meanDensity);
    densityMemo.set(nb.density, rel);
  }
  return { x: rel, y: c.relative, xLabel: `local density ÷ mean (k = ${nb.kUsed})`, yLabel: 'relative error', title: 'Relative error against local density', emphasis: c.summary.worst, selected };
}

export function convergenceData(run: ConvergenceRun, s: ConvergenceSeries): ConvergenceData {
  const mesh = s.method === 'mesh';
  return {
    title: mesh ? 'Coarse mesh: deviation against mesh size' : 'Ewald: deviation against the tolerance asked',
    xLabel: s.xLabel,
    x: s.x,
    errors: s.errors,
    predicted: s.predicted,
    reverseX: !mesh,
    plainTicks: mesh,
    floor: run.referenceTol,
  };
}

/** Panels shown per order: the worst few of the comparison first, then the others in row order. */
export const ORDER_PANELS = 6;
export const ORDER_PANELS_WORST = 3;

/**
 * The component an order's panels show by default: the axis along which its predicted limit departs most
 * from Ewald (the shape term), or, where it does not (screened, or a vanishing dipole), the axis of the
 * largest Ewald accelerations.
 */
export function orderDefaultComponent(t: OrderTrace): 0 | 1 | 2 {
  const K = t.targets.length;
  const shift = [0, 0, 0], size = [0, 0, 0];
  for (let k = 0; k < K; k++) {
    for (let d = 0; d < 3; d++) {
      size[d] += Math.abs(t.ewald[3 * k + d]);
      if (t.limit) shift[d] += Math.abs(t.limit[3 * k + d] - t.ewald[3 * k + d]);
    }
  }
  const pick = (v: number[]) => (v[0] >= v[1] && v[0] >= v[2] ? 0 : v[1] >= v[2] ? 1 : 2);
  const total = size[0] + size[1] + size[2];
  return shift[0] + shift[1] + shift[2] > 1e-6 * total ? pick(shift) : pick(size);
}

/** The panels of one order's convergence plot for component `component` (ids: particle ids per input row, else rows). */
export function orderConvergenceData(t: OrderTrace, component: 0 | 1 | 2, ids: ArrayLike<number> | null = null): OrderConvergenceData {
  const K = t.targets.length;
  const rows = t.shell.length;
  const worst = Array.from({ length: K }, (_, k) => k).filter((k) => t.tags[k]).sort((a, b) => Number(t.tags[a].slice(6)) - Number(t.tags[b].slice(6)));
  const others = Array.from({ length: K }, (_, k) => k).filter((k) => !t.tags[k]);
  const chosen = [...worst.slice(0, ORDER_PANELS_WORST), ...others].slice(0, ORDER_PANELS);
  const axis = 'xyz'[component];
  const screened = t.order === 'screened';
  const panels = chosen.map((k) => {
    const row = t.targets[k];
    const y: number[] = [];
    for (let s = 0; s < rows; s++) y.push(t.partial[(s * K + k) * 3 + component]);
    return {
      title: `${ids ? `id ${ids[row]}` : `row ${row}`}${t.tags[k] ? ` · ${t.tags[k]}` : ''}`,
      y,
      ewald: t.ewald[3 * k + component],
      limit: t.limit ? t.limit[3 * k + component] : null,
    };
  });
  const xName = screened ? 'screening λ (1/length; λ → 0 to the right)' : t.order.startsWith('slab') ? 'layers R (slab half-width in cells)' : t.order === 'cube' ? 'cube half-width R (cells)' : 'sphere radius R (longest box sides)';
  return {
    title: `${t.label}: partial sums against ${screened ? 'λ' : 'R'}${t.background || screened ? '' : ' (mean density kept)'}`,
    xLabel: xName,
    x: Array.from(t.shell),
    logX: screened,
    yLabel: `a_${axis}`,
    panels,
  };
}

/**
 * The relative deviation |a_R − a_limit| / |a_limit| of every followed target from its predicted limit,
 * shell by shell from R = 1 (or λ by λ, against Ewald), for the log–log convergence plot; `floor` is the
 * tolerance of the Ewald values the limit is built on.
 */
export function orderDeviationData(t: OrderTrace, floor: number): ConvergenceData | null {
  const K = t.targets.length;
  const ref = t.limit ?? t.ewald;
  const screened = t.order === 'screened';
  const rows = Array.from(t.shell, (x, s) => s).filter((s) => t.shell[s] > 0);
  if (rows.length < 2) return null;
  const errors = rows.map((s) => {
    const e = new Float64Array(K);
    for (let k = 0; k < K; k++) {
      const o = (s * K + k) * 3;
      const d = Math.hypot(t.partial[o] - ref[3 * k], t.partial[o + 1] - ref[3 * k + 1], t.partial[o + 2] - ref[3 * k + 2]);
      e[k] = d / Math.hypot(ref[3 * k], ref[3 * k + 1], ref[3 * k + 2]);
    }
    return e;
  });
  return {
    title: `${t.label}: deviation from the predicted limit`,
    xLabel: screened ? 'screening λ (1/length)' : t.order.startsWith('slab') ? 'layers R' : 'shell R',
    x: rows.map((s) => t.shell[s]),
    errors,
    predicted: rows.map(() => null),
    reverseX: screened,
    plainTicks: false,
    floor,
    yLabel: screened ? '|a_λ − a_Ewald| / |a_Ewald|' : '|a_R − a_limit| / |a_limit|',
  };
}
