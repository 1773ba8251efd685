// NumPy files: an .npz dropped on the page (arrays pos, mass, acc proposed; box typed) and an (N, 4)
// .npy chosen with the file picker (columns proposed; box guessed); a remembered layout loads at once;
// a file that only pretends to be .npy gets one line naming it, and the previous snapshot stays.
import { join } from 'node:path';
import { check, openFresh, stat, statsNumber, waitComparison, waitStatus } from './_helpers.mjs';
import { dragOverUntilShown, dropFixture, forgetMappings, waitMapping } from './_loadHelpers.mjs';

export const tests = {
  'a dropped .npz with pos, mass and acc is proposed as such, loads with a typed box, and next time at once': async (page, baseUrl, { fixtures, screenshot, log }) => {
    await openFresh(page, baseUrl);
    await forgetMappings(page);
    await waitStatus(page, 'done', 30_000);
    // a file dragged over any part of the page: the page says it will take it
    await dragOverUntilShown(page, 'bodies.npz');
    await dropFixture(page, fixtures, 'bodies.npz', 'header');
    await waitMapping(page);
    check((await page.$('[data-testid=page-drop]')) === null, 'the drop notice stayed after the drop');
    const arrays = await page.textContent('[data-testid=map-arrays]');
    for (const want of ['pos', 'mass', 'acc', '(2000, 3)', '(2000,)', 'float64']) check(arrays.includes(want), `arrays table lacks ${want}: ${arrays}`);
    check((await page.inputValue('[data-testid=map-positions]')) === '"pos"', 'positions not proposed as pos');
    check((await page.inputValue('[data-testid=map-mass]')) === '"mass"', 'masses not proposed as mass');
    check((await page.inputValue('[data-testid=map-acc]')) === '"acc"', 'accelerations not proposed as acc');
    // a box that is not a box: the step says so and stays open
    await page.selectOption('[data-testid=map-box-mode]', 'typed');
    await page.fill('[data-testid=map-box-text]', '-5');
    await page.click('[data-testid=map-confirm]');
    const err = await page.textContent('[data-testid=map-error]');
    check(err.startsWith('box:'), `no error naming the box: ${err}`);
    await page.fill('[data-testid=map-box-text]', '100');
    await screenshot('npz-step');
    await page.click('[data-testid=map-confirm]');
    await waitComparison(page, 'file (acc x, y, z)', 'Ewald tol 1e-6', 40_000);
    check((await stat(page, 'snapshot', 'n')).value === '2000', 'N is not 2000');
    check((await stat(page, 'snapshot', 'box')).value === '100 100 100', 'typed box not used');
    const med = await statsNumber(page, 'p50');
    check(med > 1e-8 && med < 1e-3, `median ${med} not in (1e-8, 1e-3)`);
    // again: at once
    const t0 = Date.now();
    await dropFixture(page, fixtures, 'bodies.npz', 'footer');
    await page.waitForFunction(() => document.querySelector('[data-testid=load-summary]')?.getAttribute('data-how') === 'remembered', null, { timeout: 20_000 });
    await waitComparison(page, 'file (acc x, y, z)', 'Ewald tol 1e-6', 40_000);
    log(`.npz with a remembered layout: comparison ${Date.now() - t0} ms after the drop`);
    check((await page.$('[data-testid=mapping-dialog]')) === null, 'the mapping step opened for a remembered layout');
    await screenshot('npz-compared');
  },

  'an (N, 4) .npy chosen with the file picker loads as x, y, z, m with a guessed box': async (page, baseUrl, { fixtures, screenshot }) => {
    await openFresh(page, baseUrl);
    await forgetMappings(page);
    await waitStatus(page, 'done', 30_000);
    await page.setInputFiles('[data-testid=file-input]', join(fixtures, 'table4.npy'));
    await waitMapping(page);
    const notes = await page.textContent('[data-testid=map-notes]');
    check(notes.includes('shape (N, 4)'), `notes: ${notes}`);
    check((await page.inputValue('[data-testid=map-positions-mode]')) === 'three', 'a .npy offers no N×3 array');
    check((await page.inputValue('[data-testid=map-px]')) === '0' && (await page.inputValue('[data-testid=map-pz]')) === '2', 'columns 0, 1, 2 not proposed');
    check((await page.inputValue('[data-testid=map-mass]')) === '3', 'column 3 not proposed as the mass');
    check((await page.inputValue('[data-testid=map-box-mode]')) === 'guess', 'the box is not guessed by default');
    await page.click('[data-testid=map-confirm]');
    await waitComparison(page, 'mesh 32³', 'Ewald tol 1e-6', 40_000);
    check((await stat(page, 'snapshot', 'n')).value === '2000', 'N is not 2000');
    check((await page.inputValue('input[name=box]')) === '100', 'box side 100 was not guessed');
    check((await page.textContent('[data-testid=snapshot]')).includes('box side (guessed)'), 'the guess is not flagged');
    await screenshot('npy-compared');
  },

  'a file that only pretends to be .npy gets one line naming it, and the previous snapshot stays': async (page, baseUrl, { fixtures }) => {
    await openFresh(page, baseUrl);
    await forgetMappings(page);
    await waitStatus(page, 'done', 30_000);
    await dropFixture(page, fixtures, 'fake.npy', '[data-testid=stats]', Buffer.from('this is not an array\n'));
    await waitStatus(page, 'error', 20_000);
    const msg = await page.textContent('[data-testid=status-message]');
    check(msg.startsWith('fake.npy'), `the error does not name the file: ${msg}`);
    check((await stat(page, 'snapshot', 'n')).value === '4096', 'the demo did not stay');
    check((await page.$('[data-testid=mapping-dialog]')) === null, 'a mapping step opened for a bad file');
  },
};
