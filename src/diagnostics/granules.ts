/**
 * Interference granules of a wave field, in code units (ħ/m = 1). A
 * random-phase (Gaussian) field whose velocities follow a Maxwellian of 1D
 * dispersion σ has the exponential density PDF e^{−x} of x = ρ/ρ̄, the
 * density correlation ξ(r) = ⟨δ(x)δ(x + r)⟩ = exp(−m²σ²r²/ħ²), and
 * behaves for the dynamics like quasi-particles of mass
 * ρ̄ ∫ξ dᵈr = π^{d/2} ρ̄ (ħ/(mσ))ᵈ (Bar-Or, Fouvry & Tremaine 2019, ApJ 871,
 * 28; from memory, re-derived: |⟨ψ*(x)ψ(x+r)⟩|² / ρ̄² is the squared
 * Fourier transform of the Maxwellian). The sum of n independent such fields
 * has a Gamma PDF of shape n; psibox reports the shape 1/var(δ) that matches
 * the measured variance.
 *
 * The velocity dispersion is the field's own: σ² = (⟨k²⟩ − |⟨k⟩|²)/(d a²)
 * over |ψ_k|² (the whole kinetic energy, quantum part included, as a
 * random-phase field's momentum spread is its velocity spread), and the
 * comoving correlation length predicted is ħ/(m a σ).
 */
import type { Grid } from "../grid/grid.js";
import { SimpleTransforms, type FieldTransforms } from "../fields/field-transforms.js";
import { lnGamma } from "../math/special.js";
import { simulatedAxes } from "./shells.js";
import { meanDensity } from "./analysis.js";
import { spectrumMoments, type SpectrumMoments } from "./spectrum-moments.js";
import { blockTablesOf, type BlockTables } from "./block-tables.js";

/** Granule statistics (code units; lengths comoving). */
export interface GranuleStats {
  /** Linear bins of x = ρ/ρ̄: the measured PDF, the exponential law and the Gamma law of the matching shape. */
  readonly pdf: { x: number; pdf: number; exponential: number; gamma: number }[];
  readonly variance: number;
  readonly gammaShape: number;
  /** Shell averages of ξ(r) = ⟨δ(x)δ(x + r)⟩ out to half the shortest side, with the random-phase prediction ξ(0) e^{−r²/ℓ²}. */
  readonly correlation: { r: number; xi: number; predicted: number; cells: number }[];
  /** Where ξ(r)/ξ(0) first falls to 1/e (interpolating ln ξ linearly in r²), or NaN when it does not within half the box. */
  readonly correlationLength: number;
  /** ħ/(m a σ) with σ the field's 1D velocity dispersion. */
  readonly predictedLength: number;
  /** The field's 1D (peculiar) velocity dispersion σ. */
  readonly velocityDispersion: number;
  /** ρ̄ ∫ ξ dᵈr over r < 3 × the measured correlation length ℓ (NaN without one, or where 3ℓ exceeds half the shortest side). */
  readonly quasiParticleMass: number;
  /** π^{d/2} ρ̄ (ħ/(m a σ))ᵈ · ξ(0): the random-phase prediction. */
  readonly predictedQuasiParticleMass: number;
}

/** The probability density of a Gamma law of shape k and mean 1 at x. */
function gammaPdf(x: number, k: number): number {
  if (x <= 0) return k === 1 ? 1 : k < 1 ? Infinity : 0;
  return Math.exp(k * Math.log(k) + (k - 1) * Math.log(x) - k * x - lnGamma(k));
}

/** What a caller may have measured already: the spectrum of δ = ρ/ρ̄ − 1 (densityPowerSpectrum leaves it in its work grid; it is overwritten), the moments of ψ's spectrum and ρ̄ (as meanDensity gives it). */
export interface GranuleInputs {
  readonly contrastSpectrum?: Float64Array;
  readonly moments?: SpectrumMoments;
  readonly meanDensity?: number;
}

/** The density PDF's counts in `width` bins of x = ρ/ρ̄ and var(δ); δ into the real parts of `data` when given. */
function contrastPass(psi: Float64Array, mean: number, width: number, counts: Float64Array, data: Float64Array | undefined): number {
  const n = psi.length / 2;
  let variance = 0;
  for (let i = 0; i < n; i++) {
    const x = (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) / mean;
    if (data) {
      data[2 * i] = x - 1;
      data[2 * i + 1] = 0;
    }
    variance += (x - 1) ** 2 / n;
    const b = Math.floor(x / width);
    if (b < counts.length) counts[b] = counts[b]! + 1;
  }
  return variance;
}

/** PDF, correlation function, correlation length and quasi-particle mass of the granules, at scale factor a (work grids 0 and 1 of `fft`, none with both `known` inputs). */
export function granuleStats(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms = new SimpleTransforms(grid.shape), pdfMax = 8, pdfBins = 40, known: GranuleInputs = {}): GranuleStats {
  const n = grid.size;
  const data = known.contrastSpectrum ?? fft.work(0);
  // ψ's spectrum (when its moments are not given) on the other work grid, before `data` holds ξ
  const moments = known.moments ?? spectrumMomentsOf(grid, psi, fft, data === fft.work(1) ? 0 : 1);
  const mean = known.meanDensity ?? meanDensity(psi);
  const width = pdfMax / pdfBins;
  // in WebAssembly with ψ and `data` in the memory of the transforms' tables (the same arithmetic)
  const tables = granuleTables(grid, blockTablesOf(fft, grid, psi, data), pdfBins);
  const counts = tables ? tables.sums.subarray(0, pdfBins).fill(0) : new Float64Array(pdfBins);
  const into = known.contrastSpectrum ? undefined : data;
  const variance = tables ? tables.kernels.contrastCounts(psi, mean, width, counts, into) : contrastPass(psi, mean, width, counts, into);
  const shape = 1 / variance;
  const pdf = Array.from({ length: pdfBins }, (_, b) => {
    const lo = b * width;
    return { x: lo + width / 2, pdf: counts[b]! / (n * width), exponential: (Math.exp(-lo) - Math.exp(-lo - width)) / width, gamma: gammaPdf(lo + width / 2, shape) };
  });
  // ξ(r) = IFFT |δ_k|² / N
  if (!known.contrastSpectrum) fft.forward(data);
  if (tables) tables.kernels.powerCells(data);
  else {
    for (let i = 0; i < n; i++) {
      data[2 * i] = (data[2 * i]! ** 2 + data[2 * i + 1]! ** 2) / n;
      data[2 * i + 1] = 0;
    }
  }
  fft.inverse(data);
  const sigma = velocityDispersion(grid, moments, a);
  const predictedLength = 1 / (a * sigma);
  const correlation = shellAverage(grid, data, predictedLength, tables);
  const xi0 = data[0]!;
  let correlationLength = NaN;
  for (let j = 1; j < correlation.length; j++) {
    const p = correlation[j - 1]!;
    const q = correlation[j]!;
    if (q.xi / xi0 <= Math.exp(-1)) {
      // ln ξ is linear in r² for the Gaussian law: interpolate there (linearly in ξ and r if ξ(q) ≤ 0)
      if (q.xi > 0 && p.xi > 0) {
        const lp = Math.log(p.xi / xi0);
        const lq = Math.log(q.xi / xi0);
        correlationLength = Math.sqrt(p.r * p.r + ((lp + 1) / (lp - lq)) * (q.r * q.r - p.r * p.r));
      } else {
        correlationLength = p.r + ((p.xi / xi0 - Math.exp(-1)) / (p.xi / xi0 - q.xi / xi0)) * (q.r - p.r);
      }
      break;
    }
  }
  const d = grid.dims;
  // the ball of 3ℓ must lie within half the shortest side: a larger one takes in the far side of the periodic box,
  // where ξ sums with the rest to zero (⟨δ⟩ = 0), and its sum says nothing about the granules
  const halfSide = Math.min(...simulatedAxes(grid).map((ax) => grid.extent[ax])) / 2;
  const measurable = Number.isFinite(correlationLength) && 3 * correlationLength <= halfSide;
  const integral = measurable ? ballSum(grid, data, 3 * correlationLength) : 0;
  return {
    pdf,
    variance,
    gammaShape: shape,
    correlation,
    correlationLength,
    predictedLength,
    velocityDispersion: sigma,
    quasiParticleMass: measurable ? mean * integral : NaN,
    predictedQuasiParticleMass: Math.pow(Math.PI, d / 2) * mean * Math.pow(predictedLength, d) * xi0,
  };
}

/** The moments of ψ's spectrum (transformed in work grid `slot` of `fft`). */
function spectrumMomentsOf(grid: Grid, psi: Float64Array, fft: FieldTransforms, slot: number): SpectrumMoments {
  const spec = fft.work(slot);
  spec.set(psi);
  fft.forward(spec);
  return spectrumMoments(grid, spec);
}

/** 1D velocity dispersion σ = √((⟨k²⟩ − |⟨k⟩|²)/d)/a over |ψ_k|². */
function velocityDispersion(grid: Grid, m: SpectrumMoments, a: number): number {
  const mean2 = (m.k1[0] ** 2 + m.k1[1] ** 2 + m.k1[2] ** 2) / (m.weight * m.weight);
  return Math.sqrt(Math.max(0, m.k2 / m.weight - mean2) / grid.dims) / a;
}

/** Squared minimum-image distances from the origin: per row (a, b) of the first two axes (rows[a * n1 + b]), and per cell along the last axis (into `room` when given: n0 n1 + n2 numbers). */
function separations(grid: Grid, room?: Float64Array): { rows: Float64Array; last: Float64Array } {
  const [n0, n1, n2] = grid.shape;
  const h = grid.spacing;
  const rows = room ? room.subarray(0, n0 * n1) : new Float64Array(n0 * n1);
  for (let a = 0; a < n0; a++) {
    const x = Math.min(a, n0 - a) * h[0];
    for (let b = 0; b < n1; b++) {
      const y = Math.min(b, n1 - b) * h[1];
      rows[a * n1 + b] = (n0 > 1 ? x * x : 0) + (n1 > 1 ? y * y : 0);
    }
  }
  const last = room ? room.subarray(n0 * n1, n0 * n1 + n2) : new Float64Array(n2);
  for (let c = 0; c < n2; c++) last[c] = (Math.min(c, n2 - c) * h[2]) ** 2;
  return { rows, last };
}

/** ΔV Σ of the real parts of `data` over the cells at a minimum-image distance below `r` from the origin (in storage order). */
function ballSum(grid: Grid, data: Float64Array, r: number): number {
  const { rows, last } = separations(grid);
  const acc = new Float64Array(1);
  for (let row = 0; row < rows.length; row++) if (Math.sqrt(rows[row]!) < r) ballRow(data, row * last.length, rows[row]!, last, r, grid.cellVolume, acc);
  return acc[0]!;
}

function ballRow(data: Float64Array, i: number, rowR2: number, last: Float64Array, r: number, dv: number, acc: Float64Array): void {
  let sum = acc[0]!;
  for (let c = 0; c < last.length; c++, i++) if (Math.sqrt(rowR2 + last[c]!) < r) sum += data[2 * i]! * dv;
  acc[0] = sum;
}

/** One row of shellAverage: cells [i, i + n2) into shells of width h (those below `bins`). */
function shellRow(data: Float64Array, i: number, rowR2: number, last: Float64Array, h: number, s: { sum: Float64Array; rs: Float64Array; cnt: Float64Array }): void {
  const { sum, rs, cnt } = s;
  for (let c = 0; c < last.length; c++, i++) {
    const r = Math.sqrt(rowR2 + last[c]!);
    const b = Math.floor(r / h + 0.5);
    if (b >= sum.length) continue;
    sum[b] = sum[b]! + data[2 * i]!;
    rs[b] = rs[b]! + r;
    cnt[b] = cnt[b]! + 1;
  }
}

/** The tables of the granules' passes in WebAssembly: with room in their sums for the PDF's counts and three series of the correlation's shells. */
function granuleTables(grid: Grid, tables: BlockTables | undefined, pdfBins: number): BlockTables | undefined {
  return tables && Math.max(pdfBins, 3 * correlationShells(grid)) <= tables.sums.length ? tables : undefined;
}

/** The correlation function's shells: one cell (the smallest spacing) wide, out to half the shortest side. */
function correlationShells(grid: Grid): number {
  const axes = simulatedAxes(grid);
  const h = Math.min(...axes.map((ax) => grid.spacing[ax]));
  const rMax = Math.min(...axes.map((ax) => grid.extent[ax])) / 2;
  return Math.max(1, Math.floor(rMax / h) + 1);
}

/** Shells of one cell (the smallest spacing) of a real field stored in the real parts of `data`, out to half the shortest side (in WebAssembly with `tables`). */
function shellAverage(grid: Grid, data: Float64Array, length: number, tables: BlockTables | undefined): { r: number; xi: number; predicted: number; cells: number }[] {
  const h = Math.min(...simulatedAxes(grid).map((ax) => grid.spacing[ax]));
  const bins = correlationShells(grid);
  const room = tables ? tables.sums.subarray(0, 3 * bins).fill(0) : new Float64Array(3 * bins);
  const [sum, rs, cnt] = [room.subarray(0, bins), room.subarray(bins, 2 * bins), room.subarray(2 * bins)];
  const { rows, last } = separations(grid, tables?.separations);
  // rows entirely beyond the last shell (by a cell's margin against round-off) add nothing
  const limit = (bins + 0.5) * h;
  if (tables) tables.kernels.distanceShells(data, rows, last, h, limit, sum, rs, cnt);
  else {
    const shells = { sum, rs, cnt };
    for (let row = 0; row < rows.length; row++) if (Math.sqrt(rows[row]!) < limit) shellRow(data, row * last.length, rows[row]!, last, h, shells);
  }
  const xi0 = data[0]!;
  const out: { r: number; xi: number; predicted: number; cells: number }[] = [];
  for (let b = 0; b < bins; b++) {
    if (cnt[b]! === 0) continue;
    const r = rs[b]! / cnt[b]!;
    out.push({ r, xi: sum[b]! / cnt[b]!, predicted: xi0 * Math.exp(-(r * r) / (length * length)), cells: cnt[b]! });
  }
  return out;
}
