/**
 * The mapping step: what a dropped file holds (arrays, shapes, types, attributes) and which of them
 * are positions, masses, the code's accelerations, ids and softening; the box and the units. Opens
 * when a file's layout is new and not self-explaining; the choice is remembered for its layout.
 */
import { type FormEvent, useEffect, useRef } from 'react';
import { boxOptions, fieldOptions, unitChoices, vectorOptions } from '../../loading/mappingChoice';
import { mappingCancel, mappingConfirm, mappingEdit } from '../../state/loadActions';
import { FileContents } from './FileContents';
import { RefSelect } from './RefSelect';
import { useLoad } from './useLoad';
import './mapping.css';

export function MappingDialog() {
  const step = useLoad((s) => s.step);
  const first = useRef<HTMLSelectElement>(null);
  useEffect(() => {
    if (!step) return;
    // focus once the dialog has been laid out and painted: focusing in the effect forced a layout of the
    // whole dialog inside the task that rendered it (which a worker's message started), ~100 ms in one task
    let timer = 0;
    const frame = requestAnimationFrame(() => {
      timer = window.setTimeout(() => first.current?.focus({ preventScroll: true }), 0);
    });
    const onKey = (e: KeyboardEvent) => {
      if (e.key === 'Escape') mappingCancel();
    };
    window.addEventListener('keydown', onKey);
    return () => {
      cancelAnimationFrame(frame);
      clearTimeout(timer);
      window.removeEventListener('keydown', onKey);
    };
  }, [step?.description]);
  if (!step) return null;
  const d = step.description;
  const f = step.draft;
  const fields = fieldOptions(d);
  const vectors = vectorOptions(d);
  const boxes = boxOptions(d);
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    void mappingConfirm();
  };
  const xyz = (prefix: 'p' | 'a', values: readonly string[], label: string) => (
    <div className="map-xyz">
      {(['x', 'y', 'z'] as const).map((c, i) => (
        <RefSelect key={c} testId={`map-${prefix}${c}`} label={`${label} ${c}`} value={values[i]} options={fields} onChange={(v) => mappingEdit({ [`${prefix}${c}`]: v })} />
      ))}
    </div>
  );
  return (
    <div className="map-backdrop" role="presentation">
      <form className="map-dialog" role="dialog" aria-modal="true" aria-labelledby="map-title" data-testid="mapping-dialog" data-describe-ms={String(Math.round(step.describeMs))} onSubmit={onSubmit}>
        <h2 id="map-title">
          What does <span className="map-file">{step.fileName}</span> hold?
        </h2>
        {d.proposal.notes.length > 0 ? (
          <ul className="map-notes" data-testid="map-notes">
            {d.proposal.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        ) : null}
        <div className="map-columns">
          <FileContents d={d} />
          <div className="map-choices">
            <fieldset>
              <legend>positions</legend>
              <label className="map-field">
                <span>held in</span>
                <select ref={first} data-testid="map-positions-mode" value={f.positionsMode} onChange={(e) => mappingEdit({ positionsMode: e.target.value as 'one' | 'three' })}>
                  <option value="one" disabled={vectors.length === 0}>
                    one array of shape (N, 3)
                  </option>
                  <option value="three">three separate x, y, z</option>
                </select>
              </label>
              {f.positionsMode === 'one' ? (
                <RefSelect testId="map-positions" label="array" value={f.positions} options={vectors} onChange={(v) => mappingEdit({ positions: v })} />
              ) : (
                xyz('p', [f.px, f.py, f.pz], 'position')
              )}
            </fieldset>
            <fieldset>
              <legend>masses</legend>
              <RefSelect testId="map-mass" label="from" value={f.mass} options={fields} none="the same for every particle" onChange={(v) => mappingEdit({ mass: v })} />
              {f.mass === '' ? (
                <label className="map-field">
                  <span>mass of each</span>
                  <input data-testid="map-mass-default" value={f.massDefault} onChange={(e) => mappingEdit({ massDefault: e.target.value })} />
                </label>
              ) : null}
            </fieldset>
            <fieldset>
              <legend>accelerations your code computed</legend>
              <label className="map-field">
                <span>held in</span>
                <select data-testid="map-acc-mode" value={f.accMode} onChange={(e) => mappingEdit({ accMode: e.target.value as 'none' | 'one' | 'three' })}>
                  <option value="none">not in this file</option>
                  <option value="one" disabled={vectors.length === 0}>
                    one array of shape (N, 3)
                  </option>
                  <option value="three">three separate x, y, z</option>
                </select>
              </label>
              {f.accMode === 'one' ? <RefSelect testId="map-acc" label="array" value={f.acc} options={vectors} onChange={(v) => mappingEdit({ acc: v })} /> : null}
              {f.accMode === 'three' ? xyz('a', [f.ax, f.ay, f.az], 'acceleration') : null}
            </fieldset>
            <fieldset>
              <legend>per particle, optional</legend>
              <RefSelect testId="map-ids" label="ids" value={f.ids} options={fields} none="none (row numbers)" onChange={(v) => mappingEdit({ ids: v })} />
              <RefSelect testId="map-softening" label="softening length" value={f.softening} options={fields} none="none" onChange={(v) => mappingEdit({ softening: v })} />
            </fieldset>
            <fieldset>
              <legend>periodic box</legend>
              <label className="map-field">
                <span>side(s)</span>
                <select data-testid="map-box-mode" value={f.boxMode} onChange={(e) => mappingEdit({ boxMode: e.target.value as 'file' | 'typed' | 'guess' })}>
                  <option value="file" disabled={boxes.length === 0}>
                    from an entry of the file
                  </option>
                  <option value="typed">typed here</option>
                  <option value="guess">guessed from the coordinates</option>
                </select>
              </label>
              {f.boxMode === 'file' ? (
                <label className="map-field">
                  <span>entry</span>
                  <select data-testid="map-box-ref" value={f.boxRef} onChange={(e) => mappingEdit({ boxRef: e.target.value })}>
                    {boxes.map((b) => (
                      <option key={b.value} value={b.value}>
                        {b.label}
                      </option>
                    ))}
                  </select>
                </label>
              ) : null}
              {f.boxMode === 'typed' ? (
                <label className="map-field">
                  <span>L or Lx,Ly,Lz</span>
                  <input data-testid="map-box-text" value={f.boxText} onChange={(e) => mappingEdit({ boxText: e.target.value })} />
                </label>
              ) : null}
            </fieldset>
            <fieldset>
              <legend>units</legend>
              <label className="map-field">
                <span>system</span>
                <select data-testid="map-units" value={f.units} onChange={(e) => mappingEdit({ units: e.target.value })}>
                  {unitChoices().map((u) => (
                    <option key={u.value} value={u.value}>
                      {u.label}
                    </option>
                  ))}
                </select>
              </label>
              {f.units === 'custom' ? (
                <label className="map-field">
                  <span>G</span>
                  <input data-testid="map-G" value={f.G} onChange={(e) => mappingEdit({ G: e.target.value })} />
                </label>
              ) : null}
              <label className="map-field">
                <span>keep every</span>
                <input data-testid="map-every" inputMode="numeric" value={f.every} onChange={(e) => mappingEdit({ every: e.target.value })} title="1 keeps all particles; K keeps every K-th (masses scaled by K) for files too large to load whole" />
              </label>
            </fieldset>
          </div>
        </div>
        {step.error ? (
          <p className="map-error" role="alert" data-testid="map-error">
            {step.error}
          </p>
        ) : null}
        <div className="map-buttons">
          <button type="button" className="secondary" data-testid="map-cancel" onClick={mappingCancel}>
            Keep the current snapshot
          </button>
          <button type="submit" className="primary" data-testid="map-confirm">
            Load with this mapping
          </button>
        </div>
        <p className="map-facts">This choice is remembered for files of the same layout; they then load without this step.</p>
      </form>
    </div>
  );
}
