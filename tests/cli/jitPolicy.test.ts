/** jitPolicy.ts: which inputs a forces run takes without V8's optimising compiler. */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { afterAll, describe, expect, it } from 'vitest';
import { jitLightSuits } from '../../app/cli/jitPolicy';

const dir = mkdtempSync(join(tmpdir(), 'torusgrav-jit-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('jitLightSuits', () => {
  const text = 'x,y,z,m\n0.1,0.2,0.3,1\n0.4,0.5,0.6,1\n';
  const small = join(dir, 'small.csv');
  writeFileSync(small, text);

  it('takes a small uncompressed file', () => {
    expect(jitLightSuits(small)).toBe(true);
  });

  it('leaves a gzip file (by its magic number, whatever its name), a file over 8 MiB and a missing file', () => {
    const gz = join(dir, 'packed.csv');
    writeFileSync(gz, gzipSync(text));
    expect(jitLightSuits(gz)).toBe(false);
    const big = join(dir, 'big.csv');
    writeFileSync(big, Buffer.alloc((8 << 20) + 1, 0x30));
    expect(jitLightSuits(big)).toBe(false);
    expect(jitLightSuits(join(dir, 'no-such.csv'))).toBe(false);
  });

  it('is switched off by TORUSGRAV_FULL_JIT=1', () => {
    process.env.TORUSGRAV_FULL_JIT = '1';
    try {
      expect(jitLightSuits(small)).toBe(false);
    } finally {
      delete process.env.TORUSGRAV_FULL_JIT;
    }
  });
});
