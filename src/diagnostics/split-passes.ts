/**
 * The energy split's passes over the grid (energy-split.ts), one row of the
 * last axis per call. Each row function is small and sees every case on its
 * first rows, so the engine compiles it once with complete type feedback
 * (a whole-grid loop nest is compiled on the fly while it runs and thrown
 * away when the code after the loop first runs: in a one-off analysis that
 * costs more than the loop itself). Sums are carried from row to row in the
 * order of the cells, so they equal a single loop over the grid bit for bit.
 */
import type { Grid } from "../grid/grid.js";

/** Running sums of the packing pass: [0] Σ j²/ρ over ρ > 0, [1] Σ j of the current axis. */
export type PackSums = Float64Array;

/** z ← u + i w over one row [p, end) (interleaved indices) from ψ and its derivative along an axis (in z); adds Σ j²/ρ and Σ j into `acc`. */
export function packRow(psi: Float64Array, z: Float64Array, p: number, end: number, acc: PackSums): void {
  let bulk2 = acc[0]!;
  let js = acc[1]!;
  for (; p < end; p += 2) {
    const re = psi[p]!;
    const im = psi[p + 1]!;
    const gr = z[p]!;
    const gi = z[p + 1]!;
    const rho = re * re + im * im;
    const j = re * gi - im * gr;
    if (rho > 0) bulk2 += (j * j) / rho;
    js += j;
    if (rho > 1e-300) {
      const s = Math.sqrt(rho);
      z[p] = (re * gr + im * gi) / s;
      z[p + 1] = j / s;
    } else {
      z[p] = Math.sqrt(gr * gr + gi * gi);
      z[p + 1] = 0;
    }
  }
  acc[0] = bulk2;
  acc[1] = js;
}

/** What the shell passes of one grid share: the shells' sums, each mode's shell, the running totals and the factors per mode. */
export class ShellPass {
  /** [0] quantum, [1] Σ|W|² (incompressible until the compressible part is taken out), [2] compressible, [3] uniform flow, [4] zero mode. */
  readonly totals = new Float64Array(5);

  constructor(
    readonly grid: Grid,
    readonly bins: Int16Array | Int32Array,
    readonly quantum: Float64Array,
    readonly flow: Float64Array,
    readonly compressible: Float64Array,
    readonly velocity: Float64Array,
    readonly perMode: number,
    readonly velocityPerMode: number,
  ) {
    this.nyquist = new Float64Array((grid.shape[0] + grid.shape[1]) * (grid.shape[2] + 2));
  }

  /** The mirrors' k·W of the Nyquist rows (a = n0/2 or b = n1/2 of a simulated axis), rows of n2/2 + 1 modes. */
  private readonly nyquist: Float64Array;

  /**
   * One axis's packed transform Z = U + iW into the shells and totals, and
   * k_axis W into `div` (assigned on the first axis, added after). u and w
   * are real, so U_−k = conj U_k and W_−k = conj W_k: only the modes with
   * 0 ≤ c ≤ n2/2 along the last axis are visited, those with 0 < c < n2/2
   * counted twice (for their mirrors), and `div` holds that half space, rows
   * of n2/2 + 1 modes. On the Nyquist rows of the first two axes a mode's
   * wavenumber along that axis is its mirror's too, so k·W of the mirror is
   * no mirror of k·W: those rows keep the mirrors' k·W in `nyquist`.
   */
  addAxis(z: Float64Array, axis: number, div: Float64Array, first: boolean): void {
    const [n0, n1, n2] = this.grid.shape;
    const [k0, k1] = [this.grid.wavenumbers(0), this.grid.wavenumbers(1)];
    const zScale = axis === 2 ? 1 : 0;
    for (let a = 0; a < n0; a++) {
      const ma = a === 0 ? 0 : n0 - a;
      for (let b = 0; b < n1; b++) {
        const mb = b === 0 ? 0 : n1 - b;
        const kRow = axis === 0 ? k0[a]! : axis === 1 ? k1[b]! : 0;
        const kMirror = axis === 0 ? k0[ma]! : axis === 1 ? k1[mb]! : 0;
        this.axisRow(z, div, a * n1 + b, 2 * (ma * n1 + mb) * n2, [kRow, kMirror, zScale], this.nyquistRow(a, b), first);
      }
    }
  }

  /** Where row (a, b) keeps its mirrors' k·W in `nyquist`, or −1 when it is no Nyquist row. */
  private nyquistRow(a: number, b: number): number {
    const [n0, n1, n2] = this.grid.shape;
    const row = n0 > 1 && a === n0 / 2 ? b : n1 > 1 && b === n1 / 2 ? n1 + a : -1;
    return row < 0 ? -1 : row * (n2 + 2);
  }

  /** One row of addAxis: row r's modes 0 ≤ c ≤ n2/2, their mirrors in the row starting at `mirror`; k = [row's k_axis, the mirror row's, the last axis's scale]. */
  private axisRow(z: Float64Array, div: Float64Array, r: number, mirror: number, k: readonly number[], e: number, first: boolean): void {
    const k2 = this.grid.wavenumbers(2);
    const [n2, half] = [k2.length, k2.length / 2];
    const [kRow, kMirror, zScale] = k as [number, number, number];
    const { bins, quantum: sq, flow: sw, velocity: sv, perMode, velocityPerMode, totals, nyquist } = this;
    let [quantum, incompressible] = [totals[0]!, totals[1]!];
    const onNyquist = e >= 0;
    for (let c = 0, p = 2 * r * n2, h = 2 * r * (half + 1); c <= half; c++, p += 2, h += 2, e += 2) {
      const m = mirror + (c === 0 ? 0 : 2 * (n2 - c));
      // U = (Z_k + conj Z_−k)/2, W = (Z_k − conj Z_−k)/(2i)
      const ur = 0.5 * (z[p]! + z[m]!);
      const ui = 0.5 * (z[p + 1]! - z[m + 1]!);
      const wr = 0.5 * (z[p + 1]! + z[m + 1]!);
      const wi = -0.5 * (z[p]! - z[m]!);
      const kj = kRow + zScale * k2[c]!;
      div[h] = first ? kj * wr : div[h]! + kj * wr;
      div[h + 1] = first ? kj * wi : div[h + 1]! + kj * wi;
      const weight = c === 0 || c === half ? 1 : 2;
      if (onNyquist && weight === 2) {
        const km = kMirror + zScale * k2[n2 - c]!;
        nyquist[e] = first ? km * wr : nyquist[e]! + km * wr;
        nyquist[e + 1] = first ? -(km * wi) : nyquist[e + 1]! - km * wi;
      }
      const eq = weight * (ur * ur + ui * ui) * perMode;
      const ww = weight * (wr * wr + wi * wi);
      quantum += eq;
      incompressible += ww * perMode;
      const bin = bins[p >> 1]!;
      if (bin < 0) {
        // k = 0: the uniform flow and the zero mode, in no shell
        totals[3] = totals[3]! + ww * perMode;
        totals[4] = totals[4]! + (eq + ww * perMode);
        continue;
      }
      sq[bin] = sq[bin]! + eq;
      sw[bin] = sw[bin]! + ww * perMode;
      sv[bin] = sv[bin]! + ww * velocityPerMode;
    }
    [totals[0], totals[1]] = [quantum, incompressible];
  }

  /** The compressible part |k̂·W|² from `div` = k·W (the half space of addAxis): counted in the shells, and moved out of the incompressible part. */
  takeCompressible(div: Float64Array): void {
    const [n0, n1] = this.grid.shape;
    const [k0, k1] = [this.grid.wavenumbers(0), this.grid.wavenumbers(1)];
    for (let a = 0; a < n0; a++) for (let b = 0; b < n1; b++) this.compressibleRow(div, a * n1 + b, k0[a]! * k0[a]! + k1[b]! * k1[b]!, this.nyquistRow(a, b));
  }

  private compressibleRow(div: Float64Array, r: number, kab: number, e: number): void {
    const k2 = this.grid.wavenumbers(2);
    const half = k2.length / 2;
    const { bins, flow: sw, compressible: sc, perMode, totals, nyquist } = this;
    let compressible = totals[2]!;
    let incompressible = totals[1]!;
    const onNyquist = e >= 0;
    for (let c = 0, i = r * k2.length, h = 2 * r * (half + 1); c <= half; c++, i++, h += 2, e += 2) {
      const kk = kab + k2[c]! * k2[c]!;
      if (kk === 0) continue;
      const own = div[h]! * div[h]! + div[h + 1]! * div[h + 1]!;
      // the mirror's |k·W|²: the same but on the Nyquist rows
      const mirror = c === 0 || c === half ? 0 : onNyquist ? nyquist[e]! * nyquist[e]! + nyquist[e + 1]! * nyquist[e + 1]! : own;
      const ec = ((own + mirror) / kk) * perMode;
      compressible += ec;
      incompressible -= ec;
      const bin = bins[i]!;
      sc[bin] = sc[bin]! + ec;
      sw[bin] = sw[bin]! - ec;
    }
    totals[2] = compressible;
    totals[1] = incompressible;
  }
}
