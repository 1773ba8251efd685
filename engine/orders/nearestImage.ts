/**
 * The nearest-image (minimum-image) sum: each source particle enters once, at its image closest to the
 * target (separation components wrapped into [−L/2, L/2)), and no other image. With the mean density
 * removed the background is the box-shaped region centred on the target that these images fill, whose field
 * at its own centre vanishes by symmetry, so the force is the same with or without it.
 */
import { type Box, minimumImage } from '../box';

/**
 * Minimum-image accelerations (G·mass/length²) for targets[begin..end) (input rows) from wrapped positions
 * (flat xyz) and masses: out[3t + d], t indexing `targets`.
 */
export function nearestImageTargets(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  G: number,
  targets: Int32Array,
  begin: number,
  end: number,
  out: Float64Array,
): void {
  const n = masses.length;
  for (let t = begin; t < end; t++) {
    const i = targets[t];
    const xi = positions[3 * i], yi = positions[3 * i + 1], zi = positions[3 * i + 2];
    let ax = 0, ay = 0, az = 0;
    for (let j = 0; j < n; j++) {
      if (j === i) continue;
      const dx = minimumImage(positions[3 * j] - xi, box.lx);
      const dy = minimumImage(positions[3 * j + 1] - yi, box.ly);
      const dz = minimumImage(positions[3 * j + 2] - zi, box.lz);
      const r2 = dx * dx + dy * dy + dz * dz;
      const f = masses[j] / (r2 * Math.sqrt(r2));
      ax += f * dx;
      ay += f * dy;
      az += f * dz;
    }
    out[3 * t] = G * ax;
    out[3 * t + 1] = G * ay;
    out[3 * t + 2] = G * az;
  }
}
