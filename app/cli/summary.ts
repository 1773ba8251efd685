/** The short report `torusgrav forces` prints on stderr after a successful run. */
import type { Box } from '../../engine/box';
import type { EwaldParams } from '../../engine/ewald/params';
import type { Snapshot } from '../../engine/formats/snapshot';
import type { Softening } from '../../engine/softening';
import type { ForcesSettings } from './forcesOptions';

export interface ForcesRunFacts {
  readonly file: string;
  readonly out: string;
  readonly snapshot: Snapshot;
  readonly settings: ForcesSettings;
  /** The box used (given, or read from the file). */
  readonly box: Box;
  /** Relative errors of the file's accelerations per target, when --accelerations was given. */
  readonly errors: Float64Array | null;
  readonly params: EwaldParams;
  readonly targetCount: number;
  readonly threadsUsed: number;
  /** Wall-clock seconds. */
  readonly seconds: { read: number; compute: number; write: number; total: number };
}

/** A number with `digits` significant digits, in exponent form when very small or large. */
function g(v: number, digits = 4): string {
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(digits - 1).replace(/\.?0+e/, 'e');
  return String(Number(v.toPrecision(digits)));
}

function softeningText(s: Softening): string {
  return s.kind === 'plummer' ? `plummer eps=${g(s.eps, 6)}` : s.kind === 'spline' ? `spline h=${g(s.h, 6)}` : 'none';
}

function targetsText(f: ForcesRunFacts): string {
  const spec = f.settings.targets;
  const n = f.snapshot.count;
  if (spec.kind === 'all') return `all ${n}`;
  if (spec.kind === 'first') return spec.count >= n ? `all ${n} (--targets ${spec.count} ≥ N)` : `the first ${f.targetCount}`;
  return spec.count >= n ? `all ${n} (--sample ${spec.count} ≥ N)` : `a random ${f.targetCount} (seed ${spec.seed})`;
}

/** The value at fraction q of sorted values (nearest rank). */
function quantile(sorted: Float64Array, q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))];
}

/** "relative error of the file's accelerations: 50% …, 90% …, 99% …, max …". */
function errorsText(f: ForcesRunFacts): string[] {
  if (!f.errors || f.errors.length === 0) return [];
  const sorted = Float64Array.from(f.errors).sort();
  const parts = [0.5, 0.9, 0.99].map((q) => `${100 * q}% ${g(quantile(sorted, q), 3)}`);
  return [`torusgrav: relative error of the file's accelerations (${f.snapshot.sources?.accelerations ?? 'accelerations'}) against the reference: ${parts.join(', ')}, max ${g(sorted[sorted.length - 1], 3)}`];
}

/** Where the particles came from: format, count, subsampling, masses. */
function inputText(f: ForcesRunFacts): string {
  const { snapshot } = f;
  const every = snapshot.every ?? 1;
  const n = every > 1 ? `N=${snapshot.count} (one in ${every} of ${snapshot.total}, masses scaled by ${g((snapshot.total ?? snapshot.count) / snapshot.count, 6)})` : `N=${snapshot.count}`;
  const from = snapshot.format === 'text' ? '' : ` ${snapshot.format}, positions from ${snapshot.sources?.positions},`;
  const mass =
    snapshot.massColumn === null
      ? 'all masses 1 (no mass column)'
      : snapshot.format === 'text'
        ? `masses from column ${snapshot.massColumn}`
        : `masses from ${snapshot.sources?.masses ?? snapshot.massColumn}`;
  return `${f.file}:${from} ${n}, ${mass}`;
}

/** Four lines (five with --accelerations): input, parameters, predicted error, [errors,] timing. */
export function forcesSummary(f: ForcesRunFacts): string {
  const { params: p, settings: s } = f;
  const b = f.box;
  const box = (b.lx === b.ly && b.ly === b.lz ? `${b.lx}` : `${b.lx} x ${b.ly} x ${b.lz}`) + (s.box === null ? ` (from ${f.snapshot.sources?.box})` : '');
  const G = `G=${g(p.G, 6)}${s.units ? ` (${s.units.label})` : ''}`;
  return [
    `torusgrav: ${inputText(f)}; targets: ${targetsText(f)}; box ${box}; ${G}; tol=${g(p.tol)}; softening ${softeningText(p.softening)}`,
    `torusgrav: alpha=${g(p.alpha)} rCut=${g(p.rCut)} kCut=${g(p.kCut)} k-vectors=${p.kVectors} (|h| <= ${p.hMax.join(',')}) cells=${p.cells.join('x')} (stencil ${p.stencilCells})` +
      (p.softening.kind === 'plummer' ? ` softened within ${g(p.rSoft)}` : ''),
    `torusgrav: predicted rms force error ${g(p.predictedRmsError, 3)} = ${g(p.predictedRelativeError, 3)} x ${g(p.accelerationScale, 3)} (the acceleration scale tol refers to; clustering factor ${g(p.clustering, 3)})`,
    ...errorsText(f),
    `torusgrav: wrote ${f.targetCount} rows to ${f.out} in ${f.seconds.total.toFixed(2)} s (read ${f.seconds.read.toFixed(2)}, forces ${f.seconds.compute.toFixed(2)}, write ${f.seconds.write.toFixed(2)}) on ${f.threadsUsed} thread${f.threadsUsed === 1 ? '' : 's'}`,
    '',
  ].join('\n');
}
