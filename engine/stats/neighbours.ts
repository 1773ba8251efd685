/**
 * Nearest neighbours in a periodic box: for each target, the distance to its nearest other particle and
 * to its k-th nearest (minimum-image distances, length units), and from the latter a local number
 * density. Particles are held in a k-d tree (median splits along the widest side of each node, leaves of
 * up to 8 particles) whose node boxes give a lower bound of the minimum-image distance per axis,
 * min(gap(x), gap(x ± L)); a k-nearest search visits nodes nearest first and skips those whose bound
 * exceeds the k-th distance found so far. Unlike a uniform cell grid, its cost does not blow up in dense
 * clumps (a grid cell of a dense halo holds thousands of particles, all of which a grid search scans).
 */
import { type Box, boxVolume } from '../box';

export interface Neighbours {
  /** Distance to the nearest other particle, per target (Infinity when the snapshot has one particle). */
  readonly nearest: Float64Array;
  /** Distance to the k-th nearest other particle, per target (k = kUsed). */
  readonly kth: Float64Array;
  /** Number density estimate (kUsed − 1)/((4π/3) r_k³) per target (particles/volume); see neighboursDensity. */
  readonly density: Float64Array;
  /** k actually used: min(k, N − 1). */
  readonly kUsed: number;
  /** Mean number density N/V, for scale. */
  readonly meanDensity: number;
}

/** A k-d tree over wrapped positions; node n covers order[start[n]..end[n]) inside box lo[3n..], hi[3n..]. */
export interface NeighbourTree {
  readonly box: Box;
  /** Wrapped positions (flat xyz). */
  readonly x: Float64Array;
  readonly order: Int32Array;
  readonly start: Int32Array;
  readonly end: Int32Array;
  /** Children (−1 for a leaf). */
  readonly left: Int32Array;
  readonly right: Int32Array;
  readonly lo: Float64Array;
  readonly hi: Float64Array;
  readonly nodes: number;
}

const LEAF = 16;

/** Partially sorts order[a..b) so that order[m] holds the median by coordinate `axis` (quickselect). */
function select(x: Float64Array, order: Int32Array, a: number, b: number, m: number, axis: number): void {
  let lo = a, hi = b - 1;
  while (hi > lo) {
    const pivot = x[3 * order[(lo + hi) >> 1] + axis];
    let i = lo, j = hi;
    while (i <= j) {
      while (x[3 * order[i] + axis] < pivot) i++;
      while (x[3 * order[j] + axis] > pivot) j--;
      if (i <= j) {
        const t = order[i];
        order[i] = order[j];
        order[j] = t;
        i++;
        j--;
      }
    }
    if (m <= j) hi = j;
    else if (m >= i) lo = i;
    else return;
  }
}

/** Builds the tree over positions (flat xyz, length units; wrapped into the box here, on a copy). */
export function neighbourTreeBuild(positions: Float64Array, box: Box): NeighbourTree {
  const n = positions.length / 3;
  const L = [box.lx, box.ly, box.lz];
  const x = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    for (let d = 0; d < 3; d++) {
      let v = positions[3 * i + d];
      if (v < 0 || v >= L[d]) {
        v -= Math.floor(v / L[d]) * L[d];
        if (v >= L[d]) v = 0;
      }
      x[3 * i + d] = v;
    }
  }
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  const cap = Math.max(1, 2 * Math.ceil(n / (LEAF / 2)) + 1);
  const start = new Int32Array(cap), end = new Int32Array(cap), left = new Int32Array(cap), right = new Int32Array(cap);
  const lo = new Float64Array(3 * cap), hi = new Float64Array(3 * cap);
  let nodes = 0;
  // iterative build: a stack of nodes to split
  const stack: number[] = [];
  const make = (a: number, b: number): number => {
    const id = nodes++;
    start[id] = a;
    end[id] = b;
    left[id] = right[id] = -1;
    for (let d = 0; d < 3; d++) {
      lo[3 * id + d] = Infinity;
      hi[3 * id + d] = -Infinity;
    }
    for (let p = a; p < b; p++) {
      const i = order[p];
      for (let d = 0; d < 3; d++) {
        const v = x[3 * i + d];
        if (v < lo[3 * id + d]) lo[3 * id + d] = v;
        if (v > hi[3 * id + d]) hi[3 * id + d] = v;
      }
    }
    if (b - a > LEAF) stack.push(id);
    return id;
  };
  if (n > 0) make(0, n);
  while (stack.length) {
    const id = stack.pop()!;
    const a = start[id], b = end[id];
    let axis = 0;
    for (let d = 1; d < 3; d++) if (hi[3 * id + d] - lo[3 * id + d] > hi[3 * id + axis] - lo[3 * id + axis]) axis = d;
    const m = (a + b) >> 1;
    select(x, order, a, b, m, axis);
    left[id] = make(a, m);
    right[id] = make(m, b);
  }
  return { box, x, order, start, end, left, right, lo, hi, nodes };
}

/** Keeps the k smallest squared distances seen (ascending) in `best`; returns the new count. */
function bestInsert(best: Float64Array, count: number, k: number, d2: number): number {
  if (count === k && d2 >= best[k - 1]) return count;
  let p = count < k ? count++ : k - 1;
  while (p > 0 && best[p - 1] > d2) {
    best[p] = best[p - 1];
    p--;
  }
  best[p] = d2;
  return count;
}

/** Lower bound of the minimum-image distance along one axis from v to [a, b] (all in [0, l)). */
function axisGap(v: number, a: number, b: number, l: number): number {
  if (v < a) {
    const direct = a - v, wrapped = v + l - b;
    return direct < wrapped ? direct : wrapped;
  }
  if (v > b) {
    const direct = v - b, wrapped = a - v + l;
    return direct < wrapped ? direct : wrapped;
  }
  return 0;
}

/**
 * Nearest and k-th nearest neighbour distances and local densities for `targets` (input rows; null =
 * all), positions flat xyz (length units, wrapped or not), periodic box. k from 2 to 256.
 */
export function neighboursFind(positions: Float64Array, box: Box, targets: Int32Array | null, k = 16, tree?: NeighbourTree): Neighbours {
  if (!(Number.isInteger(k) && k >= 2 && k <= 256)) throw new RangeError(`neighbours: k must be a whole number from 2 to 256, got ${k}`);
  if (positions.length % 3 !== 0) throw new RangeError(`neighbours: positions hold ${positions.length} numbers, not 3 per particle`);
  const n = positions.length / 3;
  let tg = targets;
  if (!tg) {
    tg = new Int32Array(n);
    for (let i = 0; i < n; i++) tg[i] = i;
  }
  const K = tg.length;
  const kUsed = Math.max(0, Math.min(k, n - 1));
  const nearest = new Float64Array(K);
  const kth = new Float64Array(K);
  const density = new Float64Array(K);
  const meanDensity = n / boxVolume(box);
  if (kUsed === 0) {
    nearest.fill(Infinity);
    kth.fill(Infinity);
    density.fill(NaN);
    return { nearest, kth, density, kUsed, meanDensity };
  }
  const t = tree ?? neighbourTreeBuild(positions, box);
  neighboursChunk(t, tg, 0, K, kUsed, nearest, kth);
  for (let q = 0; q < K; q++) density[q] = neighboursDensity(kth[q], kUsed);
  return { nearest, kth, density, kUsed, meanDensity };
}

/**
 * Number density from the distance r_k to the k-th nearest neighbour: (k − 1)/((4π/3) r_k³). For a
 * Poisson process of density n the ball volume V_k to the k-th neighbour is Gamma(k, 1/n) distributed,
 * so E[(k − 1)/V_k] = n (unbiased for k ≥ 2). Infinity when r_k = 0.
 */
export function neighboursDensity(rk: number, k: number): number {
  return (k - 1) / (((4 * Math.PI) / 3) * rk * rk * rk);
}

/** Fills nearest[q] and kth[q] for targets[begin..end) (the unit of work for a scheduler); k ≤ N − 1. */
export function neighboursChunk(tree: NeighbourTree, targets: Int32Array, begin: number, end: number, k: number, nearest: Float64Array, kth: Float64Array): void {
  const { x, order, start, left, right, lo, hi } = tree;
  const L = [tree.box.lx, tree.box.ly, tree.box.lz];
  const lx = L[0], ly = L[1], lz = L[2];
  const hx = lx / 2, hy = ly / 2, hz = lz / 2;
  const best = new Float64Array(k);
  const stack = new Int32Array(256);
  const stackBound = new Float64Array(256);
  for (let q = begin; q < end; q++) {
    const i = targets[q];
    const px = x[3 * i], py = x[3 * i + 1], pz = x[3 * i + 2];
    let count = 0;
    let sp = 0;
    stack[sp] = 0;
    stackBound[sp++] = 0;
    while (sp > 0) {
      const node = stack[--sp];
      const bound = stackBound[sp];
      if (count === k && bound >= best[k - 1]) continue;
      if (left[node] < 0) {
        const stop = tree.end[node];
      for (let p = start[node]; p < stop; p++) {
          const j = order[p];
          if (j === i) continue;
          // minimum image: both coordinates lie in [0, L), so one shift at most
          let dx = x[3 * j] - px, dy = x[3 * j + 1] - py, dz = x[3 * j + 2] - pz;
          if (dx > hx) dx -= lx;
          else if (dx < -hx) dx += lx;
          if (dy > hy) dy -= ly;
          else if (dy < -hy) dy += ly;
          if (dz > hz) dz -= lz;
          else if (dz < -hz) dz += lz;
          const d2 = dx * dx + dy * dy + dz * dz;
          if (count === k && d2 >= best[k - 1]) continue;
          count = bestInsert(best, count, k, d2);
        }
        continue;
      }
      const a = left[node], b = right[node];
      const ga = axisGap(px, lo[3 * a], hi[3 * a], lx), gb = axisGap(px, lo[3 * b], hi[3 * b], lx);
      const ha = axisGap(py, lo[3 * a + 1], hi[3 * a + 1], ly), hb = axisGap(py, lo[3 * b + 1], hi[3 * b + 1], ly);
      const ia = axisGap(pz, lo[3 * a + 2], hi[3 * a + 2], lz), ib = axisGap(pz, lo[3 * b + 2], hi[3 * b + 2], lz);
      const ba = ga * ga + ha * ha + ia * ia;
      const bb = gb * gb + hb * hb + ib * ib;
      const limit = count === k ? best[k - 1] : Infinity;
      // push the farther child first so that the nearer one is searched first; skip hopeless ones
      if (ba <= bb) {
        if (bb < limit) {
          stack[sp] = b;
          stackBound[sp++] = bb;
        }
        if (ba < limit) {
          stack[sp] = a;
          stackBound[sp++] = ba;
        }
      } else {
        if (ba < limit) {
          stack[sp] = a;
          stackBound[sp++] = ba;
        }
        if (bb < limit) {
          stack[sp] = b;
          stackBound[sp++] = bb;
        }
      }
    }
    nearest[q] = Math.sqrt(best[0]);
    kth[q] = Math.sqrt(best[k - 1]);
  }
}
