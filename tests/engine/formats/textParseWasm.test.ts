/**
 * The WebAssembly twin of the text row loop (engine/wasm/textParseWasm.ts, engine/wasm/as/textParse*.ts)
 * against the JavaScript path it stands in for: the same arrays bit for bit, the same line numbers and
 * counts, the same errors, on every dialect, layout, subsampling and split into pieces; and values equal to
 * Number() on the same text, which ECMA-262 defines as correctly rounded (StringToNumber / RoundMVResult):
 * an independent reference, not our own code.
 */
import { describe, expect, it } from 'vitest';
import { csvRead } from '../../../engine/formats/csv';
import { layoutResolve } from '../../../engine/formats/csvColumns';
import { type ColumnMapping, SnapshotFormatError } from '../../../engine/formats/snapshot';
import { textHeadParse } from '../../../engine/formats/textHead';
import { type TextRowsResult, textRowParserMake } from '../../../engine/formats/textRows';
import { OUT_ROWS, textParseModule, textRowsWasmMake } from '../../../engine/wasm/textParseWasm';
import { uint32Seeded } from '../../helpers/uint32Seeded';

const enc = new TextEncoder();


function withWasm<T>(on: boolean, f: () => T): T {
  const g = globalThis as { TORUSGRAV_NO_WASM?: boolean };
  const before = g.TORUSGRAV_NO_WASM;
  g.TORUSGRAV_NO_WASM = !on;
  try {
    return f();
  } finally {
    if (before === undefined) delete g.TORUSGRAV_NO_WASM;
    else g.TORUSGRAV_NO_WASM = before;
  }
}

interface ParseOptions {
  mapping?: ColumnMapping;
  every?: number;
  /** Cut points in the data part (bytes), for push() in pieces. */
  cuts?: readonly number[];
  capacity?: number;
}

type Outcome = { ok: true; r: TextRowsResult } | { ok: false; e: SnapshotFormatError };

/** The rows of a text file through textRowParserMake, as csv.ts drives it. */
function parseRows(bytes: Uint8Array, o: ParseOptions = {}): Outcome {
  try {
    const head = textHeadParse(bytes, 'f.csv', true)!;
    const layout = layoutResolve('f.csv', head.columns, head.header, head.headerRow, o.mapping ?? {});
    const data = bytes.subarray(head.dataBegin);
    const parser = textRowParserMake('f.csv', head.columns, layout, head.delim, head.linesBefore, o.capacity ?? 16, o.mapping?.massDefault ?? 1, o.every ?? 1);
    const points = [0, ...(o.cuts ?? []).filter((c) => c > 0 && c < data.length).sort((a, b) => a - b), data.length];
    for (let k = 0; k + 1 < points.length; k++) parser.push(data.slice(points[k], points[k + 1]));
    return { ok: true, r: parser.finish() };
  } catch (e) {
    if (e instanceof SnapshotFormatError) return { ok: false, e };
    throw e;
  }
}

function bytesOf(a: Float64Array | Int32Array): Uint8Array {
  return new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
}

/** Index of the first element whose bits differ, or −1. */
function firstBitDifference(a: Float64Array | Int32Array | undefined, b: Float64Array | Int32Array | undefined): number {
  if (!a || !b) return a === b ? -1 : 0;
  if (a.length !== b.length) return Math.min(a.length, b.length);
  const x = bytesOf(a), y = bytesOf(b);
  const per = a.BYTES_PER_ELEMENT;
  for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return Math.floor(i / per);
  return -1;
}

/** Parses with WebAssembly on and off and expects the same outcome, bit for bit; returns it. */
function expectSamePaths(bytes: Uint8Array, o: ParseOptions = {}): Outcome {
  const w = withWasm(true, () => parseRows(bytes, o));
  const j = withWasm(false, () => parseRows(bytes, o));
  if (!w.ok || !j.ok) {
    expect(w.ok ? 'parsed' : w.e.message).toBe(j.ok ? 'parsed' : j.e.message);
    if (!w.ok && !j.ok) {
      expect([w.e.reason, w.e.row, w.e.particle, w.e.column]).toEqual([j.e.reason, j.e.row, j.e.particle, j.e.column]);
    }
    return j;
  }
  expect([w.r.count, w.r.total]).toEqual([j.r.count, j.r.total]);
  for (const k of ['positions', 'masses', 'accelerations', 'ids', 'softening', 'lines'] as const) {
    const at = firstBitDifference(w.r[k], j.r[k]);
    expect(at, `${k}[${at}]: wasm ${w.r[k]?.[at]} js ${j.r[k]?.[at]}`).toBe(-1);
  }
  return j;
}

/** How many data rows of `bytes` the WebAssembly loop finishes by itself (the rest stop it). */
function wasmShare(bytes: Uint8Array, mapping: ColumnMapping = {}): { wasm: number; rows: number } {
  const head = textHeadParse(bytes, 'f.csv', true)!;
  const layout = layoutResolve('f.csv', head.columns, head.header, head.headerRow, mapping);
  const w = withWasm(true, () => textRowsWasmMake(layout.slotOf, head.delim, 1))!;
  expect(w).not.toBeNull();
  let pos = head.dataBegin, wasm = 0, rows = 0;
  const pos3 = new Float64Array(3 * OUT_ROWS), m = new Float64Array(OUT_ROWS), lines = new Int32Array(OUT_ROWS);
  while (pos < bytes.length) {
    pos = w.run(bytes, pos, bytes.length, 0, 0, OUT_ROWS);
    wasm += w.kept;
    rows += w.rows;
    w.take(0, pos3, m, null, null, null, lines);
    if (!w.more && pos < bytes.length) {
      const lf = bytes.indexOf(10, pos);
      pos = lf < 0 ? bytes.length : lf + 1;
      rows++;
    }
  }
  return { wasm, rows };
}

/** A random finite double from random bits (every binade, subnormals included). */
function randomBits(r: () => number): number {
  const dv = new DataView(new ArrayBuffer(8));
  for (;;) {
    dv.setUint32(0, r());
    dv.setUint32(4, r());
    const v = dv.getFloat64(0);
    if (Number.isFinite(v)) return v;
  }
}

/** Numbers written in the ways programs write them (all finite, all valid cells). */
function randomCell(r: () => number): string {
  const pick = r() % 12;
  const u = r() / 2 ** 32;
  const scaled = (u + r() / 2 ** 64) * 10 ** ((r() % 61) - 30) * (r() % 2 ? -1 : 1);
  const v = pick < 4 ? scaled : randomBits(r);
  let s: string;
  switch (pick % 6) {
    case 0:
      s = v.toPrecision(17);
      break;
    case 1:
      s = String(v);
      break;
    case 2:
      s = v.toExponential(r() % 21);
      break;
    case 3:
      s = Math.abs(v) < 1e9 ? v.toFixed(r() % 12) : v.toPrecision(1 + (r() % 21));
      break;
    case 4:
      s = v.toPrecision(1 + (r() % 21)).replace('e', r() % 2 ? 'E' : 'e');
      break;
    default:
      s = HARD[r() % HARD.length];
  }
  if (!Number.isFinite(Number(s))) s = v.toPrecision(17); // rounded up past the largest double
  if (r() % 8 === 0 && !/^[+-]/.test(s)) s = '+' + s;
  return s;
}

/** Cases on the edges of the fast paths, near half-way, at the ends of the range, and long ones. */
const HARD = [
  '0', '-0', '+0', '0.0', '-0.000e5', '0e999999999', '-0.0E-400', '5e-324', '4.9406564584124654e-324', '2.4703282292062328e-324',
  '2.4703282292062327e-324', '2.2250738585072011e-308', '2.2250738585072012e-308', '2.2250738585072014e-308', '1.7976931348623157e308',
  '1.7976931348623158e308', '9007199254740993', '9007199254740992.5', '9007199254740993.0000000001', '0.25000000000000000000',
  '1.00000000000000011102230246251565404236316680908203125', '0.1', '0.30000000000000004', '123456789012345678901234567890',
  '99999999999999999999', '9999999999999999999', '1e22', '1e23', '1e-22', '1e-23', '123456789012345e22', '123456789012345e-22',
  '1234567890123456e22', '1234567890123456e-22', '8.98846567431158e307', '-.5', '5.', '.5e+1', '1E5', '000000000000000000000001.5',
  '7.0e-10', '1234567890123456.7', '0.000001234567890123456789', '100000000000000000000000e-10', '1e-250', '1e-251', '1.2e281',
  '1.2e282', '9.999999999999999e280', '4.35679759e-310', '1.0000000000000002', '0.9999999999999999', '1e0', '1e+0', '1e-0',
  '1e+300', '1e-300', '3.0517578125e-05', '1.234567890123456789', '12345678901234567.89', '0.0000000000000000000000000000001',
  '100', '1.', '0.5', '-1.5e-7',
];

/** A data file: header, rows of cells joined by `sep`, with CRLF, blank and # lines sprinkled in when asked. */
function fileText(header: string[], rows: string[][], sep: string, r: () => number, noise = false): string {
  const out = [header.join(sep) + '\n'];
  for (const row of rows) {
    if (noise && r() % 25 === 0) out.push(['\n', '# note, 1, 2\n', '   \t \r\n', '  # indented comment\n'][r() % 4]);
    let line = row.join(sep);
    if (sep !== ',' && sep !== '\t') line = (r() % 4 === 0 ? '  ' : '') + line + (r() % 4 === 0 ? ' \t' : '');
    else if (noise && r() % 5 === 0) line = row.map((c) => (r() % 3 === 0 ? ` ${c} ` : c)).join(sep);
    out.push(line + (noise && r() % 3 === 0 ? '\r\n' : '\n'));
  }
  return out.join('');
}

function randomRows(r: () => number, n: number, width: number, cell: (r: () => number, col: number) => string = (q) => randomCell(q)): string[][] {
  return Array.from({ length: n }, () => Array.from({ length: width }, (_, c) => cell(r, c)));
}

const SEPS: Record<string, string> = { comma: ',', tab: '\t', whitespace: ' ', 'blank runs': ' \t  ' };

describe('text rows through WebAssembly', () => {
  it('compiles and is on by default in this Node (else every comparison below would be void)', () => {
    expect(textParseModule()).not.toBeNull();
    expect(withWasm(true, () => textRowsWasmMake(new Int32Array([0, 1, 2]), 44, 1))).not.toBeNull();
    expect(withWasm(false, () => textRowsWasmMake(new Int32Array([0, 1, 2]), 44, 1))).toBeNull();
  });

  it('parses most rows of 17-digit output itself, and hands back rows off its fast paths', () => {
    const r = uint32Seeded(5);
    const fast = fileText(['x', 'y', 'z', 'm'], randomRows(r, 3000, 4, (q) => ((q() / 2 ** 32) * 10 ** ((q() % 20) - 10)).toPrecision(17)), ',', r);
    const share = wasmShare(enc.encode(fast));
    expect(share.rows).toBe(3000);
    expect(share.wasm).toBeGreaterThan(2990);
    // More than 19 significant digits: Number() in JavaScript, so every row goes back.
    const slow = fileText(['x', 'y', 'z'], randomRows(r, 50, 3, () => '0.12345678901234567891'), ',', r);
    expect(wasmShare(enc.encode(slow))).toEqual({ wasm: 0, rows: 50 });
  });

  for (const [name, sep] of Object.entries(SEPS)) {
    it(`gives the JavaScript bits, lines and counts: ${name}, CRLF, blank and # lines, signs, every form of number`, () => {
      for (let seed = 1; seed <= 4; seed++) {
        const r = uint32Seeded(seed * 31 + sep.length);
        const text = fileText(['x', 'y', 'z', 'm'], randomRows(r, 1500, 4), sep, r, true);
        const bytes = enc.encode(text);
        const cuts = Array.from({ length: seed }, () => r() % bytes.length);
        const out = expectSamePaths(bytes, { cuts, capacity: seed === 1 ? 16 : 2000 });
        expect(out.ok && out.r.count).toBe(1500);
        expect(wasmShare(bytes).wasm).toBeGreaterThan(100); // a mix: rows in WebAssembly and in JavaScript
      }
    });
  }

  it('gives the JavaScript bits on the hard cases, one per row, including -0 (Object.is)', () => {
    const r = uint32Seeded(77);
    const rows = HARD.map((h, k) => [h, HARD[(k * 7) % HARD.length], `-${h.replace(/^[+-]/, '')}`]);
    const out = expectSamePaths(enc.encode(fileText(['x', 'y', 'z'], rows, ',', r)));
    expect(out.ok).toBe(true);
    if (out.ok) {
      expect(Object.is(out.r.positions[3], -0)).toBe(true); // "-0" in row 2
      HARD.forEach((h, k) => expect(Object.is(out.r.positions[3 * k], Number(h)), h).toBe(true));
    }
  });

  it('reads the columns a mapping names in any order, skips unused ones (text too), and reads acc, ids and softening', () => {
    const r = uint32Seeded(11);
    for (const [name, sep] of Object.entries(SEPS)) {
      const header = ['note', 'vz', 'z', 'id', 'x', 'skip', 'm', 'y', 'vx', 'vy', 'eps', 'tail'];
      const rows = randomRows(r, 2000, header.length, (q, c) =>
        c === 0 || c === 5 ? ['abc', 'n/a', '', 'NaN', '1e400', '#x'][q() % 6].replace(/^$/, sep === ',' || sep === '\t' ? '' : '-') : c === 3 ? String(q() % 100000) : randomCell(q),
      );
      const bytes = enc.encode(fileText(header, rows, sep, r, true));
      const mapping: ColumnMapping = { accelerations: ['vx', 'vy', 'vz'], ids: 'id', softening: 'eps' };
      const out = expectSamePaths(bytes, { mapping, cuts: [r() % bytes.length] });
      expect(out.ok, name).toBe(true);
      expect(wasmShare(bytes, mapping).wasm, name).toBeGreaterThan(20);
    }
  });

  it('subsamples every k-th data row like JavaScript (blank and # lines not counted)', () => {
    const r = uint32Seeded(12);
    const bytes = enc.encode(fileText(['x', 'y', 'z', 'm'], randomRows(r, 5000, 4), ',', r, true));
    for (const every of [1, 2, 3, 7, 4999, 5000, 6000]) {
      const out = expectSamePaths(bytes, { every, cuts: [1000, 70000, 70001], capacity: every === 3 ? 4 : Math.ceil(5000 / every) + 1 });
      expect(out.ok ? [out.r.count, out.r.total] : out.e.message).toEqual([Math.ceil(5000 / every), 5000]);
    }
  });

  it('streams a file of many windows and output blocks, in odd pieces, with a line longer than a window (1 MiB)', () => {
    const r = uint32Seeded(13);
    const rows = randomRows(r, 30000, 5, (q, c) => (c === 4 ? 'u' : ((q() / 2 ** 32) * 1e3).toPrecision(1 + (q() % 17))));
    rows[12345][4] = 'w'.repeat((1 << 20) + 100); // an unused cell longer than the window
    const bytes = enc.encode(fileText(['x', 'y', 'z', 'm', 'note'], rows, ',', r));
    expect(bytes.length).toBeGreaterThan(2 << 20);
    const out = expectSamePaths(bytes, { cuts: [1, 4 << 20, (4 << 20) + 3, bytes.length - 2], capacity: 1000 });
    expect(out.ok && out.r.count).toBe(30000);
    expect(out.ok && out.r.lines[29999]).toBe(30001);
    // csvRead pushes the whole data part at once.
    const whole = withWasm(true, () => csvRead(bytes, 'f.csv'));
    expect(firstBitDifference(whole.positions, withWasm(false, () => csvRead(bytes, 'f.csv')).positions)).toBe(-1);
  });

  it('reads pieces pushed in one reused buffer (as a stream reads into one buffer): new bytes, same object', () => {
    const r = uint32Seeded(14);
    // Rows of one length and pieces of whole rows: every push is the same object, starting a line.
    const bytes = enc.encode(fileText(['x', 'y', 'z', 'm'], randomRows(r, 3000, 4, (q) => (q() / 2 ** 32).toFixed(15)), ',', r));
    const head = textHeadParse(bytes, 'f.csv', true)!;
    const layout = layoutResolve('f.csv', head.columns, head.header, head.headerRow, {});
    const data = bytes.subarray(head.dataBegin);
    const results = [true, false].map((on) =>
      withWasm(on, () => {
        const parser = textRowParserMake('f.csv', head.columns, layout, head.delim, head.linesBefore, 3000, 1);
        const into = new Uint8Array(50 * (4 * 17 + 4));
        for (let at = 0; at < data.length; at += into.length) {
          const piece = data.subarray(at, at + into.length);
          into.set(piece);
          parser.push(piece.length === into.length ? into : into.subarray(0, piece.length));
        }
        return parser.finish();
      }),
    );
    expect(results[1].count).toBe(3000);
    expect(firstBitDifference(results[0].positions, results[1].positions)).toBe(-1);
    expect(firstBitDifference(results[0].lines, results[1].lines)).toBe(-1);
  });

  it('two parses interleaved on one thread (two files loading at once) share the instance without mixing', () => {
    const r = uint32Seeded(15);
    const files = [',', '\t'].map((sep, k) => enc.encode(fileText(k ? ['m', 'x', 'y', 'z'] : ['x', 'y', 'z', 'm'], randomRows(r, 2000, 4, (q) => (q() / 2 ** 32).toPrecision(17)), sep, r)));
    const run = (on: boolean) =>
      withWasm(on, () => {
        const parsers = files.map((bytes) => {
          const head = textHeadParse(bytes, 'f.csv', true)!;
          const layout = layoutResolve('f.csv', head.columns, head.header, head.headerRow, {});
          return { p: textRowParserMake('f.csv', head.columns, layout, head.delim, head.linesBefore, 2000, 1), data: bytes.subarray(head.dataBegin) };
        });
        for (let at = 0; at < 200_000; at += 7000) for (const { p, data } of parsers) if (at < data.length) p.push(data.slice(at, at + 7000));
        return parsers.map(({ p }) => p.finish());
      });
    const [w, j] = [run(true), run(false)];
    for (const k of [0, 1]) {
      expect(w[k].count).toBe(2000);
      expect(firstBitDifference(w[k].positions, j[k].positions)).toBe(-1);
      expect(firstBitDifference(w[k].masses, j[k].masses)).toBe(-1);
    }
  });

  it('a file of mostly slow rows (more than 19 digits: Number()), where the parser drops WebAssembly midway', () => {
    const r = uint32Seeded(16);
    const rows = randomRows(r, 4000, 3, (q, c) => (c === 1 && q() % 8 !== 0 ? '0.' + String(q()).padStart(10, '7') + String(q()).padStart(10, '3') : (q() / 2 ** 32).toPrecision(17)));
    const out = expectSamePaths(enc.encode(fileText(['x', 'y', 'z'], rows, ',', r)), { cuts: [30000, 60000] });
    expect(out.ok && out.r.count).toBe(4000);
  });

  it('a file whose last line lacks its LF, and one that is all comments after the header', () => {
    expectSamePaths(enc.encode('x,y,z\n1,2,3\r\n4.5,6e-1,7'));
    expectSamePaths(enc.encode('x y z\n 1 2 3 \n4.5 6e-1\t7 '));
    expectSamePaths(enc.encode('x,y,z\n# a\n\n  \n'));
  });
});

describe('text rows through WebAssembly: errors', () => {
  const bad = ['', '  ', 'abc', 'NaN', '-nan', 'Inf', '+Infinity', '-inf', '1e400', '-1e400', '1.5.5', '1e', '1e+', '+', '--1', '0x10', '1 2', '.', 'e5', '1d5', '\u00e9', '7,'];
  for (const [name, sep] of Object.entries(SEPS)) {
    it(`every refused cell gives the JavaScript error (message, row, particle, column): ${name}`, () => {
      const r = uint32Seeded(21);
      const rows = randomRows(r, 600, 4, (q) => ((q() / 2 ** 32) * 10).toPrecision(17));
      let refused = 0;
      for (const cell of bad) {
        for (const col of [0, 3]) {
          const rs = rows.map((row) => row.slice());
          rs[500][col] = cell;
          const out = expectSamePaths(enc.encode(fileText(['x', 'y', 'z', 'm'], rs, sep, r)));
          if (!out.ok) refused++;
          if (!out.ok && !/[ ,]/.test(cell) && cell.trim() !== '') expect(out.e.message).toContain('line 502 (particle 500)');
        }
      }
      expect(refused).toBeGreaterThan(30);
    });
  }

  it('a short row, a row cut short by a trailing delimiter, and an id that is not an integer', () => {
    const r = uint32Seeded(22);
    const rows = randomRows(r, 400, 5, (q, c) => (c === 4 ? String(q() % 1000) : ((q() / 2 ** 32) * 10).toPrecision(17)));
    for (const sep of Object.values(SEPS)) {
      const a = rows.map((row) => row.slice());
      a[300] = a[300].slice(0, 2);
      let out = expectSamePaths(enc.encode(fileText(['x', 'y', 'z', 'm', 'id'], a, sep, r)), { mapping: { ids: 'id' } });
      expect(!out.ok && out.e.reason).toContain('is missing');
      const b = rows.map((row) => row.slice());
      b[300][4] = '12.5';
      out = expectSamePaths(enc.encode(fileText(['x', 'y', 'z', 'm', 'id'], b, sep, r)), { mapping: { ids: 'id' } });
      expect(!out.ok && out.e.reason).toContain('not an integer');
    }
    const c = rows.map((row) => row.slice(0, 4).join(','));
    c[200] = c[200].split(',').slice(0, 3).join(',') + ',';
    const out = expectSamePaths(enc.encode('x,y,z,m\n' + c.join('\n') + '\n'));
    expect(!out.ok && out.e.reason).toBe('the cell is empty');
  });

  it('a bad cell in a row left out by subsampling, or in an unused column, is not an error on either path', () => {
    const r = uint32Seeded(23);
    const rows = randomRows(r, 300, 5, (q) => ((q() / 2 ** 32) * 10).toPrecision(17));
    rows[101][0] = 'abc';
    rows[200][4] = 'abc';
    const out = expectSamePaths(enc.encode(fileText(['x', 'y', 'z', 'm', 'note'], rows, ',', r)), { every: 2 });
    expect(out.ok && out.r.count).toBe(150);
  });
});

describe('text rows through WebAssembly: values against Number()', () => {
  it('100 000 random values read back exactly as Number() reads the same text (correctly rounded, ECMA-262)', () => {
    const r = uint32Seeded(99);
    const n = 25_000;
    const rows = randomRows(r, n, 4);
    const bytes = enc.encode(fileText(['x', 'y', 'z', 'm'], rows, ',', r));
    const s = withWasm(true, () => csvRead(bytes, 'f.csv'));
    let wrong = 0;
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < 3; c++) if (!Object.is(s.positions[3 * i + c], Number(rows[i][c]))) wrong++;
      if (!Object.is(s.masses[i], Number(rows[i][3]))) wrong++;
    }
    expect(wrong).toBe(0);
    expect(wasmShare(bytes).wasm).toBeGreaterThan(n / 4);
  });
});
