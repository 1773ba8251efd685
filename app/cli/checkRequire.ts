/**
 * The requirements of `torusgrav check` ("p99<=0.01"): parsing (UsageError naming --require and the
 * text) and evaluation against the measured figures.
 */
import { UsageError } from './cliErrors';

export const REQUIRE_KEYS = ['p50', 'p90', 'p99', 'p999', 'max', 'rms'] as const;
export type RequireKey = (typeof REQUIRE_KEYS)[number];
export const REQUIRE_OPS = ['<=', '<', '>=', '>'] as const;
export type RequireOp = (typeof REQUIRE_OPS)[number];

export interface Requirement {
  readonly text: string;
  readonly key: RequireKey;
  readonly op: RequireOp;
  readonly limit: number;
}

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** KEY OP LIMIT, e.g. p99<=0.01 (spaces allowed around the operator). */
export function requirementParse(text: string, command: string): Requirement {
  const m = /^\s*([A-Za-z0-9.]+)\s*(<=|>=|<|>)\s*(.*?)\s*$/.exec(text);
  const form = `KEY OP LIMIT with KEY one of ${REQUIRE_KEYS.join(', ')}, OP one of ${REQUIRE_OPS.join(' ')} and LIMIT a finite number (e.g. "p99<=0.01")`;
  if (!m) throw new UsageError(`--require ${JSON.stringify(text)}: expected ${form}`, command);
  const key = m[1].toLowerCase();
  if (!(REQUIRE_KEYS as readonly string[]).includes(key)) throw new UsageError(`--require ${JSON.stringify(text)}: unknown key ${JSON.stringify(m[1])}; keys are ${REQUIRE_KEYS.join(', ')}`, command);
  const limit = DECIMAL.test(m[3]) ? Number(m[3]) : NaN;
  if (!Number.isFinite(limit)) throw new UsageError(`--require ${JSON.stringify(text)}: the limit ${JSON.stringify(m[3])} is not a finite number`, command);
  return { text: text.trim(), key: key as RequireKey, op: m[2] as RequireOp, limit };
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
