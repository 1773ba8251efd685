/**
 * The 3D view's drawing: the box outline, particles as points coloured by relative error (targets) or
 * grey (other particles), residual arrows as line segments and a picked-particle ring, rendered with a
 * camera it is given (the page's orbit controls move it) on a canvas it is given: the page's own, or an
 * OffscreenCanvas in the view worker (view.worker.ts), so that software WebGL's waits do not fall on the
 * page. No DOM use here. Renders on demand only (after a change or while the view moves).
 * While the camera moves, very large clouds draw a random prefix of their points. Clouds are held in
 * pieces of PIECE_POINTS points, each its own draw call, handed to the GPU a few per frame, so that a
 * 10⁶-point cloud is never uploaded in one long task.
 *
 * Software WebGL (no GPU): the thread that draws waits, in the frame's commit, until the GPU process has
 * drawn the canvas, so a frame's points are a frame's stall. There every frame draws at most `perFrame`
 * points, adapted to the measured wait (FRAME_WAIT_MS); a still image larger than that is drawn over
 * several frames into the kept drawing buffer (the first frame clears and draws box, arrows and ring;
 * the next ones add points in the same order, so the finished image is the one a single frame would
 * draw, but for the order of points at equal depth). In the worker this keeps each frame short, so
 * camera moves are answered quickly. A new cloud's pieces are first drawn offscreen, where the thread
 * does not wait for them (preload).
 */
import * as THREE from 'three';
import type { Box } from '../../../engine/box';
import { frameRange, perFrameNext, pieceRange } from './frameBudget';
import { type Slab, worldUnit } from './geometry';
import { pointsMaterial } from './pointsMaterial';
import { MOVING_FRAME_MS, MOVING_MIN_POINTS, MOVING_POINTS, VIEW_COLOURS } from './viewConstants';

/**
 * Most points drawn in a still image when WebGL is rendered in software (SwiftShader, llvmpipe): a
 * random prefix of the cloud stands for the rest, and the view says so. Hardware draws everything.
 * Without a GPU the drawing thread waits for each frame's pixels (the compositor reads the canvas back),
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


/** What the renderer tells its owner. */
export interface RendererEvents {
  /** The canvas's image is incomplete (a still image drawn over several frames) or complete again. */
  drawing(on: boolean): void;
  /** A rendered frame, once the wait for its pixels is known (wait −1: not measured). */
  frame(record: FrameRecord): void;
}

export interface SceneRenderer {
  /** WebGL is rendered in software (frames budgeted, still images progressive). */
  readonly software: boolean;
  /** Most points a still frame draws (Infinity unless software). */
  readonly capacity: number;
  /** Box and particles (see ViewHandle.setCloud); the arrays are used as they are, not copied. */
  setCloud(box: Box, targets: Float32Array | null, colours: Float32Array | null, context: Float32Array | null, contextTotal?: number): void;
  setArrows(segments: Float32Array | null): void;
  setSlab(slab: Slab): void;
  setContextVisible(on: boolean): void;
  /** The picked-particle ring at a world position, or none. */
  setRing(at: readonly [number, number, number] | null): void;
  /** The camera starts or stops moving (frames drawn meanwhile are thrown away by the next). */
  setMoving(on: boolean): void;
  /** Drawing buffer size in CSS pixels and the pixel ratio. */
  setSize(width: number, height: number, pixelRatio: number): void;
  /** Something shown changed (the camera, say): a new image is drawn. */
  redraw(): void;
  /** Whether a frame is still to come before the image is complete. */
  busy(): boolean;
  dispose(): void;
}

/** The renderer on `canvas` (the page's, or an OffscreenCanvas), drawing what `camera` sees. */
export function sceneRendererCreate(canvas: HTMLCanvasElement | OffscreenCanvas, camera: THREE.PerspectiveCamera, events: RendererEvents): SceneRenderer {
  const renderer = new THREE.WebGLRenderer({ canvas, antialias: false, preserveDrawingBuffer: true, powerPreference: 'low-power' });
  renderer.setClearColor(VIEW_COLOURS.background, 1);
  const scene = new THREE.Scene();

  let outline: THREE.LineSegments | null = null;
  let slabLines: THREE.LineSegments | null = null;
  let box: Box | null = null;
  const targetMaterial = pointsMaterial(3.2);
  const contextMaterial = pointsMaterial(1.6, 0.45, false, VIEW_COLOURS.context);
  const targetPoints = new THREE.Group();
  const contextPoints = new THREE.Group();
  let targetPieces: Piece[] = [];
  let contextPieces: Piece[] = [];
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
  // kind and the drawing thread waits for it in that frame (each of these frames waited 150–800 ms in
  // headless chromium at load 3–5); so that wait falls at start, in tasks of its own, not in the first
  // frames of the first clouds. (A new cloud's own first draw is taken off the wait by preload below.)
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
  let warmTimer: ReturnType<typeof setTimeout> | undefined;
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
    events.frame(r);
  };
  waitChannel.port1.onmessage = waited;
  const frameRecord = (record: FrameRecord) => {
    if (waiting) events.frame(waiting);
    waiting = record;
    if (postTask) void postTask.call((globalThis as unknown as { scheduler: unknown }).scheduler, waited, { priority: 'user-blocking' }).catch(() => {});
    else waitChannel.port2.postMessage(null);
  };
  // Software WebGL: the first frame that drew a new cloud's pieces waited far longer than the next ones
  // (40–230 ms for 4096 points at load 2.5–5, against 15–45 ms after; no program was compiled in it). So
  // pieces are first drawn (one point each) into a 1×1 target, which the drawing thread does not wait
  // for, and the visible frame comes once a fence says the GPU process is done with them (the first
  // visible frame of the demo's comparison then waited 25–43 ms).
  const gl = renderer.getContext();
  const gl2 = typeof WebGL2RenderingContext !== 'undefined' && gl instanceof WebGL2RenderingContext ? gl : null;
  const offscreen = new THREE.WebGLRenderTarget(1, 1, { depthBuffer: false });
  let preloadSync: WebGLSync | null = null;
  let preloadTimer: ReturnType<typeof setTimeout> | undefined;
  const preloadWait = () => {
    if (!gl2 || !preloadSync) return;
    if (gl2.getSyncParameter(preloadSync, gl2.SYNC_STATUS) !== gl2.SIGNALED) {
      preloadTimer = setTimeout(preloadWait, 8);
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
    preloadTimer = setTimeout(preloadWait, 8);
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
      // the next kind in a frame of its own, after the thread has had a turn
      if (warmLeft.length) warmTimer = setTimeout(redraw, 50);
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
  let drawingShown = false;
  function imageDrawing(on: boolean) {
    if (on === drawingShown) return;
    drawingShown = on;
    events.drawing(on);
  }
  /** Something shown changed: the next frame starts a new image. */
  function redraw() {
    fresh = true;
    request();
  }

  const applySlab = (slab: Slab) => {
    for (const m of [targetMaterial, contextMaterial]) {
      const u = m.uniforms;
      u.slabAxis.value = slab.axis;
      u.slabMin.value = slab.min;
      u.slabMax.value = slab.max;
    }
  };
  let slab: Slab | null = null;
  const slabLinesSet = () => {
    if (slabLines) {
      extras.remove(slabLines);
      slabLines.geometry.dispose();
      slabLines = null;
    }
    if (box && slab) {
      slabLines = slabOutline(box, slab);
      if (slabLines) extras.add(slabLines);
    }
  };

  return {
    software,
    capacity: still,
    setCloud(b, targets, colours, context, contextTotal) {
      box = b;
      if (outline) {
        extras.remove(outline);
        outline.geometry.dispose();
      }
      outline = boxOutline(b);
      extras.add(outline);
      piecesDrop(targetPoints, targetPieces);
      piecesDrop(contextPoints, contextPieces);
      targetPieces = piecesMake(targetPoints, targetMaterial, targets, colours ?? new Float32Array(targets ? targets.length : 0));
      contextPieces = piecesMake(contextPoints, contextMaterial, context, null);
      const contextHeld = Math.max(countOf(contextPieces), contextTotal ?? 0);
      // smaller points for dense clouds
      const n = (targets?.length ?? 0) / 3 + contextHeld;
      targetMaterial.uniforms.size.value = n > 200_000 ? 1.5 : n > 20_000 ? 2.2 : 3.2;
      contextMaterial.uniforms.size.value = n > 200_000 ? 1 : 1.6;
      redraw();
    },
    setArrows(segments) {
      arrowGeom.setAttribute('position', new THREE.BufferAttribute(segments ?? new Float32Array(0), 3));
      redraw();
    },
    setSlab(s) {
      slab = s;
      applySlab(s);
      slabLinesSet();
      redraw();
    },
    setContextVisible(on) {
      contextPoints.visible = on;
      redraw();
    },
    setRing(at) {
      if (!at) ring.visible = false;
      else {
        ringGeom.setAttribute('position', new THREE.Float32BufferAttribute([...at], 3));
        ring.visible = true;
      }
      redraw();
    },
    setMoving(on) {
      moving = on;
      lastFrame = 0;
      if (!on) redraw();
    },
    setSize(width, height, pixelRatio) {
      renderer.setPixelRatio(pixelRatio);
      renderer.setSize(width, height, false);
      redraw();
    },
    redraw,
    busy: () => frame !== 0 || drawingShown || preloadSync !== null,
    dispose() {
      cancelAnimationFrame(frame);
      waitChannel.port1.close();
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
    },
  };
}
