/**
 * The 3D view on the page: the canvas element, the camera with its orbit/zoom/pan controls (pointer
 * events stay on the page), flying to a particle, screen-space picking and what the view says it draws.
 * The drawing itself (sceneRenderer.ts) runs in the view worker on an OffscreenCanvas where the browser
 * allows it (viewInWorker.ts), so that software WebGL's waits for each frame's pixels and for its first
 * draws never block the page; elsewhere on the page's canvas (viewInPage.ts, loaded only then). The
 * page sends the camera's pose on every change.
 */
import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import type { Box } from '../../../engine/box';
import { NO_SLAB, type Slab, pickNearest, slabContains, worldUnit } from './geometry';
import type { FrameRecord, RendererEvents } from './sceneRenderer';
import { type ViewAbilities, type ViewBackend, offscreenViewSupported } from './viewBackend';
import { viewInPageLater } from './viewInPageLater';
import { viewInWorker } from './viewInWorker';

export type { FrameRecord } from './sceneRenderer';
export { MOVING_MIN_POINTS, MOVING_POINTS, VIEW_COLOURS } from './viewConstants';

/** The last frames rendered (at most FRAME_LOG_MAX), oldest first, on the page's clock. */
export const viewFrameLog: FrameRecord[] = [];
const FRAME_LOG_MAX = 400;

/** How long an export waits for the view's image to be complete (ms). */
const IMAGE_WAIT_MS = 3000;

export interface ViewHandle {
  /** Resolves once the renderer runs (capacity() and drawn() are known from then on). */
  readonly ready: Promise<ViewAbilities>;
  /**
   * Box and particles: targets (world xyz, rgb) in draw order, and other particles (world xyz), which
   * may be a random part of `contextTotal` (the count the view says it stands for; default all given).
   * The view keeps `targets`; `colours` and `context` may be handed over to the worker (detached).
   */
  setCloud(box: Box, targets: Float32Array | null, colours: Float32Array | null, context: Float32Array | null, contextTotal?: number): void;
  /** Residual arrows as segments (the array may be handed over to the worker). */
  setArrows(segments: Float32Array | null): void;
  setSlab(slab: Slab): void;
  setContextVisible(on: boolean): void;
  /** Ring around the target at draw slot `slot` (−1: none). */
  setSelected(slot: number): void;
  /** Moves the camera to look at the target at draw slot `slot` from nearby. */
  flyTo(slot: number): void;
  /** Draw slot of the target nearest the pointer (client pixels inside the canvas), or −1. */
  pick(x: number, y: number): number;
  /** Points drawn in a still frame and points held (they differ only under software rendering). */
  drawn(): { shown: number; total: number; software: boolean };
  /** Most points a still frame draws (Infinity unless WebGL is rendered in software): more need not be built. */
  capacity(): number;
  /** A copy of the finished image (a large cloud's image is drawn over several frames without a GPU). */
  image(): Promise<CanvasImageSource & { readonly width: number; readonly height: number } | null>;
  resize(): void;
  readonly canvas: HTMLCanvasElement;
  dispose(): void;
}

/** The view drawn on each canvas, for the report export (viewImage). */
const views = new WeakMap<HTMLCanvasElement, ViewHandle>();

/** A copy of the finished image of the view drawn on `canvas`, or null. */
export async function viewImage(canvas: HTMLCanvasElement | null): Promise<CanvasImageSource & { readonly width: number; readonly height: number } | null> {
  const v = canvas ? views.get(canvas) : undefined;
  return v ? v.image() : null;
}

/** Creates the view inside `host` (a sized element). */
export function viewCreate(host: HTMLElement): ViewHandle {
  const canvas = document.createElement('canvas');
  canvas.setAttribute('aria-label', 'particles in the box, coloured by relative error');
  canvas.style.display = 'block';
  host.appendChild(canvas);
  const camera = new THREE.PerspectiveCamera(40, 1, 0.005, 50);
  const controls = new OrbitControls(camera, canvas);
  controls.enableDamping = false;
  controls.zoomSpeed = 1.2;

  const events: RendererEvents = {
    // the canvas carries data-drawing while its image is not complete (see viewImageDone)
    drawing(on) {
      if (on) canvas.dataset.drawing = '';
      else delete canvas.dataset.drawing;
    },
    frame(record) {
      viewFrameLog.push(record);
      if (viewFrameLog.length > FRAME_LOG_MAX) viewFrameLog.splice(0, viewFrameLog.length - FRAME_LOG_MAX);
    },
  };
  const size = () => ({ w: Math.max(1, host.clientWidth), h: Math.max(1, host.clientHeight), ratio: Math.min(2, window.devicePixelRatio || 1) });
  const s0 = size();
  const backend: ViewBackend = offscreenViewSupported() ? viewInWorker(canvas, camera, events, s0.w, s0.h, s0.ratio) : viewInPageLater(canvas, camera, events);
  let abilities: ViewAbilities = { software: false, capacity: Infinity };
  const ready = backend.ready.then((a) => (abilities = a));
  ready.catch((e: unknown) => {
    canvas.remove();
    host.textContent = `3D view unavailable: ${e instanceof Error ? e.message : String(e)}`;
  });

  let box: Box | null = null;
  let slab: Slab = NO_SLAB;
  let targetWorld: Float32Array | null = null;
  let counts = { targets: 0, context: 0, contextHeld: 0 };

  controls.addEventListener('change', () => backend.cameraChanged());
  controls.addEventListener('start', () => backend.setMoving(true));
  controls.addEventListener('end', () => backend.setMoving(false));

  const resize = () => {
    const { w, h, ratio } = size();
    canvas.style.width = `${w}px`;
    canvas.style.height = `${h}px`;
    camera.aspect = w / h;
    camera.updateProjectionMatrix();
    backend.setSize(w, h, ratio);
    backend.cameraChanged();
  };
  const observer = typeof ResizeObserver !== 'undefined' ? new ResizeObserver(resize) : null;
  observer?.observe(host);

  const cameraHome = () => {
    if (!box) return;
    const l = worldUnit(box);
    const c = new THREE.Vector3(box.lx / l / 2, box.ly / l / 2, box.lz / l / 2);
    controls.target.copy(c);
    camera.position.set(c.x + 1.25, c.y + 0.85, c.z + 1.55);
    camera.up.set(0, 1, 0);
    controls.update();
    backend.cameraChanged();
  };

  let flight = 0;
  const handle: ViewHandle = {
    canvas,
    ready,
    setCloud(b, targets, colours, context, contextTotal) {
      const newBox = !box || b.lx !== box.lx || b.ly !== box.ly || b.lz !== box.lz;
      box = b;
      targetWorld = targets;
      const nc = context ? context.length / 3 : 0;
      counts = { targets: targets ? targets.length / 3 : 0, context: nc, contextHeld: Math.max(nc, contextTotal ?? 0) };
      // the camera first, so that the worker's first frame of the new cloud is already framed
      if (newBox) cameraHome();
      backend.setCloud(b, targets, colours, context, contextTotal);
    },
    setArrows: (segments) => backend.setArrows(segments),
    setSlab(s) {
      slab = s;
      backend.setSlab(s);
    },
    setContextVisible: (on) => backend.setContextVisible(on),
    setSelected(slot) {
      if (!targetWorld || slot < 0 || 3 * slot >= targetWorld.length) backend.setRing(null);
      else backend.setRing([targetWorld[3 * slot], targetWorld[3 * slot + 1], targetWorld[3 * slot + 2]]);
    },
    flyTo(slot) {
      if (!targetWorld || slot < 0 || 3 * slot >= targetWorld.length) return;
      const goal = new THREE.Vector3(targetWorld[3 * slot], targetWorld[3 * slot + 1], targetWorld[3 * slot + 2]);
      const from = controls.target.clone();
      const dir = camera.position.clone().sub(from).normalize();
      const startPos = camera.position.clone();
      const endPos = goal.clone().add(dir.multiplyScalar(0.32));
      const t0 = performance.now();
      cancelAnimationFrame(flight);
      backend.setMoving(true);
      const step = () => {
        const t = Math.min(1, (performance.now() - t0) / 600);
        const e = t < 0.5 ? 2 * t * t : 1 - (-2 * t + 2) ** 2 / 2;
        controls.target.lerpVectors(from, goal, e);
        camera.position.lerpVectors(startPos, endPos, e);
        controls.update();
        backend.cameraChanged();
        if (t < 1) flight = requestAnimationFrame(step);
        else backend.setMoving(false);
      };
      flight = requestAnimationFrame(step);
    },
    pick(x, y) {
      if (!targetWorld) return -1;
      camera.updateMatrixWorld();
      const vp = new THREE.Matrix4().multiplyMatrices(camera.projectionMatrix, camera.matrixWorldInverse);
      const w = canvas.clientWidth, h = canvas.clientHeight;
      const world = targetWorld;
      const sl = slab;
      const shown = Math.min(world.length / 3, abilities.capacity);
      const visible = (k: number) => k < shown && (sl.axis < 0 || slabContains(sl, world[3 * k + sl.axis]));
      return pickNearest(world, vp.elements, w, h, x, y, 8, visible);
    },
    resize,
    drawn() {
      const still = abilities.capacity;
      const nt = Math.min(counts.targets, still);
      return { shown: nt + Math.max(0, Math.min(counts.context, still - nt)), total: counts.targets + counts.contextHeld, software: abilities.software };
    },
    capacity: () => abilities.capacity,
    image: () => backend.image(IMAGE_WAIT_MS),
    dispose() {
      observer?.disconnect();
      cancelAnimationFrame(flight);
      controls.dispose();
      backend.dispose();
      views.delete(canvas);
      canvas.remove();
    },
  };
  views.set(canvas, handle);
  resize();
  return handle;
}
