/**
 * The 3D view: the box outline, particles as points coloured by relative error (targets) or grey
 * (other particles), residual arrows as line segments, a picked-particle ring, orbit/zoom/pan, a slab
 * filter and screen-space picking. Renders on demand only (after a change or while the view moves).
 * While the camera moves, very large clouds draw a random prefix of their points. Clouds are held in
 * pieces of PIECE_POINTS points, each its own draw call, handed to the GPU a few per frame, so that a
 * 10⁶-point cloud is never uploaded in one long task.
 *
 * Software WebGL (no GPU): the page's thread waits, in the frame's commit, until the GPU process has
 * drawn the canvas (the compositor reads it back), so a frame's points are a frame's stall. There every
 * frame draws at most `perFrame` points, adapted to the measured wait (FRAME_WAIT_MS); a still image
 * larger than that is drawn over several frames into the kept drawing buffer (the first frame clears
 * and draws box, arrows and ring; the next ones add points in the same order, so the finished image
 * is the one a single frame would draw, but for the order of points at equal depth). A new cloud's
 * pieces are first drawn offscreen, where the page does not wait for them (preload).
 */
import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import type { Box } from '../../../engine/box';
import { frameRange, perFrameNext, pieceRange } from './frameBudget';
import { NO_SLAB, type Slab, pickNearest, slabContains, worldUnit } from './geometry';
import { pointsMaterial } from './pointsMaterial';

/**
 * Clouds larger than this are stored in a random order, so that while the view moves a prefix of them
 * can stand for all; how long that prefix is adapts to the frame time (software rendering is slow).
 */
export const MOVING_POINTS = 250_000;

/** Frame-time goal while the view moves (ms), and the smallest prefix drawn meanwhile. */
const MOVING_FRAME_MS = 40;
export const MOVING_MIN_POINTS = 20_000;

/**
 * Most points drawn in a still image when WebGL is rendered in software (SwiftShader, llvmpipe): a
 * random prefix of the cloud stands for the rest, and the view says so. Hardware draws everything.
 * Without a GPU the page's thread waits for each frame's pixels (the compositor reads the canvas back),
 * about 0.7–1.5 µs per point on the project machine under load; the image is drawn over several frames
 * of at most SOFTWARE_FRAME_MAX_POINTS, and this cap keeps the whole image within a few frames.
 */
export const SOFTWARE_STILL_POINTS = 100_000;

/**
 * Points per piece of a cloud (one buffer and draw call each), and new pieces uploaded per frame. Small
 * pieces: a software frame uploads only the pieces its points fall in, and so little more than it draws.
 */
export const PIECE_POINTS = 16_384;
const UPLOADS_PER_FRAME = 8;

/**
 * Software WebGL: the wait for a frame's pixels aimed at (ms; with the frame's own script it keeps the
 * page's tasks well under 100 ms on a loaded machine), the points a frame starts with, and the fewest
 * it is cut down to.
 */
export const FRAME_WAIT_MS = 35;
export const SOFTWARE_FRAME_POINTS = 25_000;
export const SOFTWARE_FRAME_MIN_POINTS = 4096;
/** Most points a software frame draws however fast the last frames were (the wait varies with the load). */
export const SOFTWARE_FRAME_MAX_POINTS = 50_000;

/** One rendered frame, for the browser tests (?testhooks): when, which points, and the wait that followed. */
export interface FrameRecord {
  readonly t: number;
  readonly from: number;
  readonly to: number;
  readonly moving: boolean;
  readonly clear: boolean;
  /** Whether the frame also drew a first point or line of a kind (compiling its program). */
  readonly warm: boolean;
  /** Whether the frame drew new pieces into an offscreen target only (their first draw, see preload). */
  readonly offscreen: boolean;
  /** Draw calls, and programs the renderer has compiled so far. */
  readonly calls: number;
  readonly programs: number;
  wait: number;
}

/** The last frames rendered (at most FRAME_LOG_MAX), oldest first. */
export const viewFrameLog: FrameRecord[] = [];
const FRAME_LOG_MAX = 400;

/** Whether the context renders in software (by the renderer string, where the browser tells it). */
function softwareRendered(gl: WebGLRenderingContext | WebGL2RenderingContext): boolean {
  try {
    const ext = gl.getExtension('WEBGL_debug_renderer_info');
    const name = String(ext ? gl.getParameter(ext.UNMASKED_RENDERER_WEBGL) : gl.getParameter(gl.RENDERER));
    return /swiftshader|llvmpipe|software|softpipe/i.test(name);
  } catch {
    return false;
  }
}

export const VIEW_COLOURS = {
  background: 0x17211f,
  box: 0x7f948d,
  context: [0.42, 0.48, 0.46] as const,
  arrow: 0xffb870,
  ring: [1, 0.35, 0.3] as const,
};

export interface ViewHandle {
  /**
   * Box and particles: targets (world xyz, rgb) in draw order, and other particles (world xyz), which
   * may be a random part of `contextTotal` (the count the view says it stands for; default all given).
   */
  setCloud(box: Box, targets: Float32Array | null, colours: Float32Array | null, context: Float32Array | null, contextTotal?: number): void;
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
  resize(): void;
  render(): void;
  readonly canvas: HTMLCanvasElement;
  dispose(): void;
}

/** A piece of a cloud: its own buffers and draw call; `uploaded` once it was drawn (handed to the GPU). */
interface Piece {
  readonly points: THREE.Points;
  readonly geom: THREE.BufferGeometry;
  readonly count: number;
  uploaded: boolean;
}

function boxOutline(box: Box): THREE.LineSegments {
  const l = worldUnit(box);
  const g = new THREE.BoxGeometry(box.lx / l, box.ly / l, box.lz / l);
  const edges = new THREE.EdgesGeometry(g);
  g.dispose();
  const lines = new THREE.LineSegments(edges, new THREE.LineBasicMaterial({ color: VIEW_COLOURS.box }));
  lines.position.set(box.lx / l / 2, box.ly / l / 2, box.lz / l / 2);
  return lines;
}

function slabOutline(box: Box, slab: Slab): THREE.LineSegments | null {
  if (slab.axis < 0) return null;
  const l = worldUnit(box);
  const side = [box.lx / l, box.ly / l, box.lz / l];
  const a = slab.axis, b = (a + 1) % 3, c = (a + 2) % 3;
  const pts: number[] = [];
  for (const v of [slab.min, slab.max]) {
    const corner = (u: number, w: number) => {
      const p = [0, 0, 0];
      p[a] = v;
      p[b] = u * side[b];
      p[c] = w * side[c];
      return p;
    };
    const q = [corner(0, 0), corner(1, 0), corner(1, 1), corner(0, 1)];
    for (let k = 0; k < 4; k++) pts.push(...q[k], ...q[(k + 1) % 4]);
  }
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.Float32BufferAttribute(pts, 3));
  return new THREE.LineSegments(g, new THREE.LineBasicMaterial({ color: 0xd9c9a0, transparent: true, opacity: 0.8 }));
}

/**
 * Resolves once the view's canvas shows a complete image (software WebGL draws a large still image over
 * several frames), or after `timeoutMs`: an export waits for it so as not to copy half an image.
 */
export function viewImageDone(canvas: HTMLCanvasElement | null, timeoutMs = 3000): Promise<void> {
  const end = performance.now() + timeoutMs;
  return new Promise((resolve) => {
    const look = () => {
      if (!canvas || canvas.dataset.drawing === undefined || performance.now() > end) resolve();
      else requestAnimationFrame(look);
    };
    look();
  });
}

/** Creates the view inside `host` (a sized element). */
export function viewCreate(host: HTMLElement): ViewHandle {
  const renderer = new THREE.WebGLRenderer({ antialias: false, preserveDrawingBuffer: true, powerPreference: 'low-power' });
  renderer.setPixelRatio(Math.min(2, window.devicePixelRatio || 1));
  renderer.setClearColor(VIEW_COLOURS.background, 1);
  const canvas = renderer.domElement;
  canvas.setAttribute('aria-label', 'particles in the box, coloured by relative error');
  host.appendChild(canvas);
  const scene = new THREE.Scene();
  const camera = new THREE.PerspectiveCamera(40, 1, 0.005, 50);
  const controls = new OrbitControls(camera, canvas);
  controls.enableDamping = false;
  controls.zoomSpeed = 1.2;

  let box: Box | null = null;
  let outline: THREE.LineSegments | null = null;
  let slabLines: THREE.LineSegments | null = null;
  let slab: Slab = NO_SLAB;
  let targetWorld: Float32Array | null = null;
  const targetMaterial = pointsMaterial(3.2);
  const contextMaterial = pointsMaterial(1.6, 0.45, false, VIEW_COLOURS.context);
  const targetPoints = new THREE.Group();
  const contextPoints = new THREE.Group();
  let targetPieces: Piece[] = [];
  let contextPieces: Piece[] = [];
  let contextHeld = 0;
  const piecesMake = (group: THREE.Group, material: THREE.ShaderMaterial, world: Float32Array | null, colours: Float32Array | null): Piece[] => {
    const out: Piece[] = [];
    const n = world ? world.length / 3 : 0;
    for (let b = 0; b < n; b += PIECE_POINTS) {
      const e = Math.min(n, b + PIECE_POINTS);
      const geom = new THREE.BufferGeometry();
      geom.setAttribute('position', new THREE.BufferAttribute(world!.subarray(3 * b, 3 * e), 3));
      if (colours) geom.setAttribute('color', new THREE.BufferAttribute(colours.subarray(3 * b, 3 * e), 3));
      // a sphere around the unit cube (world space): spares three a pass over the piece for sorting
      geom.boundingSphere = new THREE.Sphere(new THREE.Vector3(0.5, 0.5, 0.5), 0.87);
      const points = new THREE.Points(geom, material);
      points.frustumCulled = false;
      points.visible = false;
      group.add(points);
      out.push({ points, geom, count: e - b, uploaded: false });
    }
    return out;
  };
  const piecesDrop = (group: THREE.Group, pieces: Piece[]) => {
    for (const p of pieces) {
      group.remove(p.points);
      p.geom.dispose();
    }
  };
  const countOf = (pieces: Piece[]) => pieces.reduce((a, p) => a + p.count, 0);
  const arrowGeom = new THREE.BufferGeometry();
  const arrows = new THREE.LineSegments(arrowGeom, new THREE.LineBasicMaterial({ color: VIEW_COLOURS.arrow }));
  const ringGeom = new THREE.BufferGeometry();
  ringGeom.setAttribute('position', new THREE.Float32BufferAttribute([0, 0, 0], 3));
  ringGeom.setAttribute('color', new THREE.Float32BufferAttribute([...VIEW_COLOURS.ring], 3));
  const ring = new THREE.Points(ringGeom, pointsMaterial(16, 1, true));
  ring.visible = false;
  arrows.frustumCulled = ring.frustumCulled = false;
  // the point and line programs are first drawn in the view's first frames, one kind per frame, as a
  // point or line beyond the far plane: software WebGL compiles drawing code at the first draw of each
  // kind and the page's thread waits for it in that frame (each of these frames waited 150–800 ms in
  // headless chromium at load 3–5); so that wait falls at start, in tasks of its own, not in the first
  // frames of the first clouds. (A new cloud's own first draw is taken off the page by preload below.)
  const far = 1e4;
  const warmLine = new THREE.LineBasicMaterial({ color: VIEW_COLOURS.arrow });
  const warm: THREE.Object3D[] = [targetMaterial, contextMaterial, warmLine].map((m) => {
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', new THREE.Float32BufferAttribute([far, far, far, far, far, 2 * far], 3));
    g.setAttribute('color', new THREE.Float32BufferAttribute([0, 0, 0, 0, 0, 0], 3));
    const o = m === warmLine ? new THREE.LineSegments(g, m) : new THREE.Points(g, m);
    o.frustumCulled = false;
    o.visible = false;
    return o;
  });
  const warmLeft = [...warm];
  // what the first frame of an image draws besides points (later frames of a progressive image add points only)
  const extras = new THREE.Group();
  extras.add(arrows, ring);
  scene.add(...warm, contextPoints, targetPoints, extras);

  let frame = 0;
  let warmTimer = 0;
  let moving = false;
  // hardware: points drawn per cloud while moving, halved when frames come slower than the goal, doubled when fast
  const software = softwareRendered(renderer.getContext());
  const still = software ? SOFTWARE_STILL_POINTS : Infinity;
  let budget = MOVING_POINTS;
  let lastFrame = 0;
  // software: points per frame (adapted to the measured wait); the still image's points drawn so far, and
  // whether the next frame starts a new image (something changed)
  let perFrame = software ? SOFTWARE_FRAME_POINTS : Infinity;
  let drawnUpTo = 0;
  let fresh = true;
  // the wait for a frame's pixels falls in the task that ran the frame: a task posted from the frame at
  // the highest priority (scheduler.postTask where there is one, else a message) runs right after it
  const waitChannel = new MessageChannel();
  const postTask = (globalThis as unknown as { scheduler?: { postTask?(f: () => void, o: { priority: string }): Promise<unknown> } }).scheduler?.postTask;
  let waiting: FrameRecord | null = null;
  const waited = () => {
    const r = waiting;
    waiting = null;
    if (!r) return;
    r.wait = performance.now() - r.t;
    // a frame that compiled a program waited for that once, not for its points
    if (software && !r.warm && !r.offscreen) perFrame = perFrameNext(perFrame, r.to - r.from, r.wait, FRAME_WAIT_MS, SOFTWARE_FRAME_MIN_POINTS, Math.min(still, SOFTWARE_FRAME_MAX_POINTS));
  };
  waitChannel.port1.onmessage = waited;
  const frameRecord = (record: FrameRecord) => {
    viewFrameLog.push(record);
    if (viewFrameLog.length > FRAME_LOG_MAX) viewFrameLog.splice(0, viewFrameLog.length - FRAME_LOG_MAX);
    waiting = record;
    if (postTask) void postTask.call((globalThis as unknown as { scheduler: unknown }).scheduler, waited, { priority: 'user-blocking' }).catch(() => {});
    else waitChannel.port2.postMessage(null);
  };
  // Software WebGL: the first frame that drew a new cloud's pieces waited far longer than the next ones
  // (40–230 ms for 4096 points at load 2.5–5, against 15–45 ms after; no program was compiled in it). So
  // pieces are first drawn (one point each) into a 1×1 target, which the page's thread does not wait
  // for, and the visible frame comes once a fence says the GPU process is done with them (the first
  // visible frame of the demo's comparison then waited 25–43 ms).
  const gl = renderer.getContext();
  const gl2 = typeof WebGL2RenderingContext !== 'undefined' && gl instanceof WebGL2RenderingContext ? gl : null;
  const offscreen = new THREE.WebGLRenderTarget(1, 1, { depthBuffer: false });
  let preloadSync: WebGLSync | null = null;
  let preloadTimer = 0;
  const preloadWait = () => {
    if (!gl2 || !preloadSync) return;
    if (gl2.getSyncParameter(preloadSync, gl2.SYNC_STATUS) !== gl2.SIGNALED) {
      preloadTimer = window.setTimeout(preloadWait, 8);
      return;
    }
    gl2.deleteSync(preloadSync);
    preloadSync = null;
    request();
  };
  /** Draws the pieces of slots [from, to) not yet on the GPU offscreen and waits for them; false when there are none. */
  const preload = (from: number, to: number): boolean => {
    if (!gl2) return false;
    const fresh: Piece[] = [];
    let o = 0;
    for (const p of [...targetPieces, ...contextPieces]) {
      if (pieceRange(o, p.count, from, to).count > 0 && !p.uploaded) fresh.push(p);
      o += p.count;
    }
    if (!fresh.length) return false;
    for (const p of [...targetPieces, ...contextPieces]) {
      const f = fresh.includes(p);
      p.points.visible = f;
      if (f) p.geom.setDrawRange(0, 1);
    }
    extras.visible = false;
    renderer.setRenderTarget(offscreen);
    renderer.autoClear = false;
    renderer.render(scene, camera);
    renderer.setRenderTarget(null);
    for (const p of fresh) p.uploaded = true;
    preloadSync = gl2.fenceSync(gl2.SYNC_GPU_COMMANDS_COMPLETE, 0);
    gl2.flush();
    frameRecord({ t: performance.now(), from, to, moving, clear: false, offscreen: true, warm: false, calls: renderer.info.render.calls, programs: renderer.info.programs?.length ?? 0, wait: -1 });
    preloadTimer = window.setTimeout(preloadWait, 8);
    return true;
  };
  const pointsShown = () => Math.min(still, countOf(targetPieces) + (contextPoints.visible ? countOf(contextPieces) : 0));
  const render = (now: number = performance.now()) => {
    frame = 0;
    if (!software && moving && lastFrame > 0) {
      const dt = now - lastFrame;
      if (dt > MOVING_FRAME_MS * 1.5) budget = Math.max(MOVING_MIN_POINTS, Math.floor(budget / 2));
      else if (dt < MOVING_FRAME_MS / 2) budget = Math.min(4 * MOVING_POINTS, budget * 2);
    }
    lastFrame = moving ? now : 0;
    // which points of the draw order (targets first, then the others) this frame draws
    const shown = pointsShown();
    const range = frameRange({ software, moving, fresh, drawnUpTo, perFrame, shown, still, budget });
    if (!range) return;
    const { from, to } = range;
    if (software && preloadSync) return; // the pieces of this frame are still on their way (preload)
    if (software && preload(from, to)) return;
    const clear = from === 0;
    renderer.autoClear = clear;
    extras.visible = clear;
    // pieces not yet on the GPU go up a few a frame (software: those in the frame's range, few by its size)
    let uploads = UPLOADS_PER_FRAME;
    let more = false;
    let o = 0;
    for (const p of [...targetPieces, ...contextPieces]) {
      const { start, count: take } = pieceRange(o, p.count, from, to);
      o += p.count;
      if (take > 0 && !p.uploaded) {
        if (software || uploads > 0) {
          uploads--;
          p.uploaded = true;
        } else more = true;
      }
      p.geom.setDrawRange(start, take);
      p.points.visible = take > 0 && p.uploaded;
    }
    const warming = !moving ? warmLeft.shift() : undefined;
    if (warming) warming.visible = true;
    renderer.render(scene, camera);
    if (warming) {
      warming.visible = false;
      // the next kind in a frame of its own, after the page has had a turn
      if (warmLeft.length) warmTimer = window.setTimeout(redraw, 50);
    }
    frameRecord({ t: performance.now(), from, to, moving, clear, offscreen: false, warm: warming !== undefined, calls: renderer.info.render.calls, programs: renderer.info.programs?.length ?? 0, wait: -1 });
    if (software) {
      // a moving frame is thrown away by the next; a still image goes on where this frame stopped
      fresh = moving;
      drawnUpTo = moving ? 0 : to;
      if (!moving && to < shown) more = true;
      imageDrawing(moving || to < shown);
    }
    if (more) request();
  };
  function request() {
    if (!frame) frame = requestAnimationFrame(render);
  }
  // the canvas carries data-drawing while its image is not complete (see viewImageDone)
  let drawingShown = false;
  function imageDrawing(on: boolean) {
    if (on === drawingShown) return;
    drawingShown = on;
    if (on) canvas.dataset.drawing = '';
    else delete canvas.dataset.drawing;
  }
  /** Something shown changed: the next frame starts a new image. */
  function redraw() {
    fresh = true;
    request();
  }
  controls.addEventListener('change', redraw);
  controls.addEventListener('start', () => {
    moving = true;
    lastFrame = 0;
  });
  controls.addEventListener('end', () => {
    moving = false;
    redraw();
  });

  const resize = () => {
    const w = Math.max(1, host.clientWidth), h = Math.max(1, host.clientHeight);
    renderer.setSize(w, h, false);
    canvas.style.width = `${w}px`;
    canvas.style.height = `${h}px`;
    camera.aspect = w / h;
    camera.updateProjectionMatrix();
    redraw();
  };
  const observer = typeof ResizeObserver !== 'undefined' ? new ResizeObserver(resize) : null;
  observer?.observe(host);

  const applySlab = () => {
    for (const m of [targetMaterial, contextMaterial]) {
      const u = m.uniforms;
      u.slabAxis.value = slab.axis;
      u.slabMin.value = slab.min;
      u.slabMax.value = slab.max;
    }
  };

  const cameraHome = () => {
    if (!box) return;
    const l = worldUnit(box);
    const c = new THREE.Vector3(box.lx / l / 2, box.ly / l / 2, box.lz / l / 2);
    controls.target.copy(c);
    camera.position.set(c.x + 1.25, c.y + 0.85, c.z + 1.55);
    camera.up.set(0, 1, 0);
    controls.update();
  };

  let flight = 0;
  const handle: ViewHandle = {
    canvas,
    setCloud(b, targets, colours, context, contextTotal) {
      const newBox = !box || b.lx !== box.lx || b.ly !== box.ly || b.lz !== box.lz;
      box = b;
      if (outline) {
        extras.remove(outline);
        outline.geometry.dispose();
      }
      outline = boxOutline(b);
      extras.add(outline);
      targetWorld = targets;
      piecesDrop(targetPoints, targetPieces);
      piecesDrop(contextPoints, contextPieces);
      targetPieces = piecesMake(targetPoints, targetMaterial, targets, colours ?? new Float32Array(targets ? targets.length : 0));
      contextPieces = piecesMake(contextPoints, contextMaterial, context, null);
      contextHeld = Math.max(countOf(contextPieces), contextTotal ?? 0);
      // smaller points for dense clouds
      const n = (targets?.length ?? 0) / 3 + contextHeld;
      targetMaterial.uniforms.size.value = n > 200_000 ? 1.5 : n > 20_000 ? 2.2 : 3.2;
      contextMaterial.uniforms.size.value = n > 200_000 ? 1 : 1.6;
      if (newBox) cameraHome();
      redraw();
    },
    setArrows(segments) {
      arrowGeom.setAttribute('position', new THREE.BufferAttribute(segments ?? new Float32Array(0), 3));
      redraw();
    },
    setSlab(s) {
      slab = s;
      applySlab();
      if (slabLines) {
        extras.remove(slabLines);
        slabLines.geometry.dispose();
        slabLines = null;
      }
      if (box) {
        slabLines = slabOutline(box, s);
        if (slabLines) extras.add(slabLines);
      }
      redraw();
    },
    setContextVisible(on) {
      contextPoints.visible = on;
      redraw();
    },
    setSelected(slot) {
      if (!targetWorld || slot < 0 || 3 * slot >= targetWorld.length) ring.visible = false;
      else {
        ringGeom.setAttribute('position', new THREE.Float32BufferAttribute(Array.from(targetWorld.subarray(3 * slot, 3 * slot + 3)), 3));
        ring.visible = true;
      }
      redraw();
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
      moving = true;
      lastFrame = 0;
      const step = () => {
        const t = Math.min(1, (performance.now() - t0) / 600);
        const e = t < 0.5 ? 2 * t * t : 1 - (-2 * t + 2) ** 2 / 2;
        controls.target.lerpVectors(from, goal, e);
        camera.position.lerpVectors(startPos, endPos, e);
        controls.update();
        if (t < 1) {
          render();
          flight = requestAnimationFrame(step);
        } else {
          moving = false;
          render();
        }
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
      const shown = Math.min(world.length / 3, still);
      const visible = (k: number) => k < shown && (sl.axis < 0 || slabContains(sl, world[3 * k + sl.axis]));
      return pickNearest(world, vp.elements, w, h, x, y, 8, visible);
    },
    resize,
    render,
    drawn() {
      const n = countOf(targetPieces);
      const m = countOf(contextPieces);
      const nt = Math.min(n, still);
      return { shown: nt + Math.max(0, Math.min(m, still - nt)), total: n + contextHeld, software };
    },
    capacity() {
      return still;
    },
    dispose() {
      observer?.disconnect();
      cancelAnimationFrame(frame);
      waitChannel.port1.close();
      cancelAnimationFrame(flight);
      controls.dispose();
      piecesDrop(targetPoints, targetPieces);
      piecesDrop(contextPoints, contextPieces);
      clearTimeout(warmTimer);
      clearTimeout(preloadTimer);
      offscreen.dispose();
      for (const g of [arrowGeom, ringGeom, ...warm.map((w) => (w as THREE.Points).geometry)]) g.dispose();
      warmLine.dispose();
      for (const m of [targetMaterial, contextMaterial]) m.dispose();
      outline?.geometry.dispose();
      slabLines?.geometry.dispose();
      renderer.dispose();
      canvas.remove();
    },
  };
  resize();
  return handle;
}
