/**
 * Running the engine's image sum for `torusgrav forces --method direct` and `torusgrav converge`, with its
 * option complaints in command-line terms (one-line exit-2 errors).
 */
import type { Box } from '../../engine/box';
import type { Progress } from '../../engine/ewald/ewald';
import { type ImageSumResult, imageSumOrder } from '../../engine/orders';
import type { ImageSumOptions } from '../../engine/orders/imageSumOptions';
import { CliError } from './cliErrors';

/** The engine's option names in its RangeError messages, in command-line terms. */
function engineMessageInOptionTerms(message: string): string {
  return message
    .replace(/raise maxWork/g, 'raise it with --max-work N')
    .replace(/above maxWork/g, 'above --max-work')
    .replace(/^tol must/, '--tol must')
    .replace(/^shells must/, '--shells must')
    .replace(/^lambdas/, '--lambdas');
}

/** imageSumOrder with the engine's option complaints (RangeError) turned into one-line exit-2 errors. */
export function imageSumRun(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  targets: Int32Array | null,
  options: ImageSumOptions,
  onProgress?: Progress,
): ImageSumResult {
  try {
    return imageSumOrder(positions, masses, box, targets, options, onProgress);
  } catch (e) {
    if (e instanceof RangeError) throw new CliError(engineMessageInOptionTerms(e.message), 2);
    throw e;
  }
}
