/** snapshotValidate(snapshot, file, box, options): masses, softening lengths, coincident particles, outside count. */
import { describe, expect, it } from 'vitest';
import { csvRead } from '../../../engine/formats/csv';
import { snapshotLoad } from '../../../engine/formats/registry';
import { SnapshotFormatError } from '../../../engine/formats/snapshot';
import { snapshotValidate } from '../../../engine/formats/validate';
import { npyBytes } from './fixtures';

const box = { lx: 1, ly: 1, lz: 1 };
const read = (t: string, m = {}) => csvRead(new TextEncoder().encode(t), 'v.csv', m);

function refusal(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(SnapshotFormatError);
    return (e as Error).message;
  }
  throw new Error('nothing thrown');
}

describe('snapshotValidate', () => {
  it('refuses zero and negative masses, naming line, particle and column', () => {
    expect(refusal(() => snapshotValidate(read('x,y,z,m\n0.1,0.1,0.1,1\n0.2,0.2,0.2,0\n'), 'v.csv', box, { softened: false }))).toBe(
      'v.csv: line 3 (particle 1), column "m": mass 0: massless particles feel forces but exert none; remove them, or give them a mass',
    );
    expect(refusal(() => snapshotValidate(read('x,y,z,m\n0.1,0.1,0.1,-1\n'), 'v.csv', box, { softened: false }))).toMatch(/line 2 \(particle 0\), column "m": mass -1 is negative/);
  });

  it('refuses a negative softening length', () => {
    const s = read('x,y,z,eps\n0.1,0.1,0.1,0.01\n0.2,0.2,0.2,-0.01\n', { softening: 'eps' });
    expect(refusal(() => snapshotValidate(s, 'v.csv', box, { softened: true }))).toMatch(/line 3 \(particle 1\), column "eps": softening length -0.01/);
  });

  it('finds coincident particles without softening (after wrapping), and allows them with softening', () => {
    const s = read('x,y,z\n0.25,0.5,0.75\n0.1,0.1,0.1\n1.25,0.5,-0.25\n');
    expect(refusal(() => snapshotValidate(s, 'v.csv', box, { softened: false }))).toBe(
      'v.csv: line 2 (particle 0) and line 4 (particle 2) sit at the same position (after wrapping into the box); without softening their force is infinite: remove one, or use a softening',
    );
    expect(snapshotValidate(s, 'v.csv', box, { softened: true })).toEqual({ outside: 1, firstOutside: 2 });
  });

  it('counts particles outside the box and names binary places by array and particle', async () => {
    const s = await snapshotLoad(npyBytes([0.5, 0.5, 0.5, 1, 2, 0.5, 1, 1, 0.1, 0.1, 0.1, 0], [3, 4]), 'v.npy');
    expect(refusal(() => snapshotValidate(s, 'v.npy', box, { softened: false }))).toBe(
      'v.npy: the array, column 3, particle 2: mass 0: massless particles feel forces but exert none; remove them, or give them a mass',
    );
  });
});
