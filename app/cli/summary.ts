/** The short report `torusgrav forces` prints on stderr after a successful run. */
import type { EwaldParams } from '../../engine/ewald/params';
import type { Snapshot } from '../../engine/formats/snapshot';
import type { Softening } from '../../engine/softening';
import type { ForcesSettings } from './forcesOptions';

export interface ForcesRunFacts {
  readonly file: string;
  readonly out: string;
  readonly snapshot: Snapshot;
  readonly settings: ForcesSettings;
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

/** Four lines: input, parameters, predicted error, timing. */
export function forcesSummary(f: ForcesRunFacts): string {
  const { params: p, settings: s, snapshot } = f;
  const box = s.box.lx === s.box.ly && s.box.ly === s.box.lz ? `${s.box.lx}` : `${s.box.lx} x ${s.box.ly} x ${s.box.lz}`;
  const mass = snapshot.massColumn === null ? 'all masses 1 (no mass column)' : `masses from column ${snapshot.massColumn}`;
  return [
    `torusgrav: ${f.file}: N=${snapshot.count}, ${mass}; targets: ${targetsText(f)}; box ${box}; G=${g(p.G, 6)}; tol=${g(p.tol)}; softening ${softeningText(p.softening)}`,
    `torusgrav: alpha=${g(p.alpha)} rCut=${g(p.rCut)} kCut=${g(p.kCut)} k-vectors=${p.kVectors} (|h| <= ${p.hMax.join(',')}) cells=${p.cells.join('x')} (stencil ${p.stencilCells})` +
      (p.softening.kind === 'plummer' ? ` softened within ${g(p.rSoft)}` : ''),
    `torusgrav: predicted rms force error ${g(p.predictedRmsError, 3)} = ${g(p.predictedRelativeError, 3)} x ${g(p.accelerationScale, 3)} (the acceleration scale tol refers to; clustering factor ${g(p.clustering, 3)})`,
    `torusgrav: wrote ${f.targetCount} rows to ${f.out} in ${f.seconds.total.toFixed(2)} s (read ${f.seconds.read.toFixed(2)}, forces ${f.seconds.compute.toFixed(2)}, write ${f.seconds.write.toFixed(2)}) on ${f.threadsUsed} thread${f.threadsUsed === 1 ? '' : 's'}`,
    '',
  ].join('\n');
}
