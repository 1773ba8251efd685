/** What is being compared: the snapshot (demo or a dropped file), its box, masses and stored accelerations. */
import { type DragEvent, useRef, useState } from 'react';
import { formatBox, formatCount, formatNumber } from '../format';
import { demoReturn } from '../state/pipeline';
import { fileOpen } from '../state/loadActions';
import { LoadSummary } from './mapping/LoadSummary';
import { draftSet } from '../state/store';
import { useApp } from '../state/useApp';
import { Stat } from './Stat';

/** Hands a dropped or chosen file to the loader (the worker reads it in slices). */
async function fileTake(file: File): Promise<void> {
  await fileOpen(file, file.name);
}

/** File endings the picker offers (any file can still be dropped; the format is read from its content). */
const SNAPSHOT_ACCEPT = '.csv,.tsv,.txt,.dat,.asc,.gz,.npy,.npz,.h5,.hdf5,.hdf,.he5,text/csv,text/plain';

export function SnapshotPanel() {
  const snapshot = useApp((s) => s.snapshot);
  const draft = useApp((s) => s.draft);
  const wanted = useApp((s) => s.wantedFile);
  const busy = useApp((s) => s.status === 'loading');
  const [over, setOver] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const isFile = snapshot?.kind === 'file';
  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setOver(false);
    const f = e.dataTransfer.files?.[0];
    if (f) void fileTake(f);
  };
  return (
    <section className="card" data-testid="snapshot" aria-labelledby="snapshot-title">
      <h2 id="snapshot-title">Snapshot</h2>
      <div
        className={`dropzone${over ? ' dropzone-over' : ''}`}
        onDragOver={(e) => {
          e.preventDefault();
          setOver(true);
        }}
        onDragLeave={() => setOver(false)}
        onDrop={onDrop}
      >
        <input
          ref={input}
          type="file"
          accept={SNAPSHOT_ACCEPT}
          data-testid="file-input"
          className="visually-hidden"
          id="file-input"
          onChange={(e) => {
            const f = e.target.files?.[0];
            if (f) void fileTake(f);
            e.target.value = '';
          }}
        />
        <label htmlFor="file-input" className="drop-label">
          <strong>{busy ? 'reading…' : 'Drop a snapshot here'}</strong> or <span className="link-like">choose a file</span>
          <span className="drop-hint">anywhere on the page · text (.csv .tsv .txt .dat, also .gz), NumPy .npy/.npz, HDF5 · a header x, y, z (m, ax, ay, az) loads at once; otherwise you choose the arrays</span>
        </label>
      </div>
      {wanted ? (
        <p className="notice" data-testid="wanted-file">
          This link was made for <strong>{wanted.name}</strong>
          {wanted.n ? ` (${formatCount(wanted.n)} particles)` : ''}: drop that file to see the same view. The demo is shown meanwhile.
        </p>
      ) : null}
      <LoadSummary />
      <p className="card-note" data-testid="snapshot-source">
        {snapshot ? (snapshot.kind === 'demo' ? `${snapshot.source}, seed ${snapshot.seed}` : snapshot.source) : 'no snapshot loaded'}
      </p>
      <dl className="stats">
        <Stat name="n" label="N (particles)" text={formatCount(snapshot?.n)} value={snapshot?.n} />
        {isFile ? (
          <div className="stat" data-key="box" data-value={snapshot ? `${snapshot.box.lx} ${snapshot.box.ly} ${snapshot.box.lz}` : ''}>
            <dt>box side{snapshot?.boxGuessed ? ' (guessed)' : ''}</dt>
            <dd>
              <input
                className="inline-input"
                name="box"
                value={draft.box}
                onChange={(e) => draftSet({ box: e.target.value })}
                title="one side for a cube, or Lx,Ly,Lz; files carry no box, so check this"
              />
            </dd>
          </div>
        ) : (
          <Stat name="box" label="box side" text={formatBox(snapshot?.box)} value={snapshot ? `${snapshot.box.lx} ${snapshot.box.ly} ${snapshot.box.lz}` : null} unit="length" />
        )}
        <Stat name="mass" label="total mass" text={formatNumber(snapshot?.totalMass)} value={snapshot?.totalMass} />
        <Stat
          name="acc"
          label="accelerations in file"
          text={snapshot?.accelerationColumns ? snapshot.accelerationColumns.join(', ') : isFile ? 'none found' : '— (demo)'}
          value={snapshot?.accelerationColumns?.join(',') ?? ''}
        />
        {isFile && snapshot && snapshot.outside > 0 ? (
          <Stat name="outside" label="outside the box" text={`${formatCount(snapshot.outside)} (wrapped)`} value={snapshot.outside} hint="positions outside [0, L) are wrapped into the box before computing" />
        ) : null}
        <div className="stat" data-key="G" data-value={draft.G}>
          <dt>G</dt>
          <dd>
            <input className="inline-input" name="G" value={draft.G} onChange={(e) => draftSet({ G: e.target.value })} title="gravitational constant in the snapshot’s units (used by computed methods)" />
          </dd>
        </div>
      </dl>
      {isFile ? (
        <button type="button" className="quiet" onClick={() => void demoReturn()}>
          back to the built-in demo
        </button>
      ) : (
        <div className="inline-fields">
          <label>
            <span>demo particles</span>
            <input name="n" inputMode="numeric" value={draft.n} onChange={(e) => draftSet({ n: e.target.value })} />
          </label>
          <label>
            <span>seed</span>
            <input name="seed" inputMode="numeric" value={draft.seed} onChange={(e) => draftSet({ seed: e.target.value })} />
          </label>
        </div>
      )}
    </section>
  );
}
