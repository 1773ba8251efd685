import { describe, expect, it } from 'vitest';
import { csvRead } from '../../../engine/formats/csv';
import { csvChunks, csvHeader, csvRows } from '../../../engine/formats/csvWrite';

describe('csvHeader(columns) / csvRows(columns, begin, end)', () => {
  it('writes integers as integers and other numbers with 17 significant digits', () => {
    const cols = [
      { name: 'id', values: Int32Array.of(0, 7), integer: true },
      { name: 'v', values: Float64Array.of(0.1, -2) },
    ];
    expect(csvHeader(cols)).toBe('id,v\n');
    expect(csvRows(cols, 0, 2)).toBe('0,0.10000000000000001\n7,-2.0000000000000000\n');
    expect(csvRows(cols, 1, 1)).toBe('');
  });

  it('picks interleaved components with stride and offset', () => {
    const xyz = Float64Array.of(1, 2, 3, 4, 5, 6);
    const cols = ['x', 'y', 'z'].map((name, d) => ({ name, values: xyz, stride: 3, offset: d }));
    expect(csvRows(cols, 0, 2)).toBe(['1', '2', '3'].map((v) => Number(v).toPrecision(17)).join(',') + '\n' + ['4', '5', '6'].map((v) => Number(v).toPrecision(17)).join(',') + '\n');
  });
});

describe('csvChunks(columns, rows, rowsPerChunk)', () => {
  it('streams header and rows in chunks that concatenate to the whole table', () => {
    const v = Float64Array.from({ length: 10 }, (_, i) => i / 3);
    const cols = [{ name: 'v', values: v }];
    const chunks = [...csvChunks(cols, 10, 4)];
    expect(chunks.length).toBe(1 + 3);
    expect(chunks.join('')).toBe(csvHeader(cols) + csvRows(cols, 0, 10));
  });

  it('round-trips positions bit for bit through csvRead (17 digits suffice for binary64, IEEE 754-2008 §5.12.2)', () => {
    const n = 1000;
    const xyz = Float64Array.from({ length: 3 * n }, (_, i) => Math.sin(i * 12.9898) * 43758.5453 - Math.floor(Math.sin(i * 12.9898) * 43758.5453) + (i % 7) * 1e-300);
    const m = Float64Array.from({ length: n }, (_, i) => 1 / (i + 3));
    const cols = [...['x', 'y', 'z'].map((name, d) => ({ name, values: xyz, stride: 3, offset: d })), { name: 'm', values: m }];
    const s = csvRead(new TextEncoder().encode([...csvChunks(cols, n, 128)].join('')), 'rt.csv');
    expect(s.positions).toEqual(xyz);
    expect(s.masses).toEqual(m);
  });
});
