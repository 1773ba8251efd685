/**
 * What the report says about each method of a comparison: one line of words with every parameter it ran
 * with (the header of the PNG) and the record of the same parameters for the JSON summary. Covers every
 * method of the registry: Ewald, the file's accelerations, the coarse mesh, the image-sum orders (shells,
 * mean density, λ list, exact-part tolerance and what the exact parts chose, the predicted limit) and
 * particle-mesh Ewald (α, r_c, mesh, B-spline order, influence function, predicted error).
 */
import { type Box, boxVolume, positionsWrap } from '../../../engine/box';
import type { ImageSumParams } from '../../../engine/orders/imageSumOrder';
import { boxDipole, orderDepolarisation } from '../../../engine/orders/predictedLimit';
import type { PmeParams } from '../../../engine/pme/pmeParams';
import type { MethodRecord } from '../../../engine/stats/checkSummary';
import { formatCount, formatNumber } from '../format';
import type { MethodRun, Snapshot } from '../state/types';

function g(v: number, digits = 4): string {
  return formatNumber(v, digits);
}

/** A softening kernel in words. */
export function softeningText(s: { kind: string; eps?: number; h?: number }): string {
  if (s.kind === 'plummer') return `Plummer ε = ${g(s.eps!)}`;
  if (s.kind === 'spline') return `cubic spline h = ${g(s.h!)}`;
  return 'none (point masses)';
}

/** "name value, name value" for a parameter record: numbers to 4 digits, lists joined, softening in words. */
export function paramsText(p: Readonly<Record<string, unknown>>): string {
  const one = (v: unknown): string => {
    if (typeof v === 'number') return g(v);
    if (Array.isArray(v) || ArrayBuffer.isView(v)) return Array.from(v as ArrayLike<unknown>, one).join('×');
    if (v && typeof v === 'object' && 'kind' in v) return softeningText(v as { kind: string });
    if (v && typeof v === 'object') return `(${paramsText(v as Record<string, unknown>)})`;
    return String(v);
  };
  return Object.entries(p)
    .filter(([, v]) => v !== undefined && typeof v !== 'function')
    .map(([k, v]) => `${k} ${one(v)}`)
    .join(', ');
}

/** A copy fit for JSON: typed arrays become plain arrays (JSON.stringify would write them as {"0": …}). */
function jsonSafe(v: unknown): unknown {
  if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number>);
  if (Array.isArray(v)) return v.map(jsonSafe);
  if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, jsonSafe(x)]));
  return v;
}

/** What an image-sum order tends to as its shells grow (de Leeuw, Perram & Smith 1980; engine/orders/predictedLimit.ts). */
export interface OrderLimitInfo {
  /** The limit in words (formula). */
  readonly limit: string;
  /** Depolarisation tensor N of the order's shape (row-major 3×3), the box's mass dipole D (mass·length) about its centre. */
  readonly depolarisation: number[] | null;
  readonly dipole: number[] | null;
  /** G N·D/V (acceleration), the same for every particle, when each cell carries its background; else null. */
  readonly shift: number[] | null;
}

const SHAPE_WORDS: Readonly<Record<string, string>> = {
  sphere: '(4π/3) I (sphere)',
  cube: 'of a prism shaped like the box',
  'slab-x': '4π x̂x̂ (slab)',
  'slab-y': '4π ŷŷ (slab)',
  'slab-z': '4π ẑẑ (slab)',
};

/** The predicted limit of an order on the snapshot's particles (wrapped into the box, as the engine does). */
export function orderLimitInfo(p: ImageSumParams, positions: Float64Array, masses: Float64Array, box: Box): OrderLimitInfo {
  if (p.order === 'nearest') return { limit: 'none: the nearest image only is not a periodic force', depolarisation: null, dipole: null, shift: null };
  if (p.order === 'screened') return { limit: 'Ewald (λ → 0)', depolarisation: null, dipole: null, shift: null };
  const wrapped = Float64Array.from(positions);
  positionsWrap(wrapped, box);
  const D = boxDipole(wrapped, masses, box);
  const N = orderDepolarisation(p.order, box);
  const V = boxVolume(box);
  const shift = [0, 1, 2].map((r) => (p.G * (N[3 * r] * D[0] + N[3 * r + 1] * D[1] + N[3 * r + 2] * D[2])) / V);
  return {
    limit: p.background ? 'Ewald + G N·D/V' : 'Ewald − G ρ̄ N·(r − x_com) (mean density kept: the homologous term)',
    depolarisation: Array.from(N),
    dipole: Array.from(D),
    shift: p.background ? shift : null,
  };
}

/** The order's words: what it sums, to which shell or λ, the exact parts, work, limit. */
function orderText(label: string, p: ImageSumParams, info: OrderLimitInfo): string {
  const parts: string[] = [];
  if (p.order === 'nearest') {
    parts.push('nearest image of every particle only (minimum-image sum)');
  } else if (p.order === 'screened') {
    const l = p.lambdas ? Array.from(p.lambdas, (x) => g(x, 3)).join(', ') : '—';
    parts.push(`screened sums at λ = ${l} (1/length), extrapolated to λ → 0 by a polynomial in λ² through all of them`);
  } else {
    const shells =
      p.order === 'sphere'
        ? `spherical shells |s| ≤ R·L_max for R = 0 … ${p.shells}`
        : p.order === 'cube'
          ? `cubic shells max|n_i| ≤ R for R = 0 … ${p.shells}`
          : `layers |n_${p.order.slice(-1)}| ≤ R for R = 0 … ${p.shells}`;
    parts.push(`${shells}, mean density ${p.background ? 'removed (every cell neutral)' : 'kept'}`);
  }
  if (p.order !== 'nearest') {
    const exact: string[] = [];
    if (p.nearRadius !== undefined) exact.push(`cells within ${g(p.nearRadius)} (length) summed pair by pair`);
    if (p.maxOrder !== undefined) exact.push(`multipoles to order ${p.maxOrder}`);
    if (p.nearCells !== undefined && p.farCells !== undefined) exact.push(`${formatCount(p.nearCells)} near and ${formatCount(p.farCells)} far cells`);
    if (p.alpha !== undefined) exact.push(`α = ${g(p.alpha)} /length`);
    if (p.rCut !== undefined) exact.push(`r_c = ${g(p.rCut)}`);
    parts.push(`exact parts to tolerance ${p.tol.toExponential()}${exact.length ? ` (${exact.join(', ')})` : ''}`);
  }
  parts.push(`work ${g(p.work, 3)} pair terms (about ${g(p.estimatedSeconds, 2)} s on one core)`);
  let limit = `predicted limit: ${info.limit}`;
  if (info.depolarisation && info.dipole) {
    limit += ` with N ${SHAPE_WORDS[p.order] ?? ''}, |D| = ${g(Math.hypot(...info.dipole), 3)} mass·length`;
    if (info.shift) limit += `, |G N·D/V| = ${g(Math.hypot(...info.shift), 3)} (the same for every particle)`;
    limit += `; the truncation at R = ${p.shells} is not estimated (see the convergence plot)`;
  }
  parts.push(limit);
  return `${label}: ${parts.join('; ')}; G = ${g(p.G)}`;
}

/** PME's words: tolerance, the chosen α, r_c, mesh, order, influence function, softening, predicted error. */
function pmeText(label: string, p: PmeParams): string {
  return (
    `${label}: particle-mesh Ewald, tolerance ${p.tol.toExponential()} (rms relative); chosen α = ${g(p.alpha)} /length, r_c = ${g(p.rCut)}, ` +
    `mesh ${p.mesh.join('×')}, B-spline order p = ${p.order}, ${p.influence === 'optimal' ? 'optimal' : 'plain B-spline (SPME)'} influence function, ` +
    `softening ${softeningText(p.softening)}${p.rSoft > 0 ? ` (kept to r = ${g(p.rSoft)})` : ''}, cell grid ${p.cells.join('×')}; ` +
    `predicted rms error ${g(p.predictedRmsError, 3)} (mesh ${g(p.meshError, 3)}, real ${g(p.realError, 3)}) at the mean Σm²/V, ` +
    `rms relative ${g(p.predictedRelativeError, 3)}; G = ${g(p.G)}`
  );
}

/** The method's record for the JSON summary: its name, words and every parameter it ran with. */
export function methodRecord(run: MethodRun, snap: Snapshot): MethodRecord {
  if (run.ewald) return { method: 'ewald', label: run.label, ...(jsonSafe(run.ewald) as object) };
  if (run.mesh) return { method: 'mesh', label: run.label, ...(jsonSafe(run.mesh) as object), assignment: 'cloud-in-cell', shortRangeCorrection: false, predictedRmsError: null };
  if (run.method === 'file') return { method: 'file', label: run.label, accelerations: snap.accelerationColumns ? snap.accelerationColumns.join(',') : null };
  if (run.order) {
    // the record's own "order" is the engine's name of the summation order (slab-z, …); method is the page's
    return { method: run.method, label: run.label, ...(jsonSafe(run.order) as object), predictedLimit: orderLimitInfo(run.order, snap.positions, snap.masses, snap.box) };
  }
  if (run.pme) return { method: 'pme', label: run.label, ...(jsonSafe(run.pme) as object) };
  return { method: run.method, label: run.label };
}

/** One line about a method with every parameter and its chosen values and predicted error. */
export function methodText(run: MethodRun, snap: Snapshot): string {
  const e = run.ewald;
  if (e) {
    return (
      `${run.label}: tolerance ${e.tol.toExponential()}, softening ${softeningText(e.softening)}${e.rSoft > 0 ? ` (kept to r = ${g(e.rSoft)})` : ''}; ` +
      `chosen α = ${g(e.alpha)} /length, r_c = ${g(e.rCut)}, k_c = ${g(e.kCut)} /length (${formatCount(e.kVectors)} k-vectors, |h| ≤ ${e.hMax.join(', ')}), ` +
      `cell grid ${e.cells.join('×')}, clustering factor ${g(e.clustering, 3)}; predicted rms error ${g(e.predictedRmsError, 3)} ` +
      `(real ${g(e.realSpaceError, 3)}, Fourier ${g(e.fourierError, 3)}), relative ${g(e.predictedRelativeError, 3)} of |a| scale ${g(e.accelerationScale, 3)}; G = ${g(e.G)}`
    );
  }
  const m = run.mesh;
  if (m) {
    return (
      `${run.label}: ${m.mesh}³ mesh points, cells ${m.cell.map((c) => g(c)).join(' × ')} (length), cloud-in-cell assignment, ` +
      `no short-range correction; no error estimate (forces smoothed below about 2 cells); G = ${g(m.G)}`
    );
  }
  if (run.method === 'file') return `${run.label}: accelerations stored in the snapshot${snap.accelerationColumns ? `, columns ${snap.accelerationColumns.join(', ')}` : ''}`;
  if (run.order) return orderText(run.label, run.order, orderLimitInfo(run.order, snap.positions, snap.masses, snap.box));
  if (run.pme) return pmeText(run.label, run.pme);
  return `${run.label}: parameters not recorded`;
}

/** The G a run used, when it records one. */
export function runGravity(run: MethodRun): number | undefined {
  return run.ewald?.G ?? run.mesh?.G ?? run.order?.G ?? run.pme?.G;
}
