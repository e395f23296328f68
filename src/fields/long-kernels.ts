/**
 * A long 1D grid's elementwise steps between its four-step passes, in
 * JavaScript (the fft.js engine's; the WebAssembly kernels do the same in
 * kernels.as.ts): the twiddles of rows, the drift's phase and the kinetic sum
 * by stored wavenumber, and the periodic Poisson kernel on pairs of
 * wavenumbers. Layout as step-memory.ts LongLayout: `rows` rows of n2 cells,
 * the spectrum in transposed order (row a, column k2 holds index a + rows·k2).
 */

/**
 * Rows [lo, hi) times their twiddles, or the conjugates: row a of the matrix
 * gets e^{−2πi·A·j/N}, A = a·tStep, as coarse row ⌊A/16⌋ of `tw` times fine
 * row `coarse` + A mod 16 (step-memory.ts longTwiddleRows).
 */
export function twiddleRows(data: Float64Array, tw: Float64Array, coarse: number, n2: number, tStep: number, lo: number, hi: number, conj: boolean): void {
  const sign = conj ? -1 : 1;
  for (let a = lo; a < hi; a++) {
    const t1 = 2 * (((a * tStep) >> 4) * n2);
    const t2 = 2 * ((coarse + ((a * tStep) & 15)) * n2);
    for (let j = 0; j < n2; j++) {
      const i = 2 * (a * n2 + j);
      for (const t of [t1, t2]) {
        const wr = tw[t + 2 * j]!;
        const wi = sign * tw[t + 2 * j + 1]!;
        const re = data[i]!;
        const im = data[i + 1]!;
        data[i] = re * wr - im * wi;
        data[i + 1] = re * wi + im * wr;
      }
    }
  }
}

/** Over transformed rows [lo, hi): Σ k²|ψ_k|² (with `kk`), then ψ_k ← ψ_k·phase_k (with `phase`); returns the sum. */
export function longPhaseRows(data: Float64Array, rows: number, n2: number, lo: number, hi: number, phase: Float64Array | undefined, kk: Float64Array | undefined): number {
  let sum = 0;
  for (let a = lo; a < hi; a++) {
    for (let c = 0; c < n2; c++) {
      const i = 2 * (a * n2 + c);
      const k = a + rows * c;
      const re = data[i]!;
      const im = data[i + 1]!;
      if (kk) sum += kk[k]! * (re * re + im * im);
      if (!phase) continue;
      const er = phase[2 * k]!;
      const ei = phase[2 * k + 1]!;
      data[i] = re * er - im * ei;
      data[i + 1] = re * ei + im * er;
    }
  }
  return sum;
}

/**
 * The periodic Poisson kernel on the transformed density pairs of a long
 * grid, row pairs u ∈ [lo, hi) (row u with row rows − u), as kernels.as.ts
 * longPairs: −1/k² (kernel `kp`, index 0 … m) applied to the real spectrum
 * untangled from Z_k and Z_{m−k}, and tangled back.
 */
export function longPairRows(data: Float64Array, rows: number, n2: number, lo: number, hi: number, kp: Float64Array): void {
  const m = rows * n2;
  for (let u = lo; u < hi; u++) {
    if (u === 0) {
      for (let c = 0; c <= n2 / 2; c++) pairCell(data, c, (n2 - c) % n2, rows * c, m, kp);
      continue;
    }
    const v = rows - u;
    const last = u === v ? n2 / 2 : n2;
    for (let c = 0; c < last; c++) pairCell(data, u * n2 + c, v * n2 + n2 - 1 - c, u + rows * c, m, kp);
  }
}

function green(kp: Float64Array, k: number): number {
  const kk = kp[k]!;
  return kk > 0 ? -1 / kk : 0;
}

/** One pair: Z_k at cell ik, Z_{m−k} at cell ij (the same cell for k = 0 and k = m/2). */
function pairCell(data: Float64Array, ik: number, ij: number, k: number, m: number, kp: Float64Array): void {
  const [zr, zi] = [data[2 * ik]!, data[2 * ik + 1]!];
  const [yr, yi] = [data[2 * ij]!, -data[2 * ij + 1]!]; // conj Z_j
  const [er, ei] = [0.5 * (zr + yr), 0.5 * (zi + yi)];
  const [or, oi] = [0.5 * (zi - yi), -0.5 * (zr - yr)]; // −i(Z_k − conj Z_j)/2
  const angle = (Math.PI * k) / m;
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  const [wr, wi] = [or * c + oi * s, oi * c - or * s]; // W^k O, W^k = c − is
  const gk = green(kp, k);
  const gj = green(kp, m - k);
  const [akr, aki] = [gk * (er + wr), gk * (ei + wi)]; // Y_k
  const [bjr, bji] = [gj * (er - wr), gj * (ei - wi)]; // conj Y_j
  const [e2r, e2i] = [0.5 * (akr + bjr), 0.5 * (aki + bji)];
  const [dr, di] = [0.5 * (akr - bjr), 0.5 * (aki - bji)];
  const [o2r, o2i] = [dr * c - di * s, di * c + dr * s]; // × conj W^k = c + is
  data[2 * ij] = e2r + o2i;
  data[2 * ij + 1] = -e2i + o2r;
  data[2 * ik] = e2r - o2i;
  data[2 * ik + 1] = e2i + o2r;
}
