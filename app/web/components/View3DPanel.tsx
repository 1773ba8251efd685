/**
 * The 3D view panel: mounts the three.js view, feeds it from the store by a transient subscription
 * (no React re-render for particle data), and holds its controls (arrows, slab, other particles) and
 * the colour legend. Clicking a particle picks it.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { largestIndices } from '../../../engine/stats/errorSummary';
import { formatCount } from '../format';
import { errorColourScale, errorColours, errorLegend } from '../plots/colourScale';
import { type AppState, appStore, select, viewSet } from '../state/store';
import type { Comparison, Snapshot } from '../state/types';
import { useApp } from '../state/useApp';
import { drawOrderSliced, forSliced, slicer, worldPositionsSliced, yieldTask } from '../view3d/cloudBuild';
import { arrowSegments, slabContains, slabMake } from '../view3d/geometry';
import { MOVING_MIN_POINTS, type ViewHandle, viewCreate } from '../view3d/scene';
import { SvgPlot } from './SvgPlot';

/** Most arrows drawn in "all" mode. */
export const ARROWS_MAX = 20_000;

/** Error at the 2nd percentile, read off the thinned cumulative distribution (colour scale floor). */
function lowQuantile(c: Comparison): number {
  const { x, f } = c.cdf;
  for (let i = 0; i < x.length; i++) if (f[i] >= 0.02 && x[i] > 0) return x[i];
  return c.summary.median;
}

export function colourScaleOf(c: Comparison) {
  return errorColourScale(lowQuantile(c), c.summary.max);
}

interface Built {
  readonly cmp: Comparison | null;
  readonly snapshot: Snapshot | null;
  /** Draw slot → target index, and back (null: identity). */
  readonly order: Uint32Array | null;
  readonly slotOf: Uint32Array | null;
  readonly world: Float32Array | null;
}

interface DrawnInfo {
  readonly shown: number;
  readonly total: number;
  readonly software: boolean;
  /** What the cloud shows: the snapshot alone, or a comparison (its A and B run keys). */
  readonly of: string;
}

/** Feeds the view from the store, telling `onDrawn` what it draws; returns the unsubscribe function. */
function bind(view: ViewHandle, onDrawn: (d: DrawnInfo) => void): () => void {
  let built: Built = { cmp: null, snapshot: null, order: null, slotOf: null, world: null };
  const slot = (t: number) => (built.slotOf ? built.slotOf[t] : t);

  // clouds are built in slices of a few milliseconds (cloudBuild.ts), so that 10⁶ particles do not hold
  // the page; a newer snapshot or comparison supersedes a build under way
  let generation = 0;

  const cloud = async (s: AppState): Promise<boolean> => {
    const gen = ++generation;
    const { tick, yieldNow } = slicer(() => gen === generation);
    const snap = s.snapshot;
    const cmp = s.comparison && snap && s.comparison.snapshotId === snap.id ? s.comparison : null;
    if (!snap) return false;
    // software rendering draws at most view.capacity() points: only those are built (known once the
    // renderer runs, in the view worker)
    await view.ready;
    if (gen !== generation) return false;
    const cap = view.capacity();
    if (!cmp) {
      const m = Math.min(snap.n, cap);
      const order = snap.n > MOVING_MIN_POINTS ? await drawOrderSliced(snap.n, m, tick) : undefined;
      if (order === null) return false;
      const world = new Float32Array(3 * m);
      if (!(await worldPositionsSliced(world, snap.positions, snap.box, null, order, m, tick))) return false;
      view.setCloud(snap.box, null, null, world, snap.n);
      built = { cmp: null, snapshot: snap, order: null, slotOf: null, world: null };
      onDrawn({ ...view.drawn(), of: `snapshot ${snap.id}` });
      return true;
    }
    // every target is built (picking and flying to the worst need their places); the others as drawn
    const K = cmp.targets.indices.length;
    let order: Uint32Array | null = null;
    if (K > MOVING_MIN_POINTS) {
      order = await drawOrderSliced(K, K, tick);
      if (!order) return false;
    }
    let slotOf: Uint32Array | null = null;
    if (order) {
      slotOf = new Uint32Array(K);
      if (!(await forSliced(K, (b, e) => {
        for (let s2 = b; s2 < e; s2++) slotOf![order[s2]] = s2;
      }, tick))) return false;
    } else if (!(await tick())) return false;
    const world = new Float32Array(3 * K);
    if (!(await worldPositionsSliced(world, snap.positions, snap.box, cmp.targets.indices, order ?? undefined, K, tick))) return false;
    const scale = colourScaleOf(cmp);
    const colours = new Float32Array(3 * K);
    if (!(await forSliced(K, (b, e) => {
      if (!order) errorColours(scale, cmp.relative.subarray(b, e), colours, b);
      else {
        const rel = new Float64Array(e - b);
        for (let s2 = b; s2 < e; s2++) rel[s2 - b] = cmp.relative[order[s2]];
        errorColours(scale, rel, colours, b);
      }
    }, tick))) return false;
    let context: Float32Array | null = null;
    let contextTotal = 0;
    if (!cmp.targets.all) {
      // the other particles: the complement of the (sorted) target rows
      const ti = cmp.targets.indices;
      contextTotal = snap.n - K;
      const rows = new Int32Array(contextTotal);
      let k = 0, t = 0;
      if (!(await forSliced(snap.n, (b, e) => {
        for (let i = b; i < e; i++) {
          if (t < ti.length && ti[t] === i) t++;
          else rows[k++] = i;
        }
      }, tick))) return false;
      const m = Math.max(0, Math.min(contextTotal, cap - Math.min(K, cap)));
      const cOrder = contextTotal > MOVING_MIN_POINTS ? await drawOrderSliced(contextTotal, m, tick) : undefined;
      if (cOrder === null) return false;
      context = new Float32Array(3 * m);
      if (!(await worldPositionsSliced(context, snap.positions, snap.box, rows, cOrder, m, tick))) return false;
    }
    if (!(await yieldNow())) return false;
    view.setCloud(snap.box, world, colours, context, contextTotal);
    built = { cmp, snapshot: snap, order, slotOf, world };
    onDrawn({ ...view.drawn(), of: `comparison ${cmp.runA.key} ${cmp.runB.key}` });
    return true;
  };

  const arrows = (s: AppState) => {
    const cmp = built.cmp;
    if (!cmp || !built.world) {
      view.setArrows(null);
      return;
    }
    const v = s.draft.view;
    const K = cmp.targets.indices.length;
    let which: Int32Array;
    if (v.arrows === 'none') which = new Int32Array(0);
    else if (v.arrows === 'all' && K <= ARROWS_MAX) which = Int32Array.from({ length: K }, (_, i) => i);
    else which = largestIndices(cmp.relative, Math.max(0, Math.min(v.arrows === 'all' ? ARROWS_MAX : Number(v.worstK) || 0, ARROWS_MAX)));
    // only the arrows of particles inside the slab, when one is shown
    const sl = s.snapshot ? slabMake(v.slabAxis, Number(v.slabCenter), Number(v.slabThickness), s.snapshot.box) : null;
    if (sl && sl.axis >= 0) {
      const w = built.world;
      which = which.filter((t) => slabContains(sl, w[3 * slot(t) + sl.axis]));
    }
    const m = which.length;
    const res = new Float64Array(3 * m);
    const pos = new Float32Array(3 * m);
    for (let k = 0; k < m; k++) {
      const t = which[k];
      for (let d = 0; d < 3; d++) {
        res[3 * k + d] = cmp.runA.acc[3 * t + d] - cmp.runB.acc[3 * t + d];
        pos[3 * k + d] = built.world[3 * slot(t) + d];
      }
    }
    const scale = Number(v.arrowScale);
    const maxLength = 0.12 * (Number.isFinite(scale) && scale > 0 ? scale : 1);
    view.setArrows(arrowSegments(pos, res, Int32Array.from({ length: m }, (_, i) => i), { maxLength, log: v.arrowLog }));
  };

  const slab = (s: AppState) => {
    const v = s.draft.view;
    const snap = s.snapshot;
    if (snap) view.setSlab(slabMake(v.slabAxis, Number(v.slabCenter), Number(v.slabThickness), snap.box));
    view.setContextVisible(v.context);
  };

  const selected = (s: AppState) => view.setSelected(built.cmp && s.selected !== null ? slot(s.selected) : -1);

  const all = async (s: AppState) => {
    if (!(await cloud(s))) return;
    const now = appStore.getState();
    slab(now);
    await yieldTask();
    arrows(appStore.getState());
    selected(appStore.getState());
  };
  void all(appStore.getState());
  // a new cloud is built in its own tasks, after the store change that asked for it has been handled
  let pending = 0;
  const unsubscribe = appStore.subscribe((s, prev) => {
    if (s.comparison !== prev.comparison || s.snapshot !== prev.snapshot) {
      clearTimeout(pending);
      pending = window.setTimeout(() => void all(appStore.getState()), 0);
      return;
    }
    if (s.draft.view !== prev.draft.view) {
      const v = s.draft.view, p = prev.draft.view;
      if (v.arrows !== p.arrows || v.worstK !== p.worstK || v.arrowLog !== p.arrowLog || v.arrowScale !== p.arrowScale) arrows(s);
      if (v.slabAxis !== p.slabAxis || v.slabCenter !== p.slabCenter || v.slabThickness !== p.slabThickness || v.context !== p.context) {
        slab(s);
        arrows(s);
      }
    }
    if (s.selected !== prev.selected) selected(s);
    if (s.flyTo !== prev.flyTo && s.flyTo && built.cmp) {
      view.flyTo(slot(s.flyTo.target));
      // bring the view on screen when the request came from further down the page
      const r = view.canvas.getBoundingClientRect();
      if (r.bottom < 0 || r.top > window.innerHeight) view.canvas.scrollIntoView({ block: 'center', behavior: 'smooth' });
    }
  });

  // click (not drag) picks the nearest target under the pointer
  let down: { x: number; y: number } | null = null;
  const onDown = (e: PointerEvent) => {
    down = { x: e.clientX, y: e.clientY };
  };
  const onUp = (e: PointerEvent) => {
    if (!down || Math.hypot(e.clientX - down.x, e.clientY - down.y) > 4) return;
    down = null;
    const r = view.canvas.getBoundingClientRect();
    const sl = view.pick(e.clientX - r.left, e.clientY - r.top);
    if (sl >= 0 && built.cmp) select(built.order ? built.order[sl] : sl);
  };
  view.canvas.addEventListener('pointerdown', onDown);
  view.canvas.addEventListener('pointerup', onUp);
  return () => {
    generation++;
    clearTimeout(pending);
    unsubscribe();
    view.canvas.removeEventListener('pointerdown', onDown);
    view.canvas.removeEventListener('pointerup', onUp);
  };
}

export function View3DPanel() {
  const host = useRef<HTMLDivElement>(null);
  const view = useApp((s) => s.draft.view);
  const cmp = useApp((s) => s.comparison);
  const hasSnapshot = useApp((s) => s.snapshot !== null);
  const [drawn, setDrawn] = useState<DrawnInfo | null>(null);
  useEffect(() => {
    if (!host.current) return;
    let v: ViewHandle;
    try {
      v = viewCreate(host.current);
    } catch (e) {
      host.current.textContent = `3D view unavailable: ${e instanceof Error ? e.message : String(e)}`;
      return;
    }
    const off = bind(v, setDrawn);
    return () => {
      off();
      v.dispose();
    };
  }, []);
  const legend = useMemo(() => (cmp ? errorLegend(colourScaleOf(cmp), 240, 44, 'relative error |a_A − a_B| / |a_B|') : ''), [cmp]);
  return (
    <section className="card view-card" aria-labelledby="view-title">
      <div className="card-title-row">
        <h2 id="view-title">Where the discrepancy sits</h2>
        <span className="card-hint">drag to turn · wheel to zoom · right-drag to pan · click a particle</span>
      </div>
      <div className="viewport" data-testid="viewport-3d" data-cloud={drawn?.of ?? ''} data-points={drawn?.shown ?? 0}>
        <div className="viewport-canvas" ref={host} />
        {cmp ? (
          <div className="legend-overlay">
            <SvgPlot svg={legend} testId="legend" />
          </div>
        ) : null}
        {!hasSnapshot ? <p className="viewport-empty">no snapshot</p> : null}
        {drawn && drawn.shown < drawn.total ? (
          <p className="viewport-note" data-testid="drawn-note">
            showing a random {formatCount(drawn.shown)} of {formatCount(drawn.total)} points (WebGL is rendered in software here)
          </p>
        ) : null}
      </div>
      <div className="view-controls">
        <label>
          <span>arrows a_A − a_B</span>
          <select value={view.arrows} onChange={(e) => viewSet({ arrows: e.target.value as 'worst' | 'all' | 'none' })} data-testid="arrows-mode">
            <option value="worst">worst K</option>
            <option value="all">all targets</option>
            <option value="none">none</option>
          </select>
        </label>
        <label className="narrow">
          <span>K</span>
          <input value={view.worstK} onChange={(e) => viewSet({ worstK: e.target.value })} disabled={view.arrows !== 'worst'} inputMode="numeric" />
        </label>
        <label className="narrow">
          <span>length ×</span>
          <input value={view.arrowScale} onChange={(e) => viewSet({ arrowScale: e.target.value })} inputMode="decimal" />
        </label>
        <label className="check">
          <input type="checkbox" checked={view.arrowLog} onChange={(e) => viewSet({ arrowLog: e.target.checked })} />
          <span>log length</span>
        </label>
        <label>
          <span>slab</span>
          <select value={view.slabAxis} onChange={(e) => viewSet({ slabAxis: e.target.value as 'none' | 'x' | 'y' | 'z' })} data-testid="slab-axis">
            <option value="none">whole box</option>
            <option value="x">slice ⟂ x</option>
            <option value="y">slice ⟂ y</option>
            <option value="z">slice ⟂ z</option>
          </select>
        </label>
        <label className="range">
          <span>at {Number(view.slabCenter).toFixed(2)}</span>
          <input type="range" min={0} max={1} step={0.01} value={view.slabCenter} disabled={view.slabAxis === 'none'} onChange={(e) => viewSet({ slabCenter: e.target.value })} />
        </label>
        <label className="range">
          <span>thickness {Number(view.slabThickness).toFixed(2)}</span>
          <input type="range" min={0.01} max={0.5} step={0.01} value={view.slabThickness} disabled={view.slabAxis === 'none'} onChange={(e) => viewSet({ slabThickness: e.target.value })} />
        </label>
        <label className="check">
          <input type="checkbox" checked={view.context} onChange={(e) => viewSet({ context: e.target.checked })} />
          <span>other particles</span>
        </label>
      </div>
    </section>
  );
}
