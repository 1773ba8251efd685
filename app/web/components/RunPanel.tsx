/** The form (demo size, tolerance, targets), Compute and Cancel, the progress bar and the status line. */
import type { FormEvent } from 'react';
import { computeCancel, computeStart, draftSet, type Status } from '../state/store';
import { useApp } from '../state/useApp';
import { formatDuration } from '../format';

function statusDetail(status: Status, message: string, progress: number, wallMs: number | undefined): string {
  switch (status) {
    case 'idle':
      return 'press Compute to start';
    case 'computing':
      return progress === 0 ? 'preparing: cell list, k-vectors, structure factor…' : 'summing in a background worker…';
    case 'done':
      return `finished in ${formatDuration(wallMs)}`;
    default:
      return message;
  }
}

export function RunPanel() {
  const draft = useApp((s) => s.draft);
  const status = useApp((s) => s.status);
  const message = useApp((s) => s.message);
  const progress = useApp((s) => s.progress);
  const wallMs = useApp((s) => s.run?.wallMs);
  const pct = Math.round(progress * 100);
  const computing = status === 'computing';
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    void computeStart();
  };
  return (
    <section className="card" aria-labelledby="run-title">
      <h2 id="run-title">Ewald reference</h2>
      <form className="run-form" onSubmit={onSubmit}>
        <label>
          <span>particles (demo)</span>
          <input name="n" inputMode="numeric" value={draft.n} onChange={(e) => draftSet({ n: e.target.value })} />
        </label>
        <label>
          <span>tolerance</span>
          <input name="tol" value={draft.tol} onChange={(e) => draftSet({ tol: e.target.value })} />
        </label>
        <label>
          <span>targets</span>
          <input name="targets" value={draft.targets} onChange={(e) => draftSet({ targets: e.target.value })} title='"all" or a number of particles drawn at random (seeded)' />
        </label>
        <div className="buttons">
          <button type="submit" className="primary" data-testid="compute">
            Compute
          </button>
          <button type="button" className="secondary" data-testid="cancel" disabled={!computing} onClick={computeCancel}>
            Cancel
          </button>
        </div>
      </form>
      <div className="progress-row">
        <div
          className={`progress${computing && progress === 0 ? ' progress-waiting' : ''}`}
          data-testid="progress"
          role="progressbar"
          aria-label="computation progress"
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={pct}
        >
          <div className="progress-fill" style={{ width: `${pct}%` }} />
        </div>
        <span className="progress-text">{pct} %</span>
      </div>
      <p className="status-line" aria-live="polite">
        <span className={`pill pill-${status}`} data-testid="status">
          {status}
        </span>
        <span className="status-message" data-testid="status-message">
          {statusDetail(status, message, progress, wallMs)}
        </span>
      </p>
    </section>
  );
}
