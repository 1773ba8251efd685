// Particle-mesh Ewald on several threads in the browser (app/web/worker/pmeParallel.ts): the page is
// cross-origin isolated, the compute worker starts helper workers, the run says "threads 2", its forces
// equal the one-thread run's to rounding (A = PME on 2 threads against B = PME on 1: the comparison's max
// relative difference; 1e-12 as the CLI's own check), and Cancel ends the helpers with the compute worker.
import { check, openFresh, statsNumber, waitComparison, waitStatus } from './_helpers.mjs';

const N = 100000;

/** Helper workers alive in the page (nested workers of the compute worker), by their script URL. */
function helpersAlive(page) {
  return page.workers().filter((w) => /pmeHelper/.test(w.url())).length;
}

/** Seconds each status phase lasted (from its first appearance to the next phase's), in order. */
async function phaseSeconds(page) {
  return page.evaluate(() => {
    const st = (window.__status ?? []).filter((s) => s.status === 'computing' || s.status === 'done');
    const out = [];
    for (let k = 0; k + 1 < st.length; k++) {
      if (st[k].message === st[k + 1].message) continue;
      out.push({ phase: st[k].message, s: (st[k + 1].t - st[k].t) / 1000 });
    }
    return out;
  });
}

export const timeouts = {
  'PME of a 10⁵ demo on 2 threads: helpers used, "threads 2" on screen, equal to 1 thread to 1e-12': 240_000,
  'Cancel during a 2-thread PME run ends its helper workers': 120_000,
};

export const tests = {
  'PME of a 10⁵ demo on 2 threads: helpers used, "threads 2" on screen, equal to 1 thread to 1e-12': async (page, baseUrl, { log, screenshot }) => {
    const seen = [];
    page.on('worker', (w) => seen.push(w.url()));
    await openFresh(page, baseUrl, `n=${N}&targets=all&a=pme&a.pme.threads=2&b=pme&b.pme.threads=1`);
    const env = await page.evaluate(() => ({ isolated: self.crossOriginIsolated, cores: navigator.hardwareConcurrency }));
    log(`page: crossOriginIsolated ${env.isolated}, hardwareConcurrency ${env.cores}`);
    check(env.isolated === true, 'the page is not cross-origin isolated (no SharedArrayBuffer for the helpers)');
    check((await page.inputValue('select[name="a.pme.threads"]')) === '2', 'A’s threads field is not 2');
    await waitComparison(page, 'PME tol 1e-6, threads 2', 'PME tol 1e-6, threads 1', 200_000);
    const line = await page.textContent('[data-testid=stats] .compare-line');
    log(`compared: ${line.trim()}`);
    check(seen.some((u) => /pmeHelper/.test(u)), `no helper worker was started (workers: ${seen.join(', ')})`);
    check(helpersAlive(page) === 0, 'helper workers still alive after the run');
    check((await statsNumber(page, 'targets')) === N, 'not all particles compared');
    const max = await statsNumber(page, 'max');
    const p50 = await statsNumber(page, 'p50');
    log(`2 threads against 1: max relative difference ${max.toExponential(2)}, median ${p50.toExponential(2)}`);
    check(max < 1e-12, `2 threads differ from 1 by ${max} relative (max over ${N} particles)`);
    const phases = await phaseSeconds(page);
    log(`phases (wall s): ${phases.map((p) => `${p.phase} ${p.s.toFixed(2)}`).join(' | ')}`);
    const two = phases.find((p) => p.phase.startsWith('PME tol 1e-6, threads 2'));
    const one = phases.find((p) => p.phase.startsWith('PME tol 1e-6, threads 1'));
    check(two && one, 'the two PME phases were not both seen on the status line');
    log(`PME N = ${N}, tol 1e-6, all particles: 1 thread ${one.s.toFixed(2)} s, 2 threads ${two.s.toFixed(2)} s (wall, in the browser; not asserted)`);
    await screenshot('two-threads');
  },

  'Cancel during a 2-thread PME run ends its helper workers': async (page, baseUrl, { log }) => {
    await openFresh(page, baseUrl, `n=${N}&targets=all&a=pme&a.pme.threads=2&b=mesh`);
    // the helpers exist once A's run has chosen its parameters
    const t0 = Date.now();
    while (helpersAlive(page) === 0) {
      check(Date.now() - t0 < 90_000, 'no helper worker appeared within 90 s');
      await page.waitForTimeout(100);
    }
    const msg = await page.textContent('[data-testid=status-message]');
    check(/^PME tol 1e-6, threads 2/.test(msg), `status while the helpers run: ${msg}`);
    log(`helpers alive after ${Date.now() - t0} ms: ${helpersAlive(page)}`);
    await page.click('[data-testid=cancel]');
    await waitStatus(page, 'cancelled', 5000);
    const t1 = Date.now();
    while (helpersAlive(page) > 0) {
      check(Date.now() - t1 < 5000, `${helpersAlive(page)} helper worker(s) still alive 5 s after Cancel`);
      await page.waitForTimeout(50);
    }
    log(`helpers gone ${Date.now() - t1} ms after Cancel`);
    // the fresh compute worker works: a small run completes
    await page.selectOption('[data-testid=method-a]', 'mesh');
    await page.click('[data-testid=compute]');
    await waitStatus(page, 'done', 60_000);
  },
};
