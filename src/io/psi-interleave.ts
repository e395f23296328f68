/**
 * ψ as psibox computes with it, one interleaved float64 array (re, im), from
 * slabs of its real and imaginary parts as stored (float64, or float32
 * widened exactly), in one pass.
 */
import type { Take } from "./slabs.js";

/** ψ[2(base + i)] = re[i], ψ[2(base + i) + 1] = im[i] (one pass, monomorphic for the optimiser). */
function interleave64(psi: Float64Array, base: number, re: Float64Array, im: Float64Array): void {
  for (let i = 0, p = 2 * base; i < re.length; i++, p += 2) {
    psi[p] = re[i]!;
    psi[p + 1] = im[i]!;
  }
}

/** The same from float32 slabs, each value widened exactly. */
function interleave32(psi: Float64Array, base: number, re: Float32Array, im: Float32Array): void {
  for (let i = 0, p = 2 * base; i < re.length; i++, p += 2) {
    psi[p] = re[i]!;
    psi[p + 1] = im[i]!;
  }
}

/** ψ of `cells` from slabs of its real and imaginary parts that `read` hands over, into `into` when it has ψ's length. */
export function interleaved(cells: readonly number[], read: (take: Take) => void, into?: Float64Array): Float64Array {
  const rowCells = cells.slice(1).reduce((p, n) => p * n, 1);
  const length = 2 * rowCells * (cells[0] as number);
  const psi = into?.length === length ? into : new Float64Array(length);
  read((r0, _r1, [a, b]) => {
    if (a instanceof Float64Array && b instanceof Float64Array) interleave64(psi, r0 * rowCells, a, b);
    else interleave32(psi, r0 * rowCells, a as Float32Array, b as Float32Array);
  });
  return psi;
}
