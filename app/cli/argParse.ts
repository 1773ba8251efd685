/**
 * A small command-line parser: `--name value`, `--name=value` and flags, checked against a list of
 * option specs; every mistake is a UsageError naming the option.
 */
import { UsageError } from './cliErrors';

export interface OptionSpec {
  /** Name without the dashes: 'box' for --box. */
  readonly name: string;
  /** How the value is written in help (e.g. 'L | Lx,Ly,Lz'); absent for a flag. */
  readonly metavar?: string;
  /** One-sentence description for help. */
  readonly help: string;
  /** Default shown in help. */
  readonly defaultText?: string;
  /** May be given more than once (all values in ParsedArgs.lists). */
  readonly repeatable?: boolean;
}

export interface ParsedArgs {
  readonly positionals: readonly string[];
  /** Option values by name (flags map to ''). */
  readonly values: ReadonlyMap<string, string>;
  /** Every value of each repeatable option, in order (values holds the first). */
  readonly lists: ReadonlyMap<string, readonly string[]>;
}

/** Parses argv (without the command word) against specs; `--` ends the options. */
export function argsParse(argv: readonly string[], specs: readonly OptionSpec[], command: string): ParsedArgs {
  const byName = new Map(specs.map((s) => [s.name, s]));
  const positionals: string[] = [];
  const values = new Map<string, string>();
  const lists = new Map<string, string[]>();
  let onlyPositionals = false;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (onlyPositionals || !arg.startsWith('-') || arg === '-') {
      positionals.push(arg);
      continue;
    }
    if (arg === '--') {
      onlyPositionals = true;
      continue;
    }
    if (!arg.startsWith('--')) throw new UsageError(`unknown option ${arg} (options are written with two dashes, e.g. --out)`, command);
    const eq = arg.indexOf('=');
    const name = arg.slice(2, eq < 0 ? undefined : eq);
    const spec = byName.get(name);
    if (!spec) throw new UsageError(`unknown option --${name} for '${command}'`, command);
    if (values.has(name) && !spec.repeatable) throw new UsageError(`option --${name} is given twice`, command);
    let value = '';
    if (spec.metavar === undefined) {
      if (eq >= 0) throw new UsageError(`option --${name} takes no value`, command);
    } else if (eq >= 0) {
      value = arg.slice(eq + 1);
    } else {
      if (i + 1 >= argv.length) throw new UsageError(`option --${name} needs a value: --${name} ${spec.metavar}`, command);
      value = argv[++i];
    }
    if (!values.has(name)) values.set(name, value);
    if (spec.repeatable) lists.set(name, [...(lists.get(name) ?? []), value]);
  }
  return { positionals, values, lists };
}
