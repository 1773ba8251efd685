/**
 * Plots are pure functions from data to SVG text: checked against golden files (numbers in the SVG are
 * rounded to 0.1 px by the plots themselves; labels to 3 significant digits), plus structural checks
 * that say what the picture must contain. Regenerate goldens with UPDATE_GOLDEN=1 and look at them.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { cdfPoints, histogramLog } from '../../engine/stats/bins';
import { percentileLinear, sortedFinite } from '../../engine/stats/percentile';
import { randomNormal, randomSeeded } from '../../engine/util/random';
import { convergencePlot } from '../../app/web/plots/convergencePlot';
import { decadeDomain, distributionPlot } from '../../app/web/plots/distributionPlot';
import { runningMedian, scatterPlot } from '../../app/web/plots/scatterPlot';
import { errorColourIndex, errorColourScale, errorLegend } from '../../app/web/plots/colourScale';
import { powerLabel, px, shortNumber } from '../../app/web/plots/svg';

const GOLDEN = join(__dirname, '__golden__');

function golden(name: string, svg: string): void {
  const file = join(GOLDEN, `${name}.svg`);
  if (process.env.UPDATE_GOLDEN === '1' || !existsSync(file)) {
    if (process.env.UPDATE_GOLDEN !== '1') throw new Error(`golden file ${name}.svg is missing: run with UPDATE_GOLDEN=1 and look at it`);
    writeFileSync(file, svg);
  }
  expect(svg).toBe(readFileSync(file, 'utf8'));
}

/** Seeded log-normal "relative errors": median 10^-2.5, spread 0.7 decades. */
function errors(n: number, seed: number): Float64Array {
  const r = randomSeeded(seed);
  return Float64Array.from({ length: n }, () => 10 ** (-2.5 + 0.7 * randomNormal(r)));
}

const count = (svg: string, re: RegExp) => (svg.match(re) ?? []).length;

describe('svg helpers', () => {
  test('round coordinates to 0.1 px, write powers of ten with superscripts, shorten numbers', () => {
    expect(px(12.345)).toBe('12.3');
    expect(px(-0.04)).toBe('0');
    expect(px(NaN)).toBe('0');
    expect(powerLabel(1e-3)).toBe('10⁻³');
    expect(powerLabel(1)).toBe('1');
    expect(shortNumber(0.0123456)).toBe('0.0123');
    expect(shortNumber(2.5e-7)).toBe('2.5×10⁻⁷');
    expect(shortNumber(1e-8)).toBe('10⁻⁸');
    expect(decadeDomain(0.003, 0.2)).toEqual([1e-3, 1]);
  });
});

describe('distributionPlot(data, width, height)', () => {
  const rel = errors(5000, 3);
  const sorted = sortedFinite(rel);
  const h = histogramLog(rel, 5);
  const c = cdfPoints(sorted, 300);
  const levels = [0.5, 0.9, 0.99, 0.999];
  const data = { edges: h.edges, counts: h.counts, cdfX: c.x, cdfF: c.f, levels, percentiles: levels.map((q) => percentileLinear(sorted, q)), max: sorted[sorted.length - 1], zeros: 2 };

  test('matches its golden file', () => golden('distribution', distributionPlot(data, 560, 340)));

  test('draws one bar per non-empty bin, the cumulative curve, 4 percentile marks and the max', () => {
    const svg = distributionPlot(data, 560, 340);
    const bars = svg.slice(svg.indexOf('data-part="histogram"'), svg.indexOf('</g>', svg.indexOf('data-part="histogram"')));
    expect(count(bars, /<rect/g)).toBe(Array.from(h.counts).filter((v) => v > 0).length);
    expect(svg).toContain('data-part="cdf"');
    expect(count(svg, /stroke-dasharray="3 3"/g)).toBe(4);
    expect(svg).toMatch(/>max [^<]+</);
    expect(svg).toContain('>50 % 3.27×10⁻³<');
    expect(svg).toContain('2 exactly 0 (not shown)');
    expect(svg).not.toMatch(/NaN|undefined|Infinity/);
  });
});

describe('scatterPlot(data, width, height)', () => {
  test('few targets: one dot each, a running median, the picked one ringed (golden)', () => {
    const r = randomSeeded(5);
    const x = Float64Array.from({ length: 400 }, () => 10 ** (3 * r() - 1));
    const y = Float64Array.from(x, (v, i) => 0.02 / Math.sqrt(v) * 10 ** (0.3 * Math.sin(i)));
    const svg = scatterPlot({ x, y, xLabel: '|a_B|', yLabel: 'relative error', title: 'Relative error against |a_B|', selected: 7 }, 560, 300);
    golden('scatter-points', svg);
    expect(svg).toContain('data-part="points" data-count="400"');
    expect(count(svg, /<circle/g)).toBe(1); // the ring of the picked one
    expect(svg).toContain('data-part="median"');
    expect(svg).toContain('data-part="selected"');
  });

  test('many targets: shaded cells plus the emphasised worst as dots (golden)', () => {
    const r = randomSeeded(6);
    const n = 20_000;
    const x = Float64Array.from({ length: n }, () => 10 ** (-2 - r()));
    const y = Float64Array.from(x, (v) => 1e-4 / v * 10 ** (0.5 * randomNormal(r)));
    const svg = scatterPlot({ x, y, xLabel: 'nearest-neighbour distance', yLabel: 'relative error', title: 'against neighbours', emphasis: [0, 1, 2, 3, 4] }, 560, 300);
    golden('scatter-binned', svg);
    expect(svg).toContain('data-part="points" data-count="5"');
    // the shaded cells are at most 8 paths, one per shade
    const density = svg.slice(svg.indexOf('data-part="density"'), svg.indexOf('</g>', svg.indexOf('data-part="density"')));
    expect(count(density, /<path/g)).toBeLessThanOrEqual(8);
    expect(svg).toContain('20000 targets shaded by count per cell');
    expect(svg.length).toBeLessThan(600_000);
  });

  test('runningMedian gives the median of each log-x bin with at least 3 points', () => {
    const m = runningMedian([1, 1.1, 1.2, 100, 110, 120, 130], [1, 3, 2, 10, 40, 20, 30], [1, 1000], 3);
    expect(m.map(([, v]) => v)).toEqual([2, 25]);
  });
});

describe('convergencePlot(data, width, height)', () => {
  test('one line per target, the median, and the predicted errors dashed (golden)', () => {
    const x = [1e-2, 1e-3, 1e-4, 1e-5, 1e-6];
    const errorsAt = x.map((tol, i) => Float64Array.from({ length: 6 }, (_, t) => tol * 0.05 * (1 + t) * (1 + 0.1 * i)));
    const svg = convergencePlot({ title: 'Ewald: deviation against the tolerance asked', xLabel: 'tolerance asked', x, errors: errorsAt, predicted: x.map((v) => v * 0.3), reverseX: true, floor: 1e-11 }, 560, 300);
    golden('convergence', svg);
    const targets = svg.slice(svg.indexOf('data-part="targets"'), svg.indexOf('</g>', svg.indexOf('data-part="targets"')));
    expect(count(targets, /<path/g)).toBe(6);
    expect(svg).toContain('data-part="predicted"');
    expect(svg).toContain('median of 6 targets');
  });
});

describe('errorColourScale / errorLegend', () => {
  test('spans whole decades from a low quantile to the max, at most 8, mapping ends to ends', () => {
    const s = errorColourScale(3e-5, 0.2);
    expect([s.lo, s.hi]).toEqual([1e-5, 1]);
    expect(errorColourIndex(s, 1e-9)).toBe(0);
    expect(errorColourIndex(s, 0)).toBe(0);
    expect(errorColourIndex(s, 5)).toBe(255);
    expect(errorColourIndex(s, 10 ** -2.5)).toBe(128);
    expect(errorColourScale(1e-15, 1).lo).toBe(1e-8);
    // viridis ends: dark purple (#440154) and yellow (#fde725)
    expect(Array.from(s.table.subarray(0, 3)).map((v) => Math.round(v * 255))).toEqual([0x44, 0x01, 0x54]);
    expect(Array.from(s.table.subarray(765, 768)).map((v) => Math.round(v * 255))).toEqual([0xfd, 0xe7, 0x25]);
  });

  test('the legend matches its golden file', () => golden('legend', errorLegend(errorColourScale(3e-5, 0.2), 240, 44)));
});
