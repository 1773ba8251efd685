/**
 * The report's verdict (figure and limit) is kept with the other view settings: in the link
 * (verdict=…, vlimit=…) and in the browser's storage, so that it survives a reload; a link with an
 * unknown figure falls back to the default, a limit is kept as typed (the field then says what is wrong).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { DEFAULT_VERDICT, reportVerdict, verdictLimitParse } from '../../app/web/report/reportVerdict';
import { draftLoad, draftSave } from '../../app/web/state/persist';
import { DEFAULT_DRAFT, DEFAULT_VIEW, draftFromQuery, draftToQuery } from '../../app/web/state/settings';
import { appReset, appStore, viewSet } from '../../app/web/state/store';
import { checkFigures } from '../../engine/stats/checkSummary';

const storage = new Map<string, string>();

beforeAll(() => {
  vi.stubGlobal('localStorage', { getItem: (k: string) => storage.get(k) ?? null, setItem: (k: string, v: string) => void storage.set(k, v), removeItem: (k: string) => void storage.delete(k) });
});
afterAll(() => {
  vi.unstubAllGlobals();
});

describe('the verdict in the settings', () => {
  it('defaults to the report’s default (99th percentile ≤ 1 %), which the link leaves out', () => {
    expect(DEFAULT_VIEW.verdictKey).toBe(DEFAULT_VERDICT.key);
    expect(DEFAULT_VIEW.verdictLimit).toBe(DEFAULT_VERDICT.limit);
    expect(draftToQuery(DEFAULT_DRAFT)).not.toMatch(/verdict|vlimit/);
  });

  it('goes into the link and comes back from it', () => {
    const d = { ...DEFAULT_DRAFT, view: { ...DEFAULT_VIEW, verdictKey: 'max' as const, verdictLimit: '0.5 %' } };
    const q = draftToQuery(d);
    const p = new URLSearchParams(q);
    expect(p.get('verdict')).toBe('max');
    expect(p.get('vlimit')).toBe('0.5 %');
    expect(draftFromQuery(q)).toEqual(d);
  });

  it('a link with an unknown figure keeps the default; a malformed limit stays as typed and is refused when read', () => {
    const d = draftFromQuery('?verdict=p42&vlimit=lots');
    expect(d.view.verdictKey).toBe(DEFAULT_VERDICT.key);
    expect(d.view.verdictLimit).toBe('lots');
    expect(() => verdictLimitParse(d.view.verdictLimit)).toThrow('verdict limit: expected a positive number or percentage (such as 0.01 or 1 %), got "lots"');
  });

  it('survives a reload: set through the store, saved to storage, read back as the next page would', () => {
    storage.clear();
    appReset(DEFAULT_DRAFT);
    viewSet({ verdictKey: 'rms', verdictLimit: '2e-3' });
    draftSave(appStore.getState().draft);
    // a "reload": the store starts from the defaults, then from what storage kept
    appReset(DEFAULT_DRAFT);
    expect(appStore.getState().draft.view.verdictKey).toBe('p99');
    const kept = draftLoad();
    expect(kept?.view.verdictKey).toBe('rms');
    expect(kept?.view.verdictLimit).toBe('2e-3');
    // a shared link overrides what storage kept (main.tsx: draftFromQuery(link, stored))
    expect(draftFromQuery('?verdict=p90', kept!).view).toMatchObject({ verdictKey: 'p90', verdictLimit: '2e-3' });
  });

  it('the kept choice gives the verdict the report prints', () => {
    // relative errors 0.001 and 0.003 (B = unit vectors along x): rms = √((1e-6 + 9e-6)/2) = 2.236e-3 > 2e-3
    const f = checkFigures(Float64Array.of(1.001, 0, 0, 1.003, 0, 0), Float64Array.of(1, 0, 0, 1, 0, 0));
    const v = reportVerdict(f, { key: 'rms', limit: '2e-3' });
    expect(v.result.pass).toBe(false);
    expect(v.text).toBe('rms 0.00224 > 0.002: fails'); // plain numbers: both at or above 10⁻³
  });
});
