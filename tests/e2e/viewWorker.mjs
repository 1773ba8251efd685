// The 3D view is drawn by the view worker on an OffscreenCanvas: the page's canvas is a placeholder (its
// control was handed over, so it gives no context), the view still shows the comparison, the worker's
// frame records arrive on the page's clock, and turning the view redraws it from the page's camera.
// Where a worker cannot draw (no transferControlToOffscreen), the page draws the view on its own canvas.
import { check, openFresh, pageNow, viewPixels, waitStatus, waitViewComparison } from './_helpers.mjs';

export const tests = {
  'the 3D view is drawn in a worker on the canvas handed over by the page, and follows the page camera': async (page, baseUrl, { screenshot }) => {
    await openFresh(page, baseUrl, 'testhooks');
    await waitStatus(page, 'done', 30_000);
    await waitViewComparison(page);
    await page.waitForTimeout(500);
    const placeholder = await page.evaluate(() => {
      const c = document.querySelector('[data-testid=viewport-3d] canvas');
      try {
        c.getContext('2d');
        return false;
      } catch (e) {
        return e instanceof DOMException && e.name === 'InvalidStateError';
      }
    });
    check(placeholder, 'the 3D view canvas was not handed over to a worker (it still gives a context)');
    const before = await viewPixels(page);
    check(before.lit > 0.005 && before.colours > 5, `the view shows too little: ${JSON.stringify(before)}`);
    const now = await pageNow(page);
    const frames = await page.evaluate(() => (window.__viewFrames ?? []).map((e) => e.t));
    check(frames.length > 0, 'no frame records from the view worker');
    check(frames.every((t) => t > 0 && t <= now), `frame times are not on the page's clock: ${frames.slice(-3).join(', ')} (page now ${now})`);
    // a drag turns the page's camera; the worker redraws what it sees
    const box = await page.locator('[data-testid=viewport-3d] canvas').boundingBox();
    const cx = box.x + box.width / 2, cy = box.y + box.height / 2;
    await page.mouse.move(cx, cy);
    await page.mouse.down();
    await page.mouse.move(cx + 120, cy + 30, { steps: 8 });
    await page.mouse.up();
    await page.waitForTimeout(800);
    const later = await page.evaluate((t) => (window.__viewFrames ?? []).filter((e) => e.t > t).length, now);
    check(later > 0, 'no frame drawn after turning the view');
    const turned = await viewPixels(page);
    check(turned.lit > 0.005, 'the turned view is blank');
    check(Math.abs(turned.lit - before.lit) > 1e-4 || turned.bands !== before.bands, 'the view looks the same after turning it');
    await screenshot('turned');
  },

  'without OffscreenCanvas in workers the page draws the view itself, as before': async (page, baseUrl, { screenshot }) => {
    await page.addInitScript(() => {
      delete HTMLCanvasElement.prototype.transferControlToOffscreen;
    });
    await openFresh(page, baseUrl);
    await waitStatus(page, 'done', 30_000);
    await waitViewComparison(page);
    await page.waitForTimeout(500);
    const own = await page.evaluate(() => document.querySelector('[data-testid=viewport-3d] canvas')?.getContext('webgl2') != null);
    check(own, 'the fallback view does not draw WebGL on the page canvas');
    const px = await viewPixels(page);
    check(px.lit > 0.005 && px.colours > 5, `the fallback view shows too little: ${JSON.stringify(px)}`);
    check(Number(await page.getAttribute('[data-testid=viewport-3d]', 'data-points')) > 0, 'the fallback view says it draws no points');
    await screenshot('fallback');
  },
};
