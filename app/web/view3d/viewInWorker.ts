/**
 * The 3D view drawn by the view worker (view.worker.ts) on the page canvas's OffscreenCanvas. The page
 * sends what to show and its camera's pose; the worker's frame records come back with their times moved
 * to the page's clock.
 */
import type * as THREE from 'three';
import type { ViewAbilities, ViewBackend } from './viewBackend';
import type { ViewReply, ViewRequest } from './viewProtocol';
import type { RendererEvents } from './sceneRenderer';

/** The array's buffer when it can be handed over whole (its own, not shared), else nothing. */
export function handOver(a: Float32Array | null): Transferable[] {
  return a && a.byteOffset === 0 && a.byteLength === a.buffer.byteLength && a.buffer instanceof ArrayBuffer ? [a.buffer] : [];
}

export function viewInWorker(canvas: HTMLCanvasElement, camera: THREE.PerspectiveCamera, events: RendererEvents, width: number, height: number, pixelRatio: number): ViewBackend {
  const worker = new Worker(new URL('./view.worker.ts', import.meta.url), { type: 'module', name: 'torusgrav-view' });
  const post = (m: ViewRequest, transfer: Transferable[] = []) => worker.postMessage(m, transfer);
  let ready!: (a: ViewAbilities) => void;
  let failed!: (e: Error) => void;
  const abilities = new Promise<ViewAbilities>((res, rej) => {
    ready = res;
    failed = rej;
  });
  // the worker's clock starts at its own time origin
  let clockOffset = 0;
  const images = new Map<number, (b: ImageBitmap | null) => void>();
  let imageId = 0;
  worker.onmessage = (e: MessageEvent<ViewReply>) => {
    const m = e.data;
    if (m.type === 'ready') {
      clockOffset = m.timeOrigin - performance.timeOrigin;
      ready({ software: m.software, capacity: m.capacity });
    } else if (m.type === 'failed') failed(new Error(m.message));
    else if (m.type === 'drawing') events.drawing(m.on);
    else if (m.type === 'frame') events.frame({ ...m.record, t: m.record.t + clockOffset });
    else if (m.type === 'image') {
      images.get(m.id)?.(m.image);
      images.delete(m.id);
    }
  };
  worker.onerror = (e) => failed(new Error(e.message || 'the view worker failed to start'));
  const offscreen = canvas.transferControlToOffscreen();
  post({ type: 'init', canvas: offscreen, width, height, pixelRatio }, [offscreen]);
  return {
    ready: abilities,
    setCloud(box, targets, colours, context, contextTotal) {
      // the page keeps the targets (picking, flying to one): they are copied; the rest is handed over
      post({ type: 'cloud', box, targets, colours, context, contextTotal }, [...handOver(colours), ...handOver(context)]);
    },
    setArrows: (segments) => post({ type: 'arrows', segments }, handOver(segments)),
    setSlab: (slab) => post({ type: 'slab', slab }),
    setContextVisible: (on) => post({ type: 'context', on }),
    setRing: (at) => post({ type: 'ring', at }),
    setMoving: (on) => post({ type: 'moving', on }),
    setSize: (w, h, ratio) => post({ type: 'size', width: w, height: h, pixelRatio: ratio }),
    cameraChanged() {
      post({
        type: 'camera',
        pose: {
          position: [camera.position.x, camera.position.y, camera.position.z],
          quaternion: [camera.quaternion.x, camera.quaternion.y, camera.quaternion.z, camera.quaternion.w],
          fov: camera.fov,
          aspect: camera.aspect,
          near: camera.near,
          far: camera.far,
          zoom: camera.zoom,
        },
      });
    },
    image(timeoutMs) {
      const id = ++imageId;
      return new Promise((resolve) => {
        // a worker that no longer answers gives no image rather than a hung export
        const timer = setTimeout(() => {
          images.delete(id);
          resolve(null);
        }, timeoutMs + 2000);
        images.set(id, (b) => {
          clearTimeout(timer);
          resolve(b);
        });
        post({ type: 'image', id, timeoutMs });
      });
    },
    dispose() {
      post({ type: 'dispose' });
      for (const done of images.values()) done(null);
      images.clear();
      // the worker closes itself after disposing of its renderer; this is the backstop
      setTimeout(() => worker.terminate(), 1000);
    },
  };
}
