// Shared helpers for the browser tests (files starting with "_" are not test modules).

export function check(condition, message) {
  if (!condition) throw new Error(message);
}

/** Waits until the status pill reads `want` (or fails at once on "error", quoting the page's message). */
export async function waitStatus(page, want, timeout = 20_000) {
  const handle = await page.waitForFunction(
    (w) => {
      const s = document.querySelector('[data-testid=status]')?.textContent;
      return s === w || (s === 'error' && w !== 'error') ? s : false;
    },
    want,
    { timeout },
  );
  const got = await handle.jsonValue();
  if (got !== want) {
    const msg = await page.textContent('[data-testid=status-message]');
    throw new Error(`status became "${got}" while waiting for "${want}": ${msg}`);
  }
}

/** The shown text and the raw data-value of the stat `key` inside the panel with test id `panel`. */
export async function stat(page, panel, key) {
  const el = page.locator(`[data-testid=${panel}] [data-key="${key}"]`);
  const [text, value] = await Promise.all([el.locator('dd').textContent(), el.getAttribute('data-value')]);
  return { text: text ?? '', value: value ?? '' };
}

/** A stat that must be a finite number; returns it. */
export async function statNumber(page, panel, key) {
  const { text, value } = await stat(page, panel, key);
  const v = Number(value);
  check(value !== '' && Number.isFinite(v), `${panel}/${key}: expected a number in data-value, got "${value}" (shown "${text}")`);
  check(!text.includes('—'), `${panel}/${key}: shown as missing ("${text}") although the value is ${value}`);
  return v;
}

/** Fails if the text shows a number gone wrong. */
export function checkNoBadNumbers(text, where) {
  const bad = text.match(/NaN|undefined|Infinity|null|\[object/);
  check(!bad, `${where} shows "${bad?.[0]}": ${text.slice(0, 300)}`);
}

/** Opens the app with a fresh session (no kept settings or snapshot); `query` adds URL parameters. */
export async function openFresh(page, baseUrl, query = '') {
  await page.goto(`${baseUrl}?fresh${query ? `&${query}` : ''}`);
}

/** A number from the stats table (data-value), which must be finite. */
export function statsNumber(page, key) {
  return statNumber(page, 'stats', key);
}

/** Drops a file on the snapshot drop zone through a synthetic drop event carrying a DataTransfer. */
export async function dropFile(page, name, text) {
  await page.evaluate(
    ([n, t]) => {
      const dt = new DataTransfer();
      dt.items.add(new File([t], n, { type: 'text/csv' }));
      const zone = document.querySelector('.dropzone');
      zone.dispatchEvent(new DragEvent('dragover', { bubbles: true, cancelable: true, dataTransfer: dt }));
      zone.dispatchEvent(new DragEvent('drop', { bubbles: true, cancelable: true, dataTransfer: dt }));
    },
    [name, text],
  );
}

/**
 * What the 3D view shows: the share of canvas pixels that differ from the background, how many
 * distinct colours (coarsely binned) they have, and the lit pixels per band of 16 rows (a string: where
 * the drawing sits). Reads the WebGL canvas through a 2D canvas (the view
 * keeps its drawing buffer).
 */
export async function viewPixels(page) {
  await viewSettled(page);
  return page.evaluate(() => {
    const src = document.querySelector('[data-testid=viewport-3d] canvas');
    if (!src) return { lit: 0, colours: 0, width: 0 };
    const c = document.createElement('canvas');
    c.width = src.width;
    c.height = src.height;
    const g = c.getContext('2d');
    g.drawImage(src, 0, 0);
    const d = g.getImageData(0, 0, c.width, c.height).data;
    let lit = 0;
    const colours = new Set();
    const bands = new Array(Math.ceil(c.height / 16)).fill(0);
    for (let i = 0; i < d.length; i += 4) {
      // background #17211f
      if (Math.abs(d[i] - 0x17) + Math.abs(d[i + 1] - 0x21) + Math.abs(d[i + 2] - 0x1f) > 24) {
        lit++;
        bands[Math.floor(i / 4 / c.width / 16)]++;
        colours.add(((d[i] >> 4) << 8) | ((d[i + 1] >> 4) << 4) | (d[i + 2] >> 4));
      }
    }
    return { lit: lit / (d.length / 4), colours: colours.size, width: c.width, bands: bands.join(',') };
  });
}

/**
 * Waits until the 3D view's image is complete: its canvas has carried no data-drawing (set while a still
 * image is drawn over several frames) for `quietMs` in a row. A change sent to the view's worker shows
 * data-drawing only after its first frame, so the quiet span must outlast a frame and a message (300 ms
 * is generous even at load 3).
 */
export async function viewSettled(page, quietMs = 300, timeout = 15_000) {
  await page.waitForFunction(
    (quiet) => {
      const c = document.querySelector('[data-testid=viewport-3d] canvas');
      if (!c) return true;
      const now = performance.now();
      if (c.hasAttribute('data-drawing') || window.__viewQuietSince === undefined) window.__viewQuietSince = now;
      if (c.hasAttribute('data-drawing')) return false;
      const ok = now - window.__viewQuietSince >= quiet;
      if (ok) window.__viewQuietSince = undefined;
      return ok;
    },
    quietMs,
    { timeout, polling: 25 },
  );
}

/** Long main-thread tasks (ms durations) recorded since `since` (performance.now() of the page). */
export async function longTasksSince(page, since) {
  return page.evaluate((t) => (window.__longTasks ?? []).filter((e) => e.start >= t).map((e) => Math.round(e.duration)), since);
}

/** The page's performance.now(). */
export function pageNow(page) {
  return page.evaluate(() => performance.now());
}

/** Waits until the stats table shows a comparison whose method labels match `a` and `b` (substrings). */
export async function waitComparison(page, a, b, timeout = 30_000) {
  await page.waitForFunction(
    ([x, y]) => {
      const t = document.querySelector('[data-testid=stats] .compare-line')?.textContent ?? '';
      const s = document.querySelector('[data-testid=status]')?.textContent;
      return s === 'done' && t.includes(x) && t.includes(y);
    },
    [a, b],
    { timeout },
  );
}

/**
 * Long main-thread tasks (ms) that started while the status pill read "computing" since `since`
 * (performance.now() of the page), and those that started at other times.
 */
export async function longTasksByPhase(page, since) {
  return page.evaluate((t0) => {
    const st = (window.__status ?? []).filter((s) => s.t >= t0 - 1e6);
    const statusAt = (t) => {
      let s = '';
      for (const e of st) if (e.t <= t) s = e.status;
      return s;
    };
    const computing = [], other = [];
    for (const e of window.__longTasks ?? []) {
      if (e.start < t0) continue;
      (statusAt(e.start) === 'computing' ? computing : other).push(Math.round(e.duration));
    }
    return { computing, other };
  }, since);
}

/** Waits until the 3D view has drawn the current comparison (its cloud is built in pieces after "done"). */
export async function waitViewComparison(page, timeout = 15_000) {
  await page.waitForFunction(() => {
    const v = document.querySelector('[data-testid=viewport-3d]');
    const line = document.querySelector('[data-testid=stats] .compare-line');
    return v?.getAttribute('data-cloud')?.startsWith('comparison') && line && document.querySelector('[data-testid=status]')?.textContent === 'done';
  }, null, { timeout });
  await page.waitForTimeout(200); // the frame after the cloud was set
}

/** Waits until the 3D view shows the snapshot alone or a comparison for it (a new snapshot's first cloud). */
export async function waitViewCloud(page, timeout = 15_000) {
  await page.waitForFunction(() => (document.querySelector('[data-testid=viewport-3d]')?.getAttribute('data-cloud') ?? '') !== '', null, { timeout });
}

/** Status-line messages shown since `since` (performance.now() of the page), in order. */
export async function messagesSince(page, since) {
  return page.evaluate((t0) => (window.__status ?? []).filter((s) => s.t >= t0).map((s) => s.message), since);
}
