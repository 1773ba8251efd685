/** The plots' inputs from the store's comparison and convergence results. */
import { vectorNorms } from '../../../engine/stats/relativeError';
import { ERROR_PERCENTILES } from '../../../engine/stats/errorSummary';
import type { Comparison, ConvergenceRun, ConvergenceSeries } from '../state/types';
import type { ScatterAxis } from '../state/settings';
import type { DistributionData } from './distributionPlot';
import type { ScatterData } from './scatterPlot';
import type { ConvergenceData } from './convergencePlot';

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
