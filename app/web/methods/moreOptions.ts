/**
 * Parsers of the image-sum orders' and particle-mesh Ewald's slot parameters (typed text → the engine's
 * options), and the canonical texts that key their cached runs. Every rejection is one line naming the
 * parameter and the text it got.
 */
import { IMAGE_SUM_SHELLS_MAX, type ImageSumOptions } from '../../../engine/orders/imageSumOptions';
import type { PmeOptions } from '../../../engine/pme/pmeParams';
import type { Softening } from '../../../engine/softening';

/** The registry's image-sum orders. */
export type OrderMethodId = 'sphere' | 'cube' | 'slab' | 'screened' | 'nearest';

export const ORDER_METHODS: readonly OrderMethodId[] = ['sphere', 'cube', 'slab', 'screened', 'nearest'];

/** Checked options of an image-sum order, as the engine takes them (maxWork is set by the scheduler). */
export interface OrderMethodOptions {
  readonly method: OrderMethodId;
  readonly options: ImageSumOptions;
}

export interface PmeMethodOptions {
  readonly method: 'pme';
  readonly options: PmeOptions;
  /** Threads asked for (worker/pmeParallel.ts); undefined = auto. */
  readonly threads?: number;
}

/** Whether a method id is one of the image-sum orders. */
export function isOrderMethod(id: string): id is OrderMethodId {
  return (ORDER_METHODS as readonly string[]).includes(id);
}

type Params = Readonly<Record<string, string>>;

function wholeField(text: string | undefined, label: string, lo: number, hi: number): number {
  const t = (text ?? '').trim();
  const v = /^\d+$/.test(t) ? Number(t) : NaN;
  if (!(Number.isInteger(v) && v >= lo && v <= hi)) throw new RangeError(`${label}: expected a whole number from ${lo} to ${hi}, got "${text ?? ''}"`);
  return v;
}

function numberIn(text: string | undefined, label: string, ok: (v: number) => boolean, expected: string): number {
  const t = (text ?? '').trim();
  const v = t === '' ? NaN : Number(t);
  if (!ok(v)) throw new RangeError(`${label}: expected ${expected}, got "${text ?? ''}"`);
  return v;
}

/** "auto" → undefined (the engine's default), else at least two distinct positive numbers. */
export function lambdasParse(text: string | undefined): Float64Array | undefined {
  const t = (text ?? 'auto').trim().toLowerCase();
  if (t === 'auto' || t === '') return undefined;
  const parts = t.split(/[\s,;]+/).filter(Boolean);
  const values = parts.map((p, k) => {
    const v = Number(p);
    if (!(v > 0 && Number.isFinite(v))) throw new RangeError(`λ values: value ${k + 1} ("${p}") is not a positive number (1/length)`);
    return v;
  });
  if (values.length < 2) throw new RangeError(`λ values: expected "auto" or at least two values to extrapolate to λ → 0, got "${text ?? ''}"`);
  for (let k = 0; k < values.length; k++) {
    for (let q = 0; q < k; q++) if (values[q] === values[k]) throw new RangeError(`λ values: value ${k + 1} repeats value ${q + 1} (${values[k]}); the values must be distinct`);
  }
  return Float64Array.from(values);
}

/** Checks an order's parameters; G is the page's gravitational constant. */
export function orderOptionsParse(method: OrderMethodId, params: Params, G: number): OrderMethodOptions {
  if (method === 'nearest') return { method, options: { order: 'nearest', G } };
  const tol = numberIn(params['order.tol'], 'exact-part tolerance', (v) => v >= 1e-14 && v <= 1e-2, 'a number from 1e-14 to 1e-2');
  if (method === 'screened') {
    const lambdas = lambdasParse(params['screened.lambdas']);
    return { method, options: { order: 'screened', G, tol, ...(lambdas ? { lambdas } : {}) } };
  }
  const bg = (params['order.background'] ?? 'removed').trim();
  if (bg !== 'removed' && bg !== 'kept') throw new RangeError(`mean density: expected removed or kept, got "${bg}"`);
  const background = bg === 'removed';
  if (method === 'slab') {
    const axis = (params['slab.axis'] ?? 'z').trim();
    if (axis !== 'x' && axis !== 'y' && axis !== 'z') throw new RangeError(`slab normal: expected x, y or z, got "${axis}"`);
    const shells = wholeField(params['slab.shells'], 'layers R', 1, IMAGE_SUM_SHELLS_MAX);
    return { method, options: { order: `slab-${axis}`, shells, background, G, tol } };
  }
  const shells = wholeField(params[`${method}.shells`], 'shells R', 1, IMAGE_SUM_SHELLS_MAX);
  return { method, options: { order: method, shells, background, G, tol } };
}

function softeningParse(params: Params): Softening {
  const kind = (params['ewald.softening'] ?? 'none').trim();
  if (kind === 'none') return { kind: 'none' };
  if (kind !== 'plummer' && kind !== 'spline') throw new RangeError(`softening: expected none, plummer or spline, got "${kind}"`);
  const len = numberIn(params['ewald.eps'], kind === 'plummer' ? 'Plummer ε' : 'spline h', (v) => v > 0 && Number.isFinite(v), 'a positive length');
  return kind === 'plummer' ? { kind, eps: len } : { kind, h: len };
}

function fftFriendly(v: number): boolean {
  let m = v;
  for (const f of [2, 3, 5]) while (m % f === 0) m /= f;
  return m === 1;
}

/** Most PME threads one may ask for (the registry's choices go to 4). */
export const PME_THREADS_MAX = 64;

/**
 * A finished PME run's words with the threads that computed (the worker's count, which can be fewer than
 * asked for without cross-origin isolation): ", threads N" replaces the asked-for count, and is added when
 * more than one thread computed.
 */
export function pmeLabelThreads(label: string, used: number): string {
  const asked = /, threads \d+/.test(label);
  const base = label.replace(/, threads \d+/, '');
  return asked || used > 1 ? `${base}, threads ${used}` : base;
}

/** Checks the particle-mesh Ewald parameters (tolerance, mesh and order overrides, influence, softening). */
export function pmeOptionsParse(params: Params, G: number): PmeMethodOptions {
  const tol = numberIn(params['pme.tol'], 'PME tolerance', (v) => v > 0 && v < 1, 'a number between 0 and 1 (exclusive), such as 1e-6');
  const meshText = (params['pme.mesh'] ?? 'auto').trim().toLowerCase();
  let mesh: number | undefined;
  if (meshText !== 'auto' && meshText !== '') {
    mesh = wholeField(meshText, 'mesh points per side', 8, 1024);
    if (mesh % 2 !== 0 || !fftFriendly(mesh)) throw new RangeError(`mesh points per side: expected an even number with prime factors 2, 3, 5 only (such as 32, 48, 64, 96), got "${meshText}"`);
  }
  const orderText = (params['pme.order'] ?? 'auto').trim().toLowerCase();
  const order = orderText === 'auto' || orderText === '' ? undefined : wholeField(orderText, 'B-spline order p', 2, 12);
  if (mesh !== undefined && order !== undefined && mesh < order) throw new RangeError(`mesh points per side: ${mesh} is fewer than the B-spline order ${order}`);
  const influence = (params['pme.influence'] ?? 'optimal').trim();
  if (influence !== 'optimal' && influence !== 'spme') throw new RangeError(`influence function: expected optimal or spme, got "${influence}"`);
  const threadsText = (params['pme.threads'] ?? 'auto').trim().toLowerCase();
  const threads = threadsText === 'auto' || threadsText === '' ? undefined : wholeField(threadsText, 'threads', 1, PME_THREADS_MAX);
  return {
    method: 'pme',
    options: { tol, G, influence, softening: softeningParse(params), ...(mesh !== undefined ? { mesh } : {}), ...(order !== undefined ? { order } : {}) },
    ...(threads !== undefined ? { threads } : {}),
  };
}

function softText(s: Softening | undefined): string {
  return s?.kind === 'plummer' ? `plummer:${s.eps}` : s?.kind === 'spline' ? `spline:${s.h}` : 'none';
}

/** Canonical text of an order's or PME's checked options (the cache key part). */
export function moreOptionsKey(m: OrderMethodOptions | PmeMethodOptions): string {
  if (m.method === 'pme') {
    const o = m.options;
    return `pme(tol=${o.tol},G=${o.G},mesh=${o.mesh ?? 'auto'},p=${o.order ?? 'auto'},inf=${o.influence ?? 'optimal'},soft=${softText(o.softening)}${m.threads !== undefined ? `,threads=${m.threads}` : ''})`;
  }
  const o = m.options;
  const lambdas = o.lambdas ? Array.from(o.lambdas).join(';') : 'auto';
  return `${o.order}(R=${o.shells ?? '-'},bg=${o.background ?? true},tol=${o.tol ?? '-'},λ=${o.order === 'screened' ? lambdas : '-'},G=${o.G})`;
}

/** Short words for a run ("sphere R 32", "slab z R 8, mean kept", "screened λ → 0 (5 λ)", "PME tol 1e-6"). */
export function moreOptionsLabel(m: OrderMethodOptions | PmeMethodOptions, tolText: (v: number) => string): string {
  if (m.method === 'pme') {
    const o = m.options;
    const extra = [o.mesh !== undefined ? `mesh ${o.mesh}³` : '', o.order !== undefined ? `p ${o.order}` : '', o.influence === 'spme' ? 'SPME' : '',
      o.softening?.kind === 'plummer' ? `Plummer ε ${o.softening.eps}` : o.softening?.kind === 'spline' ? `spline h ${o.softening.h}` : '',
      m.threads !== undefined ? `threads ${m.threads}` : ''].filter(Boolean);
    return `PME tol ${tolText(o.tol ?? 1e-4)}${extra.length ? `, ${extra.join(', ')}` : ''}`;
  }
  const o = m.options;
  const bg = o.background === false ? ', mean kept' : '';
  switch (o.order) {
    case 'nearest':
      return 'nearest image';
    case 'screened':
      return `screened λ → 0 (${o.lambdas ? `${o.lambdas.length} λ` : 'auto λ'})`;
    case 'sphere':
    case 'cube':
      return `${o.order} R ${o.shells}${bg}`;
    default:
      return `slab ${o.order.slice(5)} R ${o.shells}${bg}`;
  }
}
