/**
 * The Fourier-space kernels of kSpace.ts run in WebAssembly (SIMD): same definitions, same k-vectors, the
 * k-vectors ±hz of a column taken together (as/kspace.ts), so results agree with the JavaScript twin to
 * rounding. One context per setup (per thread): positions, masses and the k-columns are copied into the
 * instance's memory once; sums come in and go out in the twin's layout (interleaved re, im per k-vector).
 */
import { type Box } from '../box';
import { type KSpace } from '../ewald/kSpace';
import { WasmArena, kernelInstance } from './module';

export interface KSpaceWasm {
  /** Adds the structure factor of particles [begin, end) into s (interleaved re, im). */
  structureFactor(begin: number, end: number, s: Float64Array): void;
  /** Adds the Fourier raw sums of targets[begin..end) into acc[3t..], phi[t] (ws from kSpaceWeigh). */
  targets(ws: Float64Array, targets: Int32Array, begin: number, end: number, acc: Float64Array, phi: Float64Array): void;
  /** A context for the same particles and box under other k-vectors, inside this context's instance. */
  derive(ks: KSpace): KSpaceWasm;
}

/** What contexts over one instance share: the instance, its memory, the particles. */
interface KSpaceBase {
  k: NonNullable<ReturnType<typeof kernelInstance>>;
  arena: WasmArena;
  pPos: number;
  pMass: number;
}

/** Particles (or targets) per kernel call. */
const CALL_PARTICLES = 128;

/** Creates the WebAssembly context, or returns null when WebAssembly SIMD is unavailable. */
export function kSpaceWasmCreate(ks: KSpace, box: Box, positions: Float64Array, masses: Float64Array): KSpaceWasm | null {
  const k = kernelInstance();
  if (!k) return null;
  const arena = new WasmArena(k);
  const n = masses.length;
  const pPos = arena.alloc(8 * 3 * n);
  const pMass = arena.alloc(8 * n);
  arena.f64(pPos, 3 * n).set(positions);
  arena.f64(pMass, n).set(masses);
  return contextMake({ k, arena, pPos, pMass }, ks, box);
}

function contextMake(base: KSpaceBase, ks: KSpace, box: Box): KSpaceWasm {
  const { k, arena, pPos, pMass } = base;
  const nCol = ks.colHx.length;
  const nk = ks.count;
  const [Hx, Hy, Hz] = ks.hMax;
  // Slots of h ≥ 0 per column for the ±hz pairs (kspace.ts): first and last h, first slot (even).
  const colH0 = new Int32Array(nCol), colH1 = new Int32Array(nCol), colSlot = new Int32Array(nCol);
  let nSlots = 0;
  for (let c = 0; c < nCol; c++) {
    const hz0 = ks.colHz0[c], hz1 = ks.colHz1[c];
    colH0[c] = hz0 > 0 ? hz0 : hz1 < 0 ? -hz1 : 0;
    colH1[c] = Math.max(hz1, -hz0);
    colSlot[c] = nSlots;
    nSlots += (colH1[c] - colH0[c] + 2) & ~1;
  }
  const table = (col: Int32Array): number => {
    const p = arena.alloc(4 * nCol);
    arena.i32(p, nCol).set(col);
    return p;
  };
  const [pHx, pHy, pHz0, pHz1, pK0, pH0, pH1, pSlot] = [ks.colHx, ks.colHy, ks.colHz0, ks.colHz1, ks.colK0, colH0, colH1, colSlot].map(table);
  const pSums = arena.alloc(32 * nSlots + 64); // U, V, X, Y per slot
  const pWeights = arena.alloc(32 * nSlots + 64); // P, Q, R, S per slot
  // Phase tables of two particles (the structure factor takes particles in pairs).
  const scratch = arena.alloc(2 * (16 * (Hx + 3 + 2 * Hy + 3 + 2 * Hz + 3) + 16) + 64);
  const tx = (2 * Math.PI) / box.lx, ty = (2 * Math.PI) / box.ly, tz = (2 * Math.PI) / box.lz;
  let pTargets = 0, targetsRef: Int32Array | null = null;
  let pAcc = 0, pPhi = 0, chunkCap = 0;
  let weightedRef: Float64Array | null = null;
  // Interleaved (re, im) staging for the callers' arrays: copied in and out whole, combined in WebAssembly.
  const glue = k as unknown as Record<string, (...a: number[]) => void>;
  let pS2 = 0;
  const staging = (): Float64Array => {
    if (pS2 === 0) pS2 = arena.alloc(16 * nk + 16);
    return arena.f64(pS2, 2 * nk);
  };
  return {
    structureFactor(begin, end, s) {
      arena.f64(pSums, 4 * nSlots).fill(0);
      // Many short calls rather than one long one: engines tier a wasm function up to optimised code
      // between calls, not inside one.
      for (let b = begin; b < end; b += CALL_PARTICLES) {
        glue.structurePaired(pPos, pMass, b, Math.min(end, b + CALL_PARTICLES), nCol, pHx, pHy, pH0, pH1, pSlot, Hx, Hy, Hz, tx, ty, tz, pSums, scratch);
      }
      staging().set(s.subarray(0, 2 * nk));
      glue.structurePairedAdd(nCol, pH0, pH1, pSlot, pHz0, pHz1, pK0, pSums, pS2);
      s.set(staging());
      weightedRef = null;
    },
    targets(ws, targets, begin, end, acc, phi) {
      if (weightedRef !== ws) {
        staging().set(ws.subarray(0, 2 * nk));
        glue.fourierPairedLoad(nCol, pH0, pH1, pSlot, pHz0, pHz1, pK0, pS2, pWeights, nSlots);
        weightedRef = ws;
      }
      if (targetsRef !== targets) {
        pTargets = arena.alloc(4 * targets.length);
        arena.i32(pTargets, targets.length).set(targets);
        targetsRef = targets;
      }
      const m = end - begin;
      if (m > chunkCap) {
        chunkCap = Math.max(m, 256);
        pAcc = arena.alloc(8 * 3 * chunkCap);
        pPhi = arena.alloc(8 * chunkCap);
      }
      // The kernel adds into the chunk's current values, copied in and out whole.
      arena.f64(pAcc, 3 * m).set(acc.subarray(3 * begin, 3 * end));
      arena.f64(pPhi, m).set(phi.subarray(begin, end));
      // The kernel indexes acc by t; shift the base so that t = begin lands at the chunk's start.
      for (let b = begin; b < end; b += CALL_PARTICLES) {
        const e = Math.min(end, b + CALL_PARTICLES);
        glue.fourierPaired(pPos, pTargets, b, e, nCol, pHx, pHy, pH0, pH1, pSlot, Hx, Hy, Hz, tx, ty, tz, pWeights, pAcc - 24 * begin, pPhi - 8 * begin, scratch);
      }
      acc.set(arena.f64(pAcc, 3 * m), 3 * begin);
      phi.set(arena.f64(pPhi, m), begin);
    },
    derive(ks2) {
      return contextMake(base, ks2, box);
    },
  };
}
