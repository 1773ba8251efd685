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
