/**
 * Options of the plain image sums (summation orders), their validation with errors that name the option,
 * and the up-front cost estimate that refuses runs above a work limit the caller can raise.
 */
import { type Box, boxVolume } from '../box';

export const IMAGE_SUM_ORDERS = ['sphere', 'cube', 'slab-x', 'slab-y', 'slab-z', 'screened', 'nearest'] as const;
export type ImageSumOrderName = (typeof IMAGE_SUM_ORDERS)[number];

/** Largest accepted shell radius / layer index. */
export const IMAGE_SUM_SHELLS_MAX = 4096;
/** Default work limit in pair-term equivalents (two to three minutes on one core). */
export const IMAGE_SUM_MAX_WORK_DEFAULT = 2e10;
/** Measured throughput, pair-term equivalents per second on one core of the project machine (scripts/bench/ordersBench.ts). */
export const IMAGE_SUM_WORK_RATE = 1.3e8;
/** Largest partial-sum table accepted (numbers; 8 bytes each). */
export const IMAGE_SUM_PARTIAL_MAX = 1.25e8;

export interface ImageSumOptions {
  /** Summation order: sphere | cube | slab-x | slab-y | slab-z | screened | nearest. */
  readonly order: ImageSumOrderName;
  /**
   * Largest shell: sphere radius R (|s_n| ≤ R·L_max), cube max|n_i| ≤ R, slab layers |n_axis| ≤ R; an
   * integer in [1, 4096] (default 32 for sphere and cube, 8 for slabs). Not for screened or nearest.
   */
  readonly shells?: number;
  /** Remove the mean density (each cell carries its uniform negative background); default true. */
  readonly background?: boolean;
  /** Gravitational constant (default 1). */
  readonly G?: number;
  /**
   * Relative tolerance of the exact parts (multipole truncation, in-plane and screened sums), relative to
   * G Σ|m|/d² (d the box diagonal) for shells; in [1e-14, 1e-2], default 1e-10.
   */
  readonly tol?: number;
  /** Screening parameters λ (1/length), at least 2 distinct values > 0 (screened only; default (2, 1, ½, ¼, ⅛)/L_max). */
  readonly lambdas?: ArrayLike<number>;
  /** Refuse runs whose estimated work (pair-term equivalents, ~1.3e8 per second) exceeds this; default 2e10. */
  readonly maxWork?: number;
}

export interface ImageSumResolved {
  readonly order: ImageSumOrderName;
  readonly shells: number;
  readonly background: boolean;
  readonly G: number;
  readonly tol: number;
  readonly lambdas: Float64Array;
  readonly maxWork: number;
}

const KNOWN = new Set(['order', 'shells', 'background', 'G', 'tol', 'lambdas', 'maxWork']);

/** Validates options and fills defaults; throws a RangeError naming the option and the bad value. */
export function imageSumOptionsResolve(options: ImageSumOptions, box: Box): ImageSumResolved {
  if (options === null || typeof options !== 'object') throw new RangeError(`options must be an object with at least "order", got ${String(options)}`);
  for (const key of Object.keys(options)) {
    if (!KNOWN.has(key)) throw new RangeError(`unknown option "${key}" (known: ${[...KNOWN].join(', ')})`);
  }
  const order = options.order;
  if (!(IMAGE_SUM_ORDERS as readonly string[]).includes(order as string)) {
    throw new RangeError(`order must be one of ${IMAGE_SUM_ORDERS.join(', ')}; got ${JSON.stringify(order)}`);
  }
  const layered = order !== 'screened' && order !== 'nearest';
  if (!layered && options.shells !== undefined) {
    throw new RangeError(`shells does not apply to order "${order}"${order === 'screened' ? ' (it uses lambdas)' : ' (it uses no images beyond the nearest)'}`);
  }
  const shells = options.shells ?? (order.startsWith('slab') ? 8 : layered ? 32 : 0);
  if (layered && !(Number.isInteger(shells) && shells >= 1 && shells <= IMAGE_SUM_SHELLS_MAX)) {
    throw new RangeError(`shells must be an integer in [1, ${IMAGE_SUM_SHELLS_MAX}], got ${String(options.shells)}`);
  }
  const background = options.background ?? true;
  if (typeof background !== 'boolean') throw new RangeError(`background must be true or false, got ${String(options.background)}`);
  const G = options.G ?? 1;
  if (typeof G !== 'number' || !(G > 0) || !Number.isFinite(G)) throw new RangeError(`G must be a positive finite number, got ${String(options.G)}`);
  const tol = options.tol ?? 1e-10;
  if (typeof tol !== 'number' || !(tol >= 1e-14 && tol <= 1e-2)) throw new RangeError(`tol must lie in [1e-14, 1e-2], got ${String(options.tol)}`);
  const maxWork = options.maxWork ?? IMAGE_SUM_MAX_WORK_DEFAULT;
  if (typeof maxWork !== 'number' || !(maxWork > 0)) throw new RangeError(`maxWork must be a positive number of pair terms, got ${String(options.maxWork)}`);
  let lambdas = new Float64Array(0);
  if (order === 'screened') {
    const lmax = Math.max(box.lx, box.ly, box.lz);
    lambdas = options.lambdas === undefined ? Float64Array.from([2, 1, 0.5, 0.25, 0.125], (f) => f / lmax) : Float64Array.from(options.lambdas as ArrayLike<number>);
    if (lambdas.length < 2) throw new RangeError(`lambdas must hold at least 2 values to extrapolate to λ → 0, got ${lambdas.length}`);
    for (let k = 0; k < lambdas.length; k++) {
      const l = lambdas[k];
      if (!(l > 0) || !Number.isFinite(l)) throw new RangeError(`lambdas[${k}] must be a positive finite screening parameter (1/length), got ${l}`);
      for (let q = 0; q < k; q++) if (lambdas[q] === l) throw new RangeError(`lambdas[${k}] repeats lambdas[${q}] = ${l}; the values must be distinct`);
    }
  } else if (options.lambdas !== undefined) {
    throw new RangeError(`lambdas applies to order "screened" only, not "${order}"`);
  }
  return { order, shells, background, G, tol, lambdas, maxWork };
}

/** Rows of the partial-sum table: shells + 1 (R = 0..shells), the number of λ, or 1 (nearest). */
export function imageSumRows(o: ImageSumResolved): number {
  if (o.order === 'screened') return o.lambdas.length;
  if (o.order === 'nearest') return 1;
  return o.shells + 1;
}

/**
 * Estimated work (pair-term equivalents) of an image sum for n particles and k targets — exact pair terms
 * plus the multipole, Fourier and special-function work converted at their measured relative cost.
 */
export function imageSumWork(o: ImageSumResolved, box: Box, n: number, k: number): number {
  const L = [box.lx, box.ly, box.lz];
  const V = boxVolume(box);
  const d = Math.hypot(L[0], L[1], L[2]);
  const lnTol = Math.log(1 / o.tol) + 3;
  switch (o.order) {
    case 'nearest':
      return k * n;
    case 'sphere':
    case 'cube': {
      const R = o.shells;
      const ell = Math.max(...L);
      const cells = o.order === 'cube' ? (2 * R + 1) ** 3 : ((4 * Math.PI) / 3) * (R * ell) ** 3 / V + 1;
      const near = Math.min(cells, ((4 * Math.PI) / 3) * (2.75 * d) ** 3 / V + 1);
      const far = Math.max(0, cells - near);
      return k * (n + 60) * near + far * 80 + k * R * 400 + n * 2000;
    }
    case 'screened': {
      const rc = Math.min(...L);
      const kVec = ((4 * Math.PI) / 3) * ((2 * lnTol) / rc) ** 3 * V / (2 * (2 * Math.PI) ** 3);
      const pairs = (n * ((4 * Math.PI) / 3) * rc ** 3) / V;
      return k * n * 27 + k * pairs * o.lambdas.length * 12 + n * kVec * 4 + k * kVec * o.lambdas.length;
    }
    default: {
      const axis = o.order === 'slab-x' ? 0 : o.order === 'slab-y' ? 1 : 2;
      const lu = L[(axis + 1) % 3], lv = L[(axis + 2) % 3], lw = L[axis];
      const rc = 2 * Math.min(lu, lv);
      const real = (2 * Math.ceil(rc / lu + 0.5) + 1) * (2 * Math.ceil(rc / lv + 0.5) + 1);
      const gNear = (Math.PI * ((2 * lnTol) / rc) ** 2 * lu * lv) / (2 * (2 * Math.PI) ** 2);
      const gFar = (Math.PI * (lnTol / lw) ** 2 * lu * lv) / (2 * (2 * Math.PI) ** 2);
      return k * n * 3 * (real * 2 + gNear * 4) + n * gFar * 4 + k * gFar * Math.min(o.shells, 60);
    }
  }
}

function humanSeconds(s: number): string {
  if (s < 90) return `${s.toPrecision(2)} s`;
  if (s < 5400) return `${(s / 60).toPrecision(2)} min`;
  if (s < 172800) return `${(s / 3600).toPrecision(2)} h`;
  return `${(s / 86400).toPrecision(2)} days`;
}

/** Throws a RangeError when the estimated work exceeds maxWork or the partial sums would not fit. */
export function imageSumCheckCost(o: ImageSumResolved, box: Box, n: number, k: number): number {
  const work = imageSumWork(o, box, n, k);
  const what = o.order === 'screened' ? `${o.lambdas.length} screening values` : o.order === 'nearest' ? 'the nearest image' : `shells ${o.shells}`;
  if (work > o.maxWork) {
    throw new RangeError(
      `order "${o.order}" with ${what}, ${k} targets and ${n} particles needs about ${work.toPrecision(2)} pair terms ` +
        `(~${humanSeconds(work / IMAGE_SUM_WORK_RATE)} on one core), above maxWork ${o.maxWork.toPrecision(2)} ` +
        `(~${humanSeconds(o.maxWork / IMAGE_SUM_WORK_RATE)}); use fewer shells or targets, or raise maxWork`,
    );
  }
  const cells = imageSumRows(o) * 3 * k;
  if (cells > IMAGE_SUM_PARTIAL_MAX) {
    throw new RangeError(`the partial sums of ${imageSumRows(o)} rows × ${k} targets would need ${((cells * 8) / 2 ** 20).toFixed(0)} MB; use fewer shells or targets`);
  }
  return work;
}
