/**
 * "Export report": a verdict figure and limit (kept with the view settings: the link and the browser's
 * storage), and the button that downloads the report PNG with the
 * residuals CSV and the JSON summary beside it (app/web/report/).
 */
import { useEffect, useState } from 'react';
import { REQUIRE_KEY_WORDS, REQUIRE_KEYS, type RequireKey } from '../../../engine/stats/checkSummary';
import { fileWatch } from '../report/fileDigest';
import { download, reportFiles } from '../report/reportExport';
import { verdictLimitParse } from '../report/reportVerdict';
import { appStore, viewSet } from '../state/store';
import { useApp } from '../state/useApp';
import { viewImage } from '../view3d/scene';

export function ExportButton() {
  const ready = useApp((s) => s.comparison !== null && s.snapshot !== null && s.comparison.snapshotId === s.snapshot.id);
  const key = useApp((s) => s.draft.view.verdictKey);
  const limit = useApp((s) => s.draft.view.verdictLimit);
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState('');
  useEffect(() => fileWatch(), []);
  let limitError = '';
  try {
    verdictLimitParse(limit);
  } catch (e) {
    limitError = e instanceof Error ? e.message : String(e);
  }
  const onClick = async () => {
    setBusy(true);
    setMessage('');
    try {
      const canvas = document.querySelector<HTMLCanvasElement>('[data-testid=viewport-3d] canvas');
      // without a GPU a large cloud's image is drawn over a few frames: the report takes the finished
      // one, a copy made by whichever thread draws the view (the view worker's canvas cannot be read here)
      const view = await viewImage(canvas);
      const files = await reportFiles(appStore.getState(), view, { key, limit }, new Date(), window.location.href);
      for (const f of files) download(f);
      setMessage("saved: report PNG, residuals CSV, JSON summary");
    } catch (e) {
      setMessage(`export failed: ${e instanceof Error ? e.message : String(e)}`);
    } finally {
      setBusy(false);
    }
  };
  return (
    <div className="export-tools" data-testid="export-panel" style={{ display: 'flex', alignItems: 'center', gap: 6, flexWrap: 'wrap', justifyContent: 'flex-end' }}>
      <label style={{ display: 'flex', alignItems: 'center', gap: 4 }} title="the verdict printed on the report: this figure of the relative error must not exceed the limit">
        <span>verdict</span>
        <select value={key} onChange={(e) => viewSet({ verdictKey: e.target.value as RequireKey })} data-testid="verdict-key">
          {REQUIRE_KEYS.map((k) => (
            <option key={k} value={k}>
              {REQUIRE_KEY_WORDS[k]}
            </option>
          ))}
        </select>
        <span>≤</span>
        <input value={limit} onChange={(e) => viewSet({ verdictLimit: e.target.value })} data-testid="verdict-limit" size={6} aria-invalid={limitError !== ''} title={limitError || 'a fraction (0.01) or a percentage (1 %)'} />
      </label>
      <button type="button" className="secondary-calm" data-testid="export-report" disabled={!ready || busy || limitError !== ''} onClick={() => void onClick()}>
        {busy ? 'Exporting…' : 'Export report'}
      </button>
      {limitError || message ? (
        <span className="card-hint" data-testid="export-message" role="status">
          {limitError || message}
        </span>
      ) : null}
    </div>
  );
}
