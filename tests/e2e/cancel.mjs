// A long computation can be cancelled; the page keeps its data and answers input while computing (the
// long main-thread tasks seen meanwhile are logged, not asserted: speed belongs to benchmarks).
import { check, checkNoBadNumbers, longTasksByPhase, openFresh, pageNow, stat, waitStatus, waitViewCloud } from './_helpers.mjs';

export const tests = {
  'cancel stops a long run, keeps the snapshot and the earlier comparison; a new run replaces a running one': async (page, baseUrl, { screenshot, log }) => {
    // N = 65536, all targets by direct Ewald (not the faster PME the page would pick): ~15 s on one core
    await openFresh(page, baseUrl, 'n=65536&targets=all&a=mesh&b=ewald&b.ewald.all=direct');
    await waitStatus(page, 'computing', 10_000);
    // measure from after the new snapshot's first frame: with WebGL rendered in software, the frame that
    // first draws a new cloud waits for the GPU process (which competes with the worker for the CPU)
    await waitViewCloud(page);
    await page.waitForTimeout(500);
    const t0 = await pageNow(page);
    check((await stat(page, 'snapshot', 'n')).value === '65536', 'N = 65536 from the URL not shown');
    await page.waitForTimeout(1500);
    await screenshot('computing');
    check(!(await page.isDisabled('[data-testid=cancel]')), 'cancel is disabled while computing');
    // the page answers input while the worker computes
    await page.fill('input[name=targets]', '512');
    check((await page.inputValue('input[name=targets]')) === '512', 'typing did not reach the form while computing');
    check((await page.textContent('[data-testid=status]')) === 'computing', 'the computation stopped when the form changed');
    await page.waitForTimeout(800);
    const longs = await longTasksByPhase(page, t0);
    log(`long main-thread tasks while computing (after the first frame of the new cloud): ${longs.computing.join(', ') || 'none'} ms`);
    await page.click('[data-testid=cancel]');
    await waitStatus(page, 'cancelled', 5_000);
    check((await stat(page, 'snapshot', 'n')).value === '65536', 'the snapshot was lost on cancel');
    check((await page.textContent('[data-testid=status-message]')).includes('kept'), 'cancel message missing');
    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'statistics');
    await screenshot('cancelled');

    // start the long run again, then a short one (512 targets) while it runs: the second replaces the first
    await page.fill('input[name=targets]', 'all');
    await page.click('[data-testid=compute]');
    await waitStatus(page, 'computing', 5_000);
    await page.waitForTimeout(400);
    // each compute worker holds a Web Lock named for it while it lives (worker/liveness.ts)
    const computeLocks = () => page.evaluate(async () => (await navigator.locks.query()).held.map((l) => l.name).filter((n) => n.startsWith('torusgrav-compute-')));
    // a terminated worker's lock is released asynchronously (after its nested PME helpers stop, more
    // slowly on a loaded machine): poll from here until one holder is left (waitForFunction would take
    // an async predicate's Promise for a true value and return at once)
    const locksUntil = async (ok, ms) => {
      const end = Date.now() + ms;
      let held = await computeLocks();
      while (!ok(held) && Date.now() < end) {
        await page.waitForTimeout(100);
        held = await computeLocks();
      }
      return held;
    };
    await locksUntil((held) => held.length === 1, 10_000);
    const first = await computeLocks();
    check(first.length === 1, `expected one live compute worker, found ${JSON.stringify(first)}`);
    await page.fill('input[name=targets]', '512');
    await page.click('[data-testid=compute]');
    await waitStatus(page, 'done', 20_000);
    check(Number((await stat(page, 'stats', 'targets')).value) === 512, 'the short computation did not use 512 targets');
    // the first run's worker was terminated (its lock released), not left computing beside the second
    const after = await locksUntil((held) => !held.includes(first[0]), 10_000);
    check(after.length === 1 && after[0] !== first[0], `the first run's worker still lives: ${JSON.stringify(after)}`);
  },
};
