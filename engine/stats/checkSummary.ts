/**
 * The force-accuracy report shared by `torusgrav check` and the web app's export (schema
 * torusgrav.check/1): the figures of A against reference B on the same targets, requirements such as
 * "p99 <= 0.01" evaluated against them, and the JSON object both write. Relative error per target is
 * |a_A − a_B|/|a_B|; percentiles by the "linear" rule (Hyndman & Fan 1996 definition 7, NumPy's
 * default) over the finite values; rms error over rms |a_B| (errorSummary). Pure: no DOM, no node:.
 */
import type { Box } from '../box';
import type { CsvColumn } from '../formats/csvWrite';
import { errorSummaryFromRelative } from './errorSummary';
import { sortedFinite } from './percentile';
import { relativeErrors } from './relativeError';

export const CHECK_SCHEMA = 'torusgrav.check/1';
/** How many worst targets the report lists. */
export const CHECK_WORST = 10;

export const REQUIRE_KEYS = ['p50', 'p90', 'p99', 'p999', 'max', 'rms'] as const;
export type RequireKey = (typeof REQUIRE_KEYS)[number];
export const REQUIRE_OPS = ['<=', '<', '>=', '>'] as const;
export type RequireOp = (typeof REQUIRE_OPS)[number];

/** Words for a figure key ("99th percentile"). */
export const REQUIRE_KEY_WORDS: Readonly<Record<RequireKey, string>> = {
  p50: 'median',
  p90: '90th percentile',
  p99: '99th percentile',
  p999: '99.9th percentile',
  max: 'maximum',
  rms: 'rms',
};

export interface Requirement {
  readonly text: string;
  readonly key: RequireKey;
  readonly op: RequireOp;
  readonly limit: number;
}

export interface CheckFigures {
  /** Per-target relative errors (NaN: undefined, Infinity: zero reference but A ≠ 0). */
  readonly rel: Float64Array;
  /** p50, p90, p99, p999 (over the finite relative errors), max and rms (over all; Infinity if any is infinite). */
  readonly relativeError: Readonly<Record<RequireKey, number>>;
  readonly rmsErrorOverRmsAcceleration: number;
  /** √(mean |a_A − a_B|²) and √(mean |a_B|²) over targets with finite components (acceleration units). */
  readonly rmsError: number;
  readonly rmsReference: number;
  /** Targets with |a_B| = 0 but a_A ≠ a_B, and targets with a non-finite component. */
  readonly zeroReference: number;
  readonly nonFinite: number;
  /** Target indices (into the target list), worst first. */
  readonly worst: Int32Array;
}

/** The figures of A against reference B (flat xyz, 3 per target, same acceleration units). */
export function checkFigures(accA: Float64Array, accB: Float64Array): CheckFigures {
  const rel = relativeErrors(accA, accB);
  const sorted = sortedFinite(rel);
  const s = errorSummaryFromRelative(rel, accA, accB, CHECK_WORST, sorted);
  let sum = 0;
  for (let i = 0; i < sorted.length; i++) sum += sorted[i] * sorted[i];
  const infinite = s.zeroReference > 0;
  const [p50, p90, p99, p999] = s.percentiles;
  return {
    rel,
    relativeError: {
      p50,
      p90,
      p99,
      p999,
      max: infinite ? Infinity : s.max,
      rms: infinite ? Infinity : sorted.length ? Math.sqrt(sum / sorted.length) : NaN,
    },
    rmsErrorOverRmsAcceleration: s.rmsRatio,
    rmsError: s.rmsError,
    rmsReference: s.rmsReference,
    zeroReference: s.zeroReference,
    nonFinite: s.nonFinite,
    worst: s.worst,
  };
}

/** Whether `value` satisfies the requirement; a NaN value never does (Infinity compares as usual). */
export function requirementHolds(r: Requirement, value: number): boolean {
  if (Number.isNaN(value)) return false;
  switch (r.op) {
    case '<=':
      return value <= r.limit;
    case '<':
      return value < r.limit;
    case '>=':
      return value >= r.limit;
    case '>':
      return value > r.limit;
  }
}

export interface RequirementResult extends Requirement {
  readonly value: number;
  readonly pass: boolean;
}

/** Every requirement evaluated against the figures. */
export function requirementsEvaluate(requirements: readonly Requirement[], f: CheckFigures): RequirementResult[] {
  return requirements.map((r) => ({ ...r, value: f.relativeError[r.key], pass: requirementHolds(r, f.relativeError[r.key]) }));
}

/** A number for JSON: Infinity and NaN become null (JSON has neither). */
export function jsonNumber(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/** What the report says about one method: its name and every parameter it ran with. */
export interface MethodRecord {
  readonly method: string;
  readonly [parameter: string]: unknown;
}

export interface CheckReportInput {
  /** The snapshot as named by the user (path or file name; the demo's description). */
  readonly file: string;
  /** SHA-256 (hex) of `sha256Of`, or null when the bytes are not at hand. */
  readonly sha256: string | null;
  /** What was hashed: "file" (the file's bytes) or a description of the bytes. */
  readonly sha256Of: string;
  /** Particles read. */
  readonly n: number;
  readonly box: Box;
  readonly G: number;
  /** The units preset name, or null. */
  readonly units: string | null;
  /** Reference B and compared A with their parameters. */
  readonly reference: MethodRecord;
  readonly compared: MethodRecord;
  readonly figures: CheckFigures;
  /** Id of each target (file ids, else 0-based rows), in target order. */
  readonly ids: ArrayLike<number>;
  readonly results: readonly RequirementResult[];
  /** torusgrav's version and the time of the report (ISO 8601). */
  readonly version: string;
  readonly created: string;
}

/** The JSON object of schema torusgrav.check/1 (README.md, "Force-accuracy gate"); infinite or undefined numbers are null. */
export function checkReportJson(o: CheckReportInput): Record<string, unknown> {
  const f = o.figures;
  return {
    schema: CHECK_SCHEMA,
    file: o.file,
    sha256: o.sha256,
    n: o.n,
    targets: f.rel.length,
    box: { lx: o.box.lx, ly: o.box.ly, lz: o.box.lz },
    G: o.G,
    units: o.units,
    reference: o.reference,
    relativeError: Object.fromEntries(REQUIRE_KEYS.map((k) => [k, jsonNumber(f.relativeError[k])])),
    rmsErrorOverRmsAcceleration: jsonNumber(f.rmsErrorOverRmsAcceleration),
    worst: Array.from(f.worst, (k) => ({ id: o.ids[k], relErr: jsonNumber(f.rel[k]) })),
    requirements: o.results.map((r) => ({ text: r.text, key: r.key, op: r.op, limit: r.limit, value: jsonNumber(r.value), pass: r.pass })),
    pass: o.results.every((r) => r.pass),
    sha256Of: o.sha256Of,
    compared: o.compared,
    rmsError: jsonNumber(f.rmsError),
    rmsReference: jsonNumber(f.rmsReference),
    undefinedTargets: { zeroReference: f.zeroReference, nonFinite: f.nonFinite },
    version: o.version,
    created: o.created,
  };
}

/** Header of the residuals CSV: A = the accelerations checked, B = the reference. */
export const RESIDUAL_COLUMNS = ['id', 'x', 'y', 'z', 'ax_A', 'ay_A', 'az_A', 'ax_B', 'ay_B', 'az_B', 'rel_error'] as const;

/**
 * The residuals CSV's columns (RESIDUAL_COLUMNS) for K targets: ids (K), positions as read, A and B
 * (flat xyz, 3K each) and the relative errors (K); write them with engine/formats/csvWrite.
 */
export function residualColumns(ids: ArrayLike<number>, positions: Float64Array, accA: Float64Array, accB: Float64Array, rel: Float64Array): CsvColumn[] {
  const xyz = (prefix: string, suffix: string, v: Float64Array): CsvColumn[] => [0, 1, 2].map((d) => ({ name: `${prefix}${'xyz'[d]}${suffix}`, values: v, stride: 3, offset: d }));
  return [{ name: 'id', values: ids, integer: true }, ...xyz('', '', positions), ...xyz('a', '_A', accA), ...xyz('a', '_B', accB), { name: 'rel_error', values: rel }];
}
