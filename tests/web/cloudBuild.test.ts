import { describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { drawOrderSliced, forSliced, slicer, worldPositionsSliced } from '../../app/web/view3d/cloudBuild';
import { shuffleStart, shuffleSteps, worldPositions } from '../../app/web/view3d/geometry';

describe('shuffleStart / shuffleSteps (a prefix of a seeded random order, made in steps)', () => {
  test('m distinct rows, the same whatever the step size, and not the identity', () => {
    const whole = shuffleStart(1000, 300, 5);
    expect(shuffleSteps(whole, 1e9)).toBe(true);
    const stepped = shuffleStart(1000, 300, 5);
    let calls = 0;
    while (!shuffleSteps(stepped, 7)) calls++;
    expect(calls).toBe(Math.ceil(300 / 7) - 1);
    const a = Array.from(whole.p.subarray(0, 300));
    expect(Array.from(stepped.p.subarray(0, 300))).toEqual(a);
    expect(new Set(a).size).toBe(300);
    expect(a.every((r) => r >= 0 && r < 1000)).toBe(true);
    expect(a.slice(0, 10)).not.toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    // the whole array stays a permutation
    expect([...whole.p].sort((x, y) => x - y)).toEqual(Array.from({ length: 1000 }, (_, i) => i));
  });

  test('m = n gives a permutation; another seed another order', () => {
    const s = shuffleStart(500, 500, 1);
    shuffleSteps(s, 1e9);
    expect([...s.p].sort((x, y) => x - y)).toEqual(Array.from({ length: 500 }, (_, i) => i));
    const t = shuffleStart(500, 500, 2);
    shuffleSteps(t, 1e9);
    expect(Array.from(t.p)).not.toEqual(Array.from(s.p));
  });
});

describe('sliced cloud building (cloudBuild.ts)', () => {
  test('yields between slices and gives the same numbers as the one-go functions', async () => {
    const n = 70_000;
    const pos = new Float64Array(3 * n);
    for (let i = 0; i < pos.length; i++) pos[i] = ((i * 0.6180339887) % 1) * 2 - 0.25; // some outside the box
    const box = boxMake(1.5);
    let yields = 0;
    // a zero budget: every tick yields
    const { tick } = slicer(() => {
      yields++;
      return true;
    }, 0);
    const order = await drawOrderSliced(n, 50_000, tick, 9);
    expect(order).not.toBeNull();
    const ref = shuffleStart(n, 50_000, 9);
    shuffleSteps(ref, 1e9);
    expect(Array.from(order!)).toEqual(Array.from(ref.p.subarray(0, 50_000)));
    const out = new Float32Array(3 * 50_000);
    expect(await worldPositionsSliced(out, pos, box, null, order!, 50_000, tick)).toBe(true);
    // (worldPositions fills as many slots as there are particles; the first 50 000 follow the order)
    expect(Array.from(out)).toEqual(Array.from(worldPositions(pos, box, null, order!).subarray(0, 3 * 50_000)));
    expect(yields).toBeGreaterThan(4);
  });

  test('a superseded build stops and says so', async () => {
    let alive = true;
    const { tick } = slicer(() => alive, 0);
    let done = 0;
    const p = forSliced(100_000, (b, e) => {
      done += e - b;
      alive = false;
    }, tick);
    await expect(p).resolves.toBe(false);
    expect(done).toBeLessThan(100_000);
    await expect(drawOrderSliced(100_000, 100_000, tick)).resolves.toBeNull();
  });
});
