/**
 * `torusgrav check`: a force-accuracy gate. Computes the Ewald reference for the targets, compares the
 * file's accelerations with it, prints a short table, optionally writes a JSON report (schema
 * torusgrav.check/1), a residuals CSV and the plots as SVG files, and exits 0 when every --require
 * holds, 1 when one fails.
 */
import { createHash } from 'node:crypto';
import { createReadStream, mkdirSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { version } from '../../package.json';
import { EngineInputError } from '../../engine/ewald/ewald';
import { csvChunksBytes } from '../../engine/formats/csvWrite';
import { residualColumns } from '../../engine/stats/checkSummary';
import { LOAD_LIMIT_BYTES } from '../../engine/formats/description';
import { snapshotValidate } from '../../engine/formats/validate';
import { targetsResolve } from '../../engine/targets';
import { UNIT_PRESETS, type UnitPreset, unitPresetFind } from '../../engine/units';
import { type OptionSpec, argsParse } from './argParse';
import { outputProblem, outputWriteAtomic } from './atomicOutput';
import { CHECK_SCHEMA, checkFigures, checkReportJson, checkTable, requirementsEvaluate } from './checkReport';
import { REQUIRE_KEYS, REQUIRE_OPS, requirementParse } from './checkRequire';
import { CliError, UsageError } from './cliErrors';
import type { CliIo } from './cliIo';
import { engineErrorExplain, outsideWarning, targetIds } from './engineErrors';
import { mappingFromOptions, sizeParse } from './mappingOptions';
import { BOX_OPTION, boxParse, integerParse, positiveParse, softeningParse, targetSpecParse, tolParse } from './optionValues';
import { ewaldForcesThreads } from './parallelEwald';
import { defaultThreads } from './workerWarm';
import { progressLine } from './progress';
import { particlePlace, snapshotFileRead } from './snapshotFile';

export const CHECK_COMMAND = 'check';
const COMMAND = CHECK_COMMAND;

export const CHECK_USAGE = 'torusgrav check SNAPSHOT --box L|Lx,Ly,Lz|@PATH --accelerations SPEC --require "p99<=0.01" [--require …] [options]';

export const CHECK_ABOUT = [
  'A force-accuracy gate for a test suite: computes the exact periodic (Ewald) reference accelerations of',
  'the targets, compares the accelerations stored in the file (--accelerations) with them, prints a short',
  'table and exits 0 when every --require holds, 1 when one fails.',
  '',
  'Figures: relative error |a_file - a_ref|/|a_ref| per target; its percentiles p50, p90, p99, p999 (99.9%)',
  'by linear interpolation between order statistics (h = (n-1)q; Hyndman & Fan 1996 definition 7, NumPy\'s',
  '"linear" default) over the finite values; max and rms (square root of the mean squared relative error),',
  'infinite when a reference acceleration is exactly 0 but the file\'s is not; rms |a_file - a_ref| over',
  'rms |a_ref|; the worst ids. A requirement is KEY OP LIMIT with KEY one of',
  `${REQUIRE_KEYS.join(', ')}, OP one of ${REQUIRE_OPS.join(' ')} and LIMIT a finite number, e.g. --require "p99<=0.01".`,
  '',
  `--json FILE: the report as JSON, schema "${CHECK_SCHEMA}" (fields listed in README.md, "Force-accuracy`,
  'gate for your test suite"); numbers that are infinite or undefined are written as null.',
  '--residuals FILE.csv: id,x,y,z,ax_A,ay_A,az_A,ax_B,ay_B,az_B,rel_error per target (A = the file, B =',
  'the reference; positions as read), 17 significant digits.',
  '--svg DIR: the plots as SVG files in DIR (made if missing; existing files of these names are replaced):',
  'distribution.svg (histogram and cumulative distribution of the relative error, percentiles and max',
  'marked), error-vs-acceleration.svg (relative error against |a_ref|) and error-vs-neighbour-distance.svg',
  '(against the distance to the nearest other particle, periodic); the same plots as the web app.',
  'Input formats and column options are those of torusgrav forces.',
];

export const CHECK_EXIT = [
  'Exit status: 0 every requirement holds; 1 a requirement fails (or an internal error); 2 bad input or',
  'command line (missing file, unknown column, malformed requirement: one line on stderr says what and',
  'where; nothing is written).',
];

export const CHECK_OPTIONS: readonly OptionSpec[] = [
  BOX_OPTION,
  { name: 'accelerations', metavar: 'SPEC', help: "the accelerations under test: three columns (x,y,z names or numbers) or one N×3 array/dataset, in the file's units (required)" },
  { name: 'require', metavar: 'KEY OP LIMIT', help: 'a requirement such as p99<=0.01 or max<0.05; repeat for several (at least one)', repeatable: true },
  { name: 'reference', metavar: 'ewald', help: 'the reference method (only ewald)', defaultText: 'ewald' },
  { name: 'tol', metavar: 'T', help: "requested relative error of the reference, strictly between 0 and 1 (as for forces); keep it well below the limits checked", defaultText: '1e-7' },
  { name: 'targets', metavar: 'all|K', help: 'particles checked: all, or the first K data rows', defaultText: 'all' },
  { name: 'sample', metavar: 'K', help: 'instead of --targets: a seeded random subsample of K particles' },
  { name: 'seed', metavar: 'S', help: 'integer seed of --sample', defaultText: '1' },
  { name: 'json', metavar: 'FILE.json', help: `write the report as JSON (schema ${CHECK_SCHEMA})` },
  { name: 'residuals', metavar: 'FILE.csv', help: 'write the per-target residuals CSV' },
  { name: 'svg', metavar: 'DIR', help: 'write the plots as SVG files into DIR (distribution, error against |a_ref| and against neighbour distance)' },
  { name: 'units', metavar: 'PRESET', help: `units of the file, which set G: ${UNIT_PRESETS.map((u) => u.name).join(', ')}`, defaultText: 'G = 1' },
  { name: 'G', metavar: 'g', help: 'gravitational constant, > 0 (instead of --units)', defaultText: '1' },
  { name: 'softening', metavar: 'none|plummer:EPS|spline:H', help: 'softening of the reference, as the code under test uses it', defaultText: 'none' },
  { name: 'threads', metavar: 'N', help: 'worker threads of the reference', defaultText: 'all cores' },
  { name: 'positions', metavar: 'SPEC', help: 'where the positions are (as for forces)' },
  { name: 'masses', metavar: 'SPEC | none', help: 'the mass column/array/dataset; none: all masses 1' },
  { name: 'ids', metavar: 'SPEC', help: 'particle ids (integers) reported instead of row numbers' },
  { name: 'max-size', metavar: 'SIZE', help: 'load limit (as for forces)', defaultText: '1GiB' },
  { name: 'every', metavar: 'K', help: 'read every K-th particle only, masses multiplied by N/N_kept', defaultText: '1' },
  { name: 'help', help: 'show this help' },
];

async function fileSha256(path: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

function outputCheck(option: string, path: string | undefined, input: string, others: readonly (string | undefined)[]): void {
  if (path === undefined) return;
  if (path === '') throw new UsageError(`--${option} needs a file name`, COMMAND);
  if (resolve(path) === resolve(input)) throw new UsageError(`--${option} ${path} is the input file; choose another name`, COMMAND);
  if (others.some((o) => o !== undefined && resolve(o) === resolve(path))) throw new UsageError(`--${option} ${path} is also another output; choose distinct names`, COMMAND);
  const problem = outputProblem(path);
  if (problem) throw new CliError(`--${option} ${path}: ${problem}`);
}

/** --svg DIR must be a folder or not exist yet (it is made after the computation). */
function svgDirCheck(dir: string | undefined): void {
  if (dir === undefined) return;
  if (dir === '') throw new UsageError('--svg needs a folder name', COMMAND);
  let st;
  try {
    st = statSync(dir);
  } catch {
    return;
  }
  if (!st.isDirectory()) throw new UsageError(`--svg ${dir} is a file, not a folder; give a folder for the SVG plots`, COMMAND);
}

/** Runs `torusgrav check`; resolves to the exit code. */
export async function checkRun(argv: readonly string[], io: CliIo, helpText: () => string): Promise<number> {
  const { positionals, values, lists } = argsParse(argv, CHECK_OPTIONS, COMMAND);
  if (values.has('help')) {
    io.stdout(helpText());
    return 0;
  }
  if (positionals.length !== 1) throw new UsageError(positionals.length === 0 ? 'no snapshot file given' : `one snapshot file expected, got ${positionals.length}: ${positionals.join(' ')}`, COMMAND);
  const file = positionals[0];
  const boxText = values.get('box');
  if (boxText === undefined) throw new UsageError('--box is required (the periodic box side L, or Lx,Ly,Lz, or @PATH to read it from the file)', COMMAND);
  if (!values.has('accelerations')) throw new UsageError('--accelerations SPEC is required (the columns, array or dataset holding the accelerations to check)', COMMAND);
  const requirements = (lists.get('require') ?? []).map((t) => requirementParse(t, COMMAND));
  if (requirements.length === 0) throw new UsageError('at least one --require KEY OP LIMIT is needed, e.g. --require "p99<=0.01"', COMMAND);
  const reference = values.get('reference');
  if (reference !== undefined && reference.trim().toLowerCase() !== 'ewald') throw new UsageError(`--reference: unknown method ${JSON.stringify(reference)}; the only reference is ewald`, COMMAND);
  const spec = targetSpecParse(values, COMMAND, 'all');
  const G = values.get('G');
  const unitsText = values.get('units');
  if (G !== undefined && unitsText !== undefined) throw new UsageError('give either --units or --G, not both (a preset sets G)', COMMAND);
  let units: UnitPreset | null = null;
  if (unitsText !== undefined) {
    units = unitPresetFind(unitsText) ?? null;
    if (!units) throw new UsageError(`--units: unknown preset ${JSON.stringify(unitsText)}; presets: ${UNIT_PRESETS.map((u) => u.name).join(', ')}`, COMMAND);
  }
  const g = units ? units.G : G === undefined ? 1 : positiveParse(G, 'G', COMMAND);
  const tolText = values.get('tol');
  const tol = tolText === undefined ? 1e-7 : tolParse(tolText, COMMAND);
  const softeningText = values.get('softening');
  const softening = softeningText === undefined ? ({ kind: 'none' } as const) : softeningParse(softeningText, COMMAND);
  const threadsText = values.get('threads');
  const threads = threadsText === undefined ? defaultThreads() : integerParse(threadsText, 'threads', COMMAND, 1, 1024);
  const mapping = mappingFromOptions(values, COMMAND);
  const givenBox = mapping.box !== undefined ? null : boxParse(boxText, COMMAND);
  const maxSize = values.get('max-size');
  const every = values.get('every');
  const jsonPath = values.get('json');
  const residualsPath = values.get('residuals');
  outputCheck('json', jsonPath, file, [residualsPath]);
  outputCheck('residuals', residualsPath, file, []);
  const svgDir = values.get('svg');
  svgDirCheck(svgDir);

  const snapshot = await snapshotFileRead(file, mapping, {
    maxBytes: maxSize === undefined ? LOAD_LIMIT_BYTES : sizeParse(maxSize, 'max-size', COMMAND),
    every: every === undefined ? 1 : integerParse(every, 'every', COMMAND, 1, 2 ** 31 - 1),
    limitAdvice: 'raise it with --max-size SIZE if the machine has the memory, or read every K-th particle with --every K',
  });
  const fileAcc = snapshot.accelerations;
  if (!fileAcc) throw new CliError(`${file}: no accelerations were read (--accelerations ${values.get('accelerations')})`);
  for (let i = 0; i < fileAcc.length; i++) {
    if (!Number.isFinite(fileAcc[i])) {
      throw new CliError(`${file}: ${particlePlace(snapshot, Math.floor(i / 3))}: acceleration ${'xyz'[i % 3]} is not a finite number (${fileAcc[i]})`);
    }
  }
  const box = givenBox ?? snapshot.box!;
  const outside = snapshotValidate(snapshot, file, box, { softened: softening.kind !== 'none', coincident: false });
  const n = snapshot.count;
  const targets = targetsResolve(spec, n);
  const all = targets.length === n && spec.kind === 'all';
  const progress = progressLine(io, `torusgrav: reference on ${targets.length} of ${n} particles`);
  let result;
  try {
    result = await ewaldForcesThreads(snapshot.positions, snapshot.masses, box, all ? null : targets, { G: g, tol, softening }, threads, progress.update);
  } catch (e) {
    if (e instanceof EngineInputError) throw engineErrorExplain(e, snapshot, file, outside.outside > 0);
    throw e;
  } finally {
    progress.done();
  }
  if (outside.outside > 0) io.stderr(outsideWarning(outside.outside, n, box, file, snapshot, outside.firstOutside));
  const K = result.targets.length;
  const accA = new Float64Array(3 * K);
  for (let t = 0; t < K; t++) for (let d = 0; d < 3; d++) accA[3 * t + d] = fileAcc[3 * result.targets[t] + d];
  const accB = result.acc;
  if (!accB.every(Number.isFinite)) throw new CliError('internal error: non-finite reference acceleration; please report this with the input file', 1);
  const f = checkFigures(accA, accB);
  const results = requirementsEvaluate(requirements, f);
  const pass = results.every((r) => r.pass);
  const ids = targetIds(snapshot, result.targets);
  const worstIds = Array.from(f.worst, (k) => ids[k]);
  const { kCut, alpha, rCut, predictedRmsError } = result.params;
  io.stdout(checkTable({ file, n, targets: K, f, worstIds, results, pass, referenceText: `ewald (tol ${tol}, predicted rms error ${predictedRmsError.toExponential(2)})`, }));

  if (residualsPath !== undefined) {
    const pos = new Float64Array(3 * K);
    for (let t = 0; t < K; t++) for (let d = 0; d < 3; d++) pos[3 * t + d] = snapshot.positions[3 * result.targets[t] + d];
    const columns = residualColumns(ids, pos, accA, accB, f.rel);
    await outputWriteAtomic(residualsPath, csvChunksBytes(columns, K, 4096, { transient: true }));
  }
  if (svgDir !== undefined) {
    // loaded only when asked for: the plot code (shared with the web app) brings d3's scales and formats
    const { checkSvgFiles } = await import('./checkSvg');
    const files = checkSvgFiles({ rel: f.rel, accA, accB, worst: f.worst, positions: snapshot.positions, box, targets: result.targets });
    try {
      mkdirSync(svgDir, { recursive: true });
    } catch (e) {
      throw new CliError(`--svg ${svgDir}: cannot make the folder (${e instanceof Error ? e.message : String(e)})`);
    }
    for (const sf of files) await outputWriteAtomic(join(svgDir, sf.name), [sf.svg, '\n']);
  }
  if (jsonPath !== undefined) {
    const report = checkReportJson({
      file,
      sha256: await fileSha256(file),
      sha256Of: 'file',
      n,
      box,
      G: g,
      units: units ? units.name : null,
      reference: { method: 'ewald', tol, softening, alpha, rCut, kCut, predictedRmsError },
      compared: { method: 'file', accelerations: values.get('accelerations') },
      figures: f,
      ids,
      results,
      version,
      created: new Date().toISOString(),
    });
    await outputWriteAtomic(jsonPath, [`${JSON.stringify(report, null, 2)}\n`]);
  }
  return pass ? 0 : 1;
}
