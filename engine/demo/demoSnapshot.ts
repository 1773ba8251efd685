/**
 * The built-in demo scenario, "three knots and a thread": an invented, seeded snapshot in a unit cube —
 * a near-uniform background (55 %), three dense knots with Plummer-sphere profiles (30 %), and a curved
 * filament joining two of them (15 %). Equal masses summing to 1. Same seed → same snapshot everywhere.
 */
import { type Random, randomNormal, randomSeeded } from '../util/random';

export interface DemoSnapshot {
  /** Flat xyz in [0, 1)³ (box side 1). */
  readonly positions: Float64Array;
  /** Equal masses 1/N. */
  readonly masses: Float64Array;
  /** Box side. */
  readonly box: number;
}

function wrap01(x: number): number {
  return x - Math.floor(x);
}

/** Radius drawn from a Plummer sphere of scale a (cumulative mass r³/(r²+a²)^{3/2}), truncated at 10a. */
function plummerRadius(rand: Random, a: number): number {
  for (;;) {
    const u = rand();
    if (u <= 0 || u >= 0.999) continue;
    const r = a / Math.sqrt(Math.pow(u, -2 / 3) - 1);
    if (r < 10 * a) return r;
  }
}

function isotropic(rand: Random): [number, number, number] {
  const z = 2 * rand() - 1;
  const phi = 2 * Math.PI * rand();
  const s = Math.sqrt(1 - z * z);
  return [s * Math.cos(phi), s * Math.sin(phi), z];
}

/** Generates the demo snapshot with n ≥ 1 particles from an integer seed. */
export function demoSnapshot(n: number, seed: number): DemoSnapshot {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`demo: particle count must be a positive integer, got ${n}`);
  if (!Number.isInteger(seed)) throw new RangeError(`demo: seed must be an integer, got ${seed}`);
  const rand = randomSeeded(seed);
  const positions = new Float64Array(3 * n);
  const masses = new Float64Array(n).fill(1 / n);
  // Knot centres and scales drawn from the seed too, kept apart from each other.
  const knots: { c: [number, number, number]; a: number; share: number }[] = [];
  const shares = [0.14, 0.1, 0.06];
  while (knots.length < 3) {
    const c: [number, number, number] = [rand(), rand(), rand()];
    if (knots.every((k) => Math.hypot(...k.c.map((v, d) => ((v - c[d] + 1.5) % 1) - 0.5)) > 0.3)) {
      knots.push({ c, a: 0.012 + 0.02 * rand(), share: shares[knots.length] });
    }
  }
  const nKnot = knots.map((k) => Math.round(k.share * n));
  const nFil = Math.round(0.15 * n);
  let p = 0;
  const put = (x: number, y: number, z: number) => {
    positions[3 * p] = wrap01(x);
    positions[3 * p + 1] = wrap01(y);
    positions[3 * p + 2] = wrap01(z);
    p++;
  };
  knots.forEach((k, i) => {
    for (let j = 0; j < nKnot[i] && p < n; j++) {
      const r = plummerRadius(rand, k.a);
      const [ux, uy, uz] = isotropic(rand);
      put(k.c[0] + r * ux, k.c[1] + r * uy, k.c[2] + r * uz);
    }
  });
  // Filament: a bowed path from knot 0 to knot 1 (shortest periodic displacement), Gaussian cross-section.
  const a = knots[0].c, b = knots[1].c;
  const d = b.map((v, i) => ((v - a[i] + 1.5) % 1) - 0.5);
  const bow = isotropic(rand).map((v) => 0.08 * v);
  for (let j = 0; j < nFil && p < n; j++) {
    const t = rand();
    const s = Math.sin(Math.PI * t);
    const w = 0.006;
    put(
      a[0] + t * d[0] + s * bow[0] + w * randomNormal(rand),
      a[1] + t * d[1] + s * bow[1] + w * randomNormal(rand),
      a[2] + t * d[2] + s * bow[2] + w * randomNormal(rand),
    );
  }
  while (p < n) put(rand(), rand(), rand());
  return { positions, masses, box: 1 };
}
