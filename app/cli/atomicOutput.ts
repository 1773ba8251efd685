/**
 * Output files appear whole or not at all: text goes to a temporary file in the destination folder,
 * which is renamed over the destination at the end and removed on any failure, on Ctrl-C (SIGINT),
 * SIGTERM and SIGHUP, and at exit. An existing destination is untouched until the rename.
 */
import { accessSync, closeSync, constants, fsyncSync, openSync, renameSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { CliError } from './cliErrors';

const pending = new Set<string>();
const SIGNALS = ['SIGINT', 'SIGTERM', 'SIGHUP'] as const;
let exitHookInstalled = false;

function removePendingSync(): void {
  for (const p of pending) {
    try {
      unlinkSync(p);
    } catch {
      // already gone
    }
  }
  pending.clear();
}

function onSignal(signal: NodeJS.Signals): void {
  removePendingSync();
  process.stderr.write(`torusgrav: interrupted (${signal}); no output written\n`);
  for (const s of SIGNALS) process.removeListener(s, onSignal);
  process.kill(process.pid, signal); // die of the signal itself, as the shell expects
}

function hooksInstall(): void {
  if (!exitHookInstalled) {
    process.on('exit', removePendingSync);
    exitHookInstalled = true;
  }
  if (pending.size === 0) for (const s of SIGNALS) process.on(s, onSignal);
}

function hooksRemove(): void {
  if (pending.size === 0) for (const s of SIGNALS) process.removeListener(s, onSignal);
}

/** Why a path cannot be an output file (folder missing, not writable, a folder itself), or null. */
export function outputProblem(path: string): string | null {
  const full = resolve(path);
  const dir = dirname(full);
  let dirStat;
  try {
    dirStat = statSync(dir);
  } catch {
    return `the folder ${dir} does not exist`;
  }
  if (!dirStat.isDirectory()) return `${dir} is not a folder`;
  try {
    accessSync(dir, constants.W_OK);
  } catch {
    return `the folder ${dir} is not writable`;
  }
  try {
    if (statSync(full).isDirectory()) return `${path} is a folder`;
  } catch {
    // does not exist yet: fine
  }
  return null;
}

/**
 * Writes the chunks (text as UTF-8, or bytes as they are) to `path` atomically (temp file + rename);
 * throws CliError (exit 2) on failure. Each chunk is written before the next is asked for, so a byte
 * chunk may be a view that the iterator reuses. The file calls are synchronous (each asynchronous one is a
 * round trip through libuv's thread pool, ~90 of them for 16 384 rows); between chunks the event loop
 * runs, so that Ctrl-C still removes the temp file mid-write.
 */
export async function outputWriteAtomic(path: string, chunks: Iterable<string | Uint8Array>): Promise<void> {
  const full = resolve(path);
  const tmp = join(dirname(full), `.${basename(full)}.${process.pid}.${Math.random().toString(36).slice(2, 10)}.tmp`);
  hooksInstall();
  pending.add(tmp);
  let fd: number | undefined;
  try {
    fd = openSync(tmp, 'wx');
    for (const chunk of chunks) {
      const bytes = typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : chunk;
      for (let at = 0; at < bytes.length; ) {
        const written = writeSync(fd, bytes, at, bytes.length - at);
        if (written <= 0) throw new Error('the write made no progress');
        at += written;
      }
      await new Promise((r) => setImmediate(r)); // a pending signal is handled here
    }
    fsyncSync(fd);
    closeSync(fd);
    fd = undefined;
    renameSync(tmp, full);
    pending.delete(tmp);
  } catch (e) {
    if (fd !== undefined) {
      try {
        closeSync(fd);
      } catch {
        // already closed
      }
    }
    try {
      unlinkSync(tmp);
    } catch {
      // not created
    }
    pending.delete(tmp);
    const code = (e as NodeJS.ErrnoException).code;
    throw new CliError(`cannot write ${path}: ${code ? `${code} ` : ''}${e instanceof Error ? e.message : String(e)}`, 2);
  } finally {
    hooksRemove();
  }
}
