/** `torusgrav demo`: writes the seeded demo snapshot (the web app's generator) as CSV x,y,z,m. */
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { csvChunksBytes } from '../../engine/formats/csvWrite';
import { type OptionSpec, argsParse } from './argParse';
import { outputProblem, outputWriteAtomic } from './atomicOutput';
import { CliError, UsageError } from './cliErrors';
import type { CliIo } from './cliIo';
import { integerParse } from './optionValues';

const COMMAND = 'demo';

export const DEMO_USAGE = 'torusgrav demo [--n N] [--seed S] --out FILE.csv';

export const DEMO_ABOUT = [
  'Writes the built-in demo snapshot, the same seeded scenario the web app shows (a near-uniform',
  'background, three dense knots and a filament in a unit cube, equal masses summing to 1), as CSV with',
  'header x,y,z,m and 17 significant digits. Prints the box side ("box 1") on stderr.',
];

export const DEMO_OPTIONS: readonly OptionSpec[] = [
  { name: 'n', metavar: 'N', help: 'number of particles, 1 to 100000000', defaultText: '4096' },
  { name: 'seed', metavar: 'S', help: 'integer seed; the same seed gives the same snapshot everywhere', defaultText: '1' },
  { name: 'out', metavar: 'FILE.csv', help: 'output file; written whole or not at all (required)' },
  { name: 'help', help: 'show this help' },
];

/** Runs `torusgrav demo`; resolves to the exit code. */
export async function demoRun(argv: readonly string[], io: CliIo, helpText: () => string): Promise<number> {
  const { positionals, values } = argsParse(argv, DEMO_OPTIONS, COMMAND);
  if (values.has('help')) {
    io.stdout(helpText());
    return 0;
  }
  if (positionals.length > 0) throw new UsageError(`demo takes no file argument (got ${positionals.join(' ')}); use --out FILE.csv`, COMMAND);
  const out = values.get('out');
  if (out === undefined || out === '') throw new UsageError('--out FILE.csv is required', COMMAND);
  const nText = values.get('n');
  const seedText = values.get('seed');
  const n = nText === undefined ? 4096 : integerParse(nText, 'n', COMMAND, 1, 100_000_000);
  const seed = seedText === undefined ? 1 : integerParse(seedText, 'seed', COMMAND, 0, 2 ** 32 - 1);
  const problem = outputProblem(out);
  if (problem) throw new CliError(`--out ${out}: ${problem}`);
  const demo = demoSnapshot(n, seed);
  await outputWriteAtomic(
    out,
    csvChunksBytes(
      [
        { name: 'x', values: demo.positions, stride: 3, offset: 0 },
        { name: 'y', values: demo.positions, stride: 3, offset: 1 },
        { name: 'z', values: demo.positions, stride: 3, offset: 2 },
        { name: 'm', values: demo.masses },
      ],
      n,
      4096,
      { transient: true },
    ),
  );
  io.stderr(`box ${demo.box}\n`);
  io.stderr(`torusgrav: wrote the demo snapshot (N=${n}, seed ${seed}) to ${out}; use --box ${demo.box} with torusgrav forces\n`);
  return 0;
}
