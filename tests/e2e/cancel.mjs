// Cancelling a long computation stops it and keeps the data; a new computation still works, and starting
// one while another runs replaces it.
import { check, checkNoBadNumbers, stat, statNumber, waitStatus } from './_helpers.mjs';

export const tests = {
  'cancel stops a large computation, keeps the snapshot, and a new compute still works': async (page, baseUrl, { screenshot }) => {
    // N = 65536 with all targets takes ~15 s on one core of the project machine: long enough to cancel.
    await page.goto(`${baseUrl}?n=65536`);
    await waitStatus(page, 'computing', 10_000);
    check((await stat(page, 'snapshot', 'n')).value === '65536', 'N = 65536 from the URL not shown');
    await page.waitForTimeout(500);
    await screenshot('computing');
    check(!(await page.isDisabled('[data-testid=cancel]')), 'cancel is disabled while computing');
    await page.click('[data-testid=cancel]');
    await waitStatus(page, 'cancelled', 5_000);
    check((await stat(page, 'snapshot', 'n')).value === '65536', 'the snapshot was lost on cancel');
    check((await stat(page, 'stats', 'alpha')).text === '—', 'a result is shown for a cancelled run');
    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'results panel');
    check(await page.isDisabled('[data-testid=cancel]'), 'cancel still enabled after cancelling');
    await screenshot('cancelled');

    // Start the long computation again, then a short one (256 targets) while it runs: the second
    // replaces the first. A worker still busy with the first would delay the result by ~15 s.
    await page.click('[data-testid=compute]');
    await waitStatus(page, 'computing', 5_000);
    await page.waitForTimeout(300);
    await page.fill('input[name=targets]', '256');
    await page.click('[data-testid=compute]');
    await waitStatus(page, 'done', 12_000);
    check((await statNumber(page, 'stats', 'targets')) === 256, 'the short computation did not use 256 targets');
    check((await stat(page, 'snapshot', 'n')).value === '65536', 'N changed');
    check((await statNumber(page, 'stats', 'predictedRelativeError')) <= 1e-6 * (1 + 1e-9), 'predicted error above tolerance');
    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'results panel');
  },
};
