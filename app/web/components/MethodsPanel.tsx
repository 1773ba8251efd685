/** The two compared methods, A (under test) and B (reference): choice, parameters, chosen values and predicted error. */
import { formatDuration, formatNumber } from '../format';
import { type MethodId, METHODS, methodSpec, paramsVisible } from '../methods/registry';
import type { SlotPlan } from '../state/runPlan';
import { slotMethodSet, slotParamSet, slotsSwap } from '../state/store';
import { useApp } from '../state/useApp';
import { useRunPlan } from '../state/useRunPlan';

function SlotCard({ slot, plan }: { slot: 'a' | 'b'; plan: SlotPlan | null }) {
  const draft = useApp((s) => s.draft[slot]);
  const hasAcc = useApp((s) => !!s.snapshot?.accelerations);
  const spec = methodSpec(draft.method);
  const ready = METHODS.filter((m) => m.ready);
  const letter = slot.toUpperCase();
  return (
    <div className={`slot slot-${slot}`} data-slot={slot}>
      <div className="slot-head">
        <span className={`slot-letter slot-letter-${slot}`}>{letter}</span>
        <label className="slot-select">
          <span className="visually-hidden">method {letter}</span>
          <select data-testid={`method-${slot}`} value={draft.method} onChange={(e) => slotMethodSet(slot, e.target.value as MethodId)}>
            {ready.map((m) => (
              <option key={m.id} value={m.id} disabled={m.id === 'file' && !hasAcc}>
                {m.label}
                {m.id === 'file' && !hasAcc ? ' — no accelerations in this snapshot' : ''}
              </option>
            ))}
          </select>
        </label>
      </div>
      <p className="slot-desc">
        <span className="slot-role">{slot === 'a' ? 'compared' : 'reference'}</span> {spec.description}
      </p>
      {spec.params.length ? (
        <div className="param-grid">
          {paramsVisible(draft.method, draft.params).map((p) => (
            <label key={p.key} title={p.hint}>
              <span>{p.label}</span>
              {p.choices ? (
                <select name={`${slot}.${p.key}`} value={draft.params[p.key] ?? p.defaultValue} onChange={(e) => slotParamSet(slot, p.key, e.target.value)}>
                  {p.choices.map((c) => (
                    <option key={c.value} value={c.value}>
                      {c.label}
                    </option>
                  ))}
                </select>
              ) : (
                <input name={`${slot}.${p.key}`} value={draft.params[p.key] ?? p.defaultValue} onChange={(e) => slotParamSet(slot, p.key, e.target.value)} />
              )}
            </label>
          ))}
        </div>
      ) : null}
      {plan ? (
        <dl className="plan" data-testid={`plan-${slot}`}>
          {plan.plan.lines.map((l) => (
            <div key={l.key} data-key={l.key} data-value={String(l.value)} title={l.hint}>
              <dt>{l.label}</dt>
              <dd>
                {typeof l.value === 'number' ? formatNumber(l.value) : l.value}
                {l.unit ? <span className="stat-unit">{l.unit}</span> : null}
              </dd>
            </div>
          ))}
          {plan.plan.predictedRelative !== null ? (
            <div data-key="predicted" data-value={String(plan.plan.predictedRelative)}>
              <dt>predicted error</dt>
              <dd>{formatNumber(plan.plan.predictedRelative, 3)} relative</dd>
            </div>
          ) : null}
          <div data-key="expected" data-value={String(plan.expectedMs)}>
            <dt>time</dt>
            <dd>{plan.cached ? 'computed — re-used' : plan.plan.costNs === 0 ? 'none (read from file)' : `≈ ${formatDuration(Math.max(plan.expectedMs, 1))}`}</dd>
          </div>
        </dl>
      ) : null}
      {plan?.plan.note ? <p className="slot-note">{plan.plan.note}</p> : null}
    </div>
  );
}

export function MethodsPanel() {
  const { plan } = useRunPlan();
  return (
    <section className="card" aria-labelledby="methods-title">
      <div className="card-title-row">
        <h2 id="methods-title">Methods</h2>
        <button type="button" className="quiet small" onClick={slotsSwap} title="swap A and B">
          swap A ⇄ B
        </button>
      </div>
      <SlotCard slot="a" plan={plan?.a ?? null} />
      <SlotCard slot="b" plan={plan?.b ?? null} />
      <p className="card-note">Relative error of each target: |a_A − a_B| / |a_B|, B being the reference.</p>
    </section>
  );
}
