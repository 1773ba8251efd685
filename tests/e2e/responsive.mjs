// Responsiveness with 10⁶ particles: a 10⁶-particle .npy is loaded, planned, compared (on a sample) and
// shown, then the 3D view is turned by dragging. The longest main-thread task of each phase is logged with
// the machine's load average (speed belongs to benchmarks); only a clear regression is asserted: no task
// of a second or more (before the cloud was built in slices, uploaded in pieces and the snapshot kept off
// the page's long tasks, single tasks of 0.8–1.7 s were measured here).
import { loadavg } from 'node:os';
import { join } from 'node:path';
import { check, openFresh, pageNow, stat, waitStatus } from './_helpers.mjs';
import { forgetMappings, waitMapping } from './_loadHelpers.mjs';

const loadAverage = () => loadavg().map((x) => x.toFixed(1)).join(' ');

/** A regression bound, far above the ~100 ms goal: a loaded 2-core machine stretches tasks by itself. */
const REGRESSION_MS = 1000;

const TEST = 'a 10⁶-particle file stays responsive from loading to the drawn comparison and while the view turns (longest tasks logged)';

export const timeouts = { [TEST]: 170_000 };

/** Long tasks (start, duration) that started at or after `from` and before `to` (page clock). */
function tasksBetween(page, from, to = Infinity) {
  return page.evaluate(([a, b]) => (window.__longTasks ?? []).filter((e) => e.start >= a && e.start < b).map((e) => Math.round(e.duration)), [from, to]);
}

const describe = (d) => (d.length ? `longest ${Math.max(...d)} ms of ${d.length} (${d.sort((x, y) => y - x).slice(0, 6).join(', ')})` : 'none');

export const tests = {
  [TEST]: async (page, baseUrl, { fixtures, log, screenshot }) => {
    // Ewald at 1e-4 keeps the sampled reference short on 10⁶ particles
    await openFresh(page, baseUrl, 'b.ewald.tol=1e-4');
    await forgetMappings(page);
    await waitStatus(page, 'done', 30_000);
    log(`load average before: ${loadAverage()}`);
    const idle0 = await pageNow(page);
    await page.waitForTimeout(2000);
    log(`idle page over 2 s: ${describe(await tasksBetween(page, idle0))}`);

    // 1. load: the file is described, mapped (box typed) and read in the worker
    const t0 = await pageNow(page);
    await page.setInputFiles('[data-testid=file-input]', join(fixtures, 'million.npy'));
    await waitMapping(page, 30_000);
    await page.selectOption('[data-testid=map-box-mode]', 'typed');
    await page.fill('[data-testid=map-box-text]', '1');
    const t1 = await pageNow(page);
    await page.click('[data-testid=map-confirm]');
    await page.waitForFunction(() => document.querySelector('[data-testid=snapshot] [data-key=n]')?.getAttribute('data-value') === '1000000', null, { timeout: 60_000 });
    const t2 = await pageNow(page);

    // 2. plan, compute and show: until the 3D view has drawn the comparison of the new snapshot
    await waitStatus(page, 'done', 120_000);
    await page.waitForFunction(() => document.querySelector('[data-testid=viewport-3d]')?.getAttribute('data-cloud')?.includes('million.npy') && document.querySelector('[data-testid=viewport-3d]')?.getAttribute('data-cloud')?.startsWith('comparison'), null, { timeout: 60_000 });
    await page.waitForTimeout(1500);
    const t3 = await pageNow(page);
    check((await stat(page, 'snapshot', 'n')).value === '1000000', 'N is not 10⁶');
    const points = Number(await page.getAttribute('[data-testid=viewport-3d]', 'data-points'));
    check(points > 0, 'the 3D view draws no points');

    // 3. orbit: drag across the view for about two seconds, counting frames meanwhile
    const box = await page.locator('[data-testid=viewport-3d] canvas').boundingBox();
    check(box && box.width > 100, 'no 3D canvas');
    await page.evaluate(() => {
      window.__frames = 0;
      const tick = () => {
        window.__frames++;
        window.__frameLoop = requestAnimationFrame(tick);
      };
      window.__frameLoop = requestAnimationFrame(tick);
    });
    const tOrbit = await pageNow(page);
    const cx = box.x + box.width / 2, cy = box.y + box.height / 2;
    await page.mouse.move(cx, cy);
    await page.mouse.down();
    for (let k = 1; k <= 40; k++) {
      await page.mouse.move(cx + 150 * Math.sin(k / 6), cy + 40 * Math.sin(k / 9));
      await page.waitForTimeout(40);
    }
    await page.mouse.up();
    const t4 = await pageNow(page);
    const frames = await page.evaluate(() => {
      cancelAnimationFrame(window.__frameLoop);
      return window.__frames;
    });
    await page.waitForTimeout(1000);

    const phases = {
      'describe and map': await tasksBetween(page, t0, t1),
      'read in the worker': await tasksBetween(page, t1, t2),
      'plan, compute, draw': await tasksBetween(page, t2, t3),
      orbit: await tasksBetween(page, tOrbit, t4),
      'after orbit (1 s)': await tasksBetween(page, t4),
    };
    for (const [name, d] of Object.entries(phases)) log(`10⁶ file, ${name}: long main-thread tasks ${describe([...d])}`);
    const all = Object.values(phases).flat();
    const longest = all.length ? Math.max(...all) : 0;
    log(`10⁶ file: longest main-thread task from loading to orbiting ${longest} ms; ${frames} animation frames in ${Math.round(t4 - tOrbit)} ms of orbiting; ${points} points drawn; load average ${loadAverage()}`);
    await screenshot('million');
    check(longest < REGRESSION_MS, `a main-thread task of ${longest} ms (regression bound ${REGRESSION_MS} ms)`);
  },
};
