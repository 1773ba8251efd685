/**
 * The options of `torusgrav forces --method pme` that override the automatic parameter choice
 * (--mesh, --order, --alpha, --rcut): their specs for help and their checking (UsageError naming the
 * option). --order is shared with --method direct, where it names a summation order.
 */
import { BSPLINE_ORDER_MAX, BSPLINE_ORDER_MIN } from '../../engine/pme/bspline';
import { fftSizeOk } from '../../engine/pme/fftRows';
import type { OptionSpec } from './argParse';
import { UsageError } from './cliErrors';
import { integerParse, positiveParse } from './optionValues';

/** Default --tol of --method pme (an rms over all particles). */
export const PME_TOL_DEFAULT = 1e-5;

export const PME_OPTIONS: readonly OptionSpec[] = [
  {
    name: 'mesh',
    metavar: 'M | M0,M1,M2',
    help: '--method pme only: mesh points per side (one for all sides, or three), each with prime factors 2, 3, 5 only, the first even; overrides the automatic choice',
  },
  { name: 'alpha', metavar: 'A', help: '--method pme only: Ewald splitting parameter alpha (1/length), > 0; overrides the automatic choice' },
  { name: 'rcut', metavar: 'R', help: '--method pme only: real-space cutoff (length), > 0; overrides the automatic choice' },
];

/** Options that only --method pme takes (besides --order, which --method direct also takes). */
export const PME_OPTION_NAMES: readonly string[] = PME_OPTIONS.map((s) => s.name);

export interface PmeOverrides {
  readonly mesh?: [number, number, number];
  readonly order?: number;
  readonly alpha?: number;
  readonly rCut?: number;
}

function meshParse(text: string, command: string): [number, number, number] {
  const parts = text.split(',');
  if (parts.length !== 1 && parts.length !== 3) throw new UsageError(`--mesh takes one number M or three M0,M1,M2, got ${JSON.stringify(text)}`, command);
  const sides = parts.map((p) => integerParse(p, 'mesh', command, 2, 4096));
  const mesh = (sides.length === 1 ? [sides[0], sides[0], sides[0]] : sides) as [number, number, number];
  mesh.forEach((m) => {
    if (!fftSizeOk(m)) throw new UsageError(`--mesh: ${m} has a prime factor other than 2, 3 and 5 (e.g. 96, 100, 120, 128 are fine)`, command);
  });
  if (mesh[0] % 2 !== 0) throw new UsageError(`--mesh: the first side must be even, got ${mesh[0]}`, command);
  return mesh;
}

/** Checks the pme overrides in `values` (the parsed command line). */
export function pmeOverridesParse(values: ReadonlyMap<string, string>, command: string): PmeOverrides {
  const mesh = values.get('mesh');
  const order = values.get('order');
  const alpha = values.get('alpha');
  const rcut = values.get('rcut');
  const o: PmeOverrides = {
    mesh: mesh === undefined ? undefined : meshParse(mesh, command),
    order: order === undefined ? undefined : integerParse(order, 'order', command, BSPLINE_ORDER_MIN, BSPLINE_ORDER_MAX),
    alpha: alpha === undefined ? undefined : positiveParse(alpha, 'alpha', command),
    rCut: rcut === undefined ? undefined : positiveParse(rcut, 'rcut', command),
  };
  if (o.mesh && o.order !== undefined && o.mesh.some((m) => m < o.order!)) {
    throw new UsageError(`--mesh ${o.mesh.join(',')} has fewer points per side than --order ${o.order}`, command);
  }
  return o;
}
