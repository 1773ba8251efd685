/**
 * The plan of the next Compute for the panels (chosen parameters, predicted errors, expected time).
 * Planning measures the snapshot, so it runs after the render: in the plan worker for large snapshots,
 * else in slices of one task each (see planBudget.ts, planOffThread.ts). Meanwhile the panels keep the
 * previous plan for a moment, then say "planning…".
 */
import { useEffect, useState } from 'react';
import { planSliced } from './planBudget';
import { DemoPendingError, type RunPlan, runPlanMake } from './runPlan';
import { appStore } from './store';
import { useApp } from './useApp';

export type RunPlanView =
  | { readonly plan: RunPlan; readonly error: null; readonly note?: undefined }
  | { readonly plan: null; readonly error: string; readonly note?: undefined }
  | { readonly plan: null; readonly error: null; readonly note: string };

const PLANNING: RunPlanView = { plan: null, error: null, note: 'planning…' };

/** A plan that takes longer than this (ms) replaces the previous one by "planning…". */
const PLANNING_NOTE_AFTER_MS = 150;

/** Recomputed when the snapshot, the run fields of the form, finished results or the calibration change. */
export function useRunPlan(): RunPlanView {
  const snapshot = useApp((s) => s.snapshot);
  const draft = useApp((s) => s.draft);
  const runs = useApp((s) => s.runs);
  const neighbours = useApp((s) => s.neighbours);
  const calibration = useApp((s) => s.calibration);
  // the view settings do not change the plan
  const runKey = JSON.stringify([draft.n, draft.seed, draft.targets, draft.G, draft.box, draft.a, draft.b]);
  const [view, setView] = useState<RunPlanView>(PLANNING);
  useEffect(() => {
    let alive = true;
    const state = appStore.getState();
    const slow = setTimeout(() => {
      if (alive) setView(PLANNING);
    }, PLANNING_NOTE_AFTER_MS);
    planSliced(() => runPlanMake(state), () => alive).then(
      (plan) => {
        clearTimeout(slow);
        if (alive && plan) setView({ plan, error: null });
      },
      (e: unknown) => {
        clearTimeout(slow);
        if (!alive) return;
        if (e instanceof DemoPendingError) setView({ plan: null, error: null, note: e.message });
        else setView({ plan: null, error: e instanceof Error ? e.message : String(e) });
      },
    );
    return () => {
      alive = false;
      clearTimeout(slow);
    };
  }, [snapshot, runKey, runs, neighbours, calibration]);
  return view;
}
