/**
 * A slot's typed parameters → the checked options of one method, with a canonical text that identifies
 * the computation (used as the cache key, so toggling back to a method reuses its result). Every
 * rejection is one line naming the parameter and the text it got.
 */
import type { EwaldOptions } from '../../../engine/ewald/params';
import type { MeshOptions } from '../../../engine/codeUnderTest/meshForces';
import type { Softening } from '../../../engine/softening';
import { type OrderMethodOptions, type PmeMethodOptions, isOrderMethod, moreOptionsKey, orderOptionsParse, pmeOptionsParse } from './moreOptions';
import { type MethodId, methodSpec } from './registry';

export type MethodOptions =
  | { readonly method: 'ewald'; readonly options: EwaldOptions }
  | { readonly method: 'mesh'; readonly options: MeshOptions }
  | { readonly method: 'file' }
  | OrderMethodOptions
  | PmeMethodOptions;

function numberField(text: string | undefined, label: string, check: (v: number) => boolean, expected: string): number {
  const t = (text ?? '').trim();
  const v = t === '' ? NaN : Number(t);
  if (!check(v)) throw new RangeError(`${label}: expected ${expected}, got "${text ?? ''}"`);
  return v;
}

/** Checks the parameters of `method` in a slot's record; G is the page's gravitational constant. */
export function methodOptionsParse(method: MethodId, params: Readonly<Record<string, string>>, G: number): MethodOptions {
  const spec = methodSpec(method);
  if (!spec.ready) throw new RangeError(`${spec.label}: not available in this build yet`);
  switch (method) {
    case 'ewald': {
      const tol = numberField(params['ewald.tol'], 'Ewald tolerance', (v) => v > 0 && v < 1, 'a number between 0 and 1 (exclusive), such as 1e-6');
      const kind = params['ewald.softening'] ?? 'none';
      let softening: Softening = { kind: 'none' };
      if (kind === 'plummer' || kind === 'spline') {
        const len = numberField(params['ewald.eps'], kind === 'plummer' ? 'Plummer ε' : 'spline h', (v) => v > 0 && Number.isFinite(v), 'a positive length');
        softening = kind === 'plummer' ? { kind, eps: len } : { kind, h: len };
      } else if (kind !== 'none') throw new RangeError(`softening: expected none, plummer or spline, got "${kind}"`);
      return { method, options: { tol, G, softening } };
    }
    case 'mesh': {
      const mesh = numberField(params['mesh.n'], 'mesh points per side', (v) => [8, 16, 32, 64, 128].includes(v), 'one of 8, 16, 32, 64, 128');
      return { method, options: { mesh, G } };
    }
    case 'file':
      return { method };
    case 'pme':
      return pmeOptionsParse(params, G);
    default:
      if (isOrderMethod(method)) return orderOptionsParse(method, params, G);
      throw new RangeError(`${spec.label}: not available in this build yet`);
  }
}

/** Canonical text of checked options: equal texts mean the same computation on the same snapshot. */
export function methodOptionsKey(m: MethodOptions): string {
  switch (m.method) {
    case 'ewald': {
      const s = m.options.softening ?? { kind: 'none' };
      const soft = s.kind === 'plummer' ? `plummer:${s.eps}` : s.kind === 'spline' ? `spline:${s.h}` : 'none';
      return `ewald(tol=${m.options.tol},G=${m.options.G},soft=${soft})`;
    }
    case 'mesh':
      return `mesh(n=${m.options.mesh},G=${m.options.G})`;
    case 'file':
      return 'file';
    default:
      return moreOptionsKey(m);
  }
}
