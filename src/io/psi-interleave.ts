/**
 * ψ as psibox computes with it, one interleaved float64 array (re, im), from
 * slabs of its real and imaginary parts as stored (float64, or float32
 * widened exactly), in one pass.
 */
import type { Take } from "./row-read.js";

/**
 * ψ[2(base + i)] = re[i], ψ[2(base + i) + 1] = im[i], four values a turn; float32 values are widened exactly (V8 keeps
 * the loop as fast for both element types: measured against one copy per type).
 */
function interleave(psi: Float64Array, base: number, re: Float64Array | Float32Array, im: Float64Array | Float32Array): void {
  const n = re.length;
  const whole = n - (n % 4);
  let p = 2 * base;
  for (let i = 0; i < whole; i += 4, p += 8) {
    psi[p] = re[i]!;
    psi[p + 1] = im[i]!;
    psi[p + 2] = re[i + 1]!;
    psi[p + 3] = im[i + 1]!;
    psi[p + 4] = re[i + 2]!;
    psi[p + 5] = im[i + 2]!;
    psi[p + 6] = re[i + 3]!;
    psi[p + 7] = im[i + 3]!;
  }
  for (let i = whole; i < n; i++, p += 2) {
    psi[p] = re[i]!;
    psi[p + 1] = im[i]!;
  }
}

/** What takes the slabs of ψ's parts (`rowCells` values a row) into ψ. */
export function intoPsi(psi: Float64Array, rowCells: number): Take {
  return (r0, _r1, [re, im]) => interleave(psi, r0 * rowCells, re!, im!);
}

/** ψ of `cells` from slabs of its real and imaginary parts that `read` hands over, into `into` when it has ψ's length. */
export function interleaved(cells: readonly number[], read: (take: Take) => void, into?: Float64Array): Float64Array {
  const rowCells = cells.slice(1).reduce((p, n) => p * n, 1);
  const length = 2 * rowCells * (cells[0] as number);
  const psi = into?.length === length ? into : new Float64Array(length);
  read(intoPsi(psi, rowCells));
  return psi;
}
