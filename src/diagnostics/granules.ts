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
  /** ρ̄ ∫ ξ dᵈr over r < 3 × the measured correlation length (NaN without one). */
  readonly quasiParticleMass: number;
  /** π^{d/2} ρ̄ (ħ/(m a σ))ᵈ · ξ(0): the random-phase prediction. */
  readonly predictedQuasiParticleMass: number;
}

/** The probability density of a Gamma law of shape k and mean 1 at x. */
function gammaPdf(x: number, k: number): number {
  if (x <= 0) return k === 1 ? 1 : k < 1 ? Infinity : 0;
  return Math.exp(k * Math.log(k) + (k - 1) * Math.log(x) - k * x - lnGamma(k));
}

/** PDF, correlation function, correlation length and quasi-particle mass of the granules, at scale factor a (work grids 0 and 1 of `fft`). */
export function granuleStats(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms = new SimpleTransforms(grid.shape), pdfMax = 8, pdfBins = 40): GranuleStats {
  const n = grid.size;
  const data = fft.work(0);
  let mean = 0;
  for (let i = 0; i < n; i++) mean += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  mean /= n;
  const width = pdfMax / pdfBins;
  const counts = new Float64Array(pdfBins);
  let variance = 0;
  for (let i = 0; i < n; i++) {
    const x = (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) / mean;
    data[2 * i] = x - 1;
    data[2 * i + 1] = 0;
    variance += (x - 1) ** 2 / n;
    const b = Math.floor(x / width);
    if (b < pdfBins) counts[b] = counts[b]! + 1;
  }
  const shape = 1 / variance;
  const pdf = Array.from({ length: pdfBins }, (_, b) => {
    const lo = b * width;
    return { x: lo + width / 2, pdf: counts[b]! / (n * width), exponential: (Math.exp(-lo) - Math.exp(-lo - width)) / width, gamma: gammaPdf(lo + width / 2, shape) };
  });
  // ξ(r) = IFFT |δ_k|² / N
  fft.forward(data);
  for (let i = 0; i < n; i++) {
    data[2 * i] = (data[2 * i]! ** 2 + data[2 * i + 1]! ** 2) / n;
    data[2 * i + 1] = 0;
  }
  fft.inverse(data);
  const sigma = velocityDispersion(grid, psi, fft, a);
  const predictedLength = 1 / (a * sigma);
  const correlation = shellAverage(grid, data, predictedLength);
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
  let integral = 0;
  if (Number.isFinite(correlationLength)) {
    forEachSeparation(grid, (i, r) => {
      if (r < 3 * correlationLength) integral += data[2 * i]! * grid.cellVolume;
    });
  }
  return {
    pdf,
    variance,
    gammaShape: shape,
    correlation,
    correlationLength,
    predictedLength,
    velocityDispersion: sigma,
    quasiParticleMass: Number.isFinite(correlationLength) ? mean * integral : NaN,
    predictedQuasiParticleMass: Math.pow(Math.PI, d / 2) * mean * Math.pow(predictedLength, d) * xi0,
  };
}

/** 1D velocity dispersion σ = √((⟨k²⟩ − |⟨k⟩|²)/d)/a over |ψ_k|². */
function velocityDispersion(grid: Grid, psi: Float64Array, fft: FieldTransforms, a: number): number {
  const spec = fft.work(1);
  spec.set(psi);
  fft.forward(spec);
  let w = 0;
  let k2 = 0;
  let kx1 = 0;
  let ky1 = 0;
  let kz1 = 0;
  const [n0, n1, n2] = grid.shape;
  const [kx, ky, kz] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  let p = 0;
  for (let i = 0; i < n0; i++)
    for (let j = 0; j < n1; j++)
      for (let l = 0; l < n2; l++, p += 2) {
        const m = spec[p]! ** 2 + spec[p + 1]! ** 2;
        w += m;
        k2 += (kx[i]! * kx[i]! + ky[j]! * ky[j]! + kz[l]! * kz[l]!) * m;
        kx1 += kx[i]! * m;
        ky1 += ky[j]! * m;
        kz1 += kz[l]! * m;
      }
  const mean2 = (kx1 ** 2 + ky1 ** 2 + kz1 ** 2) / (w * w);
  return Math.sqrt(Math.max(0, k2 / w - mean2) / grid.dims) / a;
}

/** Visit every cell with its minimum-image distance from the origin. */
function forEachSeparation(grid: Grid, visit: (i: number, r: number) => void): void {
  const [n0, n1, n2] = grid.shape;
  const h = grid.spacing;
  let i = 0;
  for (let a = 0; a < n0; a++) {
    const x = Math.min(a, n0 - a) * h[0];
    for (let b = 0; b < n1; b++) {
      const y = Math.min(b, n1 - b) * h[1];
      for (let c = 0; c < n2; c++, i++) {
        const z = Math.min(c, n2 - c) * h[2];
        visit(i, Math.sqrt((n0 > 1 ? x * x : 0) + (n1 > 1 ? y * y : 0) + z * z));
      }
    }
  }
}

/** Shells of one cell (the smallest spacing) of a real field stored in the real parts of `data`, out to half the shortest side. */
function shellAverage(grid: Grid, data: Float64Array, length: number): { r: number; xi: number; predicted: number; cells: number }[] {
  const axes = simulatedAxes(grid);
  const h = Math.min(...axes.map((ax) => grid.spacing[ax]));
  const rMax = Math.min(...axes.map((ax) => grid.extent[ax])) / 2;
  const bins = Math.max(1, Math.floor(rMax / h) + 1);
  const sum = new Float64Array(bins);
  const rs = new Float64Array(bins);
  const cnt = new Float64Array(bins);
  forEachSeparation(grid, (i, r) => {
    const b = Math.floor(r / h + 0.5);
    if (b >= bins) return;
    sum[b] = sum[b]! + data[2 * i]!;
    rs[b] = rs[b]! + r;
    cnt[b] = cnt[b]! + 1;
  });
  const xi0 = data[0]!;
  const out: { r: number; xi: number; predicted: number; cells: number }[] = [];
  for (let b = 0; b < bins; b++) {
    if (cnt[b]! === 0) continue;
    const r = rs[b]! / cnt[b]!;
    out.push({ r, xi: sum[b]! / cnt[b]!, predicted: xi0 * Math.exp(-(r * r) / (length * length)), cells: cnt[b]! });
  }
  return out;
}
