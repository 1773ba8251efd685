import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { kernelModule } from '../../../engine/wasm/module';

describe('engine/wasm/kernelsBinary.ts', () => {
  it('is exactly what the AssemblyScript sources in engine/wasm/as compile to (not stale)', () => {
    const out = execFileSync(process.execPath, ['scripts/build-wasm.mjs', '--check'], { encoding: 'utf8' });
    expect(out).toContain('up to date');
  });

  it('validates and compiles as WebAssembly with SIMD on this Node', () => {
    expect(kernelModule()).not.toBeNull();
  });
});
