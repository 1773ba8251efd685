/**
 * Ctrl-C (SIGINT) never leaves a temp file or a partial output: neither while forces are computed
 * (worker threads running) nor while the output file is being written.
 */
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cli, cliEnsureBuilt, cliSpawn, tempDir, tempDirsRemove } from './cliHarness';

beforeAll(() => cliEnsureBuilt());
afterAll(tempDirsRemove);

function exited(child: ReturnType<typeof cliSpawn>): Promise<{ code: number | null; signal: NodeJS.Signals | null; stderr: string }> {
  let stderr = '';
  child.stderr!.on('data', (d) => (stderr += d));
  return new Promise((resolve) => child.on('exit', (code, signal) => resolve({ code, signal, stderr })));
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('interrupting the CLI', () => {
  it('SIGINT while the output is being written removes the temp file and leaves an existing --out untouched', async () => {
    const dir = tempDir();
    const out = join(dir, 'big.csv');
    writeFileSync(out, 'previous\n');
    const child = cliSpawn(['demo', '--n', '400000', '--seed', '1', '--out', out], dir);
    const done = exited(child);
    // Wait until the temp file exists (the write phase has begun), then interrupt.
    const t0 = Date.now();
    let sawTemp = false;
    while (Date.now() - t0 < 60_000 && child.exitCode === null) {
      if (readdirSync(dir).some((f) => f.endsWith('.tmp'))) {
        sawTemp = true;
        child.kill('SIGINT');
        break;
      }
      await sleep(5);
    }
    const r = await done;
    expect(sawTemp, 'the write phase was never observed').toBe(true);
    expect(r.signal).toBe('SIGINT');
    expect(r.stderr).toContain('interrupted');
    expect(readdirSync(dir)).toEqual(['big.csv']);
    expect(readFileSync(out, 'utf8')).toBe('previous\n');
  });

  it('SIGINT during the force computation on worker threads leaves no file', async () => {
    const dir = tempDir();
    const snap = join(dir, 'snap.csv');
    // Large and tight enough to run for many seconds on any machine, so the interrupt lands mid-run.
    expect(cli(['demo', '--n', '60000', '--seed', '4', '--out', snap], dir).code).toBe(0);
    const out = join(dir, 'forces.csv');
    const child = cliSpawn(['forces', snap, '--box', '1', '--threads', '2', '--tol', '1e-10', '--out', out], dir);
    const done = exited(child);
    await sleep(1500);
    expect(child.exitCode, 'the run finished before it could be interrupted').toBeNull();
    child.kill('SIGINT');
    const r = await done;
    expect(r.signal).toBe('SIGINT');
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(dir)).toEqual(['snap.csv']);
  });
});
