/**
 * Messages between the page and the view worker (view.worker.ts). The page holds the camera and its
 * controls and sends the camera's pose on every change; the worker draws and reports back.
 */
import type { Box } from '../../../engine/box';
import type { Slab } from './geometry';
import type { FrameRecord } from './sceneRenderer';

/** The page's camera as the worker needs it: pose and projection. */
export interface CameraPose {
  readonly position: readonly [number, number, number];
  readonly quaternion: readonly [number, number, number, number];
  readonly fov: number;
  readonly aspect: number;
  readonly near: number;
  readonly far: number;
  readonly zoom: number;
}

export type ViewRequest =
  | { readonly type: 'init'; readonly canvas: OffscreenCanvas; readonly width: number; readonly height: number; readonly pixelRatio: number }
  | { readonly type: 'size'; readonly width: number; readonly height: number; readonly pixelRatio: number }
  | { readonly type: 'cloud'; readonly box: Box; readonly targets: Float32Array | null; readonly colours: Float32Array | null; readonly context: Float32Array | null; readonly contextTotal?: number }
  | { readonly type: 'arrows'; readonly segments: Float32Array | null }
  | { readonly type: 'slab'; readonly slab: Slab }
  | { readonly type: 'context'; readonly on: boolean }
  | { readonly type: 'ring'; readonly at: readonly [number, number, number] | null }
  | { readonly type: 'camera'; readonly pose: CameraPose }
  | { readonly type: 'moving'; readonly on: boolean }
  /** The finished image (once no frame of it is left to draw, or after timeoutMs), as an ImageBitmap. */
  | { readonly type: 'image'; readonly id: number; readonly timeoutMs: number }
  | { readonly type: 'dispose' };

export type ViewReply =
  | { readonly type: 'ready'; readonly software: boolean; readonly capacity: number; readonly timeOrigin: number }
  | { readonly type: 'failed'; readonly message: string }
  | { readonly type: 'drawing'; readonly on: boolean }
  | { readonly type: 'frame'; readonly record: FrameRecord }
  | { readonly type: 'image'; readonly id: number; readonly image: ImageBitmap | null };
