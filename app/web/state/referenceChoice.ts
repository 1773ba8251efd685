/**
 * Slot B's reference when the user asks for every particle: direct Ewald unless it would exceed the time
 * budget, then particle-mesh Ewald at the same tolerance (as an rms relative error) and softening — said
 * on screen in the slot's note. The Ewald parameter "all particles by" (ewald.all) = "direct" keeps
 * direct Ewald whatever it costs.
 */
import { formatCount, formatDuration } from '../format';
import type { PmeMethodOptions } from '../methods/moreOptions';
import type { SlotPlan } from './runPlan';
import type { TargetSet } from './types';

/** The particle-mesh Ewald options standing in for an Ewald reference (same G, tolerance, softening). */
export function pmeForEwald(sp: SlotPlan): PmeMethodOptions | null {
  if (sp.options.method !== 'ewald') return null;
  const o = sp.options.options;
  return { method: 'pme', options: { tol: o.tol ?? 1e-6, G: o.G ?? 1, softening: o.softening ?? { kind: 'none' } } };
}

/**
 * B's slot plan for `targets`: `sp` itself, or — for all particles, an Ewald reference whose expected time
 * exceeds `budgetMs` (and that is not computed already), "ewald.all" not "direct" — the plan of PME made
 * by `planPme`, with a note saying why. Throws a RangeError for an unknown "ewald.all" value.
 */
export function referenceForAll(
  sp: SlotPlan,
  params: Readonly<Record<string, string>>,
  n: number,
  targets: TargetSet,
  budgetMs: number,
  planPme: (o: PmeMethodOptions) => SlotPlan,
): SlotPlan {
  const choice = (params['ewald.all'] ?? 'auto').trim();
  if (choice !== 'auto' && choice !== 'direct') throw new RangeError(`all particles by: expected auto or direct, got "${choice}"`);
  const pmeOptions = pmeForEwald(sp);
  if (!pmeOptions || !targets.all || choice === 'direct' || sp.cached || sp.expectedMs <= budgetMs) return sp;
  const pme = planPme(pmeOptions);
  if (pme.expectedMs >= sp.expectedMs) return sp;
  const note =
    `reference: particle-mesh Ewald instead of direct Ewald — all ${formatCount(n)} particles by direct Ewald would take ≈ ${formatDuration(sp.expectedMs)}; ` +
    `PME meets the tolerance as an rms relative error over all particles (set “all particles by” to direct to insist, or ask for fewer targets)`;
  return { ...pme, plan: { ...pme.plan, note } };
}
