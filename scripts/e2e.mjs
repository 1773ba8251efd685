#!/usr/bin/env node
// Browser tests: writes the snapshot files the tests drop (tests/e2e/fixtures.ts), builds the web app,
// serves dist/ with `vite preview` (one process, stopped at the end), drives Debian's chromium through
// playwright-core, runs every test exported by tests/e2e/*.mjs and prints "e2e: N passed, M failed".
// Each test module exports `tests` (and optionally `timeouts`: { 'name': ms } for tests longer than 60 s): { 'name': async (page, baseUrl, ctx) => {} } with ctx = { screenshot,
// log, fixtures, allowConsoleError(regexp), context, server } (allowConsoleError for a test that provokes an
// error on purpose; context is the browser context, e.g. for setOffline; server.stop()/start() take the
// preview server down and bring it back on the same port, for the offline test). For every test the runner also fails on console errors, uncaught page errors and any
// request that leaves the page's origin. Every page records its long main-thread tasks in
// window.__longTasks (PerformanceObserver) and its status changes in window.__status. Speed is not
// asserted here (benchmarks measure it); the tests log what they see. Screenshots go to test-results/.
import { spawn, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
process.chdir(root);
const resultsDir = join(root, 'test-results');
mkdirSync(resultsDir, { recursive: true });
// tests whose "file name" contains any of the arguments (all tests when none is given)
const only = process.argv.slice(2);
const TEST_TIMEOUT_MS = 60_000;
const fixtures = join(resultsDir, process.env.TORUSGRAV_E2E_OUT ? `e2e-fixtures-${process.env.TORUSGRAV_E2E_OUT}` : 'e2e-fixtures');
// Where the app is built and served from: dist/, or dist-e2e-NAME/ with TORUSGRAV_E2E_OUT=NAME (so that
// several people can run the browser tests in one checkout at once).
const outDir = process.env.TORUSGRAV_E2E_OUT ? join(root, `dist-e2e-${process.env.TORUSGRAV_E2E_OUT}`) : join(root, 'dist');

const t0 = Date.now();
const log = (msg) => console.log(`[e2e ${((Date.now() - t0) / 1000).toFixed(1)}s] ${msg}`);

function freePort() {
  return new Promise((res, rej) => {
    const s = createServer();
    s.unref();
    s.on('error', rej);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address();
      s.close(() => res(port));
    });
  });
}

async function waitForServer(url, child, ms = 20_000) {
  const end = Date.now() + ms;
  while (Date.now() < end) {
    if (child.exitCode !== null) throw new Error(`vite preview exited early with code ${child.exitCode}`);
    try {
      const r = await fetch(url);
      if (r.ok) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`vite preview did not answer at ${url} within ${ms} ms`);
}

function stopProcess(child) {
  if (!child || child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((res) => {
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
    }, 3000);
    child.once('exit', () => {
      clearTimeout(timer);
      res();
    });
    child.kill('SIGTERM');
  });
}

function withTimeout(promise, ms, what) {
  let timer;
  return Promise.race([
    promise.finally(() => clearTimeout(timer)),
    new Promise((_, rej) => {
      timer = setTimeout(() => rej(new Error(`${what} timed out after ${ms / 1000} s`)), ms);
    }),
  ]);
}

/** Records what a page does that no test should allow: console errors, page errors, foreign requests. */
function pageWatch(page, origin, allowed) {
  const problems = [];
  page.on('console', (m) => {
    if (m.type() === 'error' && !allowed.some((re) => re.test(m.text()))) problems.push(`console error: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`uncaught page error: ${e.message}`));
  const onRequest = (req) => {
    const url = req.url();
    if (url.startsWith('data:') || url.startsWith('blob:')) return;
    if (new URL(url).origin !== origin) problems.push(`request left the origin: ${url}`);
  };
  page.on('request', onRequest);
  page.on('worker', (w) => {
    if (new URL(w.url()).origin !== origin && !w.url().startsWith('blob:')) problems.push(`worker from another origin: ${w.url()}`);
  });
  return problems;
}

function slug(s) {
  return s.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40).replace(/-$/, '');
}

let server = null;
let ctx = null;
let profileDir = null;
let passed = 0;
let failed = 0;
try {
  log('writing snapshot fixtures');
  const fx = spawnSync(process.execPath, ['--import', 'tsx', join(root, 'tests/e2e/fixtures.ts'), fixtures], { cwd: root, encoding: 'utf8' });
  if (fx.status !== 0) throw new Error(`fixtures failed: ${fx.stderr || fx.stdout}`);
  log('building (vite build)');
  const { build } = await import('vite');
  await build({ configFile: join(root, 'vite.config.ts'), logLevel: 'warn', build: { outDir } });

  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}/`;
  const serverStart = async () => {
    if (server && server.exitCode === null && server.signalCode === null) return;
    server = spawn(join(root, 'node_modules/.bin/vite'), ['preview', '--host', '127.0.0.1', '--port', String(port), '--strictPort', '--outDir', outDir], {
      cwd: root,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let serverLog = '';
    server.stdout.on('data', (d) => (serverLog += d));
    server.stderr.on('data', (d) => (serverLog += d));
    try {
      await waitForServer(baseUrl, server);
    } catch (e) {
      console.log(serverLog);
      throw e;
    }
    log(`preview server (pid ${server.pid}) at ${baseUrl}`);
  };
  const serverControl = {
    start: serverStart,
    stop: async () => {
      await stopProcess(server);
      log('preview server stopped');
    },
  };
  await serverStart();

  const { chromium } = await import('playwright-core');
  profileDir = mkdtempSync(join(tmpdir(), 'e2e-'));
  ctx = await chromium.launchPersistentContext(profileDir, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    acceptDownloads: true,
    viewport: { width: 1280, height: 900 },
    args: [
      '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
      '--disable-background-networking', '--disable-component-update',
      '--disable-sync', '--enable-unsafe-swiftshader',
    ],
  });
  log('chromium started');

  const files = readdirSync(join(root, 'tests/e2e')).filter((f) => f.endsWith('.mjs') && !f.startsWith('_')).sort();
  for (const file of files) {
    const mod = await import(pathToFileURL(join(root, 'tests/e2e', file)).href);
    for (const [name, run] of Object.entries(mod.tests ?? {})) {
      if (only.length && !only.some((o) => `${file} ${name}`.includes(o))) continue;
      const page = await ctx.newPage();
      await page.addInitScript(() => {
        window.__longTasks = [];
        try {
          new PerformanceObserver((list) => {
            for (const e of list.getEntries()) window.__longTasks.push({ start: e.startTime, duration: e.duration });
          }).observe({ type: 'longtask', buffered: true });
        } catch {
          /* no long-task timing in this browser */
        }
        // status pill and status line changes with their times (which long tasks fell while computing;
        // which phases a computation went through)
        window.__status = [];
        let last = '';
        const look = () => {
          const t = document.querySelector('[data-testid=status]')?.textContent ?? '';
          const m = document.querySelector('[data-testid=status-message]')?.textContent ?? '';
          if (`${t}|${m}` !== last) {
            last = `${t}|${m}`;
            window.__status.push({ t: performance.now(), status: t, message: m });
          }
        };
        document.addEventListener('DOMContentLoaded', () => new MutationObserver(look).observe(document.body, { subtree: true, childList: true, characterData: true }));
      });
      const allowed = [];
      const problems = pageWatch(page, new URL(baseUrl).origin, allowed);
      const shot = join(resultsDir, `e2e-${slug(file.replace(/\.mjs$/, ''))}-${slug(name)}.png`);
      const started = Date.now();
      try {
        await withTimeout(run(page, baseUrl, { screenshot: (suffix) => page.screenshot({ path: shot.replace(/\.png$/, `-${suffix}.png`), fullPage: true }), log, fixtures, allowConsoleError: (re) => allowed.push(re), context: ctx, server: serverControl }), mod.timeouts?.[name] ?? TEST_TIMEOUT_MS, name);
        if (problems.length) throw new Error(problems.join('\n  '));
        passed++;
        log(`ok   ${file} › ${name} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
      } catch (e) {
        failed++;
        log(`FAIL ${file} › ${name}\n  ${e instanceof Error ? e.message : e}`);
        if (problems.length) log(`  page problems:\n  ${problems.join('\n  ')}`);
      }
      await page.screenshot({ path: shot, fullPage: true }).catch(() => {});
      await page.close().catch(() => {});
      // a test that went offline or stopped the server must not leave it so for the next one
      await ctx.setOffline(false).catch(() => {});
      await serverControl.start().catch((e) => log(`preview server could not be restarted: ${e instanceof Error ? e.message : e}`));
    }
  }
} catch (e) {
  failed++;
  console.log(`e2e setup failed: ${e instanceof Error ? e.stack : e}`);
} finally {
  await ctx?.close().catch(() => {});
  await stopProcess(server);
  if (profileDir) rmSync(profileDir, { recursive: true, force: true });
}
if (passed + failed === 0) failed = 1; // a run that tested nothing is a failure
console.log(`e2e: ${passed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
