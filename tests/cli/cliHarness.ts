/**
 * Running the BUILT command line from tests: builds dist-cli once when it is missing or older than any
 * source it bundles (a lock folder keeps parallel test files from building at the same time), runs
 * `node bin/torusgrav.mjs …`, and makes temp folders.
 */
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url)).replace(/\/$/, '');
export const BIN = join(ROOT, 'bin', 'torusgrav.mjs');
/** The build's entry files (scripts/build-cli.mjs); the shared chunk-*.mjs they import are written with them. */
const OUTPUTS = ['torusgrav.mjs', 'forceWorker.mjs', 'pmeWorker.mjs'].map((f) => join(ROOT, 'dist-cli', f));

function newestSource(dir: string): number {
  let t = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    if (entry.isDirectory()) t = Math.max(t, newestSource(p));
    else if (/\.(ts|mjs|js|json|wasm)$/.test(entry.name)) t = Math.max(t, statSync(p).mtimeMs);
  }
  return t;
}

function upToDate(): boolean {
  const source = Math.max(newestSource(join(ROOT, 'app', 'cli')), newestSource(join(ROOT, 'engine')), statSync(join(ROOT, 'package.json')).mtimeMs, statSync(join(ROOT, 'scripts', 'build-cli.mjs')).mtimeMs);
  try {
    return OUTPUTS.every((o) => statSync(o).mtimeMs >= source);
  } catch {
    return false;
  }
}

function sleep(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/** Runs `npm run build:cli` unless dist-cli is current. */
export function cliEnsureBuilt(): void {
  if (upToDate()) return;
  const lock = join(tmpdir(), `torusgrav-cli-build-${Buffer.from(ROOT).toString('hex').slice(-24)}.lock`);
  const t0 = Date.now();
  for (;;) {
    try {
      mkdirSync(lock);
      break;
    } catch {
      try {
        if (Date.now() - statSync(lock).mtimeMs > 120_000) rmSync(lock, { recursive: true, force: true }); // stale
      } catch {
        // gone meanwhile
      }
      if (Date.now() - t0 > 180_000) throw new Error(`waited 3 minutes for the CLI build lock ${lock}`);
      sleep(100);
    }
  }
  try {
    if (!upToDate()) execFileSync('npm', ['run', 'build:cli'], { cwd: ROOT, stdio: 'pipe' });
  } finally {
    rmSync(lock, { recursive: true, force: true });
  }
}

export interface CliResult {
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs the built CLI with `args` in folder `cwd`. */
export function cli(args: readonly string[], cwd: string = ROOT): CliResult {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', timeout: 120_000 });
  if (r.error) throw r.error;
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Starts the built CLI without waiting (for signal tests). */
export function cliSpawn(args: readonly string[], cwd: string) {
  return spawn(process.execPath, [BIN, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'] });
}

const made: string[] = [];

/** A fresh temp folder (removed by tempDirsRemove). */
export function tempDir(): string {
  const dir = mkdtempSync(join(tmpdir(), 'torusgrav-cli-'));
  made.push(dir);
  return dir;
}

/** Removes the temp folders this test file made (call from afterAll). */
export function tempDirsRemove(): void {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
}

/** Parses a CSV of numbers with a header (test-side reader, independent of the engine's). */
export function csvParseSimple(text: string): { header: string[]; rows: number[][] } {
  const lines = text.split('\n').filter((l) => l.length > 0);
  return { header: lines[0].split(','), rows: lines.slice(1).map((l) => l.split(',').map(Number)) };
}

/** The forces output as arrays: ids, accelerations (3 per row), potentials. */
export function forcesOutput(text: string): { header: string[]; ids: number[]; acc: Float64Array; phi: Float64Array } {
  const { header, rows } = csvParseSimple(text);
  return {
    header,
    ids: rows.map((r) => r[0]),
    acc: Float64Array.from(rows.flatMap((r) => [r[1], r[2], r[3]])),
    phi: Float64Array.from(rows.map((r) => r[4])),
  };
}
