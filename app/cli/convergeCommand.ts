/**
 * `torusgrav converge`: the partial sums of a plain periodic image sum shell by shell (or screening value
 * by value) for a few targets, plus the limit each summation order is predicted to reach, as CSV
 * order,shell,id,ax,ay,az. Reading, checking and writing only; the numerics are engine/orders'.
 */
import { resolve } from 'node:path';
import { LOAD_LIMIT_BYTES } from '../../engine/formats/description';
import { snapshotValidate } from '../../engine/formats/validate';
import type { ImageSumResult } from '../../engine/orders';
import { targetsResolve } from '../../engine/targets';
import { UNIT_PRESETS, unitPresetFind } from '../../engine/units';
import { type OptionSpec, argsParse } from './argParse';
import { outputProblem, outputWriteAtomic } from './atomicOutput';
import { CliError, UsageError } from './cliErrors';
import type { CliIo } from './cliIo';
import { outsideWarning, targetIds, withEngineErrors } from './engineErrors';
import { mappingFromOptions, sizeParse } from './mappingOptions';
import { BOX_OPTION, boxParse, integerParse, numberParse, positiveParse, targetSpecParse } from './optionValues';
import { ORDER_OPTIONS, orderEngineOptions, orderSettings } from './orderOptions';
import { imageSumRun } from './orderRun';
import { progressLine } from './progress';
import { snapshotFileRead } from './snapshotFile';

export const CONVERGE_COMMAND = 'converge';
const COMMAND = CONVERGE_COMMAND;
/** Targets when neither --targets nor --sample is given: the first 64 particles. */
export const CONVERGE_DEFAULT_TARGETS = 64;

export const CONVERGE_USAGE = 'torusgrav converge SNAPSHOT --box L|Lx,Ly,Lz|@PATH --order NAME [--shells R] --out FILE.csv [options]';

export const CONVERGE_ABOUT = [
  'How a plain periodic image sum converges in a summation order: the accelerations of a few targets',
  'after every shell (or for every screening value λ), and the limit the order is predicted to reach',
  '(the Ewald acceleration plus the shape-dependent term of the box dipole, or its analogue without',
  'background). Input formats and column options are those of torusgrav forces.',
  '',
  'Output: CSV with header order,shell,id,ax,ay,az and 17 significant digits. For each target (in input',
  'order) one row per shell: shell = R for sphere, cube and slabs (R = 0, 1, …, --shells; R = 0 is the home',
  'cell), λ (1/length) for screened, 0 for nearest (a single row); then a last row whose shell column is',
  '"limit", holding the predicted limit. Nearest has no limit row (it is no sum over images).',
  `Targets: the first ${CONVERGE_DEFAULT_TARGETS} particles unless --targets or --sample says otherwise. id is the particle's id from`,
  '--ids, else its 0-based data row. --tol is the tolerance of the exact parts (multipoles, in-plane and',
  'screened sums), in [1e-14, 1e-2]. Runs estimated above --max-work are refused before computing, with',
  'an estimate of how long they would take.',
];

export const CONVERGE_OPTIONS: readonly OptionSpec[] = [
  BOX_OPTION,
  { name: 'out', metavar: 'FILE.csv', help: 'output file; written whole or not at all (required)' },
  ...ORDER_OPTIONS.map((s) => (s.name === 'order' ? { ...s, help: `${s.help} (required)` } : s.name === 'shells' ? { ...s, help: `${s.help} (required for sphere, cube and slabs)` } : s)),
  { name: 'targets', metavar: 'all|K', help: 'particles followed: all, or the first K data rows', defaultText: String(CONVERGE_DEFAULT_TARGETS) },
  { name: 'sample', metavar: 'K', help: 'instead of --targets: a seeded random subsample of K particles (ids sorted)' },
  { name: 'seed', metavar: 'S', help: 'integer seed of --sample', defaultText: '1' },
  { name: 'units', metavar: 'PRESET', help: `units of the file, which set G: ${UNIT_PRESETS.map((u) => u.name).join(', ')} (see torusgrav forces --help)`, defaultText: 'G = 1' },
  { name: 'G', metavar: 'g', help: 'gravitational constant, > 0 (instead of --units)', defaultText: '1' },
  { name: 'tol', metavar: 'T', help: 'relative tolerance of the exact parts of the sums, in [1e-14, 1e-2]', defaultText: '1e-10' },
  { name: 'positions', metavar: 'SPEC', help: 'where the positions are (as for forces)' },
  { name: 'masses', metavar: 'SPEC | none', help: 'the mass column/array/dataset; none: all masses 1' },
  { name: 'ids', metavar: 'SPEC', help: 'particle ids (integers) to write in the id column instead of row numbers' },
  { name: 'max-size', metavar: 'SIZE', help: 'load limit (as for forces)', defaultText: '1GiB' },
  { name: 'every', metavar: 'K', help: 'read every K-th particle only, masses multiplied by N/N_kept', defaultText: '1' },
  { name: 'help', help: 'show this help' },
];

function gParse(values: ReadonlyMap<string, string>): number {
  const G = values.get('G');
  const unitsText = values.get('units');
  if (G !== undefined && unitsText !== undefined) throw new UsageError('give either --units or --G, not both (a preset sets G)', COMMAND);
  if (unitsText !== undefined) {
    const units = unitPresetFind(unitsText);
    if (!units) throw new UsageError(`--units: unknown preset ${JSON.stringify(unitsText)}; presets: ${UNIT_PRESETS.map((u) => u.name).join(', ')}`, COMMAND);
    return units.G;
  }
  return G === undefined ? 1 : positiveParse(G, 'G', COMMAND);
}

function tolParseOrders(text: string): number {
  const v = numberParse(text, 'tol', COMMAND);
  if (!(v >= 1e-14 && v <= 1e-2)) throw new UsageError(`--tol must lie in [1e-14, 1e-2] (tolerance of the exact parts of the image sums), got ${text}`, COMMAND);
  return v;
}

/** The CSV lines: per target, its partial sums shell by shell, then the predicted limit (not for nearest). */
export function* convergeCsv(result: ImageSumResult, ids: ArrayLike<number>): Generator<string> {
  yield 'order,shell,id,ax,ay,az\n';
  const { order } = result.params;
  const K = result.targets.length;
  const { shell, acc } = result.partial;
  const num = (v: number) => v.toPrecision(17);
  const shellText = order === 'screened' ? Array.from(shell, num) : Array.from(shell, (s) => String(s));
  for (let t = 0; t < K; t++) {
    const lines: string[] = [];
    for (let s = 0; s < shell.length; s++) {
      const o = (s * K + t) * 3;
      lines.push(`${order},${shellText[s]},${ids[t]},${num(acc[o])},${num(acc[o + 1])},${num(acc[o + 2])}`);
    }
    if (result.limit) lines.push(`${order},limit,${ids[t]},${num(result.limit[3 * t])},${num(result.limit[3 * t + 1])},${num(result.limit[3 * t + 2])}`);
    lines.push('');
    yield lines.join('\n');
  }
}

/** Runs `torusgrav converge`; resolves to the exit code. */
export async function convergeRun(argv: readonly string[], io: CliIo, helpText: () => string): Promise<number> {
  const { positionals, values } = argsParse(argv, CONVERGE_OPTIONS, COMMAND);
  if (values.has('help')) {
    io.stdout(helpText());
    return 0;
  }
  if (positionals.length !== 1) throw new UsageError(positionals.length === 0 ? 'no snapshot file given' : `one snapshot file expected, got ${positionals.length}: ${positionals.join(' ')}`, COMMAND);
  const file = positionals[0];
  const boxText = values.get('box');
  if (boxText === undefined) throw new UsageError('--box is required (the periodic box side L, or Lx,Ly,Lz, or @PATH to read it from the file)', COMMAND);
  const out = values.get('out');
  if (out === undefined || out === '') throw new UsageError('--out FILE.csv is required', COMMAND);
  const order = orderSettings(values, COMMAND, true);
  const spec = targetSpecParse(values, COMMAND, CONVERGE_DEFAULT_TARGETS);
  const G = gParse(values);
  const tolText = values.get('tol');
  const tol = tolText === undefined ? undefined : tolParseOrders(tolText);
  const mapping = mappingFromOptions(values, COMMAND);
  const givenBox = mapping.box !== undefined ? null : boxParse(boxText, COMMAND);
  const maxSize = values.get('max-size');
  const every = values.get('every');
  if (resolve(out) === resolve(file)) throw new UsageError(`--out ${out} is the input file; choose another name`, COMMAND);
  const problem = outputProblem(out);
  if (problem) throw new CliError(`--out ${out}: ${problem}`);
  const t0 = io.now();
  const snapshot = await snapshotFileRead(file, mapping, {
    maxBytes: maxSize === undefined ? LOAD_LIMIT_BYTES : sizeParse(maxSize, 'max-size', COMMAND),
    every: every === undefined ? 1 : integerParse(every, 'every', COMMAND, 1, 2 ** 31 - 1),
    limitAdvice: 'raise it with --max-size SIZE if the machine has the memory, or read every K-th particle with --every K',
  });
  const box = givenBox ?? snapshot.box!;
  const outside = snapshotValidate(snapshot, file, box, { softened: false, coincident: false });
  const n = snapshot.count;
  const targets = targetsResolve(spec, n);
  const progress = progressLine(io, `torusgrav: ${order.order} partial sums for ${targets.length} of ${n} particles`);
  let result;
  try {
    result = withEngineErrors(
      () => imageSumRun(snapshot.positions, snapshot.masses, box, targets, orderEngineOptions(order, G, tol), progress.update),
      snapshot,
      file,
      outside.outside > 0,
      'remove one (the plain image sums are unsoftened)',
    );
  } finally {
    progress.done();
  }
  if (outside.outside > 0) io.stderr(outsideWarning(outside.outside, n, box, file, snapshot, outside.firstOutside));
  if (!result.partial.acc.every(Number.isFinite) || (result.limit && !result.limit.every(Number.isFinite))) {
    throw new CliError('internal error: non-finite partial sum; please report this with the input file', 1);
  }
  await outputWriteAtomic(out, convergeCsv(result, targetIds(snapshot, result.targets)));
  const seconds = (io.now() - t0) / 1000;
  io.stderr(
    `torusgrav: ${file}: ${n} particles, ${targets.length} targets; order ${order.order}${order.background ? '' : ' without background'}, ` +
      `${result.partial.shell.length} partial sum${result.partial.shell.length === 1 ? '' : 's'} per target${result.limit ? ' + predicted limit' : ''}; wrote ${out} in ${seconds.toFixed(2)} s\n`,
  );
  return 0;
}
