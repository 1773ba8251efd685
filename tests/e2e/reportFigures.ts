/**
 * For the report's browser test: the figures engine/stats computes from a residuals CSV (A and B as
 * written, 17 significant digits, which read back bit for bit), printed as one JSON line.
 * Run: node --import tsx tests/e2e/reportFigures.ts FILE.csv
 */
import { readFileSync } from 'node:fs';
import { errorSummary, percentileLinear, relativeErrors, sortedFinite } from '../../engine/stats';

const lines = readFileSync(process.argv[2], 'utf8').trim().split('\n');
const rows = lines.slice(1).map((l) => l.split(',').map(Number));
const A = Float64Array.from(rows.flatMap((r) => r.slice(4, 7)));
const B = Float64Array.from(rows.flatMap((r) => r.slice(7, 10)));
const rel = relativeErrors(A, B);
const sorted = sortedFinite(rel);
const s = errorSummary(A, B, 10);
let sq = 0;
for (const v of sorted) sq += v * v;
const out = {
  p50: percentileLinear(sorted, 0.5),
  p90: percentileLinear(sorted, 0.9),
  p99: percentileLinear(sorted, 0.99),
  p999: percentileLinear(sorted, 0.999),
  max: sorted[sorted.length - 1],
  rms: Math.sqrt(sq / sorted.length),
  rmsRatio: s.rmsRatio,
  rmsError: s.rmsError,
  rmsReference: s.rmsReference,
  worstIds: Array.from(s.worst, (t) => rows[t][0]),
  relMatches: rows.every((r, i) => r[10] === rel[i]),
};
process.stdout.write(`${JSON.stringify(out)}\n`);
