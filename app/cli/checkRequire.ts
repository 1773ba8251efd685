/**
 * The requirements of `torusgrav check` ("p99<=0.01"): parsing, with a UsageError naming --require and
 * the text. Their evaluation is engine/stats/checkSummary.ts (shared with the web app).
 */
import { REQUIRE_KEYS, REQUIRE_OPS, type RequireKey, type RequireOp, type Requirement } from '../../engine/stats/checkSummary';
import { UsageError } from './cliErrors';

export { REQUIRE_KEYS, REQUIRE_OPS, type RequireKey, type RequireOp, type Requirement, requirementHolds } from '../../engine/stats/checkSummary';

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
