// The image-sum orders and particle-mesh Ewald as methods: toggling between them changes the statistics,
// toggling back re-uses the finished run, the convergence of an order is drawn, and asked for all of a
// large snapshot the reference becomes PME (said on screen).
import { check, checkNoBadNumbers, longTasksSince, messagesSince, openFresh, pageNow, statsNumber, waitComparison, waitStatus } from './_helpers.mjs';

const TARGETS = 300;

async function computeAndWait(page, a, b, timeout = 45_000) {
  await page.click('[data-testid=compute]');
  await waitComparison(page, a, b, timeout);
  return { p50: await statsNumber(page, 'p50'), max: await statsNumber(page, 'max') };
}

export const timeouts = {
  'toggles Ewald against sphere, cube and PME; toggling back re-uses the run; draws the order’s convergence': 150_000,
  'asked for all particles of a 10⁵ demo, the reference is particle-mesh Ewald, said on screen': 150_000,
};

export const tests = {
  'toggles Ewald against sphere, cube and PME; toggling back re-uses the run; draws the order’s convergence': async (page, baseUrl, { log, screenshot }) => {
    await openFresh(page, baseUrl, `targets=${TARGETS}`);
    await waitStatus(page, 'done', 40_000);
    // A: image sum in growing spheres (default 32 shells) against Ewald
    await page.selectOption('[data-testid=method-a]', 'sphere');
    check((await page.inputValue('input[name="a.sphere.shells"]')) === '32', 'shells field missing or not 32');
    const planned = Number(await page.getAttribute('[data-testid=plan-a] [data-key=expected]', 'data-value').catch(() => 'NaN'));
    let t0 = Date.now();
    const sphere = await computeAndWait(page, 'sphere R 32', 'Ewald tol 1e-6');
    log(`sphere R 32, ${TARGETS} of 4096 targets: ${Date.now() - t0} ms on screen (planned ${Math.round(planned)} ms)`);
    // the plain sum in spheres tends to Ewald + (4πG/3V)·D: a dipole of the clumpy demo is not zero
    check(sphere.p50 > 1e-9 && sphere.p50 < 1, `sphere median ${sphere.p50}`);
    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'statistics');
    // A: cubes instead; statistics change
    await page.selectOption('[data-testid=method-a]', 'cube');
    t0 = Date.now();
    const cube = await computeAndWait(page, 'cube R 32', 'Ewald tol 1e-6');
    log(`cube R 32: ${Date.now() - t0} ms; medians sphere ${sphere.p50.toExponential(3)}, cube ${cube.p50.toExponential(3)}`);
    check(cube.p50 !== sphere.p50, 'the statistics did not change from sphere to cube');
    // back to sphere: only the statistics are redone
    await page.selectOption('[data-testid=method-a]', 'sphere');
    await page.waitForFunction(() => document.querySelector('[data-testid=plan-a] [data-key=expected]')?.textContent.includes('re-used'), null, { timeout: 10_000 });
    let t = await pageNow(page);
    const again = await computeAndWait(page, 'sphere R 32', 'Ewald tol 1e-6');
    let phases = await messagesSince(page, t);
    check(!phases.some((m) => /^(sphere|Ewald)/.test(m)), `a method was recomputed after toggling back: ${phases.join(' → ')}`);
    check(again.p50 === sphere.p50 && again.max === sphere.max, 'the sphere comparison changed after toggling back');
    // the convergence of the sphere order: partial sums against R, Ewald and the predicted limit drawn
    await page.click('[data-testid=convergence-run]');
    await page.waitForSelector('[data-testid=plot-convergence-sphere] svg', { timeout: 60_000 });
    const fig = page.locator('[data-testid=plot-convergence-sphere]');
    check((await fig.locator('[data-part=panel]').count()) === 6, 'not six panels');
    check((await fig.locator('[data-part=ewald]').count()) === 6 && (await fig.locator('[data-part=limit]').count()) === 6, 'Ewald or limit lines missing');
    check((await fig.locator('text').allTextContents()).some((s) => s.includes('worst 1')), 'the worst target is not among the panels');
    checkNoBadNumbers(await fig.innerHTML(), 'convergence plot');
    await fig.scrollIntoViewIfNeeded();
    await fig.screenshot({ path: 'test-results/e2e-methods-convergence-sphere.png' });
    const dev = page.locator('[data-testid=plot-deviation-sphere]');
    check((await dev.locator('[data-part=median]').count()) === 1, 'the deviation-from-limit plot is missing');
    await dev.scrollIntoViewIfNeeded();
    await dev.screenshot({ path: 'test-results/e2e-methods-deviation-sphere.png' });
    // A: particle-mesh Ewald against Ewald: agreement at about the tolerance
    const beforePme = await pageNow(page);
    await page.selectOption('[data-testid=method-a]', 'pme');
    await page.waitForSelector('[data-testid=plan-a] [data-key=mesh]', { timeout: 30_000 });
    log(`PME plan on the page (N = 4096): long main-thread tasks ${JSON.stringify(await longTasksSince(page, beforePme))} ms`);
    t0 = Date.now();
    const pme = await computeAndWait(page, 'PME tol 1e-6', 'Ewald tol 1e-6');
    log(`PME tol 1e-6, N = 4096 (all computed, ${TARGETS} compared): ${Date.now() - t0} ms on screen; median ${pme.p50.toExponential(3)}, max ${pme.max.toExponential(3)}`);
    check(pme.p50 < 1e-5, `PME against Ewald: median relative error ${pme.p50}`);
    // and back to cube, re-used
    await page.selectOption('[data-testid=method-a]', 'cube');
    t = await pageNow(page);
    const cube2 = await computeAndWait(page, 'cube R 32', 'Ewald tol 1e-6');
    phases = await messagesSince(page, t);
    check(!phases.some((m) => /^(cube|Ewald)/.test(m)) && cube2.p50 === cube.p50, `cube recomputed or changed: ${phases.join(' → ')}`);
    await screenshot('pme-vs-ewald');
  },

  'a long order run shows its expected time and progress, and Cancel stops it': async (page, baseUrl, { log }) => {
    await openFresh(page, baseUrl, 'targets=all');
    await waitStatus(page, 'done', 40_000);
    await page.selectOption('[data-testid=method-a]', 'slab');
    await page.waitForSelector('[data-testid=plan-a] [data-key=work]', { timeout: 20_000 });
    const expected = Number(await page.getAttribute('[data-testid=plan-a] [data-key=expected]', 'data-value'));
    log(`slab z R 8, all 4096 targets: expected ${Math.round(expected)} ms`);
    check(expected > 10_000, `expected time of an all-target slab sum is only ${expected} ms`);
    await page.click('[data-testid=compute]');
    await page.waitForFunction(() => {
      const pct = Number(document.querySelector('[data-testid=progress]')?.getAttribute('aria-valuenow'));
      return /^slab z R 8/.test(document.querySelector('[data-testid=status-message]')?.textContent ?? '') && pct > 0;
    }, null, { timeout: 30_000 });
    await page.click('[data-testid=cancel]');
    await waitStatus(page, 'cancelled', 5000);
    const msg = await page.textContent('[data-testid=status-message]');
    check(/stopped after/.test(msg), `status message after cancel: ${msg}`);
    check((await page.locator('[data-testid=stats] .compare-line').textContent()).includes('mesh 32³'), 'the earlier comparison was not kept');
  },

  'asked for all particles of a 10⁵ demo, the reference is particle-mesh Ewald, said on screen': async (page, baseUrl, { log, screenshot }) => {
    await openFresh(page, baseUrl, 'n=100000&targets=all');
    await page.waitForFunction(() => document.querySelector('[data-testid=plan-b]') && /particle-mesh Ewald instead/.test(document.querySelector('.slot-b .slot-note')?.textContent ?? ''), null, { timeout: 60_000 });
    const note = await page.textContent('.slot-b .slot-note');
    log(`B's note: ${note}`);
    check(/all 100\s?000 particles by direct Ewald would take/.test(note), `note: ${note}`);
    check((await page.inputValue('[data-testid=method-b]')) === 'ewald', 'B is no longer the Ewald reference in the form');
    const t0 = Date.now();
    await waitComparison(page, 'mesh 32³', 'PME tol 1e-6', 120_000);
    log(`demo N = 10⁵, all targets, mesh against PME: comparison ${Date.now() - t0} ms after the note appeared`);
    check((await statsNumber(page, 'targets')) === 100000, 'not all particles compared');
    await screenshot('pme-reference');
    // insisting on direct Ewald restores it in the plan (not computed here)
    await page.selectOption('select[name="b.ewald.all"]', 'direct');
    await page.waitForFunction(() => !/particle-mesh Ewald instead/.test(document.querySelector('.slot-b .slot-note')?.textContent ?? ''), null, { timeout: 30_000 });
  },
};
