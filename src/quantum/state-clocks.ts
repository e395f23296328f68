/**
 * Where the clocks ring for a Gaussian start of the closed Kerr mode: the X
 * of the mean-field collapse (|⟨b⟩|² down by 1/e from its start), the X at
 * which the squeezing first reaches a level, and the best squeezing. The
 * coherent start keeps the exact solutions of kerr.ts (same numbers); other
 * starts are found numerically on the closed forms of open-kerr.ts, along
 * the sign of χ (a squeeze angle breaks the symmetry X → −X).
 */
import { bestSqueezing, xForPhaseDiffusion, xForSqueezing } from "./kerr.js";
import { isCoherent, numberSpread, type GaussianStart } from "./gaussian-start.js";
import { closedIntegrals, logMeanFieldFraction, openKerrState } from "./open-kerr.js";

/** |X| at which |⟨b⟩|² has fallen by 1/e from its start (≈ 1/ΔN); sign: the sign of χ. */
export function meanFieldCollapseX(N: number, start: GaussianStart, sign = 1): number {
  if (isCoherent(start)) return xForPhaseDiffusion(N);
  const l0 = logMeanFieldFraction(N, start, closedIntegrals(0));
  if (l0 === -Infinity) return 0; // no mean field to lose
  const f = (x: number) => logMeanFieldFraction(N, start, closedIntegrals(sign * x)) - l0 + 1;
  // bracket around the Gaussian estimate 1/ΔN, then bisect in ln X
  let hi = Math.min(Math.PI, 4 / numberSpread(N, start));
  while (f(hi) > 0 && hi < Math.PI) hi = Math.min(Math.PI, 2 * hi);
  if (f(hi) > 0) return Math.PI;
  let lo = hi / 64;
  while (f(lo) <= 0 && lo > 1e-300) lo /= 8;
  for (let i = 0; i < 200 && hi / lo - 1 > 1e-14; i++) {
    const mid = Math.sqrt(lo * hi);
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return Math.sqrt(lo * hi);
}

const S = (N: number, start: GaussianStart, x: number) => openKerrState(N, start, closedIntegrals(x)).relativeVariance;

/** Samples of S on a grid in ln|X| from 1e-4/N to π. */
function scan(N: number, start: GaussianStart, sign: number): { x: number; s: number }[] {
  const lo = Math.log(1e-4 / Math.max(1, N));
  const hi = Math.log(Math.PI);
  const pts: { x: number; s: number }[] = [];
  const count = 160;
  for (let i = 0; i <= count; i++) {
    const x = Math.exp(lo + ((hi - lo) * i) / count);
    pts.push({ x, s: S(N, start, sign * x) });
  }
  return pts;
}

/** The best squeezing over 0 ≤ |X| ≤ π and where (X = 0 when the start is the best). */
export function bestSqueezingOf(N: number, start: GaussianStart, sign = 1): { X: number; relativeVariance: number } {
  if (isCoherent(start)) return bestSqueezing(N);
  const pts = scan(N, start, sign);
  let k = 0;
  pts.forEach((p, i) => {
    if (p.s < (pts[k] as { s: number }).s) k = i;
  });
  const s0 = S(N, start, 0);
  if (!(((pts[k] as { s: number }).s) < s0)) return { X: 0, relativeVariance: s0 };
  // golden section on ln S in ln X between the neighbours of the best sample
  let a = Math.log((pts[Math.max(0, k - 1)] as { x: number }).x);
  let b = Math.log((pts[Math.min(pts.length - 1, k + 1)] as { x: number }).x);
  const f = (t: number) => Math.log(S(N, start, sign * Math.exp(t)));
  const r = (Math.sqrt(5) - 1) / 2;
  for (let i = 0; i < 80 && b - a > 1e-10; i++) {
    const c = b - r * (b - a);
    const d = a + r * (b - a);
    if (f(c) < f(d)) b = d;
    else a = c;
  }
  const X = Math.exp(0.5 * (a + b));
  return { X, relativeVariance: S(N, start, sign * X) };
}

/** The smallest |X| at which the squeezing first reaches `db` (0 if the start already does), or undefined. */
export function xForSqueezingOf(N: number, start: GaussianStart, db: number, sign = 1): number | undefined {
  if (isCoherent(start)) return xForSqueezing(N, db);
  const target = Math.pow(10, db / 10);
  if (S(N, start, 0) <= target) return 0;
  const pts = scan(N, start, sign);
  const i = pts.findIndex((p) => p.s <= target);
  if (i < 0) {
    const best = bestSqueezingOf(N, start, sign);
    if (!(best.relativeVariance <= target)) return undefined;
    return bisect(N, start, target, sign, best.X / 2, best.X);
  }
  return bisect(N, start, target, sign, i === 0 ? 0 : (pts[i - 1] as { x: number }).x, (pts[i] as { x: number }).x);
}

function bisect(N: number, start: GaussianStart, target: number, sign: number, lo: number, hi: number): number {
  for (let i = 0; i < 100 && hi - lo > 1e-13 * hi; i++) {
    const mid = lo === 0 ? hi / 2 : Math.sqrt(lo * hi);
    if (S(N, start, sign * mid) > target) lo = mid;
    else hi = mid;
  }
  return hi;
}
