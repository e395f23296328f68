/**
 * Diagnostics of a field, as pure functions in code units (ħ/m = 1,
 * 4πG = 1): the density power spectrum, the density PDF, the kinetic energy
 * split into bulk flow and quantum gradient, the velocity dispersion, the
 * densest points, radial profiles and the soliton core fit.
 *
 * With ψ = √ρ e^{iS}: the current j = Im(ψ* ∇ψ) = ρ∇S, the peculiar velocity
 * v = j/(aρ), the bulk kinetic energy K_v = ½ ∫ ρ v² dV = (1/2a²) ∫ |j|²/ρ dV,
 * and the quantum-gradient part K_q = (1/2a²) ∫ |∇√ρ|² dV = K − K_v. K itself
 * is Parseval's sum with the full k² (as in the solver); the current uses
 * spectral first derivatives with the Nyquist mode's derivative set to zero.
 */
import type { Grid } from "../grid/grid.js";
import { ComplexFft } from "../fields/fft.js";

/** One bin of a power spectrum (code units: k in 1/ℓ, P in ℓ^d). */
export interface PowerBin {
  readonly k: number;
  readonly power: number;
  readonly modes: number;
}

/**
 * P(k) of δ = ρ/ρ̄ − 1 in shells of width k_F (the fundamental of the
 * longest side) out to the grid's corner: P = V ⟨|δ_k|²⟩/N², with the mode
 * count of each shell. By Parseval, Σ_bins P·modes/V is the variance of δ.
 */
export function densityPowerSpectrum(grid: Grid, psi: Float64Array): PowerBin[] {
  const n = grid.size;
  const data = new Float64Array(2 * n);
  let mean = 0;
  for (let i = 0; i < n; i++) mean += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  mean /= n;
  for (let i = 0; i < n; i++) data[2 * i] = (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) / mean - 1;
  new ComplexFft(grid.shape).forward(data);
  const simulated = [0, 1, 2].filter((ax) => grid.shape[ax]! > 1);
  const kF = Math.min(...simulated.map((ax) => (2 * Math.PI) / grid.extent[ax]!));
  const bins = Math.max(1, Math.round(Math.sqrt(grid.kSquaredMax) / kF));
  const sum = new Float64Array(bins);
  const ksum = new Float64Array(bins);
  const count = new Float64Array(bins);
  grid.forEachMode((p, kx, ky, kz) => {
    const k = Math.sqrt(kx * kx + ky * ky + kz * kz);
    if (k === 0) return;
    const bin = Math.min(bins - 1, Math.max(0, Math.round(k / kF) - 1));
    sum[bin] = sum[bin]! + (grid.volume * (data[p]! ** 2 + data[p + 1]! ** 2)) / (n * n);
    ksum[bin] = ksum[bin]! + k;
    count[bin] = count[bin]! + 1;
  });
  const out: PowerBin[] = [];
  for (let i = 0; i < bins; i++) if (count[i]! > 0) out.push({ k: ksum[i]! / count[i]!, power: sum[i]! / count[i]!, modes: count[i]! });
  return out;
}

/** Variance of δ = ρ/ρ̄ − 1 over the cells. */
export function densityVariance(psi: Float64Array): number {
  const n = psi.length / 2;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  mean /= n;
  let v = 0;
  for (let i = 0; i < n; i++) v += ((psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) / mean - 1) ** 2;
  return v / n;
}

/** Histogram of log₁₀(ρ/ρ̄): bin centres and the fraction of cells (volume) in each. */
export function densityPdf(psi: Float64Array, bins = 40): { log10Contrast: number; volumeFraction: number; massFraction: number }[] {
  const n = psi.length / 2;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  mean /= n;
  const logs = new Float64Array(n);
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const r = (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) / mean;
    const l = Math.log10(Math.max(r, 1e-30));
    logs[i] = l;
    if (r > 0) lo = Math.min(lo, l);
    hi = Math.max(hi, l);
  }
  if (!(hi > lo)) return [{ log10Contrast: hi, volumeFraction: 1, massFraction: 1 }];
  const width = (hi - lo) / bins;
  const vol = new Float64Array(bins);
  const mass = new Float64Array(bins);
  for (let i = 0; i < n; i++) {
    const b = Math.min(bins - 1, Math.max(0, Math.floor((logs[i]! - lo) / width)));
    vol[b] = vol[b]! + 1 / n;
    mass[b] = mass[b]! + Math.pow(10, logs[i]!) / n;
  }
  return Array.from({ length: bins }, (_, b) => ({ log10Contrast: lo + (b + 0.5) * width, volumeFraction: vol[b]!, massFraction: mass[b]! }));
}

/** The kinetic energy split, and velocity statistics (code units). */
export interface KineticSplit {
  readonly kinetic: number;
  readonly bulk: number;
  readonly quantum: number;
  /** Mass-weighted mean peculiar velocity, one component per simulated axis. */
  readonly meanVelocity: readonly number[];
  /** Mass-weighted 3D... d-dimensional velocity dispersion √⟨|v − v̄|²⟩ of the bulk flow. */
  readonly velocityDispersion: number;
}

/** K, K_v, K_q and the bulk-flow velocity dispersion, with spectral gradients. */
export function kineticSplit(grid: Grid, psi: Float64Array, a: number): KineticSplit {
  const n = grid.size;
  const fft = new ComplexFft(grid.shape);
  const spectrum = Float64Array.from(psi);
  fft.forward(spectrum);
  const grad = new Float64Array(2 * n);
  const jj = new Float64Array(n); // Σ_axes j²
  const simulated = [0, 1, 2].filter((ax) => grid.shape[ax]! > 1);
  const jSum: number[] = [];
  let gradSquared = 0;
  const [n0, n1, n2] = grid.shape;
  for (const ax of simulated) {
    const k = grid.wavenumbers(ax as 0 | 1 | 2);
    let p = 0;
    for (let i0 = 0; i0 < n0; i0++)
      for (let i1 = 0; i1 < n1; i1++)
        for (let i2 = 0; i2 < n2; i2++, p += 2) {
          const idx = ax === 0 ? i0 : ax === 1 ? i1 : i2;
          const kk = idx === grid.shape[ax]! / 2 ? 0 : k[idx]!; // the Nyquist mode has no derivative
          grad[p] = -kk * spectrum[p + 1]!;
          grad[p + 1] = kk * spectrum[p]!;
        }
    fft.inverse(grad);
    let js = 0;
    for (let i = 0; i < n; i++) {
      const re = psi[2 * i]!;
      const im = psi[2 * i + 1]!;
      const gr = grad[2 * i]!;
      const gi = grad[2 * i + 1]!;
      const j = re * gi - im * gr; // Im(ψ* ∂ψ)
      jj[i] = jj[i]! + j * j;
      js += j;
    }
    jSum.push(js);
  }
  let mass = 0;
  let bulk2 = 0;
  for (let i = 0; i < n; i++) {
    const rho = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
    mass += rho;
    if (rho > 0) bulk2 += jj[i]! / rho;
  }
  const dv = grid.cellVolume;
  // K from Parseval with the full k² (Nyquist included), as the solver's kinetic operator has it
  grid.forEachMode((p, kx, ky, kz) => {
    gradSquared += (kx * kx + ky * ky + kz * kz) * (spectrum[p]! ** 2 + spectrum[p + 1]! ** 2);
  });
  gradSquared /= n;
  const kinetic = (0.5 / (a * a)) * gradSquared * dv;
  const bulk = (0.5 / (a * a)) * bulk2 * dv;
  const meanVelocity = jSum.map((s) => s / (a * mass));
  const v2 = bulk2 / (a * a * mass);
  const vbar2 = meanVelocity.reduce((s, v) => s + v * v, 0);
  return { kinetic, bulk, quantum: kinetic - bulk, meanVelocity, velocityDispersion: Math.sqrt(Math.max(0, v2 - vbar2)) };
}

/** The `count` densest local maxima at least `minSeparation` cells apart (indices and densities). */
export function densestPoints(grid: Grid, psi: Float64Array, count: number, minSeparation: number): { index: number; coords: number[]; density: number }[] {
  const n = grid.size;
  const rho = new Float64Array(n);
  for (let i = 0; i < n; i++) rho[i] = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  const [n0, n1, n2] = grid.shape;
  // candidates: cells at least as dense as their neighbours along every simulated axis (periodic)
  const strides = [n1 * n2, n2, 1];
  const order: number[] = [];
  for (let i = 0; i < n; i++) {
    const idx = [Math.floor(i / (n1 * n2)), Math.floor(i / n2) % n1, i % n2];
    let peak = true;
    for (let ax = 0; ax < 3 && peak; ax++) {
      const m = [n0, n1, n2][ax]!;
      if (m === 1) continue;
      const up = idx[ax] === m - 1 ? i - (m - 1) * strides[ax]! : i + strides[ax]!;
      const down = idx[ax] === 0 ? i + (m - 1) * strides[ax]! : i - strides[ax]!;
      if (rho[up]! > rho[i]! || rho[down]! > rho[i]!) peak = false;
    }
    if (peak) order.push(i);
  }
  order.sort((x, y) => rho[y]! - rho[x]!);
  const cell = (i: number) => [Math.floor(i / (n1 * n2)), Math.floor(i / n2) % n1, i % n2];
  const chosen: { index: number; coords: number[]; density: number }[] = [];
  for (const i of order) {
    if (chosen.length >= count) break;
    const ci = cell(i);
    const far = chosen.every((c) => {
      const cj = cell(c.index);
      let d2 = 0;
      for (let ax = 0; ax < 3; ax++) {
        const m = grid.shape[ax]!;
        let d = Math.abs(ci[ax]! - cj[ax]!);
        d = Math.min(d, m - d);
        d2 += d * d;
      }
      return d2 >= minSeparation * minSeparation;
    });
    if (far) {
      const coords = [grid.coordinate(0, ci[0]!), grid.coordinate(1, ci[1]!), grid.coordinate(2, ci[2]!)].slice(3 - grid.dims);
      chosen.push({ index: i, coords, density: rho[i]! });
    }
  }
  return chosen;
}

/** Spherical (circular in 2D) shell averages of ρ around a centre, minimum-image distances, shells of one cell. */
export function radialProfile(grid: Grid, psi: Float64Array, center: readonly number[], rMax: number): { r: number; density: number; cells: number }[] {
  const h = Math.min(...grid.spacing.slice(3 - grid.dims));
  const bins = Math.max(1, Math.ceil(rMax / h));
  const sum = new Float64Array(bins);
  const rs = new Float64Array(bins);
  const cnt = new Float64Array(bins);
  const [n0, n1, n2] = grid.shape;
  const pad = 3 - grid.dims;
  let p = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++)
      for (let c = 0; c < n2; c++, p++) {
        const x = [grid.coordinate(0, a), grid.coordinate(1, b), grid.coordinate(2, c)];
        let r2 = 0;
        for (let i = 0; i < grid.dims; i++) {
          const L = grid.lengths[i]!;
          let d = x[pad + i]! - center[i]!;
          d -= L * Math.round(d / L);
          r2 += d * d;
        }
        const r = Math.sqrt(r2);
        const bin = Math.floor(r / h + 0.5);
        if (bin >= bins) continue;
        sum[bin] = sum[bin]! + psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2;
        rs[bin] = rs[bin]! + r;
        cnt[bin] = cnt[bin]! + 1;
      }
  const out: { r: number; density: number; cells: number }[] = [];
  for (let i = 0; i < bins; i++) if (cnt[i]! > 0) out.push({ r: rs[i]! / cnt[i]!, density: sum[i]! / cnt[i]!, cells: cnt[i]! });
  return out;
}

/** The soliton core profile ρ_c / (1 + 0.091 (r/r_c)²)⁸ (Schive, Chiueh & Broadhurst 2014). */
export function coreProfile(r: number, rhoC: number, rC: number): number {
  return rhoC * Math.pow(1 + 0.091 * (r / rC) ** 2, -8);
}

/**
 * Least-squares fit of the core profile to (r, ρ) points in log ρ: for each
 * r_c the best ln ρ_c is the mean residual, so the fit is a one-dimensional
 * golden-section search in ln r_c. Points beyond `rMax` are left out.
 */
export function fitCoreProfile(points: readonly { r: number; density: number }[], rMax: number): { rhoC: number; rC: number; rms: number } {
  const used = points.filter((p) => p.r <= rMax && p.density > 0);
  if (used.length < 3) throw new RangeError("a core fit needs at least 3 profile points with density");
  const lnRho = used.map((p) => Math.log(p.density));
  const cost = (lnRc: number): { c: number; lnRhoC: number } => {
    const rc = Math.exp(lnRc);
    const shape = used.map((p) => -8 * Math.log1p(0.091 * (p.r / rc) ** 2));
    const lnRhoC = lnRho.reduce((s, v, i) => s + v - shape[i]!, 0) / used.length;
    const c = lnRho.reduce((s, v, i) => s + (v - lnRhoC - shape[i]!) ** 2, 0);
    return { c, lnRhoC };
  };
  const rOuter = Math.max(...used.map((p) => p.r));
  let lo = Math.log(rOuter / 1000);
  let hi = Math.log(rOuter * 10);
  const g = (Math.sqrt(5) - 1) / 2;
  for (let i = 0; i < 200 && hi - lo > 1e-12; i++) {
    const c1 = hi - g * (hi - lo);
    const c2 = lo + g * (hi - lo);
    if (cost(c1).c < cost(c2).c) hi = c2;
    else lo = c1;
  }
  const best = cost(0.5 * (lo + hi));
  return { rhoC: Math.exp(best.lnRhoC), rC: Math.exp(0.5 * (lo + hi)), rms: Math.sqrt(best.c / used.length) };
}
