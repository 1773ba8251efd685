/**
 * The command line runs the kernels' relaxed-SIMD build (fused multiply-add): app/cli/wasmFeatures.ts sets
 * V8's flag where the build does not validate as is (Node 20). Checked in fresh processes of the built
 * CLI through the kernel build its timing lines name, with the two switches that step down.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BIN, cliEnsureBuilt } from './cliHarness';

const dir = mkdtempSync(join(tmpdir(), 'torusgrav-wasm-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
beforeAll(() => cliEnsureBuilt());

function kernelsOf(env: Record<string, string>): string {
  const file = join(dir, 'in.csv');
  writeFileSync(file, 'x,y,z\n0.1,0.2,0.3\n0.6,0.5,0.4\n0.9,0.1,0.7\n');
  const r = spawnSync(process.execPath, [BIN, 'forces', file, '--box', '1', '--threads', '1', '--out', join(dir, 'out.csv')], {
    env: { ...process.env, TORUSGRAV_NO_RELAXED_SIMD: '', TORUSGRAV_NO_WASM: '', ...env, TORUSGRAV_TIMING: '1' },
    encoding: 'utf8',
  });
  expect(r.status, r.stderr).toBe(0);
  return /timing kernels: (\S+)/.exec(r.stderr)?.[1] ?? 'none';
}

describe('the kernel build of a forces run', () => {
  it('is relaxed SIMD by default', () => expect(kernelsOf({})).toBe('relaxed-simd'));
  it('is plain SIMD with TORUSGRAV_NO_RELAXED_SIMD=1', () => expect(kernelsOf({ TORUSGRAV_NO_RELAXED_SIMD: '1' })).toBe('simd'));
  it('is the JavaScript twins with TORUSGRAV_NO_WASM=1', () => expect(kernelsOf({ TORUSGRAV_NO_WASM: '1' })).toBe('javascript'));
});
