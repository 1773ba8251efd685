/** Constants of the 3D view shared by the page (scene.ts, the report) and the renderer (sceneRenderer.ts). */

/**
 * Clouds larger than this are stored in a random order, so that while the view moves a prefix of them
 * can stand for all; how long that prefix is adapts to the frame time (software rendering is slow).
 */
export const MOVING_POINTS = 250_000;

/** Frame-time goal while the view moves (ms), and the smallest prefix drawn meanwhile. */
export const MOVING_FRAME_MS = 40;
export const MOVING_MIN_POINTS = 20_000;

/** The view's colours (the report's legend names them too). */
export const VIEW_COLOURS = {
  background: 0x17211f,
  box: 0x7f948d,
  context: [0.42, 0.48, 0.46] as const,
  arrow: 0xffb870,
  ring: [1, 0.35, 0.3] as const,
};
