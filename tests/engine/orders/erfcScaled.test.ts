import { describe, expect, it } from 'vitest';
import { erfcFast, erfcScaled } from '../../../engine/orders/erfcScaled';
import { erfc } from '../../../engine/special/erf';

describe('erfcScaled(x) = e^{x²} erfc(x)', () => {
  it('matches engine erfc (itself checked against quadrature) to 3e-13 relative on [0, 25]', () => {
    for (let k = 0; k <= 5000; k++) {
      const x = (25 * k) / 5000 + 1e-3 * Math.sin(k);
      if (x < 0) continue;
      const ref = Math.exp(x * x) * erfc(x);
      expect(Math.abs(erfcScaled(x) / ref - 1)).toBeLessThan(3e-13);
    }
  });

  it('beyond 25 follows the asymptotic series: x√π·erfcx(x) = 1 − 1/(2x²) + 3/(4x⁴) − … (A&S 7.1.23)', () => {
    for (const x of [25, 30, 100, 1e4]) {
      const w = 1 / (2 * x * x);
      expect(Math.abs(x * Math.sqrt(Math.PI) * erfcScaled(x) - (1 - w + 3 * w * w - 15 * w ** 3))).toBeLessThan(1e-9);
    }
    // continuity at the switch
    expect(Math.abs(erfcScaled(25 - 1e-12) / erfcScaled(25) - 1)).toBeLessThan(1e-13);
  });

  it('is NaN for negative or NaN arguments; erfcFast covers x < 0 through 2 − erfc(−x)', () => {
    expect(erfcScaled(-0.1)).toBeNaN();
    expect(erfcScaled(NaN)).toBeNaN();
    expect(Math.abs(erfcFast(-1.3) - erfc(-1.3))).toBeLessThan(1e-15);
    expect(Math.abs(erfcFast(0.7) - erfc(0.7))).toBeLessThan(1e-15);
  });
});
