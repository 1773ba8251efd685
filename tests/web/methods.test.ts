import { describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldParamsChoose } from '../../engine/ewald/params';
import { methodOptionsKey, methodOptionsParse } from '../../app/web/methods/methodOptions';
import { methodPlan } from '../../app/web/methods/methodPlan';
import { METHODS, isMethodId, paramDefaults, paramsVisible } from '../../app/web/methods/registry';

describe('the method registry', () => {
  test('lists the reference, file, code-under-test, image-sum orders and PME, all ready', () => {
    expect(METHODS.filter((m) => m.ready).map((m) => m.id)).toEqual(['ewald', 'file', 'mesh', 'sphere', 'cube', 'slab', 'screened', 'nearest', 'pme']);
    expect(METHODS.filter((m) => m.kind === 'order').map((m) => m.id)).toEqual(['sphere', 'cube', 'slab', 'screened', 'nearest']);
    expect(isMethodId('sphere')).toBe(true);
    expect(isMethodId('warp')).toBe(false);
  });

  test('shows the softening length only when a softening kernel is chosen', () => {
    const p = paramDefaults();
    expect(paramsVisible('ewald', p).map((s) => s.key)).toEqual(['ewald.tol', 'ewald.softening', 'ewald.all']);
    expect(paramsVisible('ewald', { ...p, 'ewald.softening': 'spline' }).map((s) => s.key)).toEqual(['ewald.tol', 'ewald.softening', 'ewald.eps', 'ewald.all']);
  });
});

describe('methodOptionsParse(method, params, G)', () => {
  const p = paramDefaults();
  test('reads Ewald tolerance and softening, mesh size, and file; keys differ when options differ', () => {
    const e = methodOptionsParse('ewald', { ...p, 'ewald.softening': 'plummer', 'ewald.eps': '0.01' }, 2);
    expect(e).toEqual({ method: 'ewald', options: { tol: 1e-6, G: 2, softening: { kind: 'plummer', eps: 0.01 } } });
    expect(methodOptionsKey(e)).toBe('ewald(tol=0.000001,G=2,soft=plummer:0.01)');
    expect(methodOptionsParse('mesh', p, 1)).toEqual({ method: 'mesh', options: { mesh: 32, G: 1 } });
    expect(methodOptionsKey(methodOptionsParse('ewald', p, 1))).not.toBe(methodOptionsKey(methodOptionsParse('ewald', { ...p, 'ewald.tol': '1e-7' }, 1)));
    expect(methodOptionsParse('file', p, 1)).toEqual({ method: 'file' });
  });

  test.each([
    ['ewald', { 'ewald.tol': '2' }, 'Ewald tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got "2"'],
    ['ewald', { 'ewald.softening': 'spline', 'ewald.eps': '-1' }, 'spline h: expected a positive length, got "-1"'],
    ['mesh', { 'mesh.n': '48' }, 'mesh points per side: expected one of 8, 16, 32, 64, 128, got "48"'],
    ['sphere', { 'sphere.shells': 'many' }, 'shells R: expected a whole number from 1 to 4096, got "many"'],
  ] as const)('rejects %s %o with a message naming the parameter', (method, patch, message) => {
    expect(() => methodOptionsParse(method, { ...p, ...patch }, 1)).toThrow(message);
  });
});

describe('methodPlan(options, …)', () => {
  test('for Ewald shows the parameters ewaldParamsChoose picks and its predicted error', () => {
    const d = demoSnapshot(2000, 1);
    const box = boxMake(1);
    const m = methodOptionsParse('ewald', paramDefaults(), 1);
    const plan = methodPlan(m, d.positions, d.masses, box, 2000);
    const ref = ewaldParamsChoose(d.positions, d.masses, box, { tol: 1e-6, G: 1, softening: { kind: 'none' } }, 2000);
    expect(plan.lines.find((l) => l.key === 'alpha')!.value).toBe(ref.alpha);
    expect(plan.predictedRelative).toBe(ref.predictedRelativeError);
    expect(plan.costNs).toBeGreaterThan(0);
  });

  test('costs grow with the work: more targets, finer mesh', () => {
    const d = demoSnapshot(2000, 1);
    const box = boxMake(1);
    const e = methodOptionsParse('ewald', paramDefaults(), 1);
    expect(methodPlan(e, d.positions, d.masses, box, 2000).costNs).toBeGreaterThan(methodPlan(e, d.positions, d.masses, box, 100).costNs);
    const m32 = methodOptionsParse('mesh', paramDefaults(), 1), m64 = methodOptionsParse('mesh', { 'mesh.n': '64' }, 1);
    expect(methodPlan(m64, d.positions, d.masses, box, 2000).costNs).toBeGreaterThan(methodPlan(m32, d.positions, d.masses, box, 2000).costNs);
    expect(methodPlan(methodOptionsParse('file', {}, 1), d.positions, d.masses, box, 2000).costNs).toBe(0);
  });
});
