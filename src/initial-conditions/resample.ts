/**
 * Fourier resampling of a periodic complex field to other cell counts (band-
 * limited interpolation): the field's discrete Fourier modes are copied to
 * the new grid, zero-padded where it has more modes and truncated where it
 * has fewer. Upsampling keeps every mode, so the field's values at the old
 * sample points, its mass Σ|ψ|²ΔV and its spectral kinetic energy are kept
 * to round-off (Parseval); the old grid's Nyquist mode stays at the same
 * wavenumber −N/2 on the new grid. Downsampling drops the modes the coarser
 * grid cannot hold and rescales the field so that its mass is kept; the
 * fraction of the mass those modes carried is returned.
 */
import { ComplexFft } from "../fields/fft.js";
import type { Triple } from "../grid/grid.js";

/** A resampled field and the fraction of the mass in modes the new grid could not hold. */
export interface Resampled {
  readonly psi: Float64Array;
  readonly droppedMassFraction: number;
}

function triple(cells: readonly number[]): Triple {
  const t = [1, 1, 1];
  const pad = 3 - cells.length;
  cells.forEach((n, i) => (t[pad + i] = n));
  return t as unknown as Triple;
}

/** For each index of an axis of m cells, the index of the same signed frequency on n cells, or −1. */
function modeMap(m: number, n: number): Int32Array {
  const map = new Int32Array(m);
  for (let j = 0; j < m; j++) {
    const k = j < m / 2 ? j : j - m; // signed frequency; the Nyquist index m/2 counts as −m/2
    map[j] = m === 1 && n === 1 ? 0 : k < -n / 2 || k >= n / 2 ? -1 : k >= 0 ? k : k + n;
  }
  return map;
}

function sumSquares(data: Float64Array): number {
  let s = 0;
  for (let i = 0; i < data.length; i++) s += data[i]! * data[i]!;
  return s;
}

/** Resample interleaved complex ψ on `from` cells per axis to `to` cells (same number of axes, powers of two). */
export function resampleField(psi: Float64Array, from: readonly number[], to: readonly number[]): Resampled {
  if (from.length !== to.length) throw new RangeError(`cannot resample ${from.length} axes to ${to.length}`);
  const src = triple(from);
  const dst = triple(to);
  const nSrc = src[0] * src[1] * src[2];
  const nDst = dst[0] * dst[1] * dst[2];
  if (psi.length !== 2 * nSrc) throw new RangeError(`field has ${psi.length / 2} cells, expected ${nSrc}`);
  const spectrum = Float64Array.from(psi);
  new ComplexFft(src).forward(spectrum);
  const total = sumSquares(spectrum);
  const maps = [0, 1, 2].map((a) => modeMap(dst[a]!, src[a]!));
  const out = new Float64Array(2 * nDst);
  for (let a = 0; a < dst[0]; a++) {
    const sa = maps[0]![a]!;
    if (sa < 0) continue;
    for (let b = 0; b < dst[1]; b++) {
      const sb = maps[1]![b]!;
      if (sb < 0) continue;
      for (let c = 0; c < dst[2]; c++) {
        const sc = maps[2]![c]!;
        if (sc < 0) continue;
        const from2 = 2 * ((sa * src[1] + sb) * src[2] + sc);
        const to2 = 2 * ((a * dst[1] + b) * dst[2] + c);
        out[to2] = spectrum[from2]!;
        out[to2 + 1] = spectrum[from2 + 1]!;
      }
    }
  }
  const kept = sumSquares(out);
  const dropped = total > 0 ? Math.max(0, 1 - kept / total) : 0;
  new ComplexFft(dst).inverse(out);
  // the inverse carries 1/N_dst where the field's values need 1/N_src; dropped modes are made up in amplitude
  const scale = (nDst / nSrc) * (kept > 0 && dropped > 0 ? Math.sqrt(total / kept) : 1);
  if (scale !== 1) for (let i = 0; i < out.length; i++) out[i] = out[i]! * scale;
  return { psi: out, droppedMassFraction: dropped };
}
