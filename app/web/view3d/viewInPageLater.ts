/**
 * The on-page fallback (viewInPage.ts) loaded only when it is needed: where the view worker draws, the
 * page's bundle then carries no WebGL renderer (less script to evaluate at start-up). Calls made before
 * it has loaded are applied in order once it has.
 */
import type * as THREE from 'three';
import type { ViewBackend } from './viewBackend';
import type { RendererEvents } from './sceneRenderer';

export function viewInPageLater(canvas: HTMLCanvasElement, camera: THREE.PerspectiveCamera, events: RendererEvents): ViewBackend {
  const loaded = import('./viewInPage').then((m) => m.viewInPage(canvas, camera, events));
  const later = (f: (b: ViewBackend) => void) => void loaded.then(f, () => {});
  return {
    ready: loaded.then((b) => b.ready),
    setCloud: (...a) => later((b) => b.setCloud(...a)),
    setArrows: (s) => later((b) => b.setArrows(s)),
    setSlab: (s) => later((b) => b.setSlab(s)),
    setContextVisible: (on) => later((b) => b.setContextVisible(on)),
    setRing: (at) => later((b) => b.setRing(at)),
    setMoving: (on) => later((b) => b.setMoving(on)),
    setSize: (w, h, ratio) => later((b) => b.setSize(w, h, ratio)),
    cameraChanged: () => later((b) => b.cameraChanged()),
    image: (timeoutMs) => loaded.then((b) => b.image(timeoutMs)),
    dispose: () => later((b) => b.dispose()),
  };
}
