/**
 * The browser's parallel particle-mesh Ewald (app/web/worker/pmeParallel.ts) without a browser: its
 * helpers are in-process fakes that run the real helper handler (pmeHelperHandle.ts) over the same
 * SharedArrayBuffers. A fake that answers at once takes every unit of every phase before this thread
 * looks (so the helper's pinned setup, shared sums and collected real-space sums make the result); one
 * that answers later takes none (this thread does all). Either must equal one-thread pmeForces up to
 * rounding (the same terms summed in other groupings; 1e-12 relative as the CLI's own check,
 * tests/cli/pme.test.ts; common practice, no source). Also: the thread count, the threads parameter and
 * the run's words.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { type PmeResult, pmeForces } from '../../engine/pme/pme';
import { moreOptionsKey, moreOptionsLabel, pmeLabelThreads, pmeOptionsParse } from '../../app/web/methods/moreOptions';
import { paramDefaults } from '../../app/web/methods/registry';
import { type PmeHelperSpawn, pmeForcesParallel, pmeThreadsChoose } from '../../app/web/worker/pmeParallel';
import { type PmeHelperReply, type PmeHelperRequest, pmeHelperHandler } from '../../app/web/worker/pmeHelperHandle';

const box = boxMake(1);
const OPTIONS = { tol: 1e-5, G: 1 };

interface FakeLog {
  requests: PmeHelperRequest['type'][];
  terminated: number;
}

/** Fakes running the real handler; `later` answers each request on a timer instead of at once. */
function fakeSpawn(log: FakeLog, how: 'now' | 'later' | 'failToLoad' | 'failOnPhases'): PmeHelperSpawn {
  return (onReply, onFail) => {
    let handle: ((m: PmeHelperRequest) => void) | null = null;
    handle = pmeHelperHandler((r: PmeHelperReply) => onReply(r));
    if (how === 'failToLoad') setTimeout(() => onFail('module script failed to load'), 0);
    return {
      post(msg) {
        log.requests.push(msg.type);
        if (how === 'failToLoad') return;
        if (how === 'failOnPhases' && msg.type === 'phases') {
          setTimeout(() => onReply({ type: 'error', message: 'out of memory (simulated)' }), 0);
          return;
        }
        if (how === 'later') setTimeout(() => handle!(msg), 0);
        else handle!(msg);
      },
      terminate() {
        log.terminated++;
        handle = null;
      },
    };
  };
}

function worstRelative(a: Float64Array, b: Float64Array): number {
  let worst = 0;
  for (let i = 0; i < b.length / 3; i++) {
    const d = Math.hypot(a[3 * i] - b[3 * i], a[3 * i + 1] - b[3 * i + 1], a[3 * i + 2] - b[3 * i + 2]);
    worst = Math.max(worst, d / Math.hypot(b[3 * i], b[3 * i + 1], b[3 * i + 2]));
  }
  return worst;
}

describe('parallel PME in the compute worker (fake helpers, real handler)', () => {
  const snap = demoSnapshot(12000, 6);
  let one: PmeResult;
  beforeAll(() => {
    one = pmeForces(snap.positions, snap.masses, box, OPTIONS);
  });

  it('a helper that answers at once does all the work: same forces and potentials as one thread (1e-12)', async () => {
    const log: FakeLog = { requests: [], terminated: 0 };
    const fractions: number[] = [];
    const r = await pmeForcesParallel(snap.positions, snap.masses, box, OPTIONS, 2, (f) => fractions.push(f), fakeSpawn(log, 'now'));
    expect(r.threadsUsed).toBe(2);
    expect(r.params).toEqual(one.params);
    expect(worstRelative(r.acc, one.acc)).toBeLessThan(1e-12);
    let phiScale = 0;
    for (const v of one.phi) phiScale = Math.max(phiScale, Math.abs(v));
    for (let i = 0; i < one.phi.length; i++) expect(Math.abs(r.phi[i] - one.phi[i])).toBeLessThan(1e-12 * phiScale);
    // setup, six phase stages, collect; terminated after the run
    expect(log.requests).toEqual(['setup', 'phases', 'phases', 'phases', 'phases', 'phases', 'phases', 'collect']);
    expect(log.terminated).toBe(1);
    // progress per stage, never backwards, ending at 1
    expect(fractions.length).toBeGreaterThanOrEqual(7);
    for (let k = 1; k < fractions.length; k++) expect(fractions[k]).toBeGreaterThanOrEqual(fractions[k - 1]);
    expect(fractions.at(-1)).toBe(1);
  });

  it('a stop flag set (Cancel) makes every thread skip its units and the run fail, helpers terminated', async () => {
    const log: FakeLog = { requests: [], terminated: 0 };
    const stop = new SharedArrayBuffer(4);
    new Int32Array(stop)[0] = 1;
    await expect(pmeForcesParallel(snap.positions, snap.masses, box, OPTIONS, 2, undefined, fakeSpawn(log, 'now'), stop)).rejects.toThrow(/stopped/);
    expect(log.requests).not.toContain('collect');
    expect(log.terminated).toBe(1);
  });

  it('helpers that answer later leave the work here: same result; three threads likewise', async () => {
    const log: FakeLog = { requests: [], terminated: 0 };
    const r = await pmeForcesParallel(snap.positions, snap.masses, box, OPTIONS, 3, undefined, fakeSpawn(log, 'later'));
    expect(r.threadsUsed).toBe(3);
    expect(worstRelative(r.acc, one.acc)).toBeLessThan(1e-12);
    expect(log.terminated).toBe(2);
  });

  it('a helper that cannot load is left out (it took no work); one that fails during a phase fails the run, helpers terminated', async () => {
    const log: FakeLog = { requests: [], terminated: 0 };
    const r = await pmeForcesParallel(snap.positions, snap.masses, box, OPTIONS, 2, undefined, fakeSpawn(log, 'failToLoad'));
    expect(r.threadsUsed).toBe(1);
    expect(worstRelative(r.acc, one.acc)).toBeLessThan(1e-12);
    expect(log.requests).toEqual(['setup']);
    const bad: FakeLog = { requests: [], terminated: 0 };
    await expect(pmeForcesParallel(snap.positions, snap.masses, box, OPTIONS, 2, undefined, fakeSpawn(bad, 'failOnPhases'))).rejects.toThrow('PME helper: out of memory (simulated)');
    expect(bad.terminated).toBe(1);
  });

  it('a handful of particles (mesh too thin to split the spreading) on 3 threads: same result', async () => {
    const tiny = demoSnapshot(40, 2);
    const ref = pmeForces(tiny.positions, tiny.masses, box, OPTIONS);
    const log: FakeLog = { requests: [], terminated: 0 };
    const r = await pmeForcesParallel(tiny.positions, tiny.masses, box, OPTIONS, 3, undefined, fakeSpawn(log, 'now'));
    expect(r.threadsUsed).toBe(3);
    expect(worstRelative(r.acc, ref.acc)).toBeLessThan(1e-12);
  });

  it('one thread is pmeForces itself (no helper started)', async () => {
    const spawn: PmeHelperSpawn = () => {
      throw new Error('no helper expected');
    };
    const r = await pmeForcesParallel(snap.positions, snap.masses, box, OPTIONS, 1, undefined, spawn);
    expect(r.threadsUsed).toBe(1);
    expect(Array.from(r.acc)).toEqual(Array.from(one.acc));
  });
});

describe('thread count', () => {
  const iso = (hw: number | undefined) => ({ hardwareConcurrency: hw, isolated: true });
  it('without cross-origin isolation: one thread, whatever was asked', () => {
    expect(pmeThreadsChoose(4, 1e6, { hardwareConcurrency: 8, isolated: false })).toBe(1);
    expect(pmeThreadsChoose(undefined, 1e6, { hardwareConcurrency: 8, isolated: false })).toBe(1);
  });
  it('auto: min(cores, 4) from 8192 particles on, else one; an asked count is kept', () => {
    expect(pmeThreadsChoose(undefined, 1e5, iso(2))).toBe(2);
    expect(pmeThreadsChoose(undefined, 1e5, iso(16))).toBe(4);
    expect(pmeThreadsChoose(undefined, 1e5, iso(undefined))).toBe(1);
    expect(pmeThreadsChoose(undefined, 8191, iso(16))).toBe(1);
    expect(pmeThreadsChoose(undefined, 8192, iso(16))).toBe(4);
    expect(pmeThreadsChoose(2, 100, iso(1))).toBe(2);
    expect(() => pmeThreadsChoose(0, 100, iso(2))).toThrow('PME threads');
  });
});

describe('the threads parameter', () => {
  const params = (threads: string) => ({ ...paramDefaults(), 'pme.threads': threads });
  it('auto by default (no count, key and words as before); a count changes key and words', () => {
    const auto = pmeOptionsParse(paramDefaults(), 1);
    expect(auto.threads).toBeUndefined();
    expect(moreOptionsKey(auto)).not.toContain('threads');
    expect(moreOptionsLabel(auto, String)).toBe('PME tol 0.000001');
    const two = pmeOptionsParse(params('2'), 1);
    expect(two.threads).toBe(2);
    expect(moreOptionsKey(two)).not.toBe(moreOptionsKey(pmeOptionsParse(params('1'), 1)));
    expect(moreOptionsLabel(two, String)).toBe('PME tol 0.000001, threads 2');
  });
  it('bad counts are refused with one line naming the parameter', () => {
    expect(() => pmeOptionsParse(params('0'), 1)).toThrow(/^threads: expected a whole number from 1 to 64, got "0"$/);
    expect(() => pmeOptionsParse(params('two'), 1)).toThrow('threads: expected a whole number');
  });
  it('a finished run says the threads that computed', () => {
    expect(pmeLabelThreads('PME tol 1e-6', 1)).toBe('PME tol 1e-6');
    expect(pmeLabelThreads('PME tol 1e-6', 2)).toBe('PME tol 1e-6, threads 2');
    expect(pmeLabelThreads('PME tol 1e-6, mesh 64³, threads 2', 1)).toBe('PME tol 1e-6, mesh 64³, threads 1');
    expect(pmeLabelThreads('PME tol 1e-6, threads 1', 1)).toBe('PME tol 1e-6, threads 1');
  });
});
