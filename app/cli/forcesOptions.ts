/**
 * The `torusgrav forces` command line: its options (for parsing and for help) and their checking.
 */
import type { Box } from '../../engine/box';
import type { Softening } from '../../engine/softening';
import type { TargetSpec } from '../../engine/targets';
import { type OptionSpec, argsParse } from './argParse';
import { UsageError } from './cliErrors';
import { boxParse, integerParse, positiveParse, softeningParse, targetsCountParse, tolParse } from './optionValues';
import { defaultThreads } from './parallelEwald';

export const FORCES_COMMAND = 'forces';
const COMMAND = FORCES_COMMAND;

export const FORCES_USAGE = 'torusgrav forces SNAPSHOT.csv --box L|Lx,Ly,Lz --out FILE.csv [options]';

export const FORCES_ABOUT = [
  'Exact periodic (Ewald) accelerations and potentials for every particle of a snapshot, or a subset.',
  '',
  'Input: CSV with a header row naming the columns x, y, z and optionally m (or mass; without one every',
  'particle has mass 1). Other columns are ignored; blank lines and lines starting with # are skipped.',
  'Particles outside the box are wrapped into it (with a warning that says how many).',
  'Output: CSV with header id,ax,ay,az,phi, where id is the 0-based particle (data row) of the input, and',
  'numbers have 17 significant digits. Conventions: a = -grad phi points toward mass; phi = -G m/r near a',
  'mass; the mean density is removed (zero-mean potential, no self-force), as in comoving simulations.',
];

export const FORCES_OPTIONS: readonly OptionSpec[] = [
  { name: 'box', metavar: 'L | Lx,Ly,Lz', help: 'periodic box: one side (cube) or three sides, each > 0; home cell [0,Lx)x[0,Ly)x[0,Lz) (required)' },
  { name: 'out', metavar: 'FILE.csv', help: 'output file; written whole or not at all (an existing file stays untouched on failure) (required)' },
  { name: 'G', metavar: 'g', help: 'gravitational constant, > 0', defaultText: '1' },
  { name: 'tol', metavar: 'T', help: 'requested relative force error, strictly between 0 and 1: alpha, cutoffs and cells are chosen (Kolafa & Perram error estimates with a safety margin, more for clustered data) so that every particle\'s |a - a_exact|/|a_exact| stays below T', defaultText: '1e-6' },
  { name: 'targets', metavar: 'all|K', help: 'particles that get forces: all, or the first K data rows', defaultText: 'all' },
  { name: 'sample', metavar: 'K', help: 'instead of --targets: a seeded random subsample of K particles (ids sorted)' },
  { name: 'seed', metavar: 'S', help: 'integer seed of --sample; the same seed gives the same subsample', defaultText: '1' },
  { name: 'softening', metavar: 'none|plummer:EPS|spline:H', help: 'softened pair force: Plummer length EPS, or cubic spline kernel with support H (box units)', defaultText: 'none' },
  { name: 'threads', metavar: 'N', help: 'worker threads (runs under 2048 particles use one)', defaultText: 'all cores' },
  { name: 'help', help: 'show this help' },
];

export interface ForcesSettings {
  readonly file: string;
  readonly out: string;
  readonly box: Box;
  readonly G: number;
  readonly tol: number;
  readonly targets: TargetSpec;
  readonly softening: Softening;
  readonly threads: number;
}

/** Checks the parsed command line and turns it into settings; UsageError names the faulty option. */
export function forcesSettings(argv: readonly string[]): ForcesSettings | 'help' {
  const { positionals, values } = argsParse(argv, FORCES_OPTIONS, COMMAND);
  if (values.has('help')) return 'help';
  if (positionals.length === 0) throw new UsageError('no snapshot file given', COMMAND);
  if (positionals.length > 1) throw new UsageError(`one snapshot file expected, got ${positionals.length}: ${positionals.join(' ')}`, COMMAND);
  const box = values.get('box');
  if (box === undefined) throw new UsageError('--box is required (the periodic box side L, or Lx,Ly,Lz)', COMMAND);
  const out = values.get('out');
  if (out === undefined || out === '') throw new UsageError('--out FILE.csv is required', COMMAND);
  const sample = values.get('sample');
  const seed = values.get('seed');
  const targetsText = values.get('targets');
  let targets: TargetSpec = { kind: 'all' };
  if (sample !== undefined) {
    if (targetsText !== undefined) throw new UsageError('give either --targets or --sample, not both', COMMAND);
    targets = { kind: 'sample', count: integerParse(sample, 'sample', COMMAND, 1), seed: seed === undefined ? 1 : integerParse(seed, 'seed', COMMAND, 0, 2 ** 32 - 1) };
  } else {
    if (seed !== undefined) throw new UsageError('--seed only applies together with --sample', COMMAND);
    const k = targetsText === undefined ? 'all' : targetsCountParse(targetsText, COMMAND);
    if (k !== 'all') targets = { kind: 'first', count: k };
  }
  const G = values.get('G');
  const tol = values.get('tol');
  const softening = values.get('softening');
  const threads = values.get('threads');
  return {
    file: positionals[0],
    out,
    box: boxParse(box, COMMAND),
    G: G === undefined ? 1 : positiveParse(G, 'G', COMMAND),
    tol: tol === undefined ? 1e-6 : tolParse(tol, COMMAND),
    targets,
    softening: softening === undefined ? { kind: 'none' } : softeningParse(softening, COMMAND),
    threads: threads === undefined ? defaultThreads() : integerParse(threads, 'threads', COMMAND, 1, 1024),
  };
}
