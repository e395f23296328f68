/**
 * The condensate number of bootstrap resamples through the members' Gram
 * matrix. W = Σⱼ wⱼ aⱼ aⱼ† / Σw and the M × M matrix
 * K = D^{1/2} G D^{1/2} / Σw, with Gᵢⱼ = ⟨aᵢ|aⱼ⟩ and D = diag(w), have the
 * same nonzero eigenvalues (W = A D A†/Σw and K = D^{1/2} A†A D^{1/2}/Σw,
 * AB and BA share them: Horn & Johnson, Matrix Analysis, Thm 1.3.22). G
 * costs M²/2 products of two fields once per sample time; each resample's
 * power iteration then costs M² products instead of 2·M·cells, which is
 * far cheaper when the grid has more cells than the ensemble has members.
 */
import { overlap } from "./density-matrix.js";

/** G (Hermitian, interleaved re, im, row-major M × M) of the members. */
export function gramMatrix(members: readonly Float64Array[]): Float64Array {
  const m = members.length;
  const g = new Float64Array(2 * m * m);
  for (let i = 0; i < m; i++) {
    const a = members[i] as Float64Array;
    for (let j = i; j < m; j++) {
      const { re, im } = overlap(a, members[j] as Float64Array);
      g[2 * (i * m + j)] = re;
      g[2 * (i * m + j) + 1] = im;
      g[2 * (j * m + i)] = re;
      g[2 * (j * m + i) + 1] = -im;
    }
  }
  return g;
}

/**
 * The largest eigenvalue of W for weights w from the Gram matrix G, by the
 * power method on K from `start` (length 2M: a member-space vector, e.g.
 * the members' overlaps with the classical mode).
 */
export function gramLeadingEigenvalue(g: Float64Array, weights: ArrayLike<number>, start: Float64Array, tolerance = 1e-13, maxIterations = 2000): number {
  const m = weights.length;
  let total = 0;
  const root = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    total += weights[j] as number;
    root[j] = Math.sqrt(weights[j] as number);
  }
  let v = new Float64Array(2 * m);
  for (let j = 0; j < m; j++) (v[2 * j] = (start[2 * j] as number) * (root[j] as number)), (v[2 * j + 1] = (start[2 * j + 1] as number) * (root[j] as number));
  let w = new Float64Array(2 * m);
  let lambda = Number.NaN;
  for (let it = 1; it <= maxIterations; it++) {
    let n = 0;
    for (let x = 0; x < v.length; x++) n += (v[x] as number) ** 2;
    if (!(n > 0)) return 0;
    n = Math.sqrt(n);
    for (let x = 0; x < v.length; x++) v[x] = (v[x] as number) / n;
    let q = 0;
    for (let i = 0; i < m; i++) {
      let re = 0;
      let im = 0;
      const ri = root[i] as number;
      if (ri !== 0) {
        for (let j = 0; j < m; j++) {
          const rj = root[j] as number;
          if (rj === 0) continue;
          const gr = g[2 * (i * m + j)] as number;
          const gi = g[2 * (i * m + j) + 1] as number;
          const vr = (v[2 * j] as number) * rj;
          const vi = (v[2 * j + 1] as number) * rj;
          re += gr * vr - gi * vi;
          im += gr * vi + gi * vr;
        }
      }
      w[2 * i] = (re * ri) / total;
      w[2 * i + 1] = (im * ri) / total;
      q += (v[2 * i] as number) * (w[2 * i] as number) + (v[2 * i + 1] as number) * (w[2 * i + 1] as number);
    }
    [v, w] = [w, v];
    if (Math.abs(q - lambda) <= tolerance * Math.abs(q)) return q;
    lambda = q;
  }
  return lambda;
}
