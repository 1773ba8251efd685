// The page opens on the built-in demo, computes its Ewald accelerations in the worker and shows them.
import { check, checkNoBadNumbers, stat, statNumber, waitStatus } from './_helpers.mjs';

export const tests = {
  'opens on the demo (N = 4096) and shows the Ewald parameters, predicted error and |a| summary': async (page, baseUrl, { log }) => {
    const t0 = Date.now();
    await page.goto(baseUrl);
    await waitStatus(page, 'done', 30_000);
    log(`demo N=4096: result on screen ${Date.now() - t0} ms after navigation started`);

    check((await stat(page, 'snapshot', 'n')).value === '4096', 'N is not 4096');
    check((await stat(page, 'snapshot', 'n')).text.includes('4096'), 'N is not shown as 4096');
    check((await stat(page, 'snapshot', 'box')).text.startsWith('1 (cube)'), 'box side 1 not shown');

    check((await statNumber(page, 'stats', 'targets')) === 4096, 'not all 4096 particles were targets');
    check((await statNumber(page, 'stats', 'wall')) > 0, 'wall time missing');
    for (const key of ['alpha', 'rCut', 'kCut', 'predictedRmsError', 'accelerationScale', 'rmsAcc', 'maxAcc', 'minAcc']) {
      check((await statNumber(page, 'stats', key)) > 0, `${key} is not positive`);
    }
    const kv = await statNumber(page, 'stats', 'kVectors');
    check(Number.isInteger(kv) && kv > 0, `k-vectors: ${kv}`);
    check(/^\d+x\d+x\d+$/.test((await stat(page, 'stats', 'cells')).value), 'cells per side missing');
    check((await statNumber(page, 'stats', 'tol')) === 1e-6, 'default tolerance is not 1e-6');
    const rel = await statNumber(page, 'stats', 'predictedRelativeError');
    // the parameters are chosen so that the predicted error meets the tolerance (params.ts)
    check(rel > 0 && rel <= 1e-6 * (1 + 1e-9), `predicted relative error ${rel} does not meet the tolerance 1e-6`);
    check((await statNumber(page, 'stats', 'maxAcc')) >= (await statNumber(page, 'stats', 'rmsAcc')), 'max |a| < rms |a|');

    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'results panel');
    checkNoBadNumbers(await page.textContent('[data-testid=snapshot]'), 'snapshot panel');
    check((await page.getAttribute('[data-testid=progress]', 'aria-valuenow')) === '100', 'progress is not at 100 %');
    check(await page.isDisabled('[data-testid=cancel]'), 'cancel is enabled after the run ended');

    const csp = await page.getAttribute('meta[http-equiv="Content-Security-Policy"]', 'content');
    check(csp?.includes("script-src 'self'") && csp.includes("connect-src 'self'"), `CSP meta missing or changed: ${csp}`);

    // The engine's WebAssembly kernels run in the worker; a policy that forbade compiling there would
    // silently send it down the slower JavaScript path. Compile the smallest valid module (header only).
    const workers = page.workers();
    check(workers.length === 1, `expected one compute worker, found ${workers.length}`);
    const wasm = await workers[0].evaluate(() => {
      try {
        new WebAssembly.Module(new Uint8Array([0, 97, 115, 109, 1, 0, 0, 0]));
        return 'ok';
      } catch (e) {
        return String(e);
      }
    });
    check(wasm === 'ok', `the compute worker cannot compile WebAssembly: ${wasm}`);
  },

  'a bad URL parameter gives a one-line error, and a corrected form computes': async (page, baseUrl) => {
    await page.goto(`${baseUrl}?tol=2`);
    await waitStatus(page, 'error', 10_000);
    const msg = await page.textContent('[data-testid=status-message]');
    check(/^tolerance: .*"2"/.test(msg ?? ''), `unexpected error text: ${msg}`);
    checkNoBadNumbers(await page.textContent('[data-testid=stats]'), 'results panel');
    await page.fill('input[name=tol]', '1e-4');
    await page.click('[data-testid=compute]');
    await waitStatus(page, 'done', 30_000);
    check((await statNumber(page, 'stats', 'tol')) === 1e-4, 'the corrected tolerance was not used');
  },
};
