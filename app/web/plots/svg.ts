/** Small helpers to write SVG text: rounded numbers, escaped text, elements from attribute objects. */

/** 10^e exactly as written (10 ** −5 is 0.000009999999999999999 in floating point; "1e-5" is not). */
export function pow10(e: number): number {
  return Number(`1e${e}`);
}

/** A coordinate rounded to 0.1 px as text ("12.3", "-0", never "NaN"). */
export function px(v: number): string {
  if (!Number.isFinite(v)) return '0';
  const r = Math.round(v * 10) / 10;
  return String(r === 0 ? 0 : r);
}

/** Escapes text for SVG content and attribute values. */
export function esc(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

type Attrs = Record<string, string | number | undefined | null | false>;

function attrs(a: Attrs): string {
  return Object.entries(a)
    .filter(([, v]) => v !== undefined && v !== null && v !== false)
    .map(([k, v]) => ` ${k}="${typeof v === 'number' ? px(v) : esc(String(v))}"`)
    .join('');
}

/** An element: `tag(name, attrs)` is self-closing; with `children` (already SVG text) it wraps them. */
export function tag(name: string, a: Attrs, children?: string): string {
  return children === undefined ? `<${name}${attrs(a)}/>` : `<${name}${attrs(a)}>${children}</${name}>`;
}

/** A text element (content escaped). */
export function text(content: string, a: Attrs): string {
  return tag('text', a, esc(content));
}

const SUP: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** A power of ten as "10⁻³" (1 and 10 as plain numbers). */
export function powerLabel(v: number): string {
  const e = Math.round(Math.log10(v));
  if (e === 0) return '1';
  if (e === 1) return '10';
  return `10${String(e).replace(/./g, (c) => SUP[c] ?? c)}`;
}

/** A short number for labels: 3 significant digits, powers of ten as 10ᵉ. */
export function shortNumber(v: number): string {
  if (!Number.isFinite(v)) return '—';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-2 && a < 1e4) return String(Number(v.toPrecision(3)));
  const [m, e] = v.toExponential(2).split('e');
  const mant = Number(m);
  const exp = String(Number(e)).replace(/./g, (c) => SUP[c] ?? c);
  return mant === 1 ? `10${exp}` : `${mant}×10${exp}`;
}

/** The outer <svg> with a background, a font and an accessible title. */
export function svgDocument(width: number, height: number, title: string, body: string, testId?: string): string {
  return tag(
    'svg',
    {
      xmlns: 'http://www.w3.org/2000/svg',
      width,
      height,
      viewBox: `0 0 ${px(width)} ${px(height)}`,
      role: 'img',
      'aria-label': title,
      'data-plot': testId,
      'font-family': 'system-ui, -apple-system, Segoe UI, Roboto, Helvetica Neue, Arial, sans-serif',
      'font-size': 11,
    },
    tag('title', {}, esc(title)) + tag('rect', { x: 0, y: 0, width, height, fill: '#fbfbf7' }) + body,
  );
}
