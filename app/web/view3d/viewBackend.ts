/**
 * Where the 3D view is drawn, behind one interface: in a worker on an OffscreenCanvas (viewInWorker.ts;
 * the page never waits for software WebGL) or, where a worker cannot draw, on the page (viewInPage.ts).
 * The page keeps the camera and its controls in both cases (scene.ts).
 */
import type { SceneRenderer } from './sceneRenderer';

/** What the renderer can do, known once it runs. */
export interface ViewAbilities {
  /** WebGL is rendered in software. */
  readonly software: boolean;
  /** Most points a still frame draws (Infinity unless software). */
  readonly capacity: number;
}

/**
 * The renderer's own calls (sceneRenderer.ts), passed on; in the worker every array but setCloud's
 * `targets` may be handed over (detached).
 */
export interface ViewBackend
  extends Pick<SceneRenderer, 'setCloud' | 'setArrows' | 'setSlab' | 'setContextVisible' | 'setRing' | 'setMoving' | 'setSize' | 'dispose'> {
  /** Resolves once the renderer runs; rejects when it cannot start. */
  readonly ready: Promise<ViewAbilities>;
  /** The page's camera moved. */
  cameraChanged(): void;
  /** A copy of the finished image (waiting at most `timeoutMs` for its last frames), or null. */
  image(timeoutMs: number): Promise<CanvasImageSource & { readonly width: number; readonly height: number } | null>;
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
