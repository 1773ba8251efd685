/**
 * The plan of an image-sum order before it runs: the shells (or λ values) it will sum, the shape its
 * cells fill and the limit that shape is predicted to reach (Ewald + G N·D/V; de Leeuw, Perram & Smith
 * 1980, see engine/orders/predictedLimit.ts), and the expected time from the engine's work estimate.
 * The truncation at the largest shell is not estimated: the convergence plot shows it.
 */
import { type Box, boxVolume, positionsWrap } from '../../../engine/box';
import { type ImageSumOrderName, imageSumOptionsResolve, imageSumWork } from '../../../engine/orders/imageSumOptions';
import { boxDipole, orderDepolarisation } from '../../../engine/orders/predictedLimit';
import type { MethodPlan, PlanLine } from './methodPlan';
import type { OrderMethodOptions } from './moreOptions';

/**
 * Nanoseconds of one core per unit of the engine's work estimate (imageSumWork, pair-term equivalents),
 * measured on the project machine (CPU time, demo N = 4096, all targets: sphere R 8 24 s and R 32 28 s, cube R 4 25 s,
 * slab z R 8 58 s, screened 23 s, nearest 1.0 s; load ≈ 4 on 2 cores). The page refines it per method
 * from every finished run (calibration in the store).
 */
export const ORDER_NS_PER_WORK: Readonly<Record<ImageSumOrderName, number>> = {
  sphere: 3.4,
  cube: 3.2,
  'slab-x': 5.6,
  'slab-y': 5.6,
  'slab-z': 5.6,
  screened: 4.9,
  nearest: 62,
};

const SHAPE_TEXT: Readonly<Record<ImageSumOrderName, string>> = {
  sphere: '(4π/3) I (sphere)',
  cube: 'prism of the box’s shape ((4π/3) I for a cube)',
  'slab-x': '4π x̂x̂ (slab)',
  'slab-y': '4π ŷŷ (slab)',
  'slab-z': '4π ẑẑ (slab)',
  screened: '0 (screened: the limit is Ewald)',
  nearest: '—',
};

/** Expected work (pair-term equivalents) and one-core time (ns) of an order for `targets` targets. */
export function orderCost(m: OrderMethodOptions, box: Box, n: number, targets: number): { work: number; costNs: number } {
  const o = imageSumOptionsResolve(m.options, box);
  const work = imageSumWork(o, box, n, targets);
  return { work, costNs: work * ORDER_NS_PER_WORK[o.order] };
}

/** The plan of an order for `targets` targets among the snapshot's particles (flat xyz, length units). */
export function orderPlan(m: OrderMethodOptions, positions: Float64Array, masses: Float64Array, box: Box, targets: number): MethodPlan {
  const o = imageSumOptionsResolve(m.options, box);
  const n = masses.length;
  const { work, costNs } = orderCost(m, box, n, targets);
  const lines: PlanLine[] = [];
  if (o.order === 'screened') {
    lines.push({ key: 'lambdas', label: 'λ values', value: Array.from(o.lambdas, (l) => Number(l.toPrecision(3))).join(', '), unit: '1/length', hint: 'the accelerations are extrapolated to λ → 0 through all of them (polynomial in λ²)' });
  } else if (o.order !== 'nearest') {
    lines.push({ key: 'shells', label: o.order.startsWith('slab') ? 'layers' : 'shells', value: `0 … ${o.shells}` });
    lines.push({ key: 'background', label: 'mean density', value: o.background ? 'removed' : 'kept' });
  }
  if (o.order !== 'nearest') {
    const wrapped = Float64Array.from(positions);
    positionsWrap(wrapped, box);
    const D = boxDipole(wrapped, masses, box);
    const N = orderDepolarisation(o.order, box);
    const shift = [0, 1, 2].map((r) => (o.G * (N[3 * r] * D[0] + N[3 * r + 1] * D[1] + N[3 * r + 2] * D[2])) / boxVolume(box));
    lines.push({ key: 'shape', label: 'shape tensor N', value: SHAPE_TEXT[o.order] });
    lines.push({ key: 'dipole', label: '|D| (mass dipole)', value: Math.hypot(D[0], D[1], D[2]), unit: 'mass·length', hint: 'D = Σ m_j (r_j − c), about the box centre c' });
    if (o.background) lines.push({ key: 'shapeTerm', label: '|G N·D/V|', value: Math.hypot(shift[0], shift[1], shift[2]), unit: 'acceleration', hint: 'predicted limit minus Ewald, the same for every particle' });
  }
  lines.push({ key: 'work', label: 'work', value: work, unit: 'pair terms', hint: 'the engine’s estimate of the pair-term equivalents summed' });
  const limitText =
    o.order === 'nearest'
      ? 'no images beyond the nearest: not a periodic force; no limit to predict'
      : o.order === 'screened'
        ? 'tends to Ewald as λ → 0'
        : o.background
          ? 'tends to Ewald + G N·D/V'
          : 'tends to Ewald − G ρ̄ N·(r − x_com) (homologous term, mean density kept)';
  return {
    lines,
    predictedRelative: null,
    predictedRms: null,
    costNs,
    note: `${limitText}; the truncation at the last shell is not estimated — see the convergence plot`,
  };
}
