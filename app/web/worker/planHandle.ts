/**
 * The plan worker's whole job, without the worker: keeps the last snapshot sent and answers plan
 * requests with methodPlan (the same function the page would call) or a seeded target sample.
 */
import { targetsResolve } from '../../../engine/targets';
import { methodPlan } from '../methods/methodPlan';
import type { PlanReply, PlanRequest } from './planProtocol';

/** State of one plan worker: the snapshot it holds. */
export interface PlanHolder {
  data: { readonly dataId: number; readonly positions: Float64Array; readonly masses: Float64Array } | null;
}

/** Handles one request; returns the reply and the buffers to move with it (null for `data` and its parts: no reply). */
export function planHandle(holder: PlanHolder, req: PlanRequest): { reply: PlanReply; transfer: Transferable[] } | null {
  try {
    switch (req.type) {
      case 'data':
        holder.data = { dataId: req.dataId, positions: new Float64Array(3 * req.n), masses: new Float64Array(req.n) };
        return null;
      case 'dataPart': {
        const d = holder.data;
        if (!d || d.dataId !== req.dataId) throw new Error(`plan worker: a part of snapshot ${req.dataId} came without its announcement`);
        d[req.array].set(req.values, req.offset);
        return null;
      }
      case 'method': {
        const d = holder.data;
        if (!d || d.dataId !== req.dataId) throw new Error(`plan worker: snapshot ${req.dataId} was not sent (holding ${d?.dataId ?? 'none'})`);
        return { reply: { type: 'method', id: req.id, plan: methodPlan(req.method, d.positions, d.masses, req.box, req.targets) }, transfer: [] };
      }
      case 'sample': {
        const indices = targetsResolve({ kind: 'sample', count: req.count, seed: req.seed }, req.n);
        return { reply: { type: 'sample', id: req.id, indices }, transfer: [indices.buffer] };
      }
      default:
        throw new Error(`plan worker: unknown request ${JSON.stringify((req as { type?: unknown }).type)}`);
    }
  } catch (e) {
    const err = e instanceof Error ? e : new Error(String(e));
    return { reply: { type: 'error', id: req.id, name: err.name, message: err.message }, transfer: [] };
  }
}
