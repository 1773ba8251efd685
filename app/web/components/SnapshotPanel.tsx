/** What is being computed: the particles, their box and masses. */
import { formatBox, formatCount, formatNumber } from '../format';
import { useApp } from '../state/useApp';
import { ProjectionView } from './ProjectionView';
import { Stat } from './Stat';

export function SnapshotPanel() {
  const snapshot = useApp((s) => s.snapshot);
  return (
    <section className="card" data-testid="snapshot" aria-labelledby="snapshot-title">
      <h2 id="snapshot-title">Snapshot</h2>
      <p className="card-note">{snapshot ? `${snapshot.source}, seed ${snapshot.seed}` : 'no snapshot loaded'}</p>
      <div className="snapshot-body">
        <dl className="stats">
          <Stat name="n" label="N (particles)" text={formatCount(snapshot?.n)} value={snapshot?.n} />
          <Stat name="box" label="box side" text={formatBox(snapshot?.box)} value={snapshot ? `${snapshot.box.lx} ${snapshot.box.ly} ${snapshot.box.lz}` : null} unit="length" />
          <Stat name="mass" label="total mass" text={formatNumber(snapshot?.totalMass)} value={snapshot?.totalMass} />
          <Stat name="G" label="G" text="1" value={1} hint="gravitational constant used by this page" />
          <Stat name="time" label="snapshot time" text="—" hint="the demo snapshot carries no simulation time" />
        </dl>
        <ProjectionView snapshot={snapshot} />
      </div>
    </section>
  );
}
