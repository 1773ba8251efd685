/** Targets, expected time, Compute and Cancel, the progress bar and the status line. */
import type { FormEvent } from 'react';
import { formatCount, formatDuration } from '../format';
import { computeCancel, computeStart } from '../state/pipeline';
import { type Status, draftSet } from '../state/store';
import { useApp } from '../state/useApp';
import { useRunPlan } from '../state/useRunPlan';

function statusDetail(status: Status, message: string, phase: string, wallMs: number | undefined): string {
  switch (status) {
    case 'idle':
      return 'press Compute to start';
    case 'loading':
    case 'computing':
      return phase ? `${phase}…` : 'working in a background worker…';
    case 'done':
      return message || `finished in ${formatDuration(wallMs)}`;
    default:
      return message;
  }
}

export function RunPanel() {
  const targets = useApp((s) => s.draft.targets);
  const status = useApp((s) => s.status);
  const message = useApp((s) => s.message);
  const phase = useApp((s) => s.phase);
  const progress = useApp((s) => s.progress);
  const wallMs = useApp((s) => s.comparison?.wallMs);
  const { plan, error, note } = useRunPlan();
  const pct = Math.round(progress * 100);
  const computing = status === 'computing' || status === 'loading';
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    void computeStart();
  };
  const k = plan?.targets.indices.length;
  const targetText = plan
    ? plan.targets.all
      ? `all ${formatCount(k)} particles`
      : `${formatCount(k)} drawn at random (seeded) of ${formatCount(plan.snapshot.n)}${plan.autoSampledFromMs ? ` — all would take ≈ ${formatDuration(plan.autoSampledFromMs)}` : ''}`
    : '—';
  return (
    <section className="card" aria-labelledby="run-title">
      <h2 id="run-title">Run</h2>
      <form className="run-form" onSubmit={onSubmit}>
        <label className="grow">
          <span>targets</span>
          <input name="targets" value={targets} onChange={(e) => draftSet({ targets: e.target.value })} title='"auto" (all when affordable, else 10 000), "all", or a number drawn at random (seeded)' />
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
      <p className="run-plan" data-testid="run-plan" data-expected-ms={plan ? String(Math.round(plan.expectedMs)) : ''}>
        {error ? (
          <span className="plan-error">{error}</span>
        ) : note ? (
          note
        ) : plan ? (
          <>
            {targetText};{' '}
            {plan.a.cached && plan.b.cached
              ? 'both computed — Compute again only redoes the statistics'
              : `expected ${plan.expectedMs < 50 ? 'well under a second' : `≈ ${formatDuration(plan.expectedMs)}`}`}
          </>
        ) : null}
      </p>
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
          {statusDetail(status, message, phase, wallMs)}
        </span>
      </p>
    </section>
  );
}
