// An HDF5 file in a layout of our own invention (positions split into three datasets, masses, the
// code's accelerations and ids under names no proposal recognises, the box as a group attribute) is
// dropped on the page, mapped in the mapping step and compared; the mapping is remembered for the next
// file of the same layout; a damaged file leaves the previous snapshot on screen.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { check, checkNoBadNumbers, openFresh, stat, statsNumber, waitComparison, waitStatus } from './_helpers.mjs';
import { dropFixture, forgetMappings, waitMapping } from './_loadHelpers.mjs';

const H5 = 'swarm-split.h5';
const enc = (ref) => JSON.stringify(ref);

export const tests = {
  'a dropped HDF5 file with x, y, z in separate datasets is mapped in the mapping step (box from an attribute) and compared': async (page, baseUrl, { fixtures, screenshot, log }) => {
    await openFresh(page, baseUrl);
    await forgetMappings(page);
    await waitStatus(page, 'done', 30_000);
    const t0 = Date.now();
    await dropFixture(page, fixtures, H5);
    const text = await waitMapping(page);
    log(`mapping step open ${Date.now() - t0} ms after the drop (the worker described the file in ${await page.getAttribute('[data-testid=mapping-dialog]', 'data-describe-ms')} ms, loading h5wasm included)`);
    // every dataset with shape and type, every attribute with its value
    const arrays = await page.textContent('[data-testid=map-arrays]');
    for (const want of ['/swarm/east', '/swarm/north', '/swarm/up', '/swarm/heft', '/swarm/pull', '/swarm/tag', '/swarm/blur', '(2000,)', '(2000, 3)', 'float64', 'int32']) {
      check(arrays.includes(want), `datasets table lacks ${want}: ${arrays}`);
    }
    const attrs = await page.textContent('[data-testid=map-attributes]');
    for (const want of ['extent', '100', 'epoch', 'made_by', 'torusgrav browser-test fixtures']) check(attrs.includes(want), `attributes table lacks ${want}: ${attrs}`);
    check(text.includes('hdf5 file'), 'format not shown');
    // the proposal (an N×3 dataset) is offered; the snapshot on screen is still the demo
    check((await page.inputValue('[data-testid=map-positions-mode]')) === 'one', 'the proposal was not an N×3 dataset');
    check((await stat(page, 'snapshot', 'n')).value === '4096', 'the demo did not stay while mapping');
    await screenshot('proposed');
    // map: x, y, z from three datasets, masses, the code's accelerations (N×3), ids, box from /swarm#extent
    await page.selectOption('[data-testid=map-positions-mode]', 'three');
    await page.selectOption('[data-testid=map-px]', enc('/swarm/east'));
    await page.selectOption('[data-testid=map-py]', enc('/swarm/north'));
    await page.selectOption('[data-testid=map-pz]', enc('/swarm/up'));
    await page.selectOption('[data-testid=map-mass]', enc('/swarm/heft'));
    await page.selectOption('[data-testid=map-acc-mode]', 'one');
    await page.selectOption('[data-testid=map-acc]', enc('/swarm/pull'));
    await page.selectOption('[data-testid=map-ids]', enc('/swarm/tag'));
    await page.selectOption('[data-testid=map-softening]', enc('/swarm/blur'));
    await page.selectOption('[data-testid=map-box-mode]', 'file');
    await page.selectOption('[data-testid=map-box-ref]', '/swarm#extent');
    await screenshot('mapped');
    await page.click('[data-testid=map-confirm]');
    await waitComparison(page, 'file (/swarm/pull x, y, z)', 'Ewald tol 1e-6', 40_000);
    log(`HDF5 file: comparison on screen ${Date.now() - t0} ms after the drop (including the mapping by the test)`);
    check((await page.$('[data-testid=mapping-dialog]')) === null, 'the mapping step stayed open');
    check((await stat(page, 'snapshot', 'n')).value === '2000', 'N is not 2000');
    check((await stat(page, 'snapshot', 'box')).value === '100 100 100', 'box not taken from /swarm#extent');
    check(!(await page.textContent('[data-testid=snapshot]')).includes('(guessed)'), 'the box is flagged as guessed');
    check((await page.inputValue('[data-testid=method-a]')) === 'file', 'A is not "from file"');
    // the accelerations are the Ewald sum at tolerance 1e-3: small errors, but not zero
    const med = await statsNumber(page, 'p50');
    check(med > 1e-8 && med < 1e-3, `median ${med} not in (1e-8, 1e-3)`);
    const first = await page.textContent('[data-testid=worst-0] .worst-id');
    const id = Number(first.trim().replace(/^id /, ''));
    check(Number.isInteger(id) && id >= 1000 && id < 3000, `worst id not from /swarm/tag: ${first}`);
    const summary = await page.textContent('[data-testid=load-summary]');
    check(summary.includes('/swarm/east') && summary.includes('/swarm#extent'), `load summary: ${summary}`);
    check((await page.textContent('[data-testid=load-softening]')).includes('0.05'), 'the softening lengths read are not shown');
    check((await stat(page, 'snapshot', 'acc')).value === '/swarm/pull x,y,z', 'the accelerations dataset is not named');
    checkNoBadNumbers(await page.textContent('[data-testid=snapshot]'), 'snapshot panel');
    await screenshot('compared');

    // the same layout again: loaded at once with the remembered mapping, which can be changed
    await dropFixture(page, fixtures, H5);
    await page.waitForFunction(() => document.querySelector('[data-testid=load-summary]')?.getAttribute('data-how') === 'remembered', null, { timeout: 20_000 });
    check((await page.$('[data-testid=mapping-dialog]')) === null, 'the mapping step opened for a remembered layout');
    await waitComparison(page, 'file (/swarm/pull x, y, z)', 'Ewald tol 1e-6', 40_000);
    await page.click('[data-testid=mapping-change]');
    await waitMapping(page);
    check((await page.inputValue('[data-testid=map-px]')) === enc('/swarm/east'), 'change mapping does not show the mapping used');
    await page.click('[data-testid=map-cancel]');
    check((await page.$('[data-testid=mapping-dialog]')) === null, 'the mapping step did not close');
  },

  'a damaged HDF5 file gets one line naming the file, and the previous snapshot stays': async (page, baseUrl, { fixtures, screenshot }) => {
    await openFresh(page, baseUrl);
    await forgetMappings(page);
    await waitStatus(page, 'done', 30_000);
    const cut = readFileSync(join(fixtures, H5)).subarray(0, 3000);
    await dropFixture(page, fixtures, 'swarm-cut.h5', '[data-testid=viewport-3d]', cut);
    await waitStatus(page, 'error', 20_000);
    const msg = await page.textContent('[data-testid=status-message]');
    check(msg.startsWith('swarm-cut.h5'), `the error does not name the file: ${msg}`);
    check(!msg.includes('\n'), 'the error is not one line');
    check((await stat(page, 'snapshot', 'n')).value === '4096', 'the demo did not stay');
    check((await page.$('[data-testid=mapping-dialog]')) === null, 'a mapping step opened for a damaged file');
    await screenshot('damaged');
  },
};
