/**
 * What a PME helper worker does, without the worker (pmeHelper.worker.ts wires it to its messages; tests
 * call it directly): a pinned setup over the shared buffers, then phases on request (app/common/pmePhases.ts),
 * then its real-space sums handed back. One request at a time, one reply each. No numerics of its own.
 */
import { pmeRealCollect } from '../../../engine/pme/index';
import { type PmePhase, type PmeShared, pmePhaseRun } from '../../common/pmePhases';
import { type PmeSetupMessage, pmeSharedJoin } from '../../common/pmeShared';

export type PmeHelperRequest =
  | PmeSetupMessage
  | { readonly type: 'phases'; readonly phases: readonly PmePhase[] }
  | { readonly type: 'collect' };

export type PmeHelperReply =
  | { readonly type: 'done' }
  | { readonly type: 'collected'; readonly acc: Float64Array; readonly phi: Float64Array }
  | { readonly type: 'error'; readonly message: string };

/** Sends a reply, moving the listed buffers. */
export type PmeHelperPost = (reply: PmeHelperReply, transfer: ArrayBuffer[]) => void;

/** A helper's state and message handler: call the result with each request in turn. */
export function pmeHelperHandler(post: PmeHelperPost): (msg: PmeHelperRequest) => void {
  let shared: PmeShared | null = null;
  const need = (what: string): PmeShared => {
    if (!shared) throw new Error(`pme helper: "${what}" before "setup"`);
    return shared;
  };
  return (msg) => {
    try {
      switch (msg.type) {
        case 'setup': {
          shared = pmeSharedJoin(msg);
          post({ type: 'done' }, []);
          return;
        }
        case 'phases': {
          const s = need('phases');
          for (const p of msg.phases) pmePhaseRun(s, p);
          post({ type: 'done' }, []);
          return;
        }
        case 'collect': {
          const s = need('collect');
          const n = s.setup.masses.length;
          const acc = new Float64Array(3 * n);
          const phi = new Float64Array(n);
          pmeRealCollect(s.setup, acc, phi);
          post({ type: 'collected', acc, phi }, [acc.buffer as ArrayBuffer, phi.buffer as ArrayBuffer]);
          return;
        }
        default:
          throw new Error(`pme helper: unknown request ${JSON.stringify((msg as { type?: unknown })?.type)}`);
      }
    } catch (e) {
      post({ type: 'error', message: e instanceof Error ? e.message : String(e) }, []);
    }
  };
}
