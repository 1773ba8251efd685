/**
 * The shipped kernel table (engine/ewald/kernelTableData.ts) is exactly what kernelTableCoefficients
 * computes (so it cannot drift from the code), and tables longer than it extend it with the same numbers
 * as a build from scratch. Accuracy of the table itself: kernelTable.test.ts (against the exact series).
 */
import { describe, expect, it } from 'vitest';
import { KERNEL_STRIDE, kernelTableBuild, kernelTableCoefficients } from '../../engine/ewald/kernelTable';
import { KERNEL_TABLE_SHIPPED_PER_UNIT, KERNEL_TABLE_SHIPPED_U } from '../../engine/ewald/kernelTableData';
import { kernelTableDataSource } from '../../scripts/build-kernel-table';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

describe('the shipped kernel table', () => {
  it('is the generator output of the current code, bit for bit (else: npx tsx scripts/build-kernel-table.ts)', () => {
    const committed = readFileSync(join(__dirname, '..', '..', 'engine', 'ewald', 'kernelTableData.ts'), 'utf8');
    expect(committed === kernelTableDataSource()).toBe(true);
    expect(KERNEL_TABLE_SHIPPED_U).toBeGreaterThanOrEqual(28); // tol ≥ 1e-9 runs never compute a table
  });

  it('cuts and extensions equal tables computed from scratch, bit for bit', () => {
    const per = KERNEL_TABLE_SHIPPED_PER_UNIT;
    for (const uMax of [3.3, KERNEL_TABLE_SHIPPED_U - 0.01, KERNEL_TABLE_SHIPPED_U + 7.5]) {
      const t = kernelTableBuild(uMax, per);
      const intervals = t.coef.length / KERNEL_STRIDE;
      const fresh = kernelTableCoefficients(intervals, per);
      expect(t.coef.length).toBe(fresh.length);
      expect(t.coef.every((v, i) => Object.is(v, fresh[i]))).toBe(true);
    }
  });
});
