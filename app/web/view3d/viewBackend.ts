/**
 * Where the 3D view is drawn, behind one interface: in a worker on an OffscreenCanvas (viewInWorker.ts;
 * the page never waits for software WebGL) or, where a worker cannot draw, on the page (viewInPage.ts).
 * The page keeps the camera and its controls in both cases (scene.ts).
 */
import type { Box } from '../../../engine/box';
import type { Slab } from './geometry';

/** What the renderer can do, known once it runs. */
export interface ViewAbilities {
  /** WebGL is rendered in software. */
  readonly software: boolean;
  /** Most points a still frame draws (Infinity unless software). */
  readonly capacity: number;
}

export interface ViewBackend {
  /** Resolves once the renderer runs; rejects when it cannot start. */
  readonly ready: Promise<ViewAbilities>;
  /** Box and particles (see ViewHandle.setCloud); arrays other than `targets` may be handed over (detached). */
  setCloud(box: Box, targets: Float32Array | null, colours: Float32Array | null, context: Float32Array | null, contextTotal?: number): void;
  /** Residual arrows as segments (the array may be handed over). */
  setArrows(segments: Float32Array | null): void;
  setSlab(slab: Slab): void;
  setContextVisible(on: boolean): void;
  setRing(at: readonly [number, number, number] | null): void;
  setMoving(on: boolean): void;
  /** Drawing size in CSS pixels, and the pixel ratio. */
  setSize(width: number, height: number, pixelRatio: number): void;
  /** The page's camera moved. */
  cameraChanged(): void;
  /** A copy of the finished image (waiting at most `timeoutMs` for its last frames), or null. */
  image(timeoutMs: number): Promise<CanvasImageSource & { readonly width: number; readonly height: number } | null>;
  dispose(): void;
}

/** Whether this browser can draw WebGL in a worker on an OffscreenCanvas taken from a page canvas. */
export function offscreenViewSupported(): boolean {
  return (
    typeof Worker !== 'undefined' &&
    typeof OffscreenCanvas !== 'undefined' &&
    typeof HTMLCanvasElement !== 'undefined' &&
    'transferControlToOffscreen' in HTMLCanvasElement.prototype &&
    typeof (OffscreenCanvas.prototype as { getContext?: unknown }).getContext === 'function'
  );
}
