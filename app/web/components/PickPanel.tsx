/** The picked particle: id, position, both accelerations, the residual, its neighbours. */
import { formatNumber, formatVector } from '../format';
import { select } from '../state/store';
import { useApp } from '../state/useApp';
import { Stat } from './Stat';
import { particleId } from './StatsTable';

export function PickPanel() {
  const cmp = useApp((s) => s.comparison);
  const t = useApp((s) => s.selected);
  const snapshot = useApp((s) => s.snapshot);
  if (!cmp || t === null || !snapshot || t >= cmp.targets.indices.length) {
    return (
      <section className="card pick" data-testid="pick" aria-labelledby="pick-title">
        <h2 id="pick-title">Particle</h2>
        <p className="card-note">Click a particle in the 3D view, or one of the worst in the list, to see it here.</p>
      </section>
    );
  }
  const row = cmp.targets.indices[t];
  const a = cmp.runA.acc.subarray(3 * t, 3 * t + 3);
  const b = cmp.runB.acc.subarray(3 * t, 3 * t + 3);
  const r = [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
  const pos = snapshot.positions.subarray(3 * row, 3 * row + 3);
  const nb = cmp.neighbours;
  const density = nb ? nb.density[t] / nb.meanDensity : NaN;
  return (
    <section className="card pick" data-testid="pick" aria-labelledby="pick-title">
      <div className="card-title-row">
        <h2 id="pick-title">Particle {particleId(snapshot.ids, row)}</h2>
        <button type="button" className="quiet small" onClick={() => select(null)}>
          clear
        </button>
      </div>
      <dl className="stats">
        <Stat name="id" label={snapshot.ids ? 'id (file)' : 'id (row)'} text={String(particleId(snapshot.ids, row))} value={particleId(snapshot.ids, row)} />
        <Stat name="position" label="position" text={formatVector(pos)} value={Array.from(pos).join(' ')} unit="length" />
        <Stat name="accA" label="a_A" text={formatVector(a)} value={Array.from(a).join(' ')} unit="acc." />
        <Stat name="accB" label="a_B" text={formatVector(b)} value={Array.from(b).join(' ')} unit="acc." />
        <Stat name="residual" label="a_A − a_B" text={formatVector(r, 3)} value={r.join(' ')} unit="acc." />
        <Stat name="relative" label="relative error" text={formatNumber(cmp.relative[t], 3)} value={cmp.relative[t]} />
        <Stat name="nearest" label="nearest neighbour" text={formatNumber(nb?.nearest[t], 3)} value={nb?.nearest[t]} unit="length" />
        <Stat name="density" label={`local density (k = ${nb?.kUsed ?? '—'})`} text={Number.isFinite(density) ? `${formatNumber(density, 3)} × mean` : '—'} value={density} hint="(k − 1) / volume of the sphere to the k-th neighbour, over the mean number density" />
      </dl>
    </section>
  );
}
