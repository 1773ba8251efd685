/**
 * The `torusgrav forces` command line: its options (for parsing and for help) and their checking.
 */
import type { Box } from '../../engine/box';
import { LOAD_LIMIT_BYTES } from '../../engine/formats/description';
import type { ColumnMapping } from '../../engine/formats/snapshot';
import type { Softening } from '../../engine/softening';
import type { TargetSpec } from '../../engine/targets';
import { UNIT_PRESETS, type UnitPreset, unitPresetFind } from '../../engine/units';
import { type OptionSpec, argsParse } from './argParse';
import { UsageError } from './cliErrors';
import { mappingFromOptions, sizeParse } from './mappingOptions';
import { boxParse, integerParse, positiveParse, softeningParse, targetsCountParse, tolParse } from './optionValues';
import { ORDER_OPTIONS, ORDER_OPTION_NAMES, type OrderSettings, orderSettings } from './orderOptions';
import { defaultThreads } from './workerWarm';
import { PME_OPTIONS, PME_OPTION_NAMES, PME_TOL_DEFAULT, type PmeOverrides, pmeOverridesParse } from './pmeOptions';

export const FORCES_COMMAND = 'forces';
const COMMAND = FORCES_COMMAND;

export const FORCES_USAGE = 'torusgrav forces SNAPSHOT --box L|Lx,Ly,Lz|@PATH --out FILE.csv [--method ewald|direct --order NAME|pme] [options]';

/** G to 8 significant digits, in exponent form when very small or large. */
function gText(G: number): string {
  return G < 1e-3 || G >= 1e5 ? G.toExponential(7).replace(/\.?0+e/, 'e').replace('e+', 'e') : String(Number(G.toPrecision(8)));
}

const PRESETS = UNIT_PRESETS.map((u) => `  ${u.name} (${u.label}: G = ${gText(u.G)})`);

export const FORCES_ABOUT = [
  'Exact periodic (Ewald) accelerations and potentials for every particle of a snapshot, or a subset.',
  '',
  'Input formats, told apart by content (then by name):',
  '  text   comma, tab or whitespace separated (.csv .tsv .txt .dat, also .gz), with a header row naming',
  '         the columns (or a # line right above the data, as numpy.savetxt writes); x, y, z and m (or',
  '         mass) are found without options; blank lines and lines starting with # are skipped.',
  '  .npy   one array: shape (N,3) is x,y,z; (N,4) is x,y,z,m; other shapes need --positions 0,1,2 etc.',
  '         float32/float64 (or integers), either byte order, C or Fortran order.',
  '  .npz   numpy.savez / savez_compressed: one array per field; N×3 arrays or x, y, z arrays are found',
  '         by shape and name (pos, x, mass, m, …), or chosen with the options below.',
  '  HDF5   every dataset is considered; an N×3 dataset or three N-long x, y, z datasets are proposed',
  '         by shape and name, or chosen with the options below (dataset paths such as /bodies/pos).',
  'Column/array options take SPEC = column names or 0-based numbers for text (x,y,z or 0,1,2), column',
  'numbers for .npy, an array name for .npz (pos), a dataset path for HDF5 (/bodies/pos); NAME[k] picks',
  'column k of a 2-D array (/bodies/pv[3]). Without a mass column every particle has mass 1.',
  'Checks: NaN/Inf, zero or negative masses, mismatched array lengths, unreadable types (complex,',
  'strings) and damaged files stop the run with one line naming the file and the place (line and column,',
  'array or dataset); particles outside the box are wrapped into it (with a warning that says how many).',
  'Files above the load limit (--max-size, default 1GiB of data) are refused unless subsampled (--every).',
  '',
  'Output: CSV with header id,ax,ay,az,phi (plus rel_err with --accelerations), where id is the particle\'s',
  'id from --ids, else its 0-based particle (data row) of the input; numbers have 17 significant digits.',
  'rel_err = |a_file - a|/|a|, the relative error of the file\'s accelerations against the reference.',
  'With --method direct (plain image sum in the summation order --order): CSV with header id,ax,ay,az',
  'only - no phi column, because the plain sums\' potentials carry order-dependent constants. The',
  'acceleration is the partial sum of the largest shell (--shells), the λ → 0 extrapolation of the',
  'screened sums, or the nearest-image sum. --softening, --softening-column, --accelerations and',
  '--threads apply to the Ewald and pme methods only; --tol is then the tolerance of the exact parts, in',
  '[1e-14, 1e-2] (default 1e-10). See torusgrav converge for the partial sums shell by shell.',
  'With --method pme (particle-mesh Ewald: every particle at once in O(N log N), for the error map of a',
  'whole snapshot): the same columns id,ax,ay,az,phi (phi from the same split: mesh potential plus the',
  'real-space sum), the same conventions; --tol is the rms relative error over all particles (see --tol);',
  'the chosen mesh, B-spline order, alpha, cutoff and the predicted rms error are printed. Forces are',
  'computed for all particles; --targets/--sample only choose the rows written.',
  'Conventions: a = -grad phi points toward mass; phi = -G m/r near a mass; the mean density is removed',
  '(zero-mean potential, no self-force), as in comoving simulations.',
  '',
  'Unit presets (--units), G derived from CODATA 2018 G, the IAU 2015 nominal GM☉, the au and the parsec:',
  ...PRESETS,
  'Lengths (positions, box, softening) and masses must be in the preset\'s units; codes that work in units',
  'with h (Mpc/h, 1e10 M☉/h) use the same G.',
];

export const FORCES_OPTIONS: readonly OptionSpec[] = [
  {
    name: 'box',
    metavar: 'L | Lx,Ly,Lz | @PATH',
    help: 'periodic box: one side (cube) or three sides, each > 0; home cell [0,Lx)x[0,Ly)x[0,Lz); or @PATH to read it from the file: an HDF5 dataset (@/header/box), an attribute (@/bodies#side; @/#BoxSize on the root group) or an .npz array (@box) holding one or three sides (required)',
  },
  { name: 'out', metavar: 'FILE.csv', help: 'output file; written whole or not at all (an existing file stays untouched on failure) (required)' },
  { name: 'method', metavar: 'ewald|direct|pme', help: 'ewald: the exact periodic reference; direct: the plain image sum in the summation order --order (see above); pme: particle-mesh Ewald for all particles at once, fast, to an rms tolerance (see above)', defaultText: 'ewald' },
  ...ORDER_OPTIONS.map((s) => ({ ...s, help: s.name === 'order' ? `--method direct: ${s.help}; --method pme: the B-spline order P, an integer from 2 to 12 (default: chosen from 4 to 8)` : `--method direct only: ${s.help}` })),
  ...PME_OPTIONS,
  { name: 'positions', metavar: 'SPEC', help: 'where the positions are: three columns x,y,z (names or numbers) or one N×3 array/dataset', defaultText: 'text: x,y,z; binary: proposed by shape and name' },
  { name: 'masses', metavar: 'SPEC | none', help: 'the mass column/array/dataset; none ignores any mass column (all masses 1)', defaultText: 'text: m or mass; binary: proposed by name' },
  { name: 'accelerations', metavar: 'SPEC', help: "the code-under-test accelerations (x,y,z or one N×3 array/dataset), in the file's units: adds rel_err to the output and error percentiles to the report" },
  { name: 'ids', metavar: 'SPEC', help: 'particle ids (integers) to write in the id column instead of row numbers' },
  { name: 'softening-column', metavar: 'SPEC', help: 'per-particle softening lengths; with --softening plummer or spline naming the kernel. The reference uses one length: all must be equal' },
  { name: 'units', metavar: 'PRESET', help: `units of the file, which set G: ${UNIT_PRESETS.map((u) => u.name).join(', ')} (see above)`, defaultText: 'G1, i.e. G = 1' },
  { name: 'G', metavar: 'g', help: 'gravitational constant, > 0 (instead of --units)', defaultText: '1' },
  { name: 'tol', metavar: 'T', help: 'requested relative force error, strictly between 0 and 1: alpha, cutoffs and cells are chosen (Kolafa & Perram error estimates with a safety margin, more for clustered data) so that every particle\'s |a - a_exact|/|a_exact| stays below T. With --method pme T is an rms: the root mean square over all particles of |a - a_exact|/|a_exact| (Essmann et al. 1995 mesh, error model of Deserno & Holm 1998 with our clustering correction), so single particles may exceed it', defaultText: '1e-6; 1e-5 with --method pme' },
  { name: 'targets', metavar: 'all|K', help: 'particles that get forces: all, or the first K data rows', defaultText: 'all' },
  { name: 'sample', metavar: 'K', help: 'instead of --targets: a seeded random subsample of K particles (ids sorted)' },
  { name: 'seed', metavar: 'S', help: 'integer seed of --sample; the same seed gives the same subsample', defaultText: '1' },
  { name: 'softening', metavar: 'none|plummer:EPS|spline:H', help: 'softened pair force: Plummer length EPS, or cubic spline kernel with support H (box units); with --softening-column just plummer or spline', defaultText: 'none' },
  { name: 'threads', metavar: 'N', help: 'threads to compute on, this one included (runs under 2048 particles use one)', defaultText: 'all cores' },
  { name: 'max-size', metavar: 'SIZE', help: 'load limit: the largest amount of file data read (uncompressed), e.g. 800MB, 4GiB; larger files are refused unless subsampled', defaultText: '1GiB' },
  { name: 'every', metavar: 'K', help: 'read every K-th particle only (rows 0, K, 2K, …), masses multiplied by N/N_kept so the mean density stays; the limit then applies to 1/K of the data', defaultText: '1' },
  { name: 'help', help: 'show this help' },
];

export interface ForcesSettings {
  readonly file: string;
  readonly out: string;
  /** The box, or null when it is read from the file (mapping.box). */
  readonly box: Box | null;
  readonly G: number;
  /** The unit preset named by --units, if any. */
  readonly units: UnitPreset | null;
  readonly tol: number;
  readonly targets: TargetSpec;
  /** Softening; for --softening-column, the kernel with a placeholder length fixed after loading. */
  readonly softening: Softening;
  /** The kernel of --softening-column, or null. */
  readonly softeningFromColumn: 'plummer' | 'spline' | null;
  readonly threads: number;
  readonly mapping: ColumnMapping;
  readonly maxBytes: number;
  readonly every: number;
  readonly method: 'ewald' | 'direct' | 'pme';
  /** The parameter overrides of --method pme, else null. */
  readonly pme: PmeOverrides | null;
  /** The summation order of --method direct, else null. */
  readonly direct: OrderSettings | null;
  /** Whether --tol was given (--method direct then passes it to the image sum). */
  readonly tolGiven: boolean;
}

/** Options that apply to one method only, checked against the chosen one. */
function methodCheck(values: ReadonlyMap<string, string>): 'ewald' | 'direct' | 'pme' {
  const text = values.get('method');
  const method = text === undefined ? 'ewald' : text.trim().toLowerCase();
  if (method !== 'ewald' && method !== 'direct' && method !== 'pme') throw new UsageError(`--method must be ewald, direct or pme, got ${JSON.stringify(text)}`, COMMAND);
  const given = (names: readonly string[]) => names.filter((n) => values.has(n)).map((n) => `--${n}`);
  const pmeOnly = method === 'pme' ? [] : given(PME_OPTION_NAMES);
  if (pmeOnly.length > 0) throw new UsageError(`${pmeOnly.join(', ')} ${pmeOnly.length === 1 ? 'applies' : 'apply'} to --method pme only`, COMMAND);
  if (method === 'pme') {
    const wrong = given(ORDER_OPTION_NAMES.filter((n) => n !== 'order'));
    if (wrong.length > 0) throw new UsageError(`${wrong.join(', ')} ${wrong.length === 1 ? 'applies' : 'apply'} to --method direct only`, COMMAND);
    return method;
  }
  if (method === 'ewald') {
    const wrong = given(ORDER_OPTION_NAMES);
    if (wrong.length > 0) throw new UsageError(`${wrong.join(', ')} ${wrong.length === 1 ? 'applies' : 'apply'} to --method direct only`, COMMAND);
  } else {
    const wrong = given(['softening', 'softening-column', 'accelerations', 'threads']);
    if (wrong.length > 0) throw new UsageError(`${wrong.join(', ')} ${wrong.length === 1 ? 'applies' : 'apply'} to --method ewald and pme only (the plain image sums are unsoftened, single-threaded and compare with nothing)`, COMMAND);
  }
  return method;
}

/** Checks the parsed command line and turns it into settings; UsageError names the faulty option. */
export function forcesSettings(argv: readonly string[]): ForcesSettings | 'help' {
  const { positionals, values } = argsParse(argv, FORCES_OPTIONS, COMMAND);
  if (values.has('help')) return 'help';
  if (positionals.length === 0) throw new UsageError('no snapshot file given', COMMAND);
  if (positionals.length > 1) throw new UsageError(`one snapshot file expected, got ${positionals.length}: ${positionals.join(' ')}`, COMMAND);
  const box = values.get('box');
  if (box === undefined) throw new UsageError('--box is required (the periodic box side L, or Lx,Ly,Lz, or @PATH to read it from the file)', COMMAND);
  const out = values.get('out');
  if (out === undefined || out === '') throw new UsageError('--out FILE.csv is required', COMMAND);
  const method = methodCheck(values);
  const direct = method === 'direct' ? orderSettings(values, COMMAND, false) : null;
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
  const unitsText = values.get('units');
  const tol = values.get('tol');
  const softening = values.get('softening');
  const threads = values.get('threads');
  if (G !== undefined && unitsText !== undefined) throw new UsageError('give either --units or --G, not both (a preset sets G)', COMMAND);
  let units: UnitPreset | null = null;
  if (unitsText !== undefined) {
    units = unitPresetFind(unitsText) ?? null;
    if (!units) throw new UsageError(`--units: unknown preset ${JSON.stringify(unitsText)}; presets: ${UNIT_PRESETS.map((u) => u.name).join(', ')}`, COMMAND);
  }
  const mapping = mappingFromOptions(values, COMMAND);
  let softeningFromColumn: 'plummer' | 'spline' | null = null;
  let soft: Softening = { kind: 'none' };
  if (mapping.softening !== undefined) {
    const kind = softening?.trim().toLowerCase();
    if (kind !== 'plummer' && kind !== 'spline') {
      throw new UsageError('--softening-column needs --softening plummer or --softening spline (without a length): the kernel the lengths in the file belong to', COMMAND);
    }
    softeningFromColumn = kind;
    soft = kind === 'plummer' ? { kind, eps: 1 } : { kind, h: 1 };
  } else if (softening !== undefined) soft = softeningParse(softening, COMMAND);
  const maxSize = values.get('max-size');
  const every = values.get('every');
  return {
    file: positionals[0],
    out,
    box: mapping.box !== undefined ? null : boxParse(box, COMMAND),
    G: units ? units.G : G === undefined ? 1 : positiveParse(G, 'G', COMMAND),
    units,
    tol: tol === undefined ? (method === 'pme' ? PME_TOL_DEFAULT : 1e-6) : tolParse(tol, COMMAND),
    tolGiven: tol !== undefined,
    method,
    pme: method === 'pme' ? pmeOverridesParse(values, COMMAND) : null,
    direct,
    targets,
    softening: soft,
    softeningFromColumn,
    threads: threads === undefined ? defaultThreads() : integerParse(threads, 'threads', COMMAND, 1, 1024),
    mapping,
    maxBytes: maxSize === undefined ? LOAD_LIMIT_BYTES : sizeParse(maxSize, 'max-size', COMMAND),
    every: every === undefined ? 1 : integerParse(every, 'every', COMMAND, 1, 2 ** 31 - 1),
  };
}
