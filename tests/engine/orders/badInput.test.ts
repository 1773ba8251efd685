import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { EngineInputError } from '../../../engine/ewald/ewald';
import { type ImageSumOptions, imageSumOrder, imageSumSetup } from '../../../engine/orders/index';

const box = boxMake(1);
const pos = new Float64Array([0.1, 0.2, 0.3, 0.6, 0.5, 0.4]);
const mass = new Float64Array([1, 2]);
const run = (o: unknown, p = pos, m = mass, b = box) => () => imageSumSetup(p, m, b, o as ImageSumOptions);

describe('imageSumSetup rejects bad options with one clear line naming the option', () => {
  const cases: [string, unknown, RegExp][] = [
    ['an unknown order', { order: 'spiral' }, /^order must be one of sphere, cube, slab-x, slab-y, slab-z, screened, nearest; got "spiral"$/],
    ['a missing order', {}, /^order must be one of .*; got undefined$/],
    ['shells 0', { order: 'sphere', shells: 0 }, /^shells must be an integer in \[1, 4096\], got 0$/],
    ['shells 4097', { order: 'cube', shells: 4097 }, /^shells must be an integer in \[1, 4096\], got 4097$/],
    ['shells 2.5', { order: 'slab-z', shells: 2.5 }, /^shells must be an integer in \[1, 4096\], got 2.5$/],
    ['shells NaN', { order: 'sphere', shells: NaN }, /^shells must be an integer/],
    ['shells for screened', { order: 'screened', shells: 5 }, /^shells does not apply to order "screened" \(it uses lambdas\)$/],
    ['shells for nearest', { order: 'nearest', shells: 5 }, /^shells does not apply to order "nearest"/],
    ['λ = 0', { order: 'screened', lambdas: [1, 0] }, /^lambdas\[1\] must be a positive finite screening parameter \(1\/length\), got 0$/],
    ['λ < 0', { order: 'screened', lambdas: [-1, 2] }, /^lambdas\[0\] must be a positive/],
    ['λ = NaN', { order: 'screened', lambdas: [1, NaN] }, /^lambdas\[1\] must be a positive/],
    ['a single λ', { order: 'screened', lambdas: [1] }, /^lambdas must hold at least 2 values to extrapolate to λ → 0, got 1$/],
    ['a repeated λ', { order: 'screened', lambdas: [1, 0.5, 1] }, /^lambdas\[2\] repeats lambdas\[0\] = 1/],
    ['lambdas for sphere', { order: 'sphere', lambdas: [1, 2] }, /^lambdas applies to order "screened" only, not "sphere"$/],
    ['tol 0', { order: 'sphere', tol: 0 }, /^tol must lie in \[1e-14, 1e-2\], got 0$/],
    ['tol 0.5', { order: 'sphere', tol: 0.5 }, /^tol must lie/],
    ['G < 0', { order: 'sphere', G: -1 }, /^G must be a positive finite number, got -1$/],
    ['background "yes"', { order: 'sphere', background: 'yes' }, /^background must be true or false, got yes$/],
    ['maxWork 0', { order: 'sphere', maxWork: 0 }, /^maxWork must be a positive number/],
    ['a misspelt option', { order: 'sphere', shell: 3 }, /^unknown option "shell" \(known: /],
  ];
  for (const [what, o, msg] of cases) {
    it(`${what}`, () => {
      expect(run(o)).toThrowError(RangeError);
      expect(run(o)).toThrowError(msg);
    });
  }
});

describe('imageSumSetup refuses absurd work before computing anything', () => {
  it('sphere R = 4096 for 4096 particles: says about how long it would take and how to raise the limit', () => {
    const n = 4096;
    const p = Float64Array.from({ length: 3 * n }, (_, k) => ((k * 0.6180339887) % 1));
    const m = new Float64Array(n).fill(1);
    const f = () => imageSumSetup(p, m, box, { order: 'sphere', shells: 4096 }, 64);
    expect(f).toThrowError(RangeError);
    expect(f).toThrowError(/^order "sphere" with shells 4096, 64 targets and 4096 particles needs about [0-9.e+]+ pair terms \(~[0-9.]+ (min|h|days) on one core\), above maxWork 2\.0e\+10 \(~[0-9.]+ (s|min)\); use fewer shells or targets, or raise maxWork$/);
  });

  it('the same run with maxWork raised is accepted by the check (cheap case: shells 20 under a tiny limit fails, under the default passes)', () => {
    expect(() => imageSumSetup(pos, mass, box, { order: 'cube', shells: 20, maxWork: 10 })).toThrowError(/raise maxWork/);
    expect(() => imageSumSetup(pos, mass, box, { order: 'cube', shells: 20 })).not.toThrow();
  });
});

describe('imageSumSetup and imageSumOrder reject bad data', () => {
  it('no particles', () => {
    expect(run({ order: 'sphere' }, new Float64Array(0), new Float64Array(0))).toThrowError(/^no particles/);
  });
  it('positions of the wrong length', () => {
    expect(run({ order: 'sphere' }, new Float64Array(5), mass)).toThrowError(/^positions hold 5 numbers but 2 masses need 6$/);
  });
  it('a NaN coordinate names the particle and axis', () => {
    const p = Float64Array.from(pos);
    p[4] = NaN;
    expect(run({ order: 'cube' }, p)).toThrowError(/^coordinate y of particle 1 is not finite \(NaN\)$/);
  });
  it('an infinite mass', () => {
    expect(run({ order: 'nearest' }, pos, new Float64Array([1, Infinity]))).toThrowError(/^mass of particle 1 is not finite/);
  });
  it('coincident particles (after wrapping) name both rows', () => {
    const p = new Float64Array([0.25, 0.5, 0.75, 1.25, 0.5, -0.25]);
    expect(run({ order: 'sphere' }, p)).toThrowError(EngineInputError);
    expect(run({ order: 'sphere' }, p)).toThrowError(/^particles 0 and 1 sit at the same position/);
  });
  it('a box side that is not positive', () => {
    expect(run({ order: 'sphere' }, pos, mass, { lx: 1, ly: 0, lz: 1 })).toThrowError(/^box side Ly must be a positive finite number, got 0$/);
  });
  it('a target outside the particles', () => {
    expect(() => imageSumOrder(pos, mass, box, Int32Array.from([0, 2]), { order: 'nearest' })).toThrowError(/^target 1 is row 2, outside the 2 particles$/);
  });
});
