/** The result of the last computation: parameters chosen, predicted error, a summary of |a|. */
import { formatCount, formatDuration, formatNumber } from '../format';
import { useApp } from '../state/useApp';
import { Stat } from './Stat';

export function StatsPanel() {
  const run = useApp((s) => s.run);
  const n = useApp((s) => s.snapshot?.n);
  const p = run?.params;
  const t = run?.targets.length;
  const targetsText = run ? (t === n ? `all ${formatCount(t)}` : `${formatCount(t)} sampled of ${formatCount(n)}`) : '—';
  return (
    <section className="card" data-testid="stats" aria-labelledby="stats-title">
      <h2 id="stats-title">Result</h2>
      <div className="stats-groups">
        <div className="group">
          <h3>Run</h3>
          <dl className="stats">
            <Stat name="targets" label="targets" text={targetsText} value={t} />
            <Stat name="wall" label="wall time" text={formatDuration(run?.wallMs)} value={run?.wallMs} hint="from pressing Compute to the result on this page" />
            <Stat name="worker" label="in the worker" text={formatDuration(run?.workerMs)} value={run?.workerMs} />
            <Stat name="wrapped" label="wrapped into box" text={formatCount(run?.wrapped)} value={run?.wrapped} hint="particles that lay outside the home cell" />
          </dl>
        </div>
        <div className="group">
          <h3>Parameters chosen</h3>
          <dl className="stats">
            <Stat name="alpha" label="α (splitting)" text={formatNumber(p?.alpha)} value={p?.alpha} unit="1/length" />
            <Stat name="rCut" label="r cut" text={formatNumber(p?.rCut)} value={p?.rCut} unit="length" />
            <Stat name="kCut" label="k cut" text={formatNumber(p?.kCut)} value={p?.kCut} unit="1/length" />
            <Stat name="kVectors" label="k-vectors" text={p ? `${formatCount(p.kVectors)} (|h| ≤ ${p.hMax.join(', ')})` : '—'} value={p?.kVectors} hint="half-space k-vectors summed, largest |h| per axis" />
            <Stat name="cells" label="cells" text={p ? `${p.cells.join(' × ')}, stencil ${p.stencilCells}` : '—'} value={p ? p.cells.join('x') : null} hint="real-space cell list: cells per side and stencil size" />
            <Stat name="clustering" label="clustering factor" text={formatNumber(p?.clustering, 3)} value={p?.clustering} hint="N_cells Σ n_c² / N²; about 1 for uniform positions" />
          </dl>
        </div>
        <div className="group">
          <h3>Predicted error</h3>
          <dl className="stats">
            <Stat name="tol" label="tolerance asked" text={formatNumber(p?.tol, 3)} value={p?.tol} />
            <Stat name="predictedRelativeError" label="relative error" text={formatNumber(p?.predictedRelativeError, 3)} value={p?.predictedRelativeError} hint="predicted rms error ÷ the smallest |a| expected among N particles" />
            <Stat name="predictedRmsError" label="rms error" text={formatNumber(p?.predictedRmsError, 3)} value={p?.predictedRmsError} unit="acc." />
            <Stat name="accelerationScale" label="relative to" text={formatNumber(p?.accelerationScale, 3)} value={p?.accelerationScale} unit="acc." hint="the acceleration the tolerance refers to" />
          </dl>
        </div>
        <div className="group">
          <h3>Accelerations</h3>
          <dl className="stats">
            <Stat name="rmsAcc" label="rms |a|" text={formatNumber(run?.summary.rms)} value={run?.summary.rms} unit="acc." />
            <Stat name="maxAcc" label="max |a|" text={formatNumber(run?.summary.max)} value={run?.summary.max} unit="acc." />
            <Stat name="minAcc" label="min |a|" text={formatNumber(run?.summary.min)} value={run?.summary.min} unit="acc." />
          </dl>
        </div>
      </div>
      <p className="card-note">Units: G = 1, lengths and masses as in the snapshot; acc. = G·mass/length².</p>
    </section>
  );
}
