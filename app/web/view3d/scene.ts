/**
 * The 3D view: the box outline, particles as points coloured by relative error (targets) or grey
 * (other particles), residual arrows as line segments, a picked-particle ring, orbit/zoom/pan, a slab
 * filter and screen-space picking. Renders on demand only (after a change or while the view moves).
 * While the camera moves, very large clouds draw a random prefix of their points.
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
 */
export const SOFTWARE_STILL_POINTS = 300_000;

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
  /** Box and particles: targets (world xyz, rgb) in draw order, and other particles (world xyz). */
  setCloud(box: Box, targets: Float32Array | null, colours: Float32Array | null, context: Float32Array | null): void;
  setColours(colours: Float32Array): void;
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
  resize(): void;
  render(): void;
  readonly canvas: HTMLCanvasElement;
  dispose(): void;
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
  const targetGeom = new THREE.BufferGeometry();
  const targetPoints = new THREE.Points(targetGeom, pointsMaterial(3.2));
  const contextGeom = new THREE.BufferGeometry();
  const contextPoints = new THREE.Points(contextGeom, pointsMaterial(1.6, 0.45));
  const arrowGeom = new THREE.BufferGeometry();
  const arrows = new THREE.LineSegments(arrowGeom, new THREE.LineBasicMaterial({ color: VIEW_COLOURS.arrow }));
  const ringGeom = new THREE.BufferGeometry();
  ringGeom.setAttribute('position', new THREE.Float32BufferAttribute([0, 0, 0], 3));
  ringGeom.setAttribute('color', new THREE.Float32BufferAttribute([...VIEW_COLOURS.ring], 3));
  const ring = new THREE.Points(ringGeom, pointsMaterial(16, 1, true));
  ring.visible = false;
  contextPoints.frustumCulled = targetPoints.frustumCulled = arrows.frustumCulled = ring.frustumCulled = false;
  scene.add(contextPoints, targetPoints, arrows, ring);

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
    const n = targetGeom.getAttribute('position')?.count ?? 0;
    const m = contextGeom.getAttribute('position')?.count ?? 0;
    // targets first: the context gets what the budget leaves
    const cap = moving ? budget : still;
    const nt = Math.min(n, cap);
    targetGeom.setDrawRange(0, nt);
    contextGeom.setDrawRange(0, Math.max(0, Math.min(m, cap - nt)));
    renderer.render(scene, camera);
  };
  const request = () => {
    if (!frame) frame = requestAnimationFrame(render);
  };
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
    for (const p of [targetPoints, contextPoints]) {
      const u = (p.material as THREE.ShaderMaterial).uniforms;
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
    setCloud(b, targets, colours, context) {
      const newBox = !box || b.lx !== box.lx || b.ly !== box.ly || b.lz !== box.lz;
      box = b;
      if (outline) {
        scene.remove(outline);
        outline.geometry.dispose();
      }
      outline = boxOutline(b);
      scene.add(outline);
      targetWorld = targets;
      targetGeom.setAttribute('position', new THREE.BufferAttribute(targets ?? new Float32Array(0), 3));
      targetGeom.setAttribute('color', new THREE.BufferAttribute(colours ?? new Float32Array(targets ? targets.length : 0), 3));
      const cx = context ?? new Float32Array(0);
      contextGeom.setAttribute('position', new THREE.BufferAttribute(cx, 3));
      const grey = new Float32Array(cx.length);
      const [gr, gg, gb] = VIEW_COLOURS.context;
      for (let i = 0; i < grey.length; i += 3) {
        grey[i] = gr;
        grey[i + 1] = gg;
        grey[i + 2] = gb;
      }
      contextGeom.setAttribute('color', new THREE.BufferAttribute(grey, 3));
      // smaller points for dense clouds
      const n = (targets?.length ?? 0) / 3 + cx.length / 3;
      (targetPoints.material as THREE.ShaderMaterial).uniforms.size.value = n > 200_000 ? 1.5 : n > 20_000 ? 2.2 : 3.2;
      (contextPoints.material as THREE.ShaderMaterial).uniforms.size.value = n > 200_000 ? 1 : 1.6;
      if (newBox) cameraHome();
      request();
    },
    setColours(colours) {
      targetGeom.setAttribute('color', new THREE.BufferAttribute(colours, 3));
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
      const n = targetGeom.getAttribute('position')?.count ?? 0;
      const m = contextGeom.getAttribute('position')?.count ?? 0;
      const nt = Math.min(n, still);
      return { shown: nt + Math.max(0, Math.min(m, still - nt)), total: n + m, software };
    },
    dispose() {
      observer?.disconnect();
      cancelAnimationFrame(frame);
      cancelAnimationFrame(flight);
      controls.dispose();
      for (const g of [targetGeom, contextGeom, arrowGeom, ringGeom]) g.dispose();
      outline?.geometry.dispose();
      slabLines?.geometry.dispose();
      renderer.dispose();
      canvas.remove();
    },
  };
  resize();
  return handle;
}
