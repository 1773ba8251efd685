/**
 * Gauss–Legendre quadrature for the independent checks (Abramowitz & Stegun 1964, 25.4.29: nodes are the
 * zeros of P_n, weights 2 / ((1 − x²) P_n'(x)²); exact for polynomials of degree ≤ 2n − 1). Nodes come from
 * Newton's method on the three-term recurrence (n + 1) P_{n+1} = (2n + 1) x P_n − n P_{n−1}.
 */

export interface GaussRule {
  readonly nodes: Float64Array;
  readonly weights: Float64Array;
}

/** n-point Gauss–Legendre rule on [−1, 1]. */
export function gaussLegendre(n: number): GaussRule {
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 1;
    for (let it = 0; it < 100; it++) {
      let p0 = 1, p1 = x;
      for (let k = 1; k < n; k++) {
        const p2 = ((2 * k + 1) * x * p1 - k * p0) / (k + 1);
        p0 = p1;
        p1 = p2;
      }
      // p1 = P_n(x), p0 = P_{n−1}(x); P_n'(x) = n (x P_n − P_{n−1}) / (x² − 1)
      dp = (n * (x * p1 - p0)) / (x * x - 1);
      const dx = p1 / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-17) break;
    }
    nodes[i] = x;
    weights[i] = 2 / ((1 - x * x) * dp * dp);
  }
  return { nodes, weights };
}

const RULE_20 = gaussLegendre(20);

/** ∫_a^b f(x) dx by a 20-point Gauss–Legendre rule on `panels` equal panels. */
export function integrate(f: (x: number) => number, a: number, b: number, panels = 1, rule: GaussRule = RULE_20): number {
  const h = (b - a) / panels;
  let total = 0;
  for (let p = 0; p < panels; p++) {
    const mid = a + (p + 0.5) * h;
    let s = 0;
    for (let k = 0; k < rule.nodes.length; k++) s += rule.weights[k] * f(mid + 0.5 * h * rule.nodes[k]);
    total += 0.5 * h * s;
  }
  return total;
}
