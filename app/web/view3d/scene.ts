/**
 * The 3D view: the box outline, particles as points coloured by relative error (targets) or grey
 * (other particles), residual arrows as line segments, a picked-particle ring, orbit/zoom/pan, a slab
 * filter and screen-space picking. Renders on demand only (after a change or while the view moves).
 * While the camera moves, very large clouds draw a random prefix of their points. Clouds are held in
 * pieces of PIECE_POINTS points, each its own draw call, handed to the GPU a few per frame, so that a
 * 10⁶-point cloud is never uploaded in one long task.
 */
import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import type { Box } from '../../../engine/box';
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
 * Most points drawn in a still frame when WebGL is rendered in software (SwiftShader, llvmpipe): a
 * random prefix of the cloud stands for the rest, and the view says so. Hardware draws everything.
 * Without a GPU the page's thread waits for each frame's pixels (the compositor reads the canvas back),
 * about 0.7 µs per point on the project machine under load: 300 000 points held it ~230 ms a frame,
 * 100 000 keep a frame near the 100 ms a user does not notice as a stall.
 */
export const SOFTWARE_STILL_POINTS = 100_000;

/** Points per piece of a cloud (one buffer and draw call each), and new pieces uploaded per frame. */
export const PIECE_POINTS = 65_536;
const UPLOADS_PER_FRAME = 2;

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
  // both point programs are compiled in the first frame (drawing nothing), not in the first frame of a
  // large cloud: software WebGL compiles a program at its first draw, and the page's thread waits for it
  const warm = [targetMaterial, contextMaterial].map((m) => {
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', new THREE.Float32BufferAttribute([0, 0, 0], 3));
    g.setAttribute('color', new THREE.Float32BufferAttribute([0, 0, 0], 3));
    g.setDrawRange(0, 0);
    const p = new THREE.Points(g, m);
    p.frustumCulled = false;
    return p;
  });
  scene.add(...warm, contextPoints, targetPoints, arrows, ring);

  let frame = 0;
  let moving = false;
  // points drawn per cloud while moving: halved when frames come slower than the goal, doubled when fast
  const software = softwareRendered(renderer.getContext());
  const still = software ? SOFTWARE_STILL_POINTS : Infinity;
  let budget = software ? MOVING_POINTS / 4 : MOVING_POINTS;
  let lastFrame = 0;
  const render = (now: number = performance.now()) => {
    frame = 0;
    if (moving && lastFrame > 0) {
      const dt = now - lastFrame;
      if (dt > MOVING_FRAME_MS * 1.5) budget = Math.max(MOVING_MIN_POINTS, Math.floor(budget / 2));
      else if (dt < MOVING_FRAME_MS / 2) budget = Math.min(4 * MOVING_POINTS, budget * 2);
    }
    lastFrame = moving ? now : 0;
    // targets first: the context gets what the budget leaves; pieces not yet on the GPU go up a few a frame
    let left = moving ? Math.min(budget, still) : still;
    let uploads = UPLOADS_PER_FRAME;
    let more = false;
    for (const p of [...targetPieces, ...contextPieces]) {
      const take = Math.max(0, Math.min(p.count, left));
      left -= take;
      if (take > 0 && !p.uploaded) {
        if (uploads > 0) {
          uploads--;
          p.uploaded = true;
        } else more = true;
      }
      p.geom.setDrawRange(0, take);
      p.points.visible = take > 0 && p.uploaded;
    }
    renderer.render(scene, camera);
    if (more) request();
  };
  function request() {
    if (!frame) frame = requestAnimationFrame(render);
  }
  controls.addEventListener('change', request);
  controls.addEventListener('start', () => {
    moving = true;
    lastFrame = 0;
  });
  controls.addEventListener('end', () => {
    moving = false;
    request();
  });

  const resize = () => {
    const w = Math.max(1, host.clientWidth), h = Math.max(1, host.clientHeight);
    renderer.setSize(w, h, false);
    canvas.style.width = `${w}px`;
    canvas.style.height = `${h}px`;
    camera.aspect = w / h;
    camera.updateProjectionMatrix();
    request();
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
        scene.remove(outline);
        outline.geometry.dispose();
      }
      outline = boxOutline(b);
      scene.add(outline);
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
      request();
    },
    setArrows(segments) {
      arrowGeom.setAttribute('position', new THREE.BufferAttribute(segments ?? new Float32Array(0), 3));
      request();
    },
    setSlab(s) {
      slab = s;
      applySlab();
      if (slabLines) {
        scene.remove(slabLines);
        slabLines.geometry.dispose();
        slabLines = null;
      }
      if (box) {
        slabLines = slabOutline(box, s);
        if (slabLines) scene.add(slabLines);
      }
      request();
    },
    setContextVisible(on) {
      contextPoints.visible = on;
      request();
    },
    setSelected(slot) {
      if (!targetWorld || slot < 0 || 3 * slot >= targetWorld.length) ring.visible = false;
      else {
        ringGeom.setAttribute('position', new THREE.Float32BufferAttribute(Array.from(targetWorld.subarray(3 * slot, 3 * slot + 3)), 3));
        ring.visible = true;
      }
      request();
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
      cancelAnimationFrame(flight);
      controls.dispose();
      piecesDrop(targetPoints, targetPieces);
      piecesDrop(contextPoints, contextPieces);
      for (const g of [arrowGeom, ringGeom, ...warm.map((w) => w.geometry)]) g.dispose();
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
