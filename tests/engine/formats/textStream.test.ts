/**
 * Streaming text: rows split anywhere between pieces parse exactly as the whole file does, and a file
 * larger than one read piece (4 MiB) streams from a Blob with its line numbers intact.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type ByteSource, blobSource } from '../../../engine/formats/byteSource';
import { csvRead } from '../../../engine/formats/csv';
import { layoutResolve } from '../../../engine/formats/csvColumns';
import { snapshotLoad } from '../../../engine/formats/registry';
import { textHeadParse } from '../../../engine/formats/textHead';
import { textRowParserMake } from '../../../engine/formats/textRows';
import { seededUniform, tableText } from './fixtures';

const enc = new TextEncoder();

describe('textRowParserMake(…).push(piece) in any split', () => {
  it('gives the arrays and line numbers of a one-piece parse (property over split points and dialects)', () => {
    const n = 40;
    const v = seededUniform(4 * n, 9);
    const cols = [0, 1, 2, 3].map((k) => Float64Array.from({ length: n }, (_, i) => v[4 * i + k]));
    const texts = [',', '\t', '  '].map((sep) => enc.encode('# comment\n' + tableText(['x', 'y', 'z', 'm'], cols, sep).replace(/\n/g, (m, at: number) => (at % 7 === 0 ? '\r\n' : m)) + '\n# tail\n'));
    fc.assert(
      fc.property(fc.constantFrom(...texts), fc.uniqueArray(fc.nat(4000), { maxLength: 12 }), (bytes, cuts) => {
        const whole = csvRead(bytes, 's.txt');
        const head = textHeadParse(bytes, 's.txt', true)!;
        const layout = layoutResolve('s.txt', head.columns, head.header, head.headerRow, {});
        const parser = textRowParserMake('s.txt', head.columns, layout, head.delim, head.linesBefore, 8, 1);
        const data = bytes.subarray(head.dataBegin);
        const points = [0, ...cuts.filter((c) => c < data.length).sort((a, b) => a - b), data.length];
        for (let k = 0; k + 1 < points.length; k++) parser.push(data.slice(points[k], points[k + 1]));
        const r = parser.finish();
        return r.count === n && r.positions.every((x, i) => Object.is(x, whole.positions[i])) && r.masses.every((m, i) => m === whole.masses[i]) && r.lines.every((l, i) => l === whole.lines![i]);
      }),
      { numRuns: 200 },
    );
  });

  it('streams a file of more than one 4 MiB piece from a Blob: every row, right line numbers', async () => {
    const n = 70_000;
    const v = seededUniform(3 * n, 4);
    const cols = [0, 1, 2].map((k) => Float64Array.from({ length: n }, (_, i) => v[3 * i + k]));
    const text = tableText(['x', 'y', 'z'], cols);
    expect(text.length).toBeGreaterThan(4 << 20);
    const s = await snapshotLoad(blobSource(new Blob([text])), 'big.csv');
    expect(s.count).toBe(n);
    expect(s.positions).toEqual(v);
    expect(s.lines![n - 1]).toBe(n + 1);
  });
});

describe('text from a source that reuses the caller\'s buffer (as the CLI\'s file source does)', () => {
  /** Fills `into` when given (scribbling over it first), so a reader that kept an old piece would see garbage. */
  function reusingSource(bytes: Uint8Array): ByteSource {
    return {
      size: bytes.length,
      async read(offset, length, into) {
        const n = Math.max(0, Math.min(length, bytes.length - offset));
        const buf = into && into.length >= n ? into : new Uint8Array(n);
        buf.fill(0x39);
        buf.set(bytes.subarray(offset, offset + n));
        return buf.subarray(0, n);
      },
    };
  }

  it('a file in one piece and one of several pieces load as csvRead reads them', async () => {
    for (const n of [500, 70_000]) {
      const v = seededUniform(4 * n, 3);
      const cols = [0, 1, 2, 3].map((k) => Float64Array.from({ length: n }, (_, i) => v[4 * i + k]));
      const bytes = enc.encode('# made by a test\n' + tableText(['x', 'y', 'z', 'm'], cols, ','));
      const whole = csvRead(bytes, 'r.csv');
      const s = await snapshotLoad(reusingSource(bytes), 'r.csv');
      expect(s.count).toBe(n);
      expect(s.positions.every((x, i) => Object.is(x, whole.positions[i]))).toBe(true);
      expect(s.masses.every((m, i) => m === whole.masses[i])).toBe(true);
      expect(Array.from(s.lines!)).toEqual(Array.from(whole.lines!));
    }
  });
});
