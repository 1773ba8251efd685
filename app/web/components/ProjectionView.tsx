/** The snapshot seen along z: particle counts per pixel, darker where denser (log scale). */
import { useEffect, useRef } from 'react';
import type { Snapshot } from '../state/store';

const SIZE = 180;

function draw(canvas: HTMLCanvasElement, snapshot: Snapshot): void {
  const ctx = canvas.getContext('2d');
  if (!ctx) return;
  const counts = new Uint32Array(SIZE * SIZE);
  const { positions, box } = snapshot;
  let top = 0;
  for (let i = 0; i < positions.length; i += 3) {
    const px = Math.min(SIZE - 1, Math.max(0, Math.floor((positions[i] / box.lx) * SIZE)));
    const py = Math.min(SIZE - 1, Math.max(0, Math.floor((1 - positions[i + 1] / box.ly) * SIZE)));
    const c = ++counts[py * SIZE + px];
    if (c > top) top = c;
  }
  const img = ctx.createImageData(SIZE, SIZE);
  // shade by log(count / mean count), so that sparse and dense snapshots both show their structure
  const mean = Math.max(1e-9, positions.length / 3 / counts.length);
  const norm = Math.log1p(top / mean) || 1;
  // background #f7f6f1, ink #24524b
  for (let p = 0; p < counts.length; p++) {
    const t = counts[p] ? 0.12 + (0.88 * Math.log1p(counts[p] / mean)) / norm : 0;
    img.data[4 * p] = 247 + (36 - 247) * t;
    img.data[4 * p + 1] = 246 + (82 - 246) * t;
    img.data[4 * p + 2] = 241 + (75 - 241) * t;
    img.data[4 * p + 3] = 255;
  }
  ctx.putImageData(img, 0, 0);
}

export function ProjectionView({ snapshot }: { snapshot: Snapshot | null }) {
  const ref = useRef<HTMLCanvasElement>(null);
  useEffect(() => {
    if (ref.current && snapshot) draw(ref.current, snapshot);
  }, [snapshot]);
  return (
    <figure className="projection">
      <canvas ref={ref} width={SIZE} height={SIZE} aria-label="particles projected along z" />
      <figcaption>projection along z, x → right, y ↑</figcaption>
    </figure>
  );
}
