/** The plots: error distribution, error against |a_B| and against neighbours, and convergence. */
import { useDeferredValue, useMemo, useState } from 'react';
import { convergencePlot } from '../plots/convergencePlot';
import { distributionPlot } from '../plots/distributionPlot';
import { orderConvergencePlot } from '../plots/orderConvergencePlot';
import { convergenceData, distributionData, orderConvergenceData, orderDefaultComponent, orderDeviationData, scatterByAcceleration, scatterByNeighbours } from '../plots/plotData';
import { type OrderTrace, runHasTrace } from '../state/orderRuns';
import { scatterPlot } from '../plots/scatterPlot';
import { convergenceStart } from '../state/pipeline';
import type { ScatterAxis } from '../state/settings';
import { viewSet } from '../state/store';
import type { Comparison, ConvergenceRun } from '../state/types';
import { useApp } from '../state/useApp';
import { SvgPlot } from './SvgPlot';

// One component per plot: a deferred render can then yield to the page between plots.

function DistributionFigure({ cmp }: { cmp: Comparison }) {
  const svg = useMemo(() => distributionPlot(distributionData(cmp), 560, 340), [cmp]);
  return (
    <figure className="plot">
      <SvgPlot svg={svg} testId="plot-distribution" />
    </figure>
  );
}

function AccelerationFigure({ cmp, selected }: { cmp: Comparison; selected: number | null }) {
  const svg = useMemo(() => scatterPlot(scatterByAcceleration(cmp, selected), 560, 300), [cmp, selected]);
  return (
    <figure className="plot">
      <SvgPlot svg={svg} testId="plot-vs-acc" />
    </figure>
  );
}

function NeighbourFigure({ cmp, selected, axis }: { cmp: Comparison; selected: number | null; axis: ScatterAxis }) {
  const svg = useMemo(() => {
    const d = scatterByNeighbours(cmp, axis, selected);
    return d ? scatterPlot(d, 560, 300) : '';
  }, [cmp, axis, selected]);
  return <figure className="plot">{svg ? <SvgPlot svg={svg} testId="plot-vs-neighbours" /> : <p className="card-note">neighbours not computed</p>}</figure>;
}

function ConvergenceFigures({ conv, cmp }: { conv: ConvergenceRun | null; cmp: Comparison }) {
  const svgs = useMemo(
    () => (conv && conv.snapshotId === cmp.snapshotId ? conv.series.map((s) => ({ key: s.method, svg: convergencePlot(convergenceData(conv, s), 560, 300) })) : []),
    [conv, cmp],
  );
  return (
    <div className="plot-grid">
      {svgs.map((c) => (
        <figure className="plot" key={c.key}>
          <SvgPlot svg={c.svg} testId={`plot-convergence-${c.key}`} />
        </figure>
      ))}
    </div>
  );
}

function OrderDeviationFigure({ trace, floor }: { trace: OrderTrace; floor: number }) {
  const svg = useMemo(() => {
    const d = orderDeviationData(trace, floor);
    return d ? convergencePlot(d, 560, 300) : '';
  }, [trace, floor]);
  return svg ? (
    <figure className="plot">
      <SvgPlot svg={svg} testId={`plot-deviation-${trace.method}`} />
    </figure>
  ) : null;
}

function OrderFigure({ trace, ids }: { trace: OrderTrace; ids: Float64Array | null }) {
  const [chosen, setChosen] = useState<'auto' | '0' | '1' | '2'>('auto');
  const component = chosen === 'auto' ? orderDefaultComponent(trace) : (Number(chosen) as 0 | 1 | 2);
  const svg = useMemo(() => orderConvergencePlot(orderConvergenceData(trace, component, ids), 560), [trace, component, ids]);
  return (
    <figure className="plot">
      <label className="inline-choice">
        <span>component</span>
        <select value={chosen} onChange={(e) => setChosen(e.target.value as typeof chosen)} data-testid={`order-component-${trace.method}`}>
          <option value="auto">auto ({'xyz'[orderDefaultComponent(trace)]}: {trace.limit && trace.order !== 'screened' ? 'where the limit departs from Ewald' : 'largest'})</option>
          <option value="0">x</option>
          <option value="1">y</option>
          <option value="2">z</option>
        </select>
      </label>
      <SvgPlot svg={svg} testId={`plot-convergence-${trace.method}`} />
    </figure>
  );
}

function OrderFigures({ conv, cmp }: { conv: ConvergenceRun | null; cmp: Comparison }) {
  const ids = useApp((s) => s.snapshot?.ids ?? null);
  const shown = conv && conv.snapshotId === cmp.snapshotId ? (conv.orders ?? []).filter((t) => t.runKey === cmp.runA.key || t.runKey === cmp.runB.key) : [];
  if (!shown.length) return null;
  return (
    <div className="plot-grid">
      {shown.map((t) => (
        <OrderFigure key={t.runKey} trace={t} ids={ids} />
      ))}
      {shown.map((t) => (
        <OrderDeviationFigure key={`${t.runKey}-dev`} trace={t} floor={conv!.referenceTol} />
      ))}
    </div>
  );
}

export function PlotsPanel() {
  // plots follow the comparison in a deferred (interruptible) render, after the rest of the page
  const cmp = useDeferredValue(useApp((s) => s.comparison));
  const selected = useDeferredValue(useApp((s) => s.selected));
  const scatterX = useApp((s) => s.draft.view.scatterX);
  const conv = useDeferredValue(useApp((s) => s.convergence));
  const convStatus = useApp((s) => s.convergenceStatus);
  const convMessage = useApp((s) => s.convergenceMessage);
  const busy = useApp((s) => s.status === 'computing' || s.status === 'loading');
  const sweepable = cmp && ([cmp.runA.method, cmp.runB.method].some((m) => m === 'ewald' || m === 'mesh') || runHasTrace(cmp.runA) || runHasTrace(cmp.runB));
  const measured = !!conv && !!cmp && conv.snapshotId === cmp.snapshotId;
  return (
    <section className="card plots" aria-labelledby="plots-title" data-testid="plots">
      <div className="card-title-row">
        <h2 id="plots-title">Plots</h2>
        <label className="inline-choice">
          <span>third plot against</span>
          <select value={scatterX} onChange={(e) => viewSet({ scatterX: e.target.value as ScatterAxis })} data-testid="scatter-x">
            <option value="nearest">nearest-neighbour distance</option>
            <option value="density">local density</option>
          </select>
        </label>
      </div>
      {cmp ? (
        <>
          <div className="plot-grid">
            <DistributionFigure cmp={cmp} />
            <AccelerationFigure cmp={cmp} selected={selected} />
            <NeighbourFigure cmp={cmp} selected={selected} axis={scatterX} />
          </div>
          <h3 className="plots-sub">Convergence</h3>
          <div className="plot-tools">
            <button type="button" className="quiet small" data-testid="convergence-run" disabled={!sweepable || busy || convStatus === 'computing'} onClick={() => void convergenceStart()}>
              {convStatus === 'computing' ? 'measuring…' : measured ? 'measure again' : 'measure convergence'}
            </button>
            <span className="plot-tools-note">
              {sweepable
                ? 'each computed method at several settings (image-sum orders: shell by shell), on 16 targets (the 4 worst and 12 drawn at random), against Ewald at tolerance 10⁻¹¹'
                : 'no method here with settings to refine (the file’s accelerations, PME and the nearest image have none)'}
            </span>
          </div>
          {convStatus === 'error' ? <p className="plan-error">{convMessage}</p> : null}
          <ConvergenceFigures conv={conv} cmp={cmp} />
          <OrderFigures conv={conv} cmp={cmp} />
        </>
      ) : (
        <p className="card-note">The plots appear when the first comparison is done.</p>
      )}
    </section>
  );
}
