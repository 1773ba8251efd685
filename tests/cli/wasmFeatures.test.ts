/**
 * The command line runs the kernels' relaxed-SIMD build (fused multiply-add): app/cli/wasmFeatures.ts sets
 * V8's flag where the build does not validate as is (Node 20), compiles the kernels and sets it back.
 * Checked in fresh processes of the built CLI through the kernel build its timing lines name, with the two
 * switches that step down, and in a fresh process of the function alone for the restored flag.
 */
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BIN, ROOT, cliEnsureBuilt } from './cliHarness';

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

describe('relaxedSimdEnable', () => {
  it('compiles the relaxed build and leaves V8 validating as it did before (the flag is set back)', async () => {
    const probe = join(dir, 'probe.mjs');
    await build({
      stdin: {
        contents: [
          "import { relaxedSimdEnable } from './app/cli/wasmFeatures';",
          "import { kernelVariant } from './engine/wasm/module';",
          "import { KERNELS_RELAXED_WASM_BASE64 } from './engine/wasm/kernelsRelaxedBinary';",
          "const bytes = Buffer.from(KERNELS_RELAXED_WASM_BASE64, 'base64');",
          'const before = WebAssembly.validate(bytes);',
          'relaxedSimdEnable();',
          'console.log(JSON.stringify({ before, after: WebAssembly.validate(bytes), variant: kernelVariant() }));',
        ].join('\n'),
        resolveDir: ROOT,
        loader: 'ts',
      },
      bundle: true,
      platform: 'node',
      format: 'esm',
      outfile: probe,
      logLevel: 'warning',
    });
    const r = spawnSync(process.execPath, [probe], { encoding: 'utf8', env: { ...process.env, TORUSGRAV_NO_RELAXED_SIMD: '', TORUSGRAV_NO_WASM: '' } });
    expect(r.status, r.stderr).toBe(0);
    const o = JSON.parse(r.stdout) as { before: boolean; after: boolean; variant: string };
    expect(o.variant).toBe('relaxed-simd');
    expect(o.after).toBe(o.before);
  });
});
