/**
 * csvChunksBytes: the bytes of csvChunks' text (toPrecision(17) for non-integer columns, ECMA-262
 * §21.1.3.5; String(v) for integer columns), from the WebAssembly formatter or, where it is off, from the
 * string functions — identical either way.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { type CsvColumn, csvChunks, csvChunksBytes } from '../../../engine/formats/csvWrite';
import { textFormatInstance } from '../../../engine/wasm/textFormatWasm';

const g = globalThis as { TORUSGRAV_NO_WASM?: boolean };
afterEach(() => {
  delete g.TORUSGRAV_NO_WASM;
});

const enc = new TextEncoder();
const dec = new TextDecoder();

function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((s, p) => s + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** Index of the first byte where a and b differ (or the shorter length), −1 when they are equal. */
function firstDifference(a: Uint8Array, b: Uint8Array): number {
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) if (a[i] !== b[i]) return i;
  return a.length === b.length ? -1 : n;
}

/** The old path: the string chunks, UTF-8 encoded. */
function stringBytes(columns: CsvColumn[], rows: number, per = 4096): Uint8Array {
  return enc.encode([...csvChunks(columns, rows, per)].join(''));
}

/** A forces-like table: ids, ax/ay/az from one xyz array, phi. */
function forcesTable(n: number, seed: number): CsvColumn[] {
  let s = seed >>> 0;
  const rnd = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  const acc = Float64Array.from({ length: 3 * n }, () => (rnd() - 0.5) * 10 ** (12 * rnd() - 6));
  const phi = Float64Array.from({ length: n }, () => -rnd() * 300);
  const ids = Int32Array.from({ length: n }, (_, i) => i * 7 - 3);
  return [
    { name: 'id', values: ids, integer: true },
    { name: 'ax', values: acc, stride: 3, offset: 0 },
    { name: 'ay', values: acc, stride: 3, offset: 1 },
    { name: 'az', values: acc, stride: 3, offset: 2 },
    { name: 'phi', values: phi },
  ];
}

describe('csvChunksBytes(columns, rows, rowsPerChunk)', () => {
  it('uses the WebAssembly formatter on this Node (so the comparisons below compare two paths)', () => {
    expect(textFormatInstance()).not.toBeNull();
    g.TORUSGRAV_NO_WASM = true;
    expect(textFormatInstance()).toBeNull();
  });

  it('is byte for byte the text of csvChunks, for several chunk sizes', () => {
    const cols = forcesTable(5000, 1);
    const want = stringBytes(cols, 5000);
    for (const per of [1, 7, 1000, 4096, 10000]) {
      const parts = [...csvChunksBytes(cols, 5000, per)];
      expect(parts.length).toBe(1 + Math.ceil(5000 / Math.min(per, 5000)));
      expect(firstDifference(concat(parts), want)).toBe(-1);
    }
  });

  it('writes the same bytes with WebAssembly disabled (TORUSGRAV_NO_WASM)', () => {
    const cols = forcesTable(3000, 2);
    const withWasm = concat([...csvChunksBytes(cols, 3000, 512)]);
    g.TORUSGRAV_NO_WASM = true;
    const withoutWasm = concat([...csvChunksBytes(cols, 3000, 512)]);
    expect(firstDifference(withoutWasm, withWasm)).toBe(-1);
    expect(firstDifference(withWasm, stringBytes(cols, 3000))).toBe(-1);
  });

  it('hands values it does not format (NaN, ±Infinity, non-integers or |v| ≥ 2^53 in integer columns) to toPrecision / String', () => {
    const ids = [0, -0, -5, 2 ** 53 - 1, -(2 ** 53 - 1), 2 ** 53, 1e21, 0.5, 123456789, 10 ** 15, Number.NaN, 99999999, 100000000];
    const v = [1, Number.NaN, Infinity, -Infinity, -0, 5e-324, 1e300, 0.1, 2, 3, 4, 5, 6];
    const cols: CsvColumn[] = [
      { name: 'id', values: ids, integer: true }, // a plain array
      { name: 'v', values: v },
    ];
    const text = dec.decode(concat([...csvChunksBytes(cols, ids.length, 4)]));
    expect(text).toBe([...csvChunks(cols, ids.length, 4)].join(''));
    expect(text.split('\n')[1]).toBe('0,1.0000000000000000');
    expect(text.split('\n')[2]).toBe('0,NaN'); // String(−0) is "0"
    expect(text.split('\n')[4]).toBe('9007199254740991,-Infinity');
    expect(text.split('\n')[7]).toBe('1e+21,1.0000000000000001e+300');
    expect(text.split('\n')[8]).toBe('0.5,0.10000000000000001');
  });

  it('copies chunks by default; transient chunks are views valid until the next one', () => {
    const cols = forcesTable(300, 3);
    const want = stringBytes(cols, 300, 100);
    const kept = [...csvChunksBytes(cols, 300, 100)];
    expect(firstDifference(concat(kept), want)).toBe(-1);
    const copied: Uint8Array[] = [];
    for (const c of csvChunksBytes(cols, 300, 100, { transient: true })) copied.push(c.slice());
    expect(firstDifference(concat(copied), want)).toBe(-1);
    // two generators taking turns on the one formatter instance
    const other = forcesTable(300, 4);
    const a = csvChunksBytes(cols, 300, 100);
    const b = csvChunksBytes(other, 300, 100);
    const pa: Uint8Array[] = [];
    const pb: Uint8Array[] = [];
    for (;;) {
      const x = a.next();
      const y = b.next();
      if (x.done && y.done) break;
      if (!x.done) pa.push(x.value);
      if (!y.done) pb.push(y.value);
    }
    expect(firstDifference(concat(pa), want)).toBe(-1);
    expect(firstDifference(concat(pb), stringBytes(other, 300, 100))).toBe(-1);
  });

  it('writes only the header for zero rows', () => {
    const cols = forcesTable(0, 5);
    const parts = [...csvChunksBytes(cols, 0)];
    expect(parts.map((p) => dec.decode(p))).toEqual(['id,ax,ay,az,phi\n']);
  });
});
