// The 3D view: picking a particle by clicking it, flying to a worst particle, the slab filter, arrows.
import { check, openFresh, stat, viewPixels, waitStatus, waitViewComparison } from './_helpers.mjs';

export const tests = {
  'clicking a particle shows its id, position, both accelerations, residual and neighbours': async (page, baseUrl, { screenshot }) => {
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    await waitViewComparison(page);
    // fly to the worst particle: it ends at the centre of the view, ringed, and is shown in the panel
    const worstId = (await page.textContent('[data-testid=worst-0] .worst-id')).trim();
    await page.click('[data-testid=worst-0]');
    await page.waitForFunction((id) => document.querySelector('[data-testid=pick] h2')?.textContent === `Particle ${id.replace('id ', '')}`, worstId, { timeout: 5000 });
    await page.waitForTimeout(900); // the flight takes 0.6 s
    await page.click('[data-testid=pick] button'); // clear the selection
    check((await page.textContent('[data-testid=pick] h2')) === 'Particle', 'selection not cleared');
    // now pick it again by clicking the centre of the 3D view, where the flight left it
    await page.locator('[data-testid=viewport-3d]').scrollIntoViewIfNeeded();
    const box = await page.locator('[data-testid=viewport-3d] canvas').boundingBox();
    await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
    await page.waitForFunction(() => document.querySelector('[data-testid=pick] h2')?.textContent !== 'Particle', null, { timeout: 5000 });
    const title = await page.textContent('[data-testid=pick] h2');
    check(title === `Particle ${worstId.replace('id ', '')}`, `clicked "${title}", expected the worst particle (${worstId})`);
    for (const key of ['position', 'accA', 'accB', 'residual']) {
      const v = (await stat(page, 'pick', key)).value.split(' ').map(Number);
      check(v.length === 3 && v.every(Number.isFinite), `${key} is not a finite vector: ${v}`);
    }
    const rel = Number((await stat(page, 'pick', 'relative')).value);
    check(rel > 0, 'relative error missing');
    check(Number((await stat(page, 'pick', 'nearest')).value) > 0, 'nearest-neighbour distance missing');
    check(Number((await stat(page, 'pick', 'density')).value) > 0, 'local density missing');
    // the residual is a_A − a_B
    const a = (await stat(page, 'pick', 'accA')).value.split(' ').map(Number);
    const b = (await stat(page, 'pick', 'accB')).value.split(' ').map(Number);
    const r = (await stat(page, 'pick', 'residual')).value.split(' ').map(Number);
    check(r.every((x, d) => Math.abs(x - (a[d] - b[d])) <= 1e-12 * Math.abs(a[d] - b[d]) + 1e-300), 'residual ≠ a_A − a_B');
    // the scatter plots ring the picked particle
    check((await page.locator('[data-testid=plot-vs-acc] [data-part=selected]').count()) === 1, 'picked particle not ringed in the plot');
    await screenshot('picked');
  },

  'the slab filter shows a slice, and arrows can be switched off': async (page, baseUrl, { log, screenshot }) => {
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    await waitViewComparison(page);
    const whole = await viewPixels(page);
    await page.selectOption('[data-testid=slab-axis]', 'z');
    await page.waitForTimeout(300);
    const slab = await viewPixels(page);
    check(slab.lit < 0.8 * whole.lit, `slab shows as much as the whole box: ${slab.lit} vs ${whole.lit}`);
    await screenshot('slab');
    await page.selectOption('[data-testid=slab-axis]', 'none');
    await page.selectOption('[data-testid=arrows-mode]', 'none');
    await page.waitForTimeout(300);
    const noArrows = await viewPixels(page);
    log(`lit share of the view: whole ${whole.lit.toFixed(4)}, z slab ${slab.lit.toFixed(4)}, no arrows ${noArrows.lit.toFixed(4)}`);
    check(noArrows.lit < whole.lit, 'switching the arrows off changed nothing');
  },
};
