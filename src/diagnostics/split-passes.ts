/**
 * The energy split's passes over the grid (energy-split.ts), one row of the
 * last axis per call. Each row function is small and sees every case on its
 * first rows, so the engine compiles it once with complete type feedback
 * (a whole-grid loop nest is compiled on the fly while it runs and thrown
 * away when the code after the loop first runs: in a one-off analysis that
 * costs more than the loop itself). The rows are grouped into blocks
 * (split-tasks.ts), each with sums of its own, carried from row to row in
 * the order of the cells; the blocks' sums are added in block order, so the
 * result is the same whatever thread took which block.
 */

/** z ← u + i w over one row [p, end) (interleaved indices) from ψ and its derivative along an axis (in z); adds Σ j²/ρ and Σ j into acc[at], acc[at + 1]. */
export function packRow(psi: Float64Array, z: Float64Array, p: number, end: number, acc: Float64Array, at = 0): void {
  let bulk2 = acc[at]!;
  let js = acc[at + 1]!;
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
  acc[at] = bulk2;
  acc[at + 1] = js;
}

/**
 * What the shell passes share, as plain data (it goes to the pool's threads by message: its typed arrays on
 * shared memory are shared, the small ones copied): the shape and wavenumbers, each mode's shell, the factors
 * per mode, k·W in `div` (the half space: rows of n2/2 + 1 modes) and the mirrors' k·W of the Nyquist rows.
 */
export interface ShellData {
  readonly shape: readonly [number, number, number];
  readonly k0: Float64Array;
  readonly k1: Float64Array;
  readonly k2: Float64Array;
  /** The shell of mode (r, c) at bins[r binRow + c]: a table of every mode (binRow = n2) or of the half space (n2/2 + 1). */
  readonly bins: Int16Array | Int32Array;
  readonly binRow: number;
  /** Shells. */
  readonly count: number;
  readonly perMode: number;
  readonly velocityPerMode: number;
  readonly div: Float64Array;
  /** The mirrors' k·W of the Nyquist rows (a = n0/2 or b = n1/2 of a simulated axis), rows of n2/2 + 1 modes. */
  readonly nyquist: Float64Array;
}

/** The numbers of `div`: the half space of a shape, rows of n2/2 + 1 complex modes (at least one number per cell). */
export function halfSpaceLength(shape: readonly [number, number, number]): number {
  return 2 * shape[0] * shape[1] * (Math.floor(shape[2] / 2) + 1);
}

/** A block's sums in the shell passes: [0] quantum, [1] Σ|W|² (incompressible until the compressible part is taken out), [2] compressible, [3] uniform flow, [4] zero mode, then per shell the quantum, incompressible and compressible energy and the velocity power. */
export const SHELL_TOTALS = 5;

/** Entries of a block's sums: the totals and four series per shell. */
export function shellSumsLength(count: number): number {
  return SHELL_TOTALS + 4 * count;
}

/**
 * Rows of the mirrors' k·W a shape's Nyquist rows keep (nyquistRow): one for each b where a = n0/2 (a simulated
 * first axis), then one for each a where b = n1/2 (a simulated second axis); rows of n2 + 2 numbers.
 */
export function nyquistRows(shape: readonly [number, number, number]): number {
  return (shape[0] > 1 ? shape[1] : 0) + (shape[1] > 1 ? shape[0] : 0);
}

/** Where row (a, b) keeps its mirrors' k·W in `nyquist` (nyquistRows rows of n2 + 2), or −1 when it is no Nyquist row. */
export function nyquistRow(d: ShellData, a: number, b: number): number {
  const n0 = d.shape[0];
  const n1 = d.shape[1];
  const row = n0 > 1 && a === n0 / 2 ? b : n1 > 1 && b === n1 / 2 ? (n0 > 1 ? n1 : 0) + a : -1;
  return row < 0 ? -1 : row * (d.shape[2] + 2);
}

/**
 * Row r = a n1 + b of one axis's packed transform Z = U + iW into the block's sums `s` (from `at`), and
 * k_axis W into `div` (assigned on the first axis, added after). u and w are real, so U_−k = conj U_k and
 * W_−k = conj W_k: only the modes 0 ≤ c ≤ n2/2 are visited, those with 0 < c < n2/2 counted twice (for their
 * mirrors, in the row starting at `mirror`). On the Nyquist rows of the first two axes a mode's wavenumber
 * along that axis is its mirror's too, so k·W of the mirror is no mirror of k·W: those rows keep the mirrors'
 * k·W in `nyquist` (from e). kRow: the row's k_axis, kMirror: the mirror row's; zScale: 1 along the last axis, else 0.
 */
export function axisRow(d: ShellData, z: Float64Array, r: number, mirror: number, kRow: number, kMirror: number, zScale: number, e: number, first: boolean, s: Float64Array, at: number): void {
  const { k2, bins, binRow, count, perMode, velocityPerMode, div, nyquist } = d;
  const n2 = k2.length;
  const half = n2 / 2;
  const binAt = r * binRow;
  const sq = at + SHELL_TOTALS;
  const sw = sq + count;
  const sv = sq + 3 * count;
  let quantum = s[at]!;
  let incompressible = s[at + 1]!;
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
    const bin = bins[binAt + c]!;
    if (bin < 0) {
      // k = 0: the uniform flow and the zero mode, in no shell
      s[at + 3] = s[at + 3]! + ww * perMode;
      s[at + 4] = s[at + 4]! + (eq + ww * perMode);
      continue;
    }
    s[sq + bin] = s[sq + bin]! + eq;
    s[sw + bin] = s[sw + bin]! + ww * perMode;
    s[sv + bin] = s[sv + bin]! + ww * velocityPerMode;
  }
  s[at] = quantum;
  s[at + 1] = incompressible;
}

/**
 * The compressible part |k̂·W|² of row r = a n1 + b, from `div` = k·W (the half space of axisRow), at
 * kab = k_a² + k_b²: counted in the shells of `s` (from `at`), and moved out of the incompressible part.
 */
export function compressibleRow(d: ShellData, r: number, kab: number, e: number, s: Float64Array, at: number): void {
  const { k2, bins, binRow, count, perMode, div, nyquist } = d;
  const half = k2.length / 2;
  const sw = at + SHELL_TOTALS + count;
  const sc = sw + count;
  let compressible = s[at + 2]!;
  let incompressible = s[at + 1]!;
  const onNyquist = e >= 0;
  for (let c = 0, i = r * binRow, h = 2 * r * (half + 1); c <= half; c++, i++, h += 2, e += 2) {
    const kk = kab + k2[c]! * k2[c]!;
    if (kk === 0) continue;
    const own = div[h]! * div[h]! + div[h + 1]! * div[h + 1]!;
    // the mirror's |k·W|²: the same but on the Nyquist rows
    const mirror = c === 0 || c === half ? 0 : onNyquist ? nyquist[e]! * nyquist[e]! + nyquist[e + 1]! * nyquist[e + 1]! : own;
    const ec = ((own + mirror) / kk) * perMode;
    compressible += ec;
    incompressible -= ec;
    const bin = bins[i]!;
    s[sc + bin] = s[sc + bin]! + ec;
    s[sw + bin] = s[sw + bin]! - ec;
  }
  s[at + 2] = compressible;
  s[at + 1] = incompressible;
}
