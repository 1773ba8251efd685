// Helpers of the loading tests (files starting with "_" are not test modules).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

/** Forgets the mappings remembered by earlier tests (the browser profile is shared within a run). */
export async function forgetMappings(page) {
  await page.evaluate(() => localStorage.removeItem('torusgrav:mappings'));
}

/**
 * Drops a fixture file on the element matched by `selector` (not the snapshot panel's drop zone: the
 * whole page takes files) through synthetic drag events carrying a DataTransfer with the file's bytes.
 */
export async function dropFixture(page, fixtures, name, selector = '[data-testid=stats]', bytes = null) {
  const data = (bytes ?? readFileSync(join(fixtures, name))).toString('base64');
  await page.evaluate(
    ([n, b64, sel]) => {
      const raw = atob(b64);
      const u = new Uint8Array(raw.length);
      for (let i = 0; i < raw.length; i++) u[i] = raw.charCodeAt(i);
      const dt = new DataTransfer();
      dt.items.add(new File([u], n));
      const target = document.querySelector(sel) ?? document.body;
      target.dispatchEvent(new DragEvent('dragover', { bubbles: true, cancelable: true, dataTransfer: dt }));
      target.dispatchEvent(new DragEvent('drop', { bubbles: true, cancelable: true, dataTransfer: dt }));
    },
    [name, data, selector],
  );
}

/**
 * Drags a file over the page without dropping it, repeating dragover every 50 ms as a browser does
 * while the pointer is over the page, until the page shows that it takes files (or the timeout).
 */
export async function dragOverUntilShown(page, name, timeout = 5000) {
  await page.waitForFunction(
    (n) => {
      const dt = new DataTransfer();
      dt.items.add(new File([new Uint8Array(8)], n));
      document.body.dispatchEvent(new DragEvent('dragover', { bubbles: true, cancelable: true, dataTransfer: dt }));
      return document.querySelector('[data-testid=page-drop]') !== null;
    },
    name,
    { timeout, polling: 50 },
  );
}

/** Waits for the mapping step and returns the text of its contents tables. */
export async function waitMapping(page, timeout = 20_000) {
  await page.waitForSelector('[data-testid=mapping-dialog]', { timeout });
  return page.textContent('[data-testid=mapping-dialog]');
}

/** Records the progress bar (aria-valuenow) and status pill every 25 ms into window.__loadTrace. */
export async function progressTrace(page) {
  await page.evaluate(() => {
    window.__loadTrace = [];
    window.__loadTraceTimer = setInterval(() => {
      const bar = document.querySelector('[data-testid=progress]');
      window.__loadTrace.push({
        t: performance.now(),
        pct: Number(bar?.getAttribute('aria-valuenow') ?? 0),
        status: document.querySelector('[data-testid=status]')?.textContent ?? '',
        message: document.querySelector('[data-testid=status-message]')?.textContent ?? '',
      });
    }, 25);
  });
}

/** Stops the trace and returns it. */
export async function progressTraceEnd(page) {
  return page.evaluate(() => {
    clearInterval(window.__loadTraceTimer);
    return window.__loadTrace;
  });
}
