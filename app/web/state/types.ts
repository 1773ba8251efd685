/** The shapes the store holds: the loaded snapshot, computed method results, the comparison. */
import type { Box } from '../../../engine/box';
import type { EwaldParams } from '../../../engine/ewald/params';
import type { MeshParams } from '../../../engine/codeUnderTest/meshForces';
import type { CdfPoints, LogHistogram } from '../../../engine/stats/bins';
import type { ErrorSummary } from '../../../engine/stats/errorSummary';
import type { MethodId } from '../methods/registry';
import type { ImageSumParams } from '../../../engine/orders/imageSumOrder';
import type { PmeParams } from '../../../engine/pme/pmeParams';
import type { OrderTrace } from './orderRuns';

export interface Snapshot {
  /** Identifies the particles (demo size and seed, or file name, size and a content hash). */
  readonly id: string;
  readonly kind: 'demo' | 'file';
  /** Where the particles came from, in words. */
  readonly source: string;
  readonly fileName: string | null;
  readonly seed: number | null;
  readonly n: number;
  /** Flat xyz (length units) as given; the engine wraps them into the box. */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
  /** Whether the box came from a guess (files carry no box). */
  readonly boxGuessed: boolean;
  readonly totalMass: number;
  /** Accelerations stored in the file (3N), with the columns they came from. */
  readonly accelerations: Float64Array | null;
  readonly accelerationColumns: readonly [string, string, string] | null;
  /** Particle ids from the file (N), else null (ids are then the 0-based rows). */
  readonly ids: Float64Array | null;
  readonly columns: readonly string[];
  /** Particles outside the home cell (wrapped before computing). */
  readonly outside: number;
}

/** Which particles get forces: all, or a seeded sample. `indices` are sorted input rows. */
export interface TargetSet {
  readonly key: string;
  readonly all: boolean;
  readonly indices: Int32Array;
}

/** One finished method computation on one target set (kept for re-use when methods are toggled). */
export interface MethodRun {
  /** snapshot id | targets key | method options key. */
  readonly key: string;
  readonly method: MethodId;
  /** Short words for tables and legends ("Ewald tol 1e-6", "mesh 32³", "file ax,ay,az"). */
  readonly label: string;
  readonly targetsKey: string;
  /** Accelerations, 3 per target, in the target set's order. */
  readonly acc: Float64Array;
  readonly ewald: EwaldParams | null;
  readonly mesh: MeshParams | null;
  /** Image-sum order or particle-mesh Ewald parameters used (orderRuns.ts), when the run is one. */
  readonly order?: ImageSumParams | null;
  readonly pme?: PmeParams | null;
  readonly wrapped: number;
  readonly workerMs: number;
}

/** Nearest-neighbour distances and local number densities of a target set. */
export interface NeighbourRun {
  readonly key: string;
  readonly nearest: Float64Array;
  readonly density: Float64Array;
  readonly kUsed: number;
  readonly meanDensity: number;
}

/** A against reference B over one target set. */
export interface Comparison {
  readonly snapshotId: string;
  readonly runA: MethodRun;
  readonly runB: MethodRun;
  readonly targets: TargetSet;
  readonly relative: Float64Array;
  readonly summary: ErrorSummary;
  readonly histogram: LogHistogram;
  readonly cdf: CdfPoints;
  readonly neighbours: NeighbourRun | null;
  /** From pressing Compute to this comparison on screen (ms); workers' share. */
  readonly wallMs: number;
  readonly workerMs: number;
}

/** One method measured at several parameter values on a few targets, against a tight Ewald value. */
export interface ConvergenceSeries {
  readonly method: 'ewald' | 'mesh';
  readonly label: string;
  readonly xLabel: string;
  /** Parameter values (tolerance or mesh points per side). */
  readonly x: readonly number[];
  /** Relative deviation from the reference, per parameter value, per target. */
  readonly errors: readonly Float64Array[];
  /** The method's own predicted relative error per parameter value, when it has one. */
  readonly predicted: readonly (number | null)[];
}

export interface ConvergenceRun {
  readonly snapshotId: string;
  /** Input rows of the targets followed. */
  readonly targets: Int32Array;
  readonly referenceTol: number;
  readonly series: readonly ConvergenceSeries[];
  /** Partial sums of the compared image-sum orders (orderRuns.ts). */
  readonly orders?: readonly OrderTrace[];
}
