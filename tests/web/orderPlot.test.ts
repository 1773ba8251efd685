/**
 * The convergence plot of an image-sum order: a pure function from partial sums to SVG text, checked
 * against golden files (coordinates rounded to 0.1 px, labels to 3 significant digits) and for what the
 * picture must contain. Regenerate goldens with UPDATE_GOLDEN=1 and look at them.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { orderConvergencePlot, orderPanelDomain, tickText } from '../../app/web/plots/orderConvergencePlot';
import { ORDER_PANELS, orderConvergenceData, orderDefaultComponent, orderDeviationData } from '../../app/web/plots/plotData';
import { convergencePlot } from '../../app/web/plots/convergencePlot';
import type { OrderTrace } from '../../app/web/state/orderRuns';

const GOLDEN = join(__dirname, '__golden__');

function golden(name: string, svg: string): void {
  const file = join(GOLDEN, `${name}.svg`);
  if (process.env.UPDATE_GOLDEN === '1' || !existsSync(file)) {
    if (process.env.UPDATE_GOLDEN !== '1') throw new Error(`golden file ${name}.svg is missing: run with UPDATE_GOLDEN=1 and look at it`);
    writeFileSync(file, svg);
  }
  expect(svg).toBe(readFileSync(file, 'utf8'));
}

const count = (svg: string, re: RegExp) => (svg.match(re) ?? []).length;

/**
 * A made-up trace of K targets: partial sums that oscillate with a decaying amplitude about a limit that
 * sits `shift` (along z) off the Ewald value, the same for every target (as with the background).
 */
function trace(order: OrderTrace['order'], K: number, rows: number, shift: [number, number, number], tags: string[]): OrderTrace {
  const shell = Float64Array.from({ length: rows }, (_, s) => (order === 'screened' ? 2 / 2 ** s : s));
  const ewald = Float64Array.from({ length: 3 * K }, (_, i) => Math.sin(1 + i) * (1 + (i % 3)));
  const limit = Float64Array.from(ewald, (v, i) => v + shift[i % 3]);
  const partial = new Float64Array(rows * 3 * K);
  for (let s = 0; s < rows; s++) {
    for (let i = 0; i < 3 * K; i++) partial[s * 3 * K + i] = (order === 'screened' ? ewald[i] : limit[i]) + (0.8 * Math.cos(s * 1.7 + i)) / (1 + s) ** 1.5;
  }
  return { runKey: `run-${order}`, method: order === 'screened' ? 'screened' : order.startsWith('slab') ? 'slab' : (order as 'sphere'), order, label: order === 'screened' ? 'screened λ → 0 (5 λ)' : `${order} R ${rows - 1}`, background: true, targets: Int32Array.from({ length: K }, (_, k) => 10 * k + 3), tags, shell, partial, ewald, limit: order === 'screened' ? ewald.slice() : limit, dipole: new Float64Array(3) };
}

describe('orderConvergenceData(trace, component, ids)', () => {
  test('shows the worst three first, then the others in row order, at most six panels', () => {
    const tags = ['', 'worst 2', '', 'worst 1', 'worst 4', '', 'worst 3', '', ''];
    const d = orderConvergenceData(trace('sphere', 9, 9, [0, 0, 0.3], tags), 2);
    expect(d.panels).toHaveLength(ORDER_PANELS);
    expect(d.panels.map((p) => p.title)).toEqual(['row 33 · worst 1', 'row 13 · worst 2', 'row 63 · worst 3', 'row 3', 'row 23', 'row 53']);
    expect(d.panels[0].y).toHaveLength(9);
    expect(d.panels[0].limit! - d.panels[0].ewald).toBeCloseTo(0.3, 12);
    expect(orderConvergenceData(trace('sphere', 2, 3, [0, 0, 0], ['', '']), 0, Float64Array.from({ length: 20 }, (_, i) => 100 + i)).panels[0].title).toBe('id 103');
  });

  test('picks by default the axis where the limit departs from Ewald; for screened, that of the largest Ewald values', () => {
    expect(orderDefaultComponent(trace('slab-y', 4, 5, [0, 0.5, 0], ['', '', '', '']))).toBe(1);
    expect(orderDefaultComponent(trace('sphere', 4, 5, [0.1, -0.02, 0.4], ['', '', '', '']))).toBe(2);
    const t = trace('screened', 4, 5, [0, 0, 0], ['', '', '', '']);
    const size = [0, 1, 2].map((d) => Array.from(t.ewald).reduce((s, v, i) => s + (i % 3 === d ? Math.abs(v) : 0), 0));
    expect(orderDefaultComponent(t)).toBe(size.indexOf(Math.max(...size)));
  });

  test('panel y range covers the later partial sums, Ewald and the limit, and leaves the first eighth out', () => {
    const [lo, hi] = orderPanelDomain({ title: '', y: [100, 1, 2, 3, 2, 1, 2, 3, 2.5], ewald: 1.5, limit: 0.5 });
    expect(lo).toBeLessThan(0.5);
    expect(hi).toBeGreaterThan(3);
    expect(hi).toBeLessThan(100);
    const [a, b] = orderPanelDomain({ title: '', y: [2, 2], ewald: 2, limit: null });
    expect(a).toBeLessThan(2);
    expect(b).toBeGreaterThan(2);
  });
});

describe('orderConvergencePlot(data, width)', () => {
  test('a sphere order: six panels, each with the partial sums, the Ewald line and the dashed limit (golden)', () => {
    const tags = ['worst 1', '', 'worst 2', '', '', 'worst 3', '', 'worst 4'];
    const svg = orderConvergencePlot(orderConvergenceData(trace('sphere', 8, 17, [0, 0, 0.3], tags), 2), 560);
    golden('order-convergence-sphere', svg);
    expect(count(svg, /data-part="panel"/g)).toBe(6);
    expect(count(svg, /data-part="ewald"/g)).toBe(6);
    expect(count(svg, /data-part="limit"/g)).toBe(6);
    expect(count(svg, /data-part="partial"/g)).toBe(6);
    expect(svg).toContain('sphere R 16: partial sums against R');
    expect(svg).toContain('predicted limit');
    expect(svg).not.toMatch(/NaN|undefined|Infinity/);
  });

  test('a screened order: λ on a log axis with λ → 0 to the right (golden)', () => {
    const svg = orderConvergencePlot(orderConvergenceData(trace('screened', 3, 5, [0, 0, 0], ['worst 1', '', '']), 0), 560);
    golden('order-convergence-screened', svg);
    expect(count(svg, /data-part="panel"/g)).toBe(3);
    expect(svg).toContain('screening λ (1/length; λ → 0 to the right)');
    // the smallest λ (last row) is drawn to the right of the largest
    const path = svg.match(/data-part="partial"[^>]*/)?.[0] ?? svg.match(/<path d="([^"]+)"[^>]*data-part="partial"/)![1];
    const xs = [...(svg.match(/<path d="(M[^"]+)" fill="none" stroke="#2c6a5f" stroke-width="1.5" data-part="partial"/)![1].matchAll(/[ML]([\d.]+),/g))].map((m) => Number(m[1]));
    expect(path).toBeTruthy();
    expect(xs[xs.length - 1]).toBeGreaterThan(xs[0]);
  });
});

describe('tickText(v, ticks)', () => {
  test('keeps neighbouring ticks apart on a narrow range about a large value, else 3 digits', () => {
    expect([125.98, 126, 126.02].map((v) => tickText(v, [125.98, 126, 126.02]))).toEqual(['125.98', '126', '126.02']);
    expect([-0.2, 0, 0.2].map((v) => tickText(v, [-0.2, 0, 0.2]))).toEqual(['-0.2', '0', '0.2']);
    expect(tickText(33.4, [33.2, 33.4, 33.6])).toBe('33.4');
  });
});

describe('orderDeviationData(trace, floor)', () => {
  test('is |a_R − a_limit| / |a_limit| per target from R = 1 on, drawn log–log (golden)', () => {
    const t = trace('sphere', 5, 17, [0, 0, 0.3], ['worst 1', '', '', '', '']);
    const d = orderDeviationData(t, 1e-11)!;
    expect(d.x).toEqual(Array.from({ length: 16 }, (_, i) => i + 1));
    // the made-up partial sums sit 0.8·cos(1.7R + i)/(1 + R)^1.5 off the limit in component i
    const k = 2, R = 4;
    const off = [0, 1, 2].map((c) => (0.8 * Math.cos(R * 1.7 + 3 * k + c)) / (1 + R) ** 1.5);
    const lim = [0, 1, 2].map((c) => t.limit![3 * k + c]);
    expect(d.errors[R - 1][k]).toBeCloseTo(Math.hypot(...off) / Math.hypot(...lim), 12);
    const svg = convergencePlot(d, 560, 300);
    golden('order-deviation-sphere', svg);
    expect(svg).toContain('|a_R − a_limit| / |a_limit|');
    expect(svg).toContain('median of 5 targets');
  });

  test('screened: against Ewald, λ reversed; a single row has nothing to draw', () => {
    const d = orderDeviationData(trace('screened', 3, 5, [0, 0, 0], ['', '', '']), 1e-11)!;
    expect(d.reverseX).toBe(true);
    expect(d.yLabel).toBe('|a_λ − a_Ewald| / |a_Ewald|');
    expect(orderDeviationData(trace('sphere', 3, 2, [0, 0, 0], ['', '', '']), 1e-11)).toBeNull();
  });
});
