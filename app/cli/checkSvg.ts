/**
 * `torusgrav check --svg DIR`: the web app's plots (app/web/plots, pure functions from data to SVG
 * text) drawn for the check's comparison: the distribution of the relative error, the error against
 * |a_ref| and against nearest-neighbour distance. A = the file's accelerations, B = the reference.
 */
import type { Box } from '../../engine/box';
import { cdfPoints, histogramLog } from '../../engine/stats/bins';
import { ERROR_PERCENTILES, errorSummaryFromRelative } from '../../engine/stats/errorSummary';
import { neighboursFind } from '../../engine/stats/neighbours';
import { sortedFinite } from '../../engine/stats/percentile';
import { vectorNorms } from '../../engine/stats/relativeError';
import { type DistributionData, distributionPlot } from '../web/plots/distributionPlot';
import { type ScatterData, scatterPlot } from '../web/plots/scatterPlot';

/** Size of every SVG written (px), as in the web app's plots panel. */
export const CHECK_SVG_WIDTH = 560;
export const CHECK_SVG_HEIGHT = 340;

/** The plot inputs of A against reference B (flat xyz per target), with the percentiles shown. */
export function checkDistributionData(rel: Float64Array, accA: Float64Array, accB: Float64Array): DistributionData {
  const sorted = sortedFinite(rel);
  const h = histogramLog(rel, 5);
  const cdf = cdfPoints(sorted, 600);
  const s = errorSummaryFromRelative(rel, accA, accB, 0, sorted);
  return {
    edges: h.edges,
    counts: h.counts,
    cdfX: cdf.x,
    cdfF: cdf.f,
    levels: [...ERROR_PERCENTILES],
    percentiles: s.percentiles,
    max: s.max,
    zeros: h.zeros,
    label: 'Relative error |a_file − a_ref| / |a_ref|',
  };
}

/** One SVG file: its name inside DIR and its text. */
export interface CheckSvgFile {
  readonly name: string;
  readonly svg: string;
}

/**
 * The SVG files of a check: distribution.svg, error-vs-acceleration.svg and, when the snapshot has
 * more than one particle, error-vs-neighbour-distance.svg (minimum-image distances in `box`).
 * `targets` are the input rows compared, `worst` target indices drawn as dots when binned.
 */
export function checkSvgFiles(o: {
  rel: Float64Array;
  accA: Float64Array;
  accB: Float64Array;
  worst: Int32Array;
  positions: Float64Array;
  box: Box;
  targets: Int32Array;
}): CheckSvgFile[] {
  const files: CheckSvgFile[] = [
    { name: 'distribution.svg', svg: distributionPlot(checkDistributionData(o.rel, o.accA, o.accB), CHECK_SVG_WIDTH, CHECK_SVG_HEIGHT) },
  ];
  const byAcc: ScatterData = {
    x: vectorNorms(o.accB),
    y: o.rel,
    xLabel: '|a_ref| (acceleration units)',
    yLabel: 'relative error',
    title: 'Relative error against |a_ref|',
    emphasis: o.worst,
    selected: null,
  };
  files.push({ name: 'error-vs-acceleration.svg', svg: scatterPlot(byAcc, CHECK_SVG_WIDTH, CHECK_SVG_HEIGHT) });
  if (o.positions.length / 3 > 1) {
    const nb = neighboursFind(o.positions, o.box, o.targets, 2); // k = 2, the least the search takes: only the nearest is drawn
    const byNeighbour: ScatterData = {
      x: nb.nearest,
      y: o.rel,
      xLabel: 'nearest-neighbour distance (length units)',
      yLabel: 'relative error',
      title: 'Relative error against nearest-neighbour distance',
      emphasis: o.worst,
      selected: null,
    };
    files.push({ name: 'error-vs-neighbour-distance.svg', svg: scatterPlot(byNeighbour, CHECK_SVG_WIDTH, CHECK_SVG_HEIGHT) });
  }
  return files;
}
