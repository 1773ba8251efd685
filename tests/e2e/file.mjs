// A snapshot file with the user's accelerations: dropped on the page, compared against Ewald; methods
// toggled (results re-used); the session kept over a reload; the URL carrying the settings.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { check, checkNoBadNumbers, dropFile, messagesSince, openFresh, pageNow, stat, statsNumber, waitComparison, waitStatus } from './_helpers.mjs';

const SMALL = 'small-with-acc.csv';

async function dropSmall(page, baseUrl, fixtures) {
  await openFresh(page, baseUrl);
  await waitStatus(page, 'done', 30_000);
  await dropFile(page, SMALL, readFileSync(join(fixtures, SMALL), 'utf8'));
  await waitComparison(page, 'file (ax, ay, az)', 'Ewald tol 1e-6', 30_000);
}

export const tests = {
  'a dropped CSV with ax, ay, az is compared against Ewald by default (box guessed from the coordinates)': async (page, baseUrl, { fixtures, screenshot, log }) => {
    const t0 = Date.now();
    await dropSmall(page, baseUrl, fixtures);
    log(`2000-particle file: comparison on screen ${Date.now() - t0} ms after navigation (demo first, then the drop)`);
    check((await page.inputValue('[data-testid=method-a]')) === 'file', 'A is not "from file"');
    check((await page.inputValue('[data-testid=method-b]')) === 'ewald', 'B is not Ewald');
    check((await stat(page, 'snapshot', 'n')).value === '2000', 'N is not 2000');
    check((await page.inputValue('input[name=box]')) === '100', 'box side 100 was not guessed');
    check((await page.textContent('[data-testid=snapshot]')).includes('box side (guessed)'), 'the guess is not flagged');
    check((await stat(page, 'snapshot', 'acc')).value === 'ax,ay,az', 'acceleration columns not named');
    // the file holds the Ewald sum at tolerance 1e-3: small errors, but not zero
    const med = await statsNumber(page, 'p50');
    const max = await statsNumber(page, 'max');
    check(med > 1e-8 && med < 1e-3, `median ${med} not in (1e-8, 1e-3)`);
    check(max < 1e-2, `max ${max} ≥ 1e-2 for Ewald at tolerance 1e-3`);
    // ids come from the file's id column (1000 + row)
    const first = await page.textContent('[data-testid=worst-0] .worst-id');
    const id = Number(first.trim().replace(/^id /, ''));
    check(Number.isInteger(id) && id >= 1000 && id < 3000, `worst id not from the file's id column: ${first}`);
    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'statistics');
    await screenshot('file-vs-ewald');
  },

  'toggling between three methods re-uses finished results (file, Ewald at two tolerances, coarse mesh)': async (page, baseUrl, { fixtures, screenshot }) => {
    await dropSmall(page, baseUrl, fixtures);
    const medFile = await statsNumber(page, 'p50');
    // A: coarse mesh (new computation)
    await page.selectOption('[data-testid=method-a]', 'mesh');
    await page.click('[data-testid=compute]');
    await waitComparison(page, 'mesh 32³', 'Ewald tol 1e-6');
    const medMesh = await statsNumber(page, 'p50');
    check(medMesh > 10 * medFile, `mesh median ${medMesh} not far above the file's ${medFile}`);
    // B: Ewald at 1e-3 against A: Ewald at 1e-6 — three methods computed in all
    await page.selectOption('[data-testid=method-a]', 'ewald');
    await page.fill('input[name="a.ewald.tol"]', '1e-3');
    await page.click('[data-testid=compute]');
    await waitComparison(page, 'Ewald tol 0.001', 'Ewald tol 1e-6');
    const medE = await statsNumber(page, 'p50');
    check(medE < 1e-3, `Ewald 1e-3 against 1e-6: median ${medE}`);
    // back to the file: nothing but the statistics is recomputed (no method phase is shown)
    await page.selectOption('[data-testid=method-a]', 'file');
    await page.waitForFunction(() => document.querySelector('[data-testid=plan-b] [data-key=expected]')?.textContent.includes('re-used'), null, { timeout: 5000 });
    let t = await pageNow(page);
    await page.click('[data-testid=compute]');
    await waitComparison(page, 'file (ax, ay, az)', 'Ewald tol 1e-6');
    let phases = await messagesSince(page, t);
    check(!phases.some((m) => /^(Ewald|mesh)/.test(m)), `a method was recomputed after toggling back: ${phases.join(' → ')}`);
    check((await statsNumber(page, 'p50')) === medFile, 'the file comparison changed after toggling back');
    // and the mesh again, also re-used
    await page.selectOption('[data-testid=method-a]', 'mesh');
    await page.waitForFunction(() => document.querySelector('[data-testid=plan-a] [data-key=expected]')?.textContent.includes('re-used'), null, { timeout: 5000 });
    t = await pageNow(page);
    await page.click('[data-testid=compute]');
    await waitComparison(page, 'mesh 32³', 'Ewald tol 1e-6');
    phases = await messagesSince(page, t);
    check(phases.some((m) => m.startsWith('statistics')) && !phases.some((m) => /^(Ewald|mesh)/.test(m)), `phases after toggling: ${phases.join(' → ')}`);
    check((await statsNumber(page, 'p50')) === medMesh, 'the mesh comparison changed');
    await screenshot('toggled');
  },

  'the session survives a reload, and the URL carries the settings': async (page, baseUrl, { fixtures }) => {
    await dropSmall(page, baseUrl, fixtures);
    await page.selectOption('[data-testid=method-b]', 'ewald');
    await page.fill('input[name="b.ewald.tol"]', '1e-7');
    await page.selectOption('[data-testid=slab-axis]', 'z');
    await page.click('[data-testid=compute]');
    await waitComparison(page, 'file (ax, ay, az)', 'Ewald tol 1e-7');
    await page.waitForFunction(() => location.search.includes('b.ewald.tol=1e-7'), null, { timeout: 5000 });
    const url = new URL(page.url());
    check(url.searchParams.get('file') === SMALL && url.searchParams.get('fileN') === '2000', `file not in the URL: ${url.search}`);
    check(url.searchParams.get('slab') === 'z' && url.searchParams.get('a') === 'file', `settings not in the URL: ${url.search}`);
    await page.reload();
    await waitComparison(page, 'file (ax, ay, az)', 'Ewald tol 1e-7', 30_000);
    check((await stat(page, 'snapshot', 'n')).value === '2000', 'the file snapshot was not kept');
    check((await page.inputValue('[data-testid=slab-axis]')) === 'z', 'the slab setting was not kept');
    // a colleague with the same file opens the link: told which file to drop, the demo meanwhile; once
    // dropped, the link's settings (B at 1e-7, the slab) apply to it
    const shared = page.url();
    await openFresh(page, baseUrl); // forgets the kept session, as on another machine
    await waitStatus(page, 'done', 30_000);
    await page.goto(shared);
    const notice = await page.textContent('[data-testid=wanted-file]');
    check(notice.includes(SMALL) && notice.includes('2000'), `no notice naming the file: ${notice}`);
    await waitStatus(page, 'done', 30_000);
    check((await stat(page, 'snapshot', 'n')).value === '4096', 'the demo is not shown meanwhile');
    await dropFile(page, SMALL, readFileSync(join(fixtures, SMALL), 'utf8'));
    await waitComparison(page, 'file (ax, ay, az)', 'Ewald tol 1e-7', 30_000);
    check((await page.inputValue('[data-testid=slab-axis]')) === 'z', 'the link’s slab setting was lost');
  },
};
