import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { csvRead, csvReader } from '../../../engine/formats/csv';
import { SnapshotFormatError } from '../../../engine/formats/snapshot';

const enc = new TextEncoder();
const bytes = (text: string) => enc.encode(text);
const read = (text: string, mapping = {}) => csvRead(bytes(text), 'snap.csv', mapping);

/** Runs `f`, expects a SnapshotFormatError, returns it. */
function formatError(f: () => unknown): SnapshotFormatError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(SnapshotFormatError);
    const err = e as SnapshotFormatError;
    expect(err.message).not.toMatch(/\n/);
    expect(err.file).toBe('snap.csv');
    expect(err.message.startsWith('snap.csv')).toBe(true);
    return err;
  }
  throw new Error('expected a SnapshotFormatError, nothing was thrown');
}

describe('csvRead(bytes, fileName, mapping)', () => {
  it('reads x,y,z,m into flat typed arrays in file order', () => {
    const s = read('x,y,z,m\n0.5,0.25,0.125,2\n1,2,3,4\n');
    expect(s.format).toBe('text');
    expect(s.count).toBe(2);
    expect(Array.from(s.positions)).toEqual([0.5, 0.25, 0.125, 1, 2, 3]);
    expect(Array.from(s.masses)).toEqual([2, 4]);
    expect(s.massColumn).toBe('m');
    expect(s.columns).toEqual(['x', 'y', 'z', 'm']);
    expect(Array.from(s.lines!)).toEqual([2, 3]);
    expect(s.positions).toBeInstanceOf(Float64Array);
    expect(s.accelerations).toBeUndefined();
    expect(s.ids).toBeUndefined();
  });

  it('gives every particle mass 1 when there is no mass column', () => {
    const s = read('x,y,z\n1,2,3\n4,5,6\n');
    expect(Array.from(s.masses)).toEqual([1, 1]);
    expect(s.massColumn).toBeNull();
  });

  it('accepts the mass column under the name "mass", in any case, and header names in any case', () => {
    const s = read('X,Y,Z,Mass\n1,2,3,7\n');
    expect(Array.from(s.positions)).toEqual([1, 2, 3]);
    expect(Array.from(s.masses)).toEqual([7]);
    expect(s.massColumn).toBe('Mass');
  });

  it('finds the columns in any order and ignores other columns, even non-numeric ones', () => {
    const s = read('name,m,vx,z,y,x,note\nstar,3,oops,30,20,10,"a, quoted note"\ngas,4,,60,50,40,\n');
    expect(Array.from(s.positions)).toEqual([10, 20, 30, 40, 50, 60]);
    expect(Array.from(s.masses)).toEqual([3, 4]);
  });

  it('reads CRLF line ends, a byte-order mark, blank lines, comment lines and spaces around cells', () => {
    const s = read('\ufeff# made by hand\r\n x , y ,z\r\n\r\n 1 ,\t2 , 3 \r\n# between\r\n4,5,6\r\n');
    expect(Array.from(s.positions)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(Array.from(s.lines!)).toEqual([4, 6]);
  });

  it('ignores blank trailing lines and a missing final newline', () => {
    expect(read('x,y,z\n1,2,3\n\n\n  \n').count).toBe(1);
    expect(read('x,y,z\n1,2,3').count).toBe(1);
    expect(read('x,y,z\r\n1,2,3\r\n\r\n').count).toBe(1);
  });

  it('strips double quotes around header names', () => {
    const s = read('"x","y","z"\n1,2,3\n');
    expect(Array.from(s.positions)).toEqual([1, 2, 3]);
  });

  it('reads every decimal form: signs, exponents, leading/trailing points, negative zero', () => {
    const s = read('x,y,z\n-1.5e3,+.5,7.\n1E-2,0.000123,-0\n');
    expect(Array.from(s.positions)).toEqual([-1500, 0.5, 7, 0.01, 0.000123, -0]);
    expect(Object.is(s.positions[5], -0)).toBe(true);
  });

  it('reads numbers exactly as Number() does (correct rounding), fast path or not (property)', () => {
    // Decimal strings from the JS grammar the reader accepts; Number() is correctly rounded (ECMA-262 §7.1.4.1.1).
    const digits = fc.stringMatching(/^[0-9]{1,25}$/);
    const decimal = fc
      .tuple(fc.constantFrom('', '-', '+'), digits, fc.option(fc.stringMatching(/^[0-9]{0,20}$/)), fc.option(fc.integer({ min: -330, max: 310 })))
      .map(([sign, int, frac, exp]) => `${sign}${int}${frac === null ? '' : `.${frac}`}${exp === null ? '' : `e${exp}`}`)
      .filter((t) => Number.isFinite(Number(t)));
    fc.assert(
      fc.property(fc.array(decimal, { minLength: 3, maxLength: 30 }), (cells) => {
        const rows = Math.floor(cells.length / 3);
        const text = 'x,y,z\n' + Array.from({ length: rows }, (_, r) => cells.slice(3 * r, 3 * r + 3).join(',')).join('\n');
        const s = read(text);
        for (let k = 0; k < 3 * rows; k++) if (!Object.is(s.positions[k], Number(cells[k]))) return false;
        return true;
      }),
      { numRuns: 400 },
    );
  });

  it('reads back 17-significant-digit output bit for bit (property over all finite doubles)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 3, maxLength: 60 }), (vals) => {
        const rows = Math.floor(vals.length / 3);
        const text = 'x,y,z\n' + Array.from({ length: rows }, (_, r) => vals.slice(3 * r, 3 * r + 3).map((v) => v.toPrecision(17)).join(',')).join('\n');
        const s = read(text);
        for (let k = 0; k < 3 * rows; k++) if (s.positions[k] !== vals[k]) return false; // −0 prints as 0: compare with ===
        return true;
      }),
      { numRuns: 300 },
    );
  });

  it('reads a file without a header when the mapping names columns by number', () => {
    const s = read('1,2,3,4\n5,6,7,8\n', { positions: [1, 2, 3], mass: 0 });
    expect(Array.from(s.positions)).toEqual([2, 3, 4, 6, 7, 8]);
    expect(Array.from(s.masses)).toEqual([1, 5]);
    expect(s.columns).toEqual(['0', '1', '2', '3']);
    expect(Array.from(s.lines!)).toEqual([1, 2]);
  });

  it('reads mapped acceleration and id columns when asked, and ignores the mass column when mass is null', () => {
    const s = read('x,y,z,m,ax,ay,az,pid\n1,2,3,9,-1,-2,-3,42\n', { accelerations: ['ax', 'ay', 'az'], ids: 'pid', mass: null, massDefault: 0.5 });
    expect(Array.from(s.accelerations!)).toEqual([-1, -2, -3]);
    expect(Array.from(s.ids!)).toEqual([42]);
    expect(Array.from(s.masses)).toEqual([0.5]);
    expect(s.massColumn).toBeNull();
  });
});

describe('csvRead errors name file, line, particle and column', () => {
  it('an empty file', () => {
    const e = formatError(() => read(''));
    expect(e.row).toBeUndefined();
    expect(e.message).toMatch(/empty/);
    formatError(() => read('\n\n  \r\n# only a comment\n'));
  });

  it('a file whose lines end in CR alone', () => {
    expect(formatError(() => read('x,y,z\r1,2,3\r')).message).toMatch(/CR alone/);
  });

  it('a header but no particle rows', () => {
    const e = formatError(() => read('x,y,z\n\n'));
    expect(e.row).toBe(1);
    expect(e.message).toMatch(/no particle rows/);
  });

  it('a missing position column, naming it and the header line', () => {
    const e = formatError(() => read('# c\nx,y,m\n1,2,3\n'));
    expect(e.row).toBe(2);
    expect(e.column).toBe('z');
    expect(e.message).toContain('line 2');
    expect(e.message).toContain('"z"');
  });

  it('a first line of numbers where a header is expected', () => {
    const e = formatError(() => read('1,2,3\n4,5,6\n'));
    expect(e.row).toBe(1);
    expect(e.message).toMatch(/header/);
  });

  it('a non-numeric cell, with 1-based line, 0-based particle and column', () => {
    const e = formatError(() => read('x,y,z\n1,2,3\n\n4,abc,6\n'));
    expect([e.row, e.particle, e.column]).toEqual([4, 1, 'y']);
    expect(e.message).toBe('snap.csv: line 4 (particle 1), column "y": "abc" is not a number');
  });

  it('a number followed by junk, and two numbers in one cell', () => {
    expect(formatError(() => read('x,y,z\n1,2,3x\n')).column).toBe('z');
    expect(formatError(() => read('x,y,z\n1 2,2,3\n')).column).toBe('x');
    expect(formatError(() => read('x,y,z\n0x10,2,3\n')).message).toMatch(/"0x10" is not a number/);
  });

  it('NaN and Inf cells, in any spelling', () => {
    for (const word of ['NaN', 'nan', 'Inf', '-inf', 'Infinity', '+Infinity']) {
      const e = formatError(() => read(`x,y,z\n1,2,${word}\n`));
      expect([e.row, e.particle, e.column]).toEqual([2, 0, 'z']);
      expect(e.message).toMatch(/not a finite number/);
    }
  });

  it('a number too large for a double', () => {
    const e = formatError(() => read('x,y,z,m\n1,2,3,1e999\n'));
    expect([e.row, e.particle, e.column]).toEqual([2, 0, 'm']);
    expect(e.message).toMatch(/too large/);
  });

  it('an empty cell', () => {
    const e = formatError(() => read('x,y,z\n1,,3\n'));
    expect([e.row, e.particle, e.column]).toEqual([2, 0, 'y']);
    expect(e.message).toMatch(/empty/);
  });

  it('a short row', () => {
    const e = formatError(() => read('x,y,z,m\n1,2,3,1\n4,5\n'));
    expect([e.row, e.particle, e.column]).toEqual([3, 1, 'z']);
    expect(e.message).toMatch(/only 2 cells/);
  });

  it('both m and mass columns, and a duplicated position column', () => {
    expect(formatError(() => read('x,y,z,m,mass\n1,2,3,4,5\n')).message).toMatch(/both/);
    const e = formatError(() => read('x,y,z,x\n1,2,3,4\n'));
    expect(e.column).toBe('x');
    expect(e.message).toMatch(/twice/);
  });

  it('a mapping to a column that does not exist, or one column mapped twice', () => {
    expect(formatError(() => read('1,2,3\n', { positions: [0, 1, 5] })).message).toMatch(/column 5/);
    expect(formatError(() => read('x,y,z\n1,2,3\n', { positions: ['x', 'x', 'z'] })).message).toMatch(/mapped to both/);
  });

  it('a non-integer id', () => {
    const e = formatError(() => read('x,y,z,id\n1,2,3,4.5\n', { ids: 'id' }));
    expect([e.row, e.particle, e.column]).toEqual([2, 0, 'id']);
  });
});

describe('csvReader.sniff(bytes, fileName)', () => {
  it('claims text-named files, comma-separated text under other names, and whitespace-separated numbers', () => {
    expect(csvReader.sniff(bytes('x y z\n'), 'a.CSV')).toBe(true);
    expect(csvReader.sniff(bytes('x y z\n1 2 3\n'), 'a.txt')).toBe(true);
    expect(csvReader.sniff(bytes('# c\nx,y,z\n'), 'snapshot')).toBe(true);
    expect(csvReader.sniff(bytes('1 2 3\n'), 'snapshot')).toBe(true);
    expect(csvReader.sniff(bytes('x y z\n1 2 3\n'), 'snapshot')).toBe(false);
    expect(csvReader.sniff(bytes('hello world\n'), 'notes')).toBe(false);
  });

  it('refuses binary data even under a .csv name', () => {
    expect(csvReader.sniff(new Uint8Array([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 0, 1]), 'a.csv')).toBe(false);
  });
});
