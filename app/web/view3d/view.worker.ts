/**
 * The view worker: draws the 3D view on an OffscreenCanvas handed over by the page, so that the waits
 * of software WebGL (each frame's commit, the first draw of each program) fall on this thread and not
 * on the page's. The page sends what to show and the camera's pose (viewProtocol.ts).
 */
import * as THREE from 'three';
import { type SceneRenderer, sceneRendererCreate } from './sceneRenderer';
import type { CameraPose, ViewReply, ViewRequest } from './viewProtocol';

const post = (reply: ViewReply, transfer: Transferable[] = []) => (self as unknown as Worker).postMessage(reply, transfer);

const camera = new THREE.PerspectiveCamera(40, 1, 0.005, 50);
let canvas: OffscreenCanvas | null = null;
let view: SceneRenderer | null = null;

function cameraSet(p: CameraPose): void {
  camera.position.fromArray(p.position);
  camera.quaternion.fromArray(p.quaternion);
  camera.fov = p.fov;
  camera.aspect = p.aspect;
  camera.near = p.near;
  camera.far = p.far;
  camera.zoom = p.zoom;
  camera.updateProjectionMatrix();
}

/** The finished image: waits (a frame at a time) until no frame of it is left, or until the timeout. */
async function image(id: number, timeoutMs: number): Promise<void> {
  const end = performance.now() + timeoutMs;
  while (view && view.busy() && performance.now() < end) await new Promise((r) => requestAnimationFrame(r));
  const bitmap = canvas && canvas.width > 0 && canvas.height > 0 ? await createImageBitmap(canvas) : null;
  post({ type: 'image', id, image: bitmap }, bitmap ? [bitmap] : []);
}

self.onmessage = (e: MessageEvent<ViewRequest>) => {
  const m = e.data;
  if (m.type === 'init') {
    try {
      canvas = m.canvas;
      view = sceneRendererCreate(canvas, camera, {
        drawing: (on) => post({ type: 'drawing', on }),
        frame: (record) => post({ type: 'frame', record }),
      });
      view.setSize(m.width, m.height, m.pixelRatio);
      post({ type: 'ready', software: view.software, capacity: view.capacity, timeOrigin: performance.timeOrigin });
    } catch (err) {
      post({ type: 'failed', message: err instanceof Error ? err.message : String(err) });
    }
    return;
  }
  if (m.type === 'image') {
    void image(m.id, m.timeoutMs);
    return;
  }
  if (!view) return;
  switch (m.type) {
    case 'size':
      view.setSize(m.width, m.height, m.pixelRatio);
      break;
    case 'cloud':
      view.setCloud(m.box, m.targets, m.colours, m.context, m.contextTotal);
      break;
    case 'arrows':
      view.setArrows(m.segments);
      break;
    case 'slab':
      view.setSlab(m.slab);
      break;
    case 'context':
      view.setContextVisible(m.on);
      break;
    case 'ring':
      view.setRing(m.at);
      break;
    case 'camera':
      cameraSet(m.pose);
      view.redraw();
      break;
    case 'moving':
      view.setMoving(m.on);
      break;
    case 'dispose':
      view.dispose();
      view = null;
      self.close();
      break;
  }
};
