/**
 * The largest eigenvalue of an ensemble's one-body density matrix without
 * forming it. In number units the symmetrically ordered matrix is a sum of
 * outer products, W = Σⱼ wⱼ aⱼ aⱼ† / Σⱼ wⱼ (one per member, weights for
 * bootstrap resamples), and the quantum one is ρ₁ = W − I/2 (the Wigner
 * shift of ⟨â†â⟩), so both share their eigenvectors and the condensate
 * number is N₀ = λ_max(W) − 1/2 (Penrose & Onsager 1956, Phys. Rev. 104,
 * 576). W is applied as Σⱼ wⱼ aⱼ ⟨aⱼ|v⟩: 2·M·cells products per
 * iteration, never a cells × cells matrix. The power method converges in
 * the ratio (λ₂/λ₁)² per iteration for the Rayleigh quotient of a
 * Hermitian matrix (Golub & Van Loan, Matrix Computations, §8.2); started
 * from the classical mode, which is close to the condensate's, it takes a
 * few iterations while the condensate dominates.
 */

/** The largest eigenvalue of W and its unit eigenvector (interleaved re, im). */
export interface LeadingMode {
  readonly eigenvalue: number;
  readonly vector: Float64Array;
  readonly iterations: number;
}

/** ⟨a|b⟩ = Σₓ conj(aₓ) bₓ of two interleaved complex arrays. */
export function overlap(a: Float64Array, b: Float64Array): { re: number; im: number } {
  let re = 0;
  let im = 0;
  for (let x = 0; x < a.length; x += 2) {
    const ar = a[x] as number;
    const ai = a[x + 1] as number;
    const br = b[x] as number;
    const bi = b[x + 1] as number;
    re += ar * br + ai * bi;
    im += ar * bi - ai * br;
  }
  return { re, im };
}

/** out = W v for W = Σ wⱼ aⱼ aⱼ† / Σ wⱼ (weights undefined: all 1). */
export function applyEnsembleMatrix(members: readonly Float64Array[], v: Float64Array, out: Float64Array, weights?: ArrayLike<number>): void {
  out.fill(0);
  let total = 0;
  members.forEach((a, j) => {
    const w = weights ? (weights[j] as number) : 1;
    total += w;
    if (w === 0) return;
    const c = overlap(a, v);
    const cr = c.re * w;
    const ci = c.im * w;
    for (let x = 0; x < a.length; x += 2) {
      const ar = a[x] as number;
      const ai = a[x + 1] as number;
      out[x] = (out[x] as number) + ar * cr - ai * ci;
      out[x + 1] = (out[x + 1] as number) + ar * ci + ai * cr;
    }
  });
  for (let x = 0; x < out.length; x++) out[x] = (out[x] as number) / total;
}

function norm(v: Float64Array): number {
  let s = 0;
  for (let x = 0; x < v.length; x++) s += (v[x] as number) ** 2;
  return Math.sqrt(s);
}

/**
 * The leading eigenpair of W by the power method from `start` (any nonzero
 * vector), stopped when the Rayleigh quotient changes by less than
 * `tolerance` relative, or after `maxIterations`.
 */
export function leadingMode(members: readonly Float64Array[], start: Float64Array, weights?: ArrayLike<number>, tolerance = 1e-12, maxIterations = 2000): LeadingMode {
  let v = Float64Array.from(start);
  const n0 = norm(v);
  if (!(n0 > 0)) throw new RangeError("the power method needs a nonzero start vector");
  for (let x = 0; x < v.length; x++) v[x] = (v[x] as number) / n0;
  let w = new Float64Array(v.length);
  let lambda = Number.NaN;
  for (let it = 1; it <= maxIterations; it++) {
    applyEnsembleMatrix(members, v, w, weights);
    let q = 0;
    for (let x = 0; x < v.length; x++) q += (v[x] as number) * (w[x] as number);
    const nw = norm(w);
    if (!(nw > 0)) return { eigenvalue: 0, vector: v, iterations: it };
    for (let x = 0; x < w.length; x++) w[x] = (w[x] as number) / nw;
    [v, w] = [w, v];
    if (Math.abs(q - lambda) <= tolerance * Math.abs(q)) return { eigenvalue: q, vector: v, iterations: it };
    lambda = q;
  }
  return { eigenvalue: lambda, vector: v, iterations: maxIterations };
}
