/**
 * Exact Kerr evolution of a coherent state, stable in double precision from
 * N = 1 to N = 1e120 and for X from far below 1/N to 2π.
 *
 * With H = ħω b†b + (ħχ/2) b†b†bb, n = b†b is conserved and
 * b(t) = e^{−iΘ − iXn} b(0), Θ = ∫ω dt, X = ∫χ dt. For |α⟩, α = √N e^{iθ₀}:
 *   ⟨b⟩  = α e^{−iΘ} exp(N(e^{−iX} − 1))
 *   ⟨b²⟩ = α² e^{−2iΘ} e^{−iX} exp(N(e^{−2iX} − 1))
 * With n̄ = N − |⟨b⟩|² and m = ⟨b²⟩ − ⟨b⟩², the quadrature variances are
 * 1/2 + n̄ ± |m| (coherent state: 1/2), so V_min = 1/2 + n̄ − |m|.
 *
 * Stable evaluation. Let u = 4N sin²(X/2), w = 2N sin²X, a = 1 − e^{−u},
 * b = 1 − e^{−w}, φ = X − u sin X. Then |⟨b⟩|² = N e^{−u},
 * ⟨b²⟩/⟨b⟩² = e^{z}, z = −iX − u e^{−iX}, and the determinant of the
 * quadrature covariance is det = (1/2 + n̄)² − |m|² = 1/4 + F with
 *   F = N² b (2a − b) + N (a − u) + 4N² sin(u sinX / 2) sin(X − u sinX / 2)
 *       + 4N² (a + b − ab) sin²(φ/2),
 * a sum of terms of like size (the identity sin²A − sin²B = sin(A−B)sin(A+B)
 * removes the cancellation between n̄ and |m| that ruins the naive form at
 * large N). Then V_min = (1/4 + F)/(1/2 + n̄ + |m|) with no cancellation, and
 * 2a − b, a − u are summed as series when u is small. Past u = 1 (the mean
 * field has mostly dephased) V_min = 1/2 + n̄ − |m| is evaluated directly,
 * with the one remaining near-cancellation (around X = π, where the state is
 * a cat) rewritten in closed form.
 */

/** Everything the sidecar reports about the mode's state at accumulated phases Θ and X. */
export interface KerrState {
  /** |⟨b⟩|²/N = e^{−u} (0 when it underflows; see logMeanFieldFraction). */
  readonly meanFieldFraction: number;
  /** ln(|⟨b⟩|²/N) = −u, finite even when the fraction underflows. */
  readonly logMeanFieldFraction: number;
  /** Smallest quadrature variance V_min (coherent state: 1/2). */
  readonly minVariance: number;
  /** S = V_min / (1/2), the relative variance. */
  readonly relativeVariance: number;
  /** Squeezing in dB, 10 log₁₀ S (negative when squeezed). */
  readonly squeezingDb: number;
  /** Effective squeezing parameter r = −ln(S)/2 (= asinh(NX) in the linear regime). */
  readonly squeezingParameter: number;
  /** Angle of the squeezed quadrature measured from the direction of ⟨b⟩ [rad], in (−π/2, π/2]. */
  readonly squeezingAngle: number;
  /** ⟨b⟩ / √N (real and imaginary parts), for α real; its phase is meaningful only while N|sin X| < 1e15. */
  readonly meanField: readonly [number, number];
  /** ⟨b²⟩ / N (real and imaginary parts), for α real; its phase is meaningful only while N|sin 2X| < 1e15. */
  readonly secondMoment: readonly [number, number];
  /** |⟨b²⟩ − ⟨b⟩²| / N. */
  readonly pairCorrelation: number;
}

/** 1 − e^{−x} for x ≥ 0 without cancellation. */
function oneMinusExp(x: number): number {
  return -Math.expm1(-x);
}

/** 2(1 − e^{−u}) − (1 − e^{−w}) with 2u − w given exactly, for small u summed as a series. */
function twoAminusB(u: number, w: number, twoUminusW: number): number {
  if (u > 0.1) return 2 * oneMinusExp(u) - oneMinusExp(w);
  // Σ_{k≥1} (−1)^{k+1} (2u^k − w^k)/k!, with the k = 1 term exact
  let sum = twoUminusW;
  let uk = u;
  let wk = w;
  let fact = 1;
  for (let k = 2; k < 40; k++) {
    uk *= u;
    wk *= w;
    fact *= k;
    const term = ((k % 2 === 0 ? -1 : 1) * (2 * uk - wk)) / fact;
    sum += term;
    if (Math.abs(term) <= 1e-18 * Math.abs(sum)) break;
  }
  return sum;
}

/** (1 − e^{−u}) − u, summed as a series for small u. */
function aMinusU(u: number): number {
  if (u > 0.1) return oneMinusExp(u) - u;
  let sum = 0;
  let term = u; // the k = 1 term of Σ (−1)^{k+1} u^k / k!
  for (let k = 2; k < 40; k++) {
    term *= -u / k;
    sum += term;
    if (Math.abs(term) <= 1e-18 * Math.abs(sum)) break;
  }
  return sum;
}

/**
 * The state of a coherent start of N quanta after accumulated Kerr phase X
 * and linear phase Θ (radians). N ≥ 1 (any positive N works numerically).
 */
export function kerrState(N: number, X: number, theta = 0): KerrState {
  if (!(N > 0) || !Number.isFinite(N)) throw new RangeError(`N must be positive and finite, got ${N}`);
  if (!Number.isFinite(X)) throw new RangeError(`X must be finite, got ${X}`);
  const sinHalf = Math.sin(X / 2);
  const sinX = Math.sin(X);
  const cosX = Math.cos(X);
  const u = 4 * N * sinHalf * sinHalf;
  const w = 2 * N * sinX * sinX;
  const a = oneMinusExp(u);
  const b = oneMinusExp(w);
  // 2u − w = u (1 − cos X) = 2u sin²(X/2)
  const g = twoAminusB(u, w, 2 * u * sinHalf * sinHalf);
  const phi = X - u * sinX;
  const sinHalfPhi = Math.sin(phi / 2);
  const N2 = N * N;
  const F =
    N2 * b * g +
    N * aMinusU(u) +
    4 * N2 * Math.sin((u * sinX) / 2) * Math.sin(X - (u * sinX) / 2) +
    4 * N2 * (a + b - a * b) * sinHalfPhi * sinHalfPhi;

  const q = Math.exp(-u);
  const nBar = N * a;
  // q|e^z − 1| with z = x + iy, x = −u cos X, y = −φ, scaled so nothing overflows (x − u = −w):
  // q(e^z − 1) = e^{−w} e^{iy} − q = D₁ cos y − 2q sin²(y/2) + i e^{−w} sin y, D₁ = e^{−w} − q = q expm1(x)
  const x = -u * cosX;
  const d1 = Math.abs(x) < 0.5 ? q * Math.expm1(x) : Math.exp(-w) - q;
  const qEz = Math.sqrt(d1 * d1 + 4 * Math.exp(-w - u) * sinHalfPhi * sinHalfPhi);
  const mAbs = N * qEz;
  let minVariance: number;
  if (u <= 1) {
    minVariance = (0.25 + F) / (0.5 + nBar + mAbs);
  } else {
    // deep in phase diffusion: V_min = 1/2 + N[(1 − q) − q|e^z − 1|], with the near-cancellation at
    // e^{−w} ≳ q (around X = π) written as b − 4e^{−w−u} sin²(φ/2)/(q|e^z − 1| + D₁)
    const tail = qEz + d1 > 0 ? (4 * Math.exp(-w - u) * sinHalfPhi * sinHalfPhi) / (qEz + d1) : 0;
    const e = d1 >= 0 ? b - tail : a - qEz;
    minVariance = 0.5 + N * e;
  }
  const S = 2 * minVariance;
  const re = d1 * Math.cos(phi) - 2 * q * sinHalfPhi * sinHalfPhi;
  const im = -Math.exp(-w) * Math.sin(phi);
  let angle = (Math.atan2(im, re) - Math.PI) / 2;
  if (angle <= -Math.PI / 2) angle += Math.PI;
  if (angle > Math.PI / 2) angle -= Math.PI;
  // ⟨b⟩/√N = e^{−iΘ} e^{−u/2} e^{−iN sin X}
  const phase = -theta - ((N * sinX) % (2 * Math.PI));
  const amp = Math.exp(-u / 2);
  // ⟨b²⟩/N = e^{−2iΘ} e^{−iX} e^{N(cos 2X − 1)} e^{−iN sin 2X}, |·| = e^{−w}
  const phase2 = -2 * theta - X - ((N * Math.sin(2 * X)) % (2 * Math.PI));
  const amp2 = Math.exp(-w);
  return {
    meanFieldFraction: q,
    logMeanFieldFraction: -u,
    minVariance,
    relativeVariance: S,
    squeezingDb: 10 * Math.log10(S),
    squeezingParameter: -0.5 * Math.log(S),
    squeezingAngle: qEz === 0 ? 0 : angle,
    meanField: [amp * Math.cos(phase), amp * Math.sin(phase)],
    secondMoment: [amp2 * Math.cos(phase2), amp2 * Math.sin(phase2)],
    pairCorrelation: qEz,
  };
}

/** Relative variance S(N, X) alone. */
export function relativeVariance(N: number, X: number): number {
  return kerrState(N, X).relativeVariance;
}

/**
 * The best squeezing over X and where it happens, by golden-section search
 * on ln S over ln X around the asymptotic optimum X ≈ 2^{−2/3} N^{−5/6}.
 */
export function bestSqueezing(N: number): { readonly X: number; readonly relativeVariance: number } {
  const guess = Math.pow(2, -2 / 3) * Math.pow(N, -5 / 6);
  let lo = Math.log(guess) - 3;
  let hi = Math.min(Math.log(guess) + 3, Math.log(Math.PI));
  const f = (t: number) => Math.log(relativeVariance(N, Math.exp(t)));
  const r = (Math.sqrt(5) - 1) / 2;
  let c = hi - r * (hi - lo);
  let d = lo + r * (hi - lo);
  let fc = f(c);
  let fd = f(d);
  for (let i = 0; i < 200 && hi - lo > 1e-12; i++) {
    if (fc < fd) {
      hi = d;
      d = c;
      fd = fc;
      c = hi - r * (hi - lo);
      fc = f(c);
    } else {
      lo = c;
      c = d;
      fc = fd;
      d = lo + r * (hi - lo);
      fd = f(d);
    }
  }
  const X = Math.exp(0.5 * (lo + hi));
  return { X, relativeVariance: relativeVariance(N, X) };
}

/**
 * The smallest X > 0 at which the squeezing first reaches `db` (negative, in
 * dB), or undefined when the best squeezing never gets there. S falls
 * monotonically from 1 at X = 0 to its minimum, so bisection in ln X works.
 */
export function xForSqueezing(N: number, db: number): number | undefined {
  const best = bestSqueezing(N);
  const target = Math.pow(10, db / 10);
  if (!(best.relativeVariance <= target)) return undefined;
  let lo = Math.log(best.X) - 200;
  let hi = Math.log(best.X);
  for (let i = 0; i < 200 && hi - lo > 1e-13; i++) {
    const mid = 0.5 * (lo + hi);
    if (relativeVariance(N, Math.exp(mid)) > target) lo = mid;
    else hi = mid;
  }
  return Math.exp(hi);
}

/** X at which |⟨b⟩|²/N has fallen to 1/e: 4N sin²(X/2) = 1 (needs N ≥ 1/4). */
export function xForPhaseDiffusion(N: number): number {
  return 2 * Math.asin(Math.min(1, 1 / (2 * Math.sqrt(N))));
}
