// First open: the built-in demo is compared (coarse mesh "code under test" against Ewald) without a file.
import { check, checkNoBadNumbers, openFresh, stat, statsNumber, viewPixels, waitStatus, waitViewComparison } from './_helpers.mjs';

/** A task of a second or more is a regression (the goal is 100 ms; a loaded 2-core machine stretches tasks by itself). */
const REGRESSION_MS = 1000;

export const tests = {
  'while the demo computes on first open, the page has no long task of a second or more (its long tasks logged)': async (page, baseUrl, { log }) => {
    // status changes with their times, from the first moment of the page (a 2 ms poll: a few µs a task)
    await page.addInitScript(() => {
      window.__statusLog = [];
      let last;
      setInterval(() => {
        const s = document.querySelector('[data-testid=status]')?.textContent ?? null;
        if (s !== last) window.__statusLog.push({ t: performance.now(), s: (last = s) });
      }, 2);
    });
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    const { statuses, tasks } = await page.evaluate(() => ({ statuses: window.__statusLog, tasks: window.__longTasks ?? [] }));
    const from = statuses.find((x) => x.s === 'loading' || x.s === 'computing')?.t;
    const to = statuses.find((x) => x.s === 'done')?.t;
    check(from !== undefined && to !== undefined && to > from, `no loading/computing → done sequence: ${JSON.stringify(statuses)}`);
    const during = tasks.filter((e) => e.start < to && e.start + e.duration > from).map((e) => Math.round(e.duration));
    const before = tasks.filter((e) => e.start + e.duration <= from).map((e) => Math.round(e.duration));
    const describe = (d) => (d.length ? `longest ${Math.max(...d)} ms of ${d.length} (${d.sort((a, b) => b - a).slice(0, 6).join(', ')})` : 'none');
    log(`demo first open: computing from ${Math.round(from)} to ${Math.round(to)} ms; long main-thread tasks while computing: ${describe(during)}; before it (page start): ${describe(before)}`);
    check(during.every((d) => d < REGRESSION_MS), `a ${Math.max(...during)} ms main-thread task while the demo computed`);
  },

  'opens on the demo and shows the mesh-against-Ewald comparison: numbers, 3D view, plots': async (page, baseUrl, { log, screenshot }) => {
    const t0 = Date.now();
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    log(`demo N=4096: comparison on screen ${Date.now() - t0} ms after navigation started`);
    check((await page.inputValue('[data-testid=method-a]')) === 'mesh', 'A is not the coarse mesh');
    check((await page.inputValue('[data-testid=method-b]')) === 'ewald', 'B is not the Ewald reference');
    const line = await page.textContent('[data-testid=stats] .compare-line');
    check(line.includes('mesh 32³') && line.includes('Ewald tol 1e-6'), `comparison line: ${line}`);
    check((await stat(page, 'snapshot', 'n')).value === '4096', 'N is not 4096');
    check((await statsNumber(page, 'targets')) === 4096, 'not all 4096 particles were targets');
    const p = [];
    for (const k of ['p50', 'p90', 'p99', 'p999', 'max']) p.push(await statsNumber(page, k));
    for (let i = 1; i < p.length; i++) check(p[i] >= p[i - 1], `percentiles not increasing: ${p}`);
    // a 32³ mesh without short-range correction smooths the knots: errors of order 10 % and more
    check(p[0] > 1e-3 && p[0] < 1, `median relative error ${p[0]} is not what a coarse mesh gives`);
    const ratio = await statsNumber(page, 'rmsRatio');
    check(ratio > 0 && Number.isFinite(ratio), 'rms ratio missing');
    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'statistics');
    check((await page.locator('[data-testid=worst-list] button').count()) === 10, 'the ten worst particles are not listed');
    // the predicted error and chosen Ewald parameters are shown before and after computing
    const pred = Number(await page.getAttribute('[data-testid=plan-b] [data-key=predicted]', 'data-value'));
    check(pred > 0 && pred <= 1e-6, `predicted Ewald error ${pred} not shown or above the tolerance`);
    // plots: distribution with the percentile marks, two scatter plots
    for (const id of ['plot-distribution', 'plot-vs-acc', 'plot-vs-neighbours']) check((await page.locator(`[data-testid=${id}] svg`).count()) === 1, `${id} missing`);
    check((await page.locator('[data-testid=plot-distribution] [data-part=marks] line').count()) === 5, 'percentile and max marks missing');
    // the 3D view shows coloured points (viridis has many distinct colours)
    await waitViewComparison(page);
    const px = await viewPixels(page);
    check(px.lit > 0.01 && px.colours > 20, `3D view looks empty: ${JSON.stringify(px)}`);
    // the follow-up convergence measurement (small snapshot) draws both convergence plots
    await page.waitForSelector('[data-testid=plot-convergence-ewald] svg', { timeout: 30_000 });
    await page.waitForSelector('[data-testid=plot-convergence-mesh] svg', { timeout: 30_000 });
    await page.waitForTimeout(300);
    await screenshot('done');
    check((await page.getAttribute('[data-testid=progress]', 'aria-valuenow')) === '100', 'progress is not at 100 %');
    check(await page.isDisabled('[data-testid=cancel]'), 'cancel is enabled after the run ended');
  },

  'the page declares a content security policy that keeps every request on its own origin': async (page, baseUrl, { allowConsoleError }) => {
    allowConsoleError(/Content Security Policy/);
    const requests = [];
    page.on('request', (r) => requests.push(r.url()));
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    const csp = await page.getAttribute('meta[http-equiv="Content-Security-Policy"]', 'content');
    check(/default-src 'self'/.test(csp) && /connect-src 'self'/.test(csp), `CSP missing or weaker: ${csp}`);
    // a request to another origin from the page is refused by the policy
    const refused = await page.evaluate(async () => {
      try {
        await fetch('https://example.org/probe');
        return false;
      } catch {
        return true;
      }
    });
    check(refused, 'a cross-origin fetch was not blocked');
    const origin = new URL(baseUrl).origin;
    const foreign = requests.filter((u) => !u.startsWith('data:') && !u.startsWith('blob:') && new URL(u).origin !== origin);
    check(foreign.length === 0, `requests left the origin: ${foreign.join(', ')}`);
    check(requests.length > 2, 'no requests seen at all');
  },
};
