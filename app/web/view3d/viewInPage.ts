/** The 3D view drawn on the page's own canvas: the fallback where a worker cannot draw WebGL. */
import type * as THREE from 'three';
import { canvasSnapshot } from '../report/reportCanvas';
import type { ViewBackend } from './viewBackend';
import { type RendererEvents, sceneRendererCreate } from './sceneRenderer';

export function viewInPage(canvas: HTMLCanvasElement, camera: THREE.PerspectiveCamera, events: RendererEvents): ViewBackend {
  const r = sceneRendererCreate(canvas, camera, events);
  return {
    ready: Promise.resolve({ software: r.software, capacity: r.capacity }),
    setCloud: (...a) => r.setCloud(...a),
    setArrows: (s) => r.setArrows(s),
    setSlab: (s) => r.setSlab(s),
    setContextVisible: (on) => r.setContextVisible(on),
    setRing: (at) => r.setRing(at),
    setMoving: (on) => r.setMoving(on),
    setSize: (w, h, ratio) => r.setSize(w, h, ratio),
    cameraChanged: () => r.redraw(),
    async image(timeoutMs) {
      const end = performance.now() + timeoutMs;
      while (r.busy() && performance.now() < end) await new Promise((done) => requestAnimationFrame(done));
      return canvasSnapshot(canvas);
    },
    dispose: () => r.dispose(),
  };
}
