// Reliability: a compute worker that dies (killed from outside, an uncaught error, closing itself) is
// reported and restarted, and the page keeps its snapshot and finished results; the app works offline
// after the first visit (our service worker) and stays cross-origin isolated; a 10⁶-particle demo is
// planned and computed off the page's thread (its long main-thread tasks are logged, not asserted).
import { check, checkNoBadNumbers, longTasksByPhase, openFresh, pageNow, stat, statsNumber, waitComparison, waitStatus } from './_helpers.mjs';

/** Sets slot B's Ewald tolerance and presses Compute. */
async function computeWithTol(page, tol) {
  await page.fill('input[name="b.ewald.tol"]', tol);
  await page.click('[data-testid=compute]');
}

/** Waits for the status line to say the worker stopped; returns that message. */
async function waitStopped(page, timeout = 15_000) {
  await waitStatus(page, 'error', timeout);
  const msg = await page.textContent('[data-testid=status-message]');
  check(/the computing worker stopped: .+; restarted/.test(msg), `crash message not shown: "${msg}"`);
  return msg;
}

/** The page still holds the demo snapshot and the comparison finished before the crash. */
async function checkKept(page, line) {
  check((await stat(page, 'snapshot', 'n')).value === '4096', 'the snapshot was lost');
  check((await page.textContent('[data-testid=stats] .compare-line')) === line, 'the finished comparison was lost');
  checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'statistics');
}

const MILLION = '10⁶-particle demo: planned in the plan worker and computed without long main-thread tasks (logged)';

export const timeouts = { [MILLION]: 150_000 };

export const tests = {
  'a compute worker killed mid-run, throwing or closing itself is reported and restarted; data are kept and the next Compute works': async (page, baseUrl, { log, screenshot }) => {
    await openFresh(page, baseUrl, 'testhooks');
    await waitStatus(page, 'done', 30_000);
    const line = await page.textContent('[data-testid=stats] .compare-line');
    check(await page.evaluate(() => typeof window.__torusgravTest?.workerCrash === 'function'), 'the test hook is missing with ?testhooks');

    // 1. killed from outside while the Ewald sum runs (as when the browser kills it for memory)
    await computeWithTol(page, '1e-11');
    await page.waitForFunction(() => document.querySelector('[data-testid=status-message]')?.textContent?.includes('Ewald tol 1e-11'), null, { timeout: 15_000 });
    check(await page.evaluate(() => window.__torusgravTest.workerCrash('terminate')), 'no worker to kill');
    const killedAt = Date.now();
    log(`killed: ${await waitStopped(page)} (noticed after ${Date.now() - killedAt} ms)`);
    await checkKept(page, line);
    await screenshot('killed');
    // the next Compute works (a fresh worker)
    await computeWithTol(page, '1e-5');
    await waitComparison(page, 'mesh 32³', 'Ewald tol 1e-5', 30_000);
    const line2 = await page.textContent('[data-testid=stats] .compare-line');
    check((await statsNumber(page, 'targets')) === 4096, 'targets after the restart');

    // 2. an uncaught error in the worker's message handler
    check(await page.evaluate(() => window.__torusgravTest.workerCrash('throw')), 'no worker to arm');
    await computeWithTol(page, '1e-4');
    const thrown = await waitStopped(page);
    check(thrown.includes('test hook: an uncaught error'), `the worker's error is not quoted: ${thrown}`);
    await checkKept(page, line2);
    await computeWithTol(page, '1e-4');
    await waitComparison(page, 'mesh 32³', 'Ewald tol 1e-4', 30_000);

    // 3. a worker that closes itself without a word (noticed through its liveness lock)
    check(await page.evaluate(() => window.__torusgravTest.workerCrash('close')), 'no worker to arm');
    await computeWithTol(page, '1e-7');
    const closed = await waitStopped(page);
    check(closed.includes('ended without an error message'), `a silent end is not described: ${closed}`);
    const line3 = await page.textContent('[data-testid=stats] .compare-line');
    check(line3.includes('Ewald tol 1e-4'), `the last comparison was lost: ${line3}`);
    await computeWithTol(page, '1e-7');
    await waitComparison(page, 'mesh 32³', 'Ewald tol 1e-7', 30_000);
    await screenshot('recovered');
  },

  'without ?testhooks the page has no test hook': async (page, baseUrl) => {
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    check(await page.evaluate(() => window.__torusgravTest === undefined), 'the test hook exists without the flag');
  },

  'after the first visit the app works offline, served by its service worker, and stays cross-origin isolated': async (page, baseUrl, { context, server, log, screenshot }) => {
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    // the service worker has cached every built file and controls the page
    const sw = await page.evaluate(async () => {
      const reg = await navigator.serviceWorker.ready;
      for (let i = 0; i < 100 && !navigator.serviceWorker.controller; i++) await new Promise((r) => setTimeout(r, 100));
      const keys = await caches.keys();
      const cache = await caches.open(keys.find((k) => k.startsWith('torusgrav-')));
      const urls = (await cache.keys()).map((r) => new URL(r.url).pathname);
      return { active: reg.active?.state, controlled: !!navigator.serviceWorker.controller, keys, urls };
    });
    log(`service worker ${sw.active}, controlling: ${sw.controlled}, cache ${sw.keys.join(', ')} with ${sw.urls.length} files`);
    check(sw.active === 'activated' && sw.controlled, `service worker not in control: ${JSON.stringify(sw)}`);
    check(sw.urls.includes('/') && sw.urls.some((u) => /compute\.worker.*\.js$/.test(u)) && sw.urls.some((u) => /plan\.worker.*\.js$/.test(u)), `worker bundles not cached: ${sw.urls.join(' ')}`);
    check(sw.urls.some((u) => /h5wasm|hdf5/i.test(u)), `the HDF5 reader's chunk is not cached: ${sw.urls.join(' ')}`);
    check(await page.evaluate(() => crossOriginIsolated), 'not cross-origin isolated on the first visit');

    // offline: the server is gone and the browser context has no network
    await server.stop();
    await context.setOffline(true);
    const t0 = Date.now();
    await page.reload();
    await waitStatus(page, 'done', 30_000);
    log(`offline reload: demo comparison on screen after ${Date.now() - t0} ms`);
    check((await page.textContent('[data-testid=stats] .compare-line')).includes('Ewald'), 'no comparison offline');
    check((await stat(page, 'snapshot', 'n')).value === '4096', 'demo snapshot not shown offline');
    const iso = await page.evaluate(() => ({ isolated: crossOriginIsolated, sab: typeof SharedArrayBuffer === 'function', controlled: !!navigator.serviceWorker.controller }));
    check(iso.controlled, 'the offline page is not served by the service worker');
    check(iso.isolated && iso.sab, `cross-origin isolation lost when served from the cache: ${JSON.stringify(iso)}`);
    await screenshot('offline');
    await context.setOffline(false);
    await server.start();
  },

  [MILLION]: async (page, baseUrl, { log, screenshot }) => {
    const wall = Date.now();
    // Ewald at 1e-4 (fewer k-vectors than the default 1e-6) keeps the run near half a minute here
    await openFresh(page, baseUrl, 'n=1000000&b.ewald.tol=1e-4');
    await page.waitForFunction(() => document.querySelector('[data-testid=status]')?.textContent === 'computing', null, { timeout: 15_000 });
    const t0 = await pageNow(page);
    await waitStatus(page, 'done', 140_000);
    log(`10⁶ demo: comparison on screen ${Date.now() - wall} ms after navigation`);
    const longs = await longTasksByPhase(page, t0);
    check((await stat(page, 'snapshot', 'n')).value === '1000000', 'N is not 10⁶');
    const k = await statsNumber(page, 'targets');
    log(`10⁶ demo: targets ${k}; long main-thread tasks while planning/computing: ${longs.computing.join(', ') || 'none'} ms; at other times (first load, drawing): ${longs.other.join(', ') || 'none'} ms`);
    await page.waitForTimeout(1500);
    const after = await longTasksByPhase(page, t0);
    log(`10⁶ demo: long tasks after "done" (3D cloud of 10⁶ points): ${after.other.slice(longs.other.length).join(', ') || 'none'} ms`);
    await screenshot('million');
  },
};
