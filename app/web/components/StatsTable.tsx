/** The numbers of the comparison: N, targets, error percentiles, max, rms, rms ratio, and the worst particles. */
import { formatCount, formatDuration, formatNumber } from '../format';
import { flyToTarget } from '../state/store';
import { useApp } from '../state/useApp';
import { Stat } from './Stat';

/** Shown id of an input row: the file's id column, else the 0-based row. */
export function particleId(ids: Float64Array | null | undefined, row: number): number {
  return ids ? ids[row] : row;
}

const WORST_SHOWN = 10;

export function StatsTable() {
  const cmp = useApp((s) => s.comparison);
  const snapshot = useApp((s) => s.snapshot);
  const selected = useApp((s) => s.selected);
  const sm = cmp?.summary;
  const K = cmp?.targets.indices.length;
  const p = sm?.percentiles ?? [];
  return (
    <section className="card" data-testid="stats" aria-labelledby="stats-title">
      <h2 id="stats-title">Statistics</h2>
      {cmp ? (
        <p className="card-note compare-line">
          <span className="slot-letter slot-letter-a">A</span> {cmp.runA.label} <span className="vs">against</span> <span className="slot-letter slot-letter-b">B</span> {cmp.runB.label}
        </p>
      ) : (
        <p className="card-note">no comparison yet</p>
      )}
      <div className="stats-columns">
        <dl className="stats">
          <Stat name="n" label="N (particles)" text={formatCount(snapshot?.n)} value={snapshot?.n} />
          <Stat name="targets" label="targets" text={cmp ? (cmp.targets.all ? `all ${formatCount(K)}` : `${formatCount(K)} sampled`) : '—'} value={K} />
          <Stat name="p50" label="median" text={formatNumber(p[0], 3)} value={p[0]} hint="50th percentile of the relative error (linear interpolation between order statistics)" />
          <Stat name="p90" label="90th percentile" text={formatNumber(p[1], 3)} value={p[1]} />
          <Stat name="p99" label="99th percentile" text={formatNumber(p[2], 3)} value={p[2]} />
          <Stat name="p999" label="99.9th percentile" text={formatNumber(p[3], 3)} value={p[3]} />
          <Stat name="max" label="max" text={formatNumber(sm?.max, 3)} value={sm?.max} />
        </dl>
        <dl className="stats">
          <Stat name="rmsError" label="rms |a_A − a_B|" text={formatNumber(sm?.rmsError, 3)} value={sm?.rmsError} unit="acc." />
          <Stat name="rmsReference" label="rms |a_B|" text={formatNumber(sm?.rmsReference, 3)} value={sm?.rmsReference} unit="acc." />
          <Stat name="rmsRatio" label="rms error ÷ rms |a_B|" text={formatNumber(sm?.rmsRatio, 3)} value={sm?.rmsRatio} hint="robust where forces nearly cancel (nearly uniform regions)" />
          {sm && sm.zeroReference + sm.nonFinite > 0 ? (
            <Stat name="undefined" label="undefined" text={`${formatCount(sm.zeroReference)} with |a_B| = 0, ${formatCount(sm.nonFinite)} not finite`} value={sm.zeroReference + sm.nonFinite} />
          ) : null}
          <Stat name="wall" label="time to result" text={formatDuration(cmp?.wallMs)} value={cmp?.wallMs} hint="from pressing Compute to this comparison (re-used results take no time)" />
          <Stat name="worker" label="in the worker" text={formatDuration(cmp?.workerMs)} value={cmp?.workerMs} />
        </dl>
      </div>
      <h3>Worst particles</h3>
      {cmp && sm ? (
        <ol className="worst-list" data-testid="worst-list">
          {Array.from(sm.worst.subarray(0, WORST_SHOWN)).map((t, i) => {
            const row = cmp.targets.indices[t];
            return (
              <li key={t}>
                <button type="button" className={`worst${selected === t ? ' worst-selected' : ''}`} data-testid={`worst-${i}`} data-target={t} onClick={() => flyToTarget(t)} title="show this particle in the 3D view">
                  <span className="worst-id">id {particleId(snapshot?.ids, row)}</span>
                  <span className="worst-err">{formatNumber(cmp.relative[t], 3)}</span>
                </button>
              </li>
            );
          })}
        </ol>
      ) : (
        <p className="card-note">—</p>
      )}
      <p className="card-note">Units: G as set, lengths and masses as in the snapshot; acc. = G·mass/length².</p>
    </section>
  );
}
