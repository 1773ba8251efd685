/**
 * The forces output written as bytes (csvChunksBytes, WebAssembly formatter) is the file the string
 * path (csvChunks, toPrecision(17): ECMA-262 §21.1.3.5) writes, byte for byte; and the built command's
 * output is toPrecision(17) text with and without WebAssembly.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { outputWriteAtomic } from '../../app/cli/atomicOutput';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { type CsvColumn, csvChunks, csvChunksBytes } from '../../engine/formats/csvWrite';
import { textFormatInstance } from '../../engine/wasm/textFormatWasm';
import { cli, cliEnsureBuilt, tempDir, tempDirsRemove } from './cliHarness';

afterAll(tempDirsRemove);

/** Every field of a forces CSV is what toPrecision(17) (String for the id) writes for its own value. */
function notCanonical(text: string): string[] {
  const bad: string[] = [];
  const lines = text.split('\n');
  expect(lines[0]).toBe('id,ax,ay,az,phi');
  expect(lines.at(-1)).toBe('');
  for (const line of lines.slice(1, -1)) {
    const f = line.split(',');
    if (f.length !== 5 || String(Number(f[0])) !== f[0] || f.slice(1).some((x) => Number(x).toPrecision(17) !== x)) bad.push(line);
  }
  return bad;
}

describe('forces output as bytes', () => {
  it('writes the same file as the string path (a small forces result through outputWriteAtomic)', async () => {
    expect(textFormatInstance()).not.toBeNull();
    const n = 300;
    const demo = demoSnapshot(n, 9);
    const r = ewaldForces(demo.positions, demo.masses, { lx: 1, ly: 1, lz: 1 }, null, { tol: 1e-8 });
    // the columns of app/cli/forcesCommand.ts (ids are the target indices when the file has none)
    const columns: CsvColumn[] = [
      { name: 'id', values: r.targets, integer: true },
      { name: 'ax', values: r.acc, stride: 3, offset: 0 },
      { name: 'ay', values: r.acc, stride: 3, offset: 1 },
      { name: 'az', values: r.acc, stride: 3, offset: 2 },
      { name: 'phi', values: r.phi },
    ];
    const dir = tempDir();
    await outputWriteAtomic(join(dir, 'old.csv'), csvChunks(columns, n, 64));
    await outputWriteAtomic(join(dir, 'new.csv'), csvChunksBytes(columns, n, 64, { transient: true }));
    const oldBytes = readFileSync(join(dir, 'old.csv'));
    const newBytes = readFileSync(join(dir, 'new.csv'));
    expect(newBytes.length).toBe(oldBytes.length);
    expect(Buffer.compare(newBytes, oldBytes)).toBe(0);
    expect(notCanonical(newBytes.toString('latin1'))).toEqual([]);
  });

  it('the built `torusgrav forces` writes toPrecision(17) text, with WebAssembly and with TORUSGRAV_NO_WASM=1', () => {
    cliEnsureBuilt();
    const dir = tempDir();
    const demo = join(dir, 'demo.csv');
    expect(cli(['demo', '--n', '200', '--seed', '4', '--out', demo]).code).toBe(0);
    for (const noWasm of [false, true]) {
      const out = join(dir, `forces-${noWasm}.csv`);
      const before = process.env.TORUSGRAV_NO_WASM;
      if (noWasm) process.env.TORUSGRAV_NO_WASM = '1';
      try {
        const r = cli(['forces', demo, '--box', '1', '--threads', '1', '--out', out]);
        expect(r.code, r.stderr).toBe(0);
      } finally {
        if (before === undefined) delete process.env.TORUSGRAV_NO_WASM;
        else process.env.TORUSGRAV_NO_WASM = before;
      }
      const text = readFileSync(out, 'latin1');
      expect(text.split('\n').length).toBe(202);
      expect(notCanonical(text)).toEqual([]);
    }
  });
});
