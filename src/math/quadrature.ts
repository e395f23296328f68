/**
 * Gauss–Legendre quadrature (Golub–Welsch-free: nodes by Newton iteration on
 * the Legendre recurrence, Abramowitz & Stegun 25.4.29) and an adaptive
 * bisecting integrator built on it.
 */

/** Nodes and weights of an n-point Gauss–Legendre rule on [−1, 1]. */
export interface GaussRule {
  readonly nodes: Float64Array;
  readonly weights: Float64Array;
}

const ruleCache = new Map<number, GaussRule>();

/** The n-point Gauss–Legendre rule on [−1, 1] (cached). */
export function gaussLegendre(n: number): GaussRule {
  const cached = ruleCache.get(n);
  if (cached) return cached;
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p0 = 1;
      let p1 = x;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (x * p1 - p0)) / (x * x - 1);
      const dx = p1 / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    const w = 2 / ((1 - x * x) * dp * dp);
    nodes[i] = -x;
    nodes[n - 1 - i] = x;
    weights[i] = w;
    weights[n - 1 - i] = w;
  }
  const rule = { nodes, weights };
  ruleCache.set(n, rule);
  return rule;
}

/** ∫ f over [a, b] with a fixed n-point Gauss–Legendre rule. */
export function integrateFixed(f: (x: number) => number, a: number, b: number, n = 16): number {
  const { nodes, weights } = gaussLegendre(n);
  const half = 0.5 * (b - a);
  const mid = 0.5 * (a + b);
  let sum = 0;
  for (let i = 0; i < n; i++) sum += (weights[i] as number) * f(mid + half * (nodes[i] as number));
  return sum * half;
}

/**
 * ∫ f over [a, b], bisecting until the 16-point rule on an interval agrees
 * with the sum over its two halves to `relTol` of the running total.
 */
export function integrate(f: (x: number) => number, a: number, b: number, relTol = 1e-13): number {
  const whole = integrateFixed(f, a, b);
  return refine(f, a, b, whole, relTol, Math.abs(whole), 0);
}

function refine(
  f: (x: number) => number,
  a: number,
  b: number,
  whole: number,
  relTol: number,
  scale: number,
  depth: number,
): number {
  const mid = 0.5 * (a + b);
  const left = integrateFixed(f, a, mid);
  const right = integrateFixed(f, mid, b);
  const sum = left + right;
  if (depth >= 40 || Math.abs(sum - whole) <= relTol * Math.max(scale, Math.abs(sum), 1e-300)) return sum;
  return (
    refine(f, a, mid, left, relTol, scale, depth + 1) + refine(f, mid, b, right, relTol, scale, depth + 1)
  );
}
