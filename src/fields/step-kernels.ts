/**
 * The split-step's elementwise passes as functions of a row range, so that
 * one thread or several (worker_threads over shared memory) run the very same
 * arithmetic on every cell: results do not depend on the thread count.
 * A row is one run of the last axis: (i0, i1) ↦ row i0·n1 + i1.
 */
import type { Triple } from "../grid/grid.js";

/**
 * ψ ← e^{−iK(φ + g|s|²)} ψ over rows [lo, hi), K = `factor`, g = `contact`,
 * s = `source` (ψ itself, or a tangent's reference field); g = 0: e^{−iKφ}.
 */
export function kickRows(psi: Float64Array, phi: Float64Array, factor: number, n2: number, lo: number, hi: number, contact = 0, source = psi): void {
  for (let i = lo * n2; i < hi * n2; i++) {
    const v = contact === 0 ? (phi[i] as number) : (phi[i] as number) + contact * (source[2 * i]! * source[2 * i]! + source[2 * i + 1]! * source[2 * i + 1]!);
    const angle = -v * factor;
    const c = Math.cos(angle);
    const s = Math.sin(angle);
    const re = psi[2 * i] as number;
    const im = psi[2 * i + 1] as number;
    psi[2 * i] = re * c - im * s;
    psi[2 * i + 1] = re * s + im * c;
  }
}

/** ψ_k ← ψ_k e^{−ik²D/2} over rows [lo, hi), with the phase factored per axis (tables of cos, sin per axis). */
export function driftRows(psi: Float64Array, shape: Triple, p0: Float64Array, p1: Float64Array, p2: Float64Array, lo: number, hi: number): void {
  const [, n1, n2] = shape;
  for (let row = lo; row < hi; row++) {
    const a = Math.floor(row / n1);
    const b = row - a * n1;
    const ar = p0[2 * a] as number;
    const ai = p0[2 * a + 1] as number;
    const br = p1[2 * b] as number;
    const bi = p1[2 * b + 1] as number;
    const abr = ar * br - ai * bi;
    const abi = ar * bi + ai * br;
    let p = 2 * row * n2;
    for (let c = 0; c < n2; c++, p += 2) {
      const cr = p2[2 * c] as number;
      const ci = p2[2 * c + 1] as number;
      const er = abr * cr - abi * ci;
      const ei = abr * ci + abi * cr;
      const re = psi[p] as number;
      const im = psi[p + 1] as number;
      psi[p] = re * er - im * ei;
      psi[p + 1] = re * ei + im * er;
    }
  }
}

/** Σ k²|ψ_k|² over rows [lo, hi) of a transformed field, with k² tabulated per axis. */
export function gradientNormRows(psi: Float64Array, shape: Triple, kk0: Float64Array, kk1: Float64Array, kk2: Float64Array, lo: number, hi: number): number {
  const [, n1, n2] = shape;
  let sum = 0;
  for (let row = lo; row < hi; row++) {
    const a = Math.floor(row / n1);
    const b = row - a * n1;
    const kab = kk0[a]! + kk1[b]!;
    let p = 2 * row * n2;
    for (let c = 0; c < n2; c++, p += 2) sum += (kab + kk2[c]!) * (psi[p]! * psi[p]! + psi[p + 1]! * psi[p + 1]!);
  }
  return sum;
}

/** φ ← |ψ|² (or φ += |ψ|² with `add`) over rows [lo, hi); returns Σ|ψ|² over them. */
export function densityRows(psi: Float64Array, phi: Float64Array, add: boolean, n2: number, lo: number, hi: number): number {
  let sum = 0;
  for (let i = lo * n2; i < hi * n2; i++) {
    const re = psi[2 * i] as number;
    const im = psi[2 * i + 1] as number;
    const rho = re * re + im * im;
    phi[i] = add ? (phi[i] as number) + rho : rho;
    sum += rho;
  }
  return sum;
}

/** Σ|ψ|² over rows [lo, hi). */
export function normRows(psi: Float64Array, n2: number, lo: number, hi: number): number {
  let sum = 0;
  for (let i = lo * n2; i < hi * n2; i++) {
    const re = psi[2 * i] as number;
    const im = psi[2 * i + 1] as number;
    sum += re * re + im * im;
  }
  return sum;
}

/** spec ← −spec/k² (0 at k = 0) over half-spectrum rows [lo, hi), with k² tabulated per axis. */
export function poissonRows(spec: Float64Array, halfShape: Triple, k0: Float64Array, k1: Float64Array, k2: Float64Array, lo: number, hi: number): void {
  const [, h1, h2] = halfShape;
  for (let row = lo; row < hi; row++) {
    const a = Math.floor(row / h1);
    const b = row - a * h1;
    const kab = (k0[a] as number) + (k1[b] as number);
    let p = 2 * row * h2;
    for (let c = 0; c < h2; c++, p += 2) {
      const kk = kab + (k2[c] as number);
      const g = kk > 0 ? -1 / kk : 0;
      spec[p] = (spec[p] as number) * g;
      spec[p + 1] = (spec[p + 1] as number) * g;
    }
  }
}
