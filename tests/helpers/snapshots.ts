/**
 * Seeded test configurations: uniform and clustered snapshots in rectangular boxes, ionic crystals as
 * signed-mass cells. Everything is deterministic (engine/util/random), so a failing case reproduces exactly.
 */
import { type Box, boxMake, demoSnapshot, randomSeeded } from '../../engine/index';

export interface Snapshot {
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
}

/** N particles uniform in the box; masses (1 ± spread/2)·M/N with the given spread (0: equal masses). */
export function snapshotUniform(n: number, seed: number, sides: [number, number, number], totalMass = 1, spread = 0): Snapshot {
  const rand = randomSeeded(seed);
  const positions = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) for (let d = 0; d < 3; d++) positions[3 * i + d] = rand() * sides[d];
  const masses = new Float64Array(n);
  let sum = 0;
  for (let i = 0; i < n; i++) sum += masses[i] = 1 + spread * (rand() - 0.5);
  for (let i = 0; i < n; i++) masses[i] *= totalMass / sum;
  return { positions, masses, box: boxMake(...sides) };
}

/**
 * The engine's clustered demo snapshot (knots and a filament, unit cube) stretched axis by axis onto the
 * box: a periodic configuration stays periodic under the stretch. Masses sum to totalMass.
 */
export function snapshotClustered(n: number, seed: number, sides: [number, number, number], totalMass = 1): Snapshot {
  const demo = demoSnapshot(n, seed);
  const positions = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) for (let d = 0; d < 3; d++) positions[3 * i + d] = demo.positions[3 * i + d] * sides[d];
  const masses = demo.masses.map((m) => m * totalMass);
  return { positions, masses, box: boxMake(...sides) };
}

/** Shifts every position by a vector (no wrapping: the engine wraps). */
export function snapshotTranslated(s: Snapshot, shift: [number, number, number]): Snapshot {
  const positions = s.positions.map((x, k) => x + shift[k % 3]);
  return { positions, masses: s.masses, box: s.box };
}

/** A cubic-box snapshot and its copy shifted by L along z, in the box L×L×2L. */
export function snapshotStackedZ(s: Snapshot): Snapshot {
  const n = s.masses.length;
  const positions = new Float64Array(6 * n);
  positions.set(s.positions);
  for (let i = 0; i < n; i++) {
    positions[3 * (n + i)] = s.positions[3 * i];
    positions[3 * (n + i) + 1] = s.positions[3 * i + 1];
    positions[3 * (n + i) + 2] = s.positions[3 * i + 2] + s.box.lz;
  }
  const masses = new Float64Array(2 * n);
  masses.set(s.masses);
  masses.set(s.masses, n);
  return { positions, masses, box: boxMake(s.box.lx, s.box.ly, 2 * s.box.lz) };
}

export interface Crystal extends Snapshot {
  /** Nearest-neighbour (cation–anion) distance. */
  readonly r0: number;
}

/** Builds a crystal from a basis (fractions of the cubic cell, with charges) repeated reps³ times. */
function crystalBuild(a: number, basis: [number, number, number, number][], r0OverA: number, reps: number, offset: [number, number, number]): Crystal {
  const n = basis.length * reps ** 3;
  const positions = new Float64Array(3 * n);
  const masses = new Float64Array(n);
  let p = 0;
  for (let ix = 0; ix < reps; ix++) for (let iy = 0; iy < reps; iy++) for (let iz = 0; iz < reps; iz++) {
    for (const [fx, fy, fz, q] of basis) {
      positions[3 * p] = (ix + fx + offset[0]) * a;
      positions[3 * p + 1] = (iy + fy + offset[1]) * a;
      positions[3 * p + 2] = (iz + fz + offset[2]) * a;
      masses[p++] = q;
    }
  }
  return { positions, masses, box: boxMake(reps * a), r0: r0OverA * a };
}

const FCC: [number, number, number][] = [[0, 0, 0], [0, 0.5, 0.5], [0.5, 0, 0.5], [0.5, 0.5, 0]];

/** Rock salt (NaCl): cation fcc + anion fcc shifted by (½,0,0)a; r0 = a/2. 8 ions per cubic cell. */
export function crystalRockSalt(a = 1, reps = 1, offset: [number, number, number] = [0, 0, 0]): Crystal {
  const basis = [...FCC.map(([x, y, z]) => [x, y, z, 1]), ...FCC.map(([x, y, z]) => [x + 0.5, y, z, -1])] as [number, number, number, number][];
  return crystalBuild(a, basis, 0.5, reps, offset);
}

/** Caesium chloride (CsCl): cation at (0,0,0), anion at (½,½,½)a; r0 = (√3/2)a. 2 ions per cubic cell. */
export function crystalCaesiumChloride(a = 1, reps = 1, offset: [number, number, number] = [0, 0, 0]): Crystal {
  return crystalBuild(a, [[0, 0, 0, 1], [0.5, 0.5, 0.5, -1]], Math.sqrt(3) / 2, reps, offset);
}

/** Zinc blende (ZnS): cation fcc + anion fcc shifted by (¼,¼,¼)a; r0 = (√3/4)a. 8 ions per cubic cell. */
export function crystalZincBlende(a = 1, reps = 1, offset: [number, number, number] = [0, 0, 0]): Crystal {
  const basis = [...FCC.map(([x, y, z]) => [x, y, z, 1]), ...FCC.map(([x, y, z]) => [x + 0.25, y + 0.25, z + 0.25, -1])] as [number, number, number, number][];
  return crystalBuild(a, basis, Math.sqrt(3) / 4, reps, offset);
}
