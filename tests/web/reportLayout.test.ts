/**
 * reportLayout: nothing outside the image, no block over another, every line of text inside its box
 * (long values such as a SHA-256 or a settings link are wrapped, words longer than a line are cut),
 * the 3D view keeps the aspect it has on screen, and the image grows with the plots.
 */
import { describe, expect, it } from 'vitest';
import { FONTS, type LayoutContent, type Measure, REPORT_WIDTH, type Rect, rectsOverlap, reportLayout, wrapText } from '../../app/web/report/reportLayout';

/** An estimate of text width: 0.6 em per character (wider than most fonts draw, so it is strict). */
const measure: Measure = (text, font) => {
  const size = Number(/(\d+(?:\.\d+)?)px/.exec(font)![1]);
  return text.length * size * 0.6;
};

const LONG_URL = `http://127.0.0.1:4173/?${'a=mesh&b=ewald&seed=12345&'.repeat(12)}`;

function content(plots: number, extra: Partial<LayoutContent> = {}): LayoutContent {
  return {
    title: 'torusgrav — force comparison report',
    header: [
      ['snapshot', 'built-in demo “three knots and a thread”, N 4096, seed 1'],
      ['SHA-256', `${'0123456789abcdef'.repeat(4)} (of the generated positions then masses as float64 little-endian bytes)`],
      ['B (reference)', 'Ewald tol 1e-6: tolerance 1e-6, softening none; chosen α = 9.514 /length, r_c = 0.4437, k_c = 80.31 /length (4 366 k-vectors), predicted rms error 2.44 × 10⁻⁹'.repeat(2)],
    ],
    verdict: { text: '99th percentile 0.42 % ≤ 1 %: passes', result: { pass: true } },
    stats: [
      ['N (particles)', '4 096'],
      ['99th percentile', '0.0042'],
      ['worst 10 (id: error)', Array.from({ length: 10 }, (_, i) => `${1000 + i}: 0.0${i}`).join(', ')],
    ],
    plots: Array.from({ length: plots }, (_, i) => ({ key: `p${i}`, height: 340 })),
    notes: ['Relative error per target: |a_A − a_B| / |a_B|.', `Settings: ${LONG_URL}`],
    ...extra,
  };
}

function inside(r: Rect, w: number, h: number): boolean {
  return r.x >= 0 && r.y >= 0 && r.x + r.w <= w + 1e-9 && r.y + r.h <= h + 1e-9;
}

describe('wrapText(text, width, font, measure)', () => {
  it('breaks at spaces so that every line fits, keeping every word in order', () => {
    const t = 'the quick brown fox jumps over the lazy dog '.repeat(5).trim();
    const lines = wrapText(t, 150, FONTS.body, measure);
    expect(lines.length).toBeGreaterThan(3);
    for (const l of lines) expect(measure(l, FONTS.body)).toBeLessThanOrEqual(150);
    expect(lines.join(' ')).toBe(t);
  });
  it('cuts a word longer than the line between characters (a hash, a link)', () => {
    const word = 'f'.repeat(200);
    const lines = wrapText(word, 100, FONTS.body, measure);
    for (const l of lines) expect(measure(l, FONTS.body)).toBeLessThanOrEqual(100);
    expect(lines.join('')).toBe(word);
  });
  it('never breaks at a no-break space (an "id: error" entry stays whole)', () => {
    const entries = Array.from({ length: 6 }, (_, i) => `${2000 + i}:\u00a05.85\u00a0×\u00a010⁻⁵`);
    const lines = wrapText(entries.join(', '), 160, FONTS.body, measure);
    expect(lines.length).toBeGreaterThan(1);
    for (const l of lines) for (const piece of l.split(' ')) expect(piece.replace(/,$/, '')).toMatch(/^\d+:\u00a05\.85\u00a0×\u00a010⁻⁵$/);
  });
  it('empty text is one empty line', () => {
    expect(wrapText('', 100, FONTS.body, measure)).toEqual(['']);
  });
});

describe('reportLayout(content, measure, options)', () => {
  const L = reportLayout(content(5), measure, { viewAspect: 1.6 });

  it('is REPORT_WIDTH wide at pixel ratio 2, with every block inside the image', () => {
    expect(L.width).toBe(REPORT_WIDTH);
    expect(L.pixelRatio).toBe(2);
    for (const [name, r] of Object.entries(L.blocks)) expect(inside(r, L.width, L.height), `${name} ${JSON.stringify(r)}`).toBe(true);
    for (const it of L.items) if (it.kind !== 'text') expect(inside(it.rect, L.width, L.height)).toBe(true);
  });

  it('places no block over another (the 3D view and its legend sit beside the statistics)', () => {
    const names = Object.keys(L.blocks);
    expect(names).toEqual(expect.arrayContaining(['title', 'header', 'verdict', 'stats', 'view', 'viewLegend', 'plot-p0', 'plot-p4', 'notes']));
    for (let i = 0; i < names.length; i++) {
      for (let j = i + 1; j < names.length; j++) expect(rectsOverlap(L.blocks[names[i]], L.blocks[names[j]]), `${names[i]} over ${names[j]}`).toBe(false);
    }
  });

  it('keeps every line of text inside its box and inside the image (nothing cut off)', () => {
    const texts = L.items.filter((it) => it.kind === 'text');
    expect(texts.length).toBeGreaterThan(20);
    for (const t of texts) {
      if (t.kind !== 'text') continue;
      const w = measure(t.text, t.font);
      expect(t.x + w, t.text).toBeLessThanOrEqual(t.right + 1e-9);
      expect(t.right).toBeLessThanOrEqual(L.width);
      expect(t.y).toBeGreaterThanOrEqual(0);
      expect(t.y + 20).toBeLessThanOrEqual(L.height);
    }
    // the long link is wrapped over several lines, all its characters kept
    const linkLines = texts.filter((t) => t.kind === 'text' && t.font === FONTS.note).map((t) => (t.kind === 'text' ? t.text : ''));
    expect(linkLines.join('').replace(/\s/g, '')).toContain(LONG_URL.slice(0, 200));
  });

  it('puts each text line inside the block it belongs to (header rows in the header box, statistics in theirs)', () => {
    const within = (name: string) => (t: { x: number; y: number }) => {
      const r = L.blocks[name];
      return t.x >= r.x && t.x <= r.x + r.w && t.y >= r.y && t.y <= r.y + r.h;
    };
    const texts = L.items.flatMap((t) => (t.kind === 'text' ? [t] : []));
    expect(texts.filter((t) => t.text.startsWith('0123456789abcdef')).every(within('header'))).toBe(true);
    expect(texts.filter((t) => t.text === 'N (particles)' || t.text.startsWith('1000:')).every(within('stats'))).toBe(true);
    expect(texts.filter((t) => t.text.startsWith('Verdict:')).every(within('verdict'))).toBe(true);
  });

  it('keeps the 3D view\'s aspect (width ÷ height as on screen) for wide, square and tall views', () => {
    for (const aspect of [2.5, 1.6, 1, 0.5]) {
      const v = reportLayout(content(2), measure, { viewAspect: aspect }).blocks.view;
      expect(v.w / v.h).toBeCloseTo(aspect, 9);
      expect(v.h).toBeLessThanOrEqual(560);
    }
  });

  it('wraps a long view heading (a note about points drawn) and moves the view below it', () => {
    const short = reportLayout(content(2), measure, { viewAspect: 1.6 });
    const long = reportLayout(content(2, { viewTitle: `Where the discrepancy sits; ${'showing a random 300 000 of 2 000 000 points '.repeat(3)}` }), measure, { viewAspect: 1.6 });
    expect(long.blocks.view.y).toBeGreaterThan(short.blocks.view.y);
    for (const t of long.items) if (t.kind === 'text') expect(t.x + measure(t.text, t.font)).toBeLessThanOrEqual(t.right + 1e-9);
  });

  it('has no view block without a 3D view, and grows by one row of plots per two plots', () => {
    const none = reportLayout(content(2), measure, { viewAspect: null });
    expect(none.blocks.view).toBeUndefined();
    expect(none.items.some((i) => i.kind === 'view')).toBe(false);
    const h2 = reportLayout(content(2), measure, { viewAspect: 1.6 }).height;
    const h3 = reportLayout(content(3), measure, { viewAspect: 1.6 }).height;
    const h4 = reportLayout(content(4), measure, { viewAspect: 1.6 }).height;
    expect(h3 - h2).toBe(340 + 16);
    expect(h4).toBe(h3);
  });

  it('two plots of a row share its top and split the width without touching', () => {
    const a = L.blocks['plot-p0'], b = L.blocks['plot-p1'];
    expect(a.y).toBe(b.y);
    expect(a.w).toBe(b.w);
    expect(b.x - (a.x + a.w)).toBe(16);
    expect(b.x + b.w).toBe(L.width - 24);
  });

  it('gives a full-width plot (an order\'s panels) a row of its own across the whole width', () => {
    const F = reportLayout(content(0, { plots: [{ key: 'a', height: 340 }, { key: 'b', height: 340 }, { key: 'c', height: 420, full: true }, { key: 'd', height: 340 }] }), measure, { viewAspect: 1.6 });
    const [a, b, c, d] = ['a', 'b', 'c', 'd'].map((k) => F.blocks[`plot-${k}`]);
    expect(a.y).toBe(b.y);
    expect(c.y).toBe(a.y + 340 + 16);
    expect(c.x).toBe(24);
    expect(c.w).toBe(F.width - 48);
    expect(c.h).toBe(420);
    expect(d.y).toBe(c.y + 420 + 16);
    expect(d.x).toBe(24);
    expect(d.w).toBe(a.w);
    for (const x of [a, b, c, d]) expect(inside(x, F.width, F.height)).toBe(true);
  });

  it('draws a failing verdict in a box of its own colour', () => {
    const fail = reportLayout(content(1, { verdict: { text: 'maximum 4.4 > 1: fails', result: { pass: false } } }), measure, { viewAspect: 1 });
    const box = fail.items.find((i) => i.kind === 'rect' && i.rect === fail.blocks.verdict);
    const passBox = L.items.find((i) => i.kind === 'rect' && i.rect === L.blocks.verdict);
    expect(box && passBox && box.kind === 'rect' && passBox.kind === 'rect' && box.fill !== passBox.fill).toBe(true);
  });
});
