/** Help texts, built from the commands' option lists so that every option is documented. */
import type { OptionSpec } from './argParse';
import { CHECK_ABOUT, CHECK_EXIT, CHECK_OPTIONS, CHECK_USAGE } from './checkCommand';
import { CONVERGE_ABOUT, CONVERGE_OPTIONS, CONVERGE_USAGE } from './convergeCommand';
import { DEMO_ABOUT, DEMO_OPTIONS, DEMO_USAGE } from './demoCommand';
import { FORCES_ABOUT, FORCES_OPTIONS, FORCES_USAGE } from './forcesOptions';

const EXIT_CODES = [
  'Exit status: 0 success; 2 bad input or command line (one line on stderr says what and where); 1 internal',
  'error. Ctrl-C stops at once and leaves no partial or temporary file.',
];

const WIDTH = 100;
const INDENT = 30;

/** Words of `text` filled into lines of at most `width` characters. */
function wrap(text: string, width: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    if (line && line.length + 1 + word.length > width) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines;
}

/** "  --name VALUE   description (default …)", descriptions wrapped in a column. */
function optionLines(specs: readonly OptionSpec[]): string[] {
  return specs.flatMap((s) => {
    const left = `  --${s.name}${s.metavar ? ` ${s.metavar}` : ''}`;
    const text = wrap(s.help + (s.defaultText ? ` (default ${s.defaultText})` : ''), WIDTH - INDENT);
    const pad = ' '.repeat(INDENT);
    if (left.length + 2 > INDENT) return [left, ...text.map((t) => pad + t)];
    return [left.padEnd(INDENT) + text[0], ...text.slice(1).map((t) => pad + t)];
  });
}

/** Help for `torusgrav forces`. */
export function forcesHelp(): string {
  return [`Usage: ${FORCES_USAGE}`, '', ...FORCES_ABOUT, '', 'Options:', ...optionLines(FORCES_OPTIONS), '', ...EXIT_CODES, ''].join('\n');
}

/** Help for `torusgrav converge`. */
export function convergeHelp(): string {
  return [`Usage: ${CONVERGE_USAGE}`, '', ...CONVERGE_ABOUT, '', 'Options:', ...optionLines(CONVERGE_OPTIONS), '', ...EXIT_CODES, ''].join('\n');
}

/** Help for `torusgrav check` (its own exit codes: 1 means a requirement failed). */
export function checkHelp(): string {
  return [`Usage: ${CHECK_USAGE}`, '', ...CHECK_ABOUT, '', 'Options:', ...optionLines(CHECK_OPTIONS), '', ...CHECK_EXIT, ''].join('\n');
}

/** Help for `torusgrav demo`. */
export function demoHelp(): string {
  return [`Usage: ${DEMO_USAGE}`, '', ...DEMO_ABOUT, '', 'Options:', ...optionLines(DEMO_OPTIONS), '', ...EXIT_CODES, ''].join('\n');
}

/** Help for `torusgrav` itself: the commands and all their options. */
export function mainHelp(version: string): string {
  return [
    `torusgrav ${version}: exact periodic (Ewald) gravity for periodic-box N-body snapshots`,
    '',
    'Usage:',
    `  ${FORCES_USAGE}`,
    `  ${CONVERGE_USAGE}`,
    `  ${CHECK_USAGE}`,
    `  ${DEMO_USAGE}`,
    '  torusgrav --help | --version',
    '  torusgrav help COMMAND',
    '',
    'Commands:',
    '  forces   accelerations and potentials for the particles of a snapshot',
    '  converge partial sums of a plain image sum shell by shell, and the predicted limit',
    '  check    force-accuracy gate: compare the file\'s accelerations with the reference, exit 0/1',
    '  demo     write the seeded demo snapshot',
    '',
    'Options:',
    '  --help       show this help (also: torusgrav COMMAND --help)',
    '  --version    print the version',
    '',
    '-- torusgrav forces --',
    '',
    forcesHelp(),
    '-- torusgrav converge --',
    '',
    convergeHelp(),
    '-- torusgrav check --',
    '',
    checkHelp(),
    '-- torusgrav demo --',
    '',
    demoHelp(),
  ].join('\n');
}
