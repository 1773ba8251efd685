/**
 * The summation-order options shared by `torusgrav forces --method direct` and `torusgrav converge`
 * (--order, --shells, --no-background, --lambdas, --max-work): their specs for help and their checking
 * (UsageError naming the option). Running the image sum is in orderRun.ts, so that parsing these options
 * does not load the image-sum engine.
 */
import {
  IMAGE_SUM_MAX_WORK_DEFAULT,
  IMAGE_SUM_ORDERS,
  IMAGE_SUM_SHELLS_MAX,
  type ImageSumOptions,
  type ImageSumOrderName,
} from '../../engine/orders/imageSumOptions';
import type { OptionSpec } from './argParse';
import { UsageError } from './cliErrors';
import { integerParse, numberParse } from './optionValues';

/** The option specs (help text is shared by both commands). */
export const ORDER_OPTIONS: readonly OptionSpec[] = [
  {
    name: 'order',
    metavar: IMAGE_SUM_ORDERS.join('|'),
    help: 'summation order of the plain image sum: growing spheres or cubes of periodic images, slabs stacked along x, y or z, screened sums extrapolated to no screening, or the nearest image only',
  },
  {
    name: 'shells',
    metavar: 'R',
    help: `largest shell, an integer from 1 to ${IMAGE_SUM_SHELLS_MAX}: sphere radius R (in units of the longest box side), cube half-width R cells, slab layers |n| ≤ R; not for screened or nearest`,
  },
  { name: 'no-background', help: 'do not remove the mean density (each image cell without its uniform negative background)' },
  {
    name: 'lambdas',
    metavar: 'l1,l2,...',
    help: 'screened only: at least two distinct screening parameters λ > 0 (1/length); the acceleration is the λ → 0 extrapolation (polynomial in λ² through all values)',
    defaultText: '(2,1,1/2,1/4,1/8)/L_max',
  },
  {
    name: 'max-work',
    metavar: 'N',
    help: `refuse runs estimated above N pair-term equivalents (about 1.3e8 per second on one core); raise it to allow longer runs`,
    defaultText: IMAGE_SUM_MAX_WORK_DEFAULT.toExponential(0).replace('e+', 'e'),
  },
];

export const ORDER_OPTION_NAMES = ORDER_OPTIONS.map((s) => s.name);

export interface OrderSettings {
  readonly order: ImageSumOrderName;
  /** Largest shell (layered orders), else undefined. */
  readonly shells?: number;
  readonly background: boolean;
  readonly lambdas?: Float64Array;
  readonly maxWork: number;
}

/** --order NAME. */
export function orderParse(text: string, command: string): ImageSumOrderName {
  const t = text.trim().toLowerCase();
  if (!(IMAGE_SUM_ORDERS as readonly string[]).includes(t)) {
    throw new UsageError(`--order: unknown order ${JSON.stringify(text)}; orders are ${IMAGE_SUM_ORDERS.join(', ')}`, command);
  }
  return t as ImageSumOrderName;
}

/** --lambdas l1,l2,…: at least two distinct finite values > 0. */
export function lambdasParse(text: string, command: string): Float64Array {
  const parts = text.split(',');
  const values = Float64Array.from(parts, (p, k) => {
    const v = numberParse(p, 'lambdas', command);
    if (!(v > 0)) throw new UsageError(`--lambdas: value ${k + 1} (${p.trim()}) must be > 0 (a screening parameter, 1/length)`, command);
    return v;
  });
  if (values.length < 2) throw new UsageError(`--lambdas needs at least two values to extrapolate to λ → 0, got ${JSON.stringify(text)}`, command);
  for (let k = 0; k < values.length; k++) {
    for (let q = 0; q < k; q++) if (values[q] === values[k]) throw new UsageError(`--lambdas: value ${k + 1} repeats value ${q + 1} (${values[k]}); the values must be distinct`, command);
  }
  return values;
}

/**
 * The order settings from parsed option values; `shellsRequired` makes --shells mandatory for the
 * layered orders (sphere, cube, slabs). Options that do not apply to the order are a UsageError.
 */
export function orderSettings(values: ReadonlyMap<string, string>, command: string, shellsRequired: boolean): OrderSettings {
  const orderText = values.get('order');
  if (orderText === undefined) throw new UsageError(`--order is required (${IMAGE_SUM_ORDERS.join(', ')})`, command);
  const order = orderParse(orderText, command);
  const layered = order !== 'screened' && order !== 'nearest';
  const shellsText = values.get('shells');
  const lambdasText = values.get('lambdas');
  if (!layered && shellsText !== undefined) {
    throw new UsageError(`--shells does not apply to --order ${order}${order === 'screened' ? ' (it uses --lambdas)' : ' (it sums the nearest image only)'}`, command);
  }
  if (order !== 'screened' && lambdasText !== undefined) throw new UsageError(`--lambdas applies to --order screened only, not ${order}`, command);
  if (layered && shellsRequired && shellsText === undefined) throw new UsageError(`--shells R is required for --order ${order} (the largest shell, 1 to ${IMAGE_SUM_SHELLS_MAX})`, command);
  if (order === 'nearest' && values.has('no-background')) throw new UsageError('--no-background does not apply to --order nearest (a single image has no background)', command);
  const maxWork = values.get('max-work');
  return {
    order,
    ...(shellsText !== undefined ? { shells: integerParse(shellsText, 'shells', command, 1, IMAGE_SUM_SHELLS_MAX) } : {}),
    background: !values.has('no-background'),
    ...(lambdasText !== undefined ? { lambdas: lambdasParse(lambdasText, command) } : {}),
    maxWork: maxWork === undefined ? IMAGE_SUM_MAX_WORK_DEFAULT : maxWorkParse(maxWork, command),
  };
}

function maxWorkParse(text: string, command: string): number {
  const v = numberParse(text, 'max-work', command);
  if (!(v > 0)) throw new UsageError(`--max-work must be a number > 0 (pair-term equivalents), got ${text}`, command);
  return v;
}

/** The engine options for the settings, G and tol (undefined: the engine's default 1e-10). */
export function orderEngineOptions(s: OrderSettings, G: number, tol: number | undefined): ImageSumOptions {
  return {
    order: s.order,
    background: s.background,
    G,
    maxWork: s.maxWork,
    ...(s.shells !== undefined ? { shells: s.shells } : {}),
    ...(s.lambdas !== undefined ? { lambdas: s.lambdas } : {}),
    ...(tol !== undefined ? { tol } : {}),
  };
}
