// A 10⁵-particle file with accelerations: read in the worker, compared on a seeded sample chosen from the
// expected time ("auto"). Long main-thread tasks are logged (speed belongs to benchmarks, not tests).
import { join } from 'node:path';
import { check, longTasksByPhase, openFresh, pageNow, stat, statsNumber, viewPixels, waitComparison, waitStatus, waitViewComparison } from './_helpers.mjs';

export const tests = {
  'a 10⁵-particle file is compared on a sample chosen from the expected time, which is shown before the result': async (page, baseUrl, { fixtures, log, screenshot }) => {
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    const t0 = await pageNow(page);
    const wall = Date.now();
    await page.setInputFiles('[data-testid=file-input]', join(fixtures, 'large-with-acc.csv'));
    // before the result, the plan of the new snapshot shows its targets and the expected time
    const planHandle = await page.waitForFunction(() => {
      const t = document.querySelector('[data-testid=run-plan]')?.textContent ?? '';
      return /of 100.000/.test(t) && t.includes('expected') ? t : false;
    }, null, { timeout: 30_000 });
    const planBefore = await planHandle.jsonValue();
    // the new snapshot's first frame (software WebGL: it waits for the GPU process) — then steady state
    await page.waitForFunction(() => document.querySelector('[data-testid=viewport-3d]')?.getAttribute('data-cloud')?.includes('large-with-acc.csv'), null, { timeout: 30_000 });
    await page.waitForTimeout(500);
    const t1 = await pageNow(page);
    await waitComparison(page, 'file (ax, ay, az)', 'Ewald tol 1e-6', 50_000);
    log(`10⁵-particle file: comparison on screen ${Date.now() - wall} ms after the file was given`);
    const longs = await longTasksByPhase(page, t0);
    const steady = await longTasksByPhase(page, t1);
    log(`long main-thread tasks from the file to the result — while computing: ${longs.computing.join(', ') || 'none'} ms; reading, planning, drawing: ${longs.other.join(', ') || 'none'} ms; while computing after the first frame of the new cloud: ${steady.computing.join(', ') || 'none'} ms`);
    check((await stat(page, 'snapshot', 'n')).value === '100000', 'N is not 100 000');
    const k = await statsNumber(page, 'targets');
    log(`targets ${k}; plan line while computing: ${planBefore}`);
    // "auto": all 10⁵ would take far longer than 8 s, so the largest of 10 000, 3000, 1000 that fits
    check([1000, 3000, 10_000].includes(k), `unexpected target count ${k}`);
    check(/all would take ≈ [^;]+; expected ≈ \d/.test(planBefore), `the expected times are not shown: ${planBefore}`);
    // the file holds our 64³ mesh: errors of order percent, large in the knots
    const med = await statsNumber(page, 'p50');
    check(med > 1e-4 && med < 1, `median ${med}`);
    await waitViewComparison(page);
    const px = await viewPixels(page);
    check(px.lit > 0.01, '3D view empty');
    await screenshot('large');
  },
};
