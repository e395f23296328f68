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
import { SimpleTransforms, type FieldTransforms } from "../fields/field-transforms.js";
import { modeShells, Shells, simulatedAxes, spectralDerivative } from "./shells.js";

export { densestPoints, radialProfile } from "./peaks.js";
import { runHere, type BlockRunner } from "./block-tasks.js";
import { densityPdf as pdfOn } from "./density-pdf.js";
import { blockTablesOf, type BlockTables } from "./block-tables.js";

/** Histogram of log₁₀(ρ/ρ̄): bin centres and the fraction of cells (volume) and of mass in each (density-pdf.ts; on this thread unless `run` says; in WebAssembly with `tables` of ψ's memory). */
export function densityPdf(psi: Float64Array, bins = 40, run: BlockRunner = runHere, tables?: BlockTables): { log10Contrast: number; volumeFraction: number; massFraction: number }[] {
  return pdfOn(psi, bins, run, tables?.sums.buffer === psi.buffer ? tables : undefined);
}

/** One bin of a power spectrum (code units: k in 1/ℓ, P in ℓ^d). */
export interface PowerBin {
  readonly k: number;
  readonly power: number;
  readonly modes: number;
}

/** ρ̄ = Σ|ψ|²/N over the cells (code density). */
export function meanDensity(psi: Float64Array): number {
  let mean = 0;
  for (let p = 0; p < psi.length; p += 2) mean += psi[p]! ** 2 + psi[p + 1]! ** 2;
  return mean / (psi.length / 2);
}

/**
 * P(k) of δ = ρ/ρ̄ − 1 in shells of width k_F (the fundamental of the
 * longest side) out to the grid's corner: P = V ⟨|δ_k|²⟩/N², with the mode
 * count of each shell. By Parseval, Σ_bins P·modes/V is the variance of δ.
 * Uses work grid `slot` of `fft` (0 unless told), which keeps δ_k afterwards
 * (for the potential energy and the granules' correlation function); `mean`
 * is ρ̄ when known already (as meanDensity gives it).
 */
export function densityPowerSpectrum(grid: Grid, psi: Float64Array, fft: FieldTransforms = new SimpleTransforms(grid.shape), slot = 0, mean = meanDensity(psi)): PowerBin[] {
  const n = grid.size;
  const data = fft.work(slot);
  // in WebAssembly when ψ and the work grid are in the memory of the transforms' tables (the same arithmetic)
  const tables = blockTablesOf(fft, grid, psi, data);
  if (tables) tables.kernels.contrastCells(psi, data, mean, 0, n);
  else {
    for (let p = 0; p < psi.length; p += 2) {
      data[p] = (psi[p]! ** 2 + psi[p + 1]! ** 2) / mean - 1;
      data[p + 1] = 0;
    }
  }
  fft.forward(data);
  const shells = new Shells(grid, 1);
  const table = tables ?? modeShells(grid);
  shells.countModes(table);
  const sums = shells.series(0);
  const perMode = grid.volume / (n * n);
  if (tables) {
    // the shells' sums in the tables' memory, then copied out
    const into = tables.sums.subarray(0, shells.count).fill(0);
    tables.kernels.powerRows(data, tables.bins, grid.shape[2], perMode, into, 0, grid.shape[0] * grid.shape[1]);
    sums.set(into);
  } else {
    const { bins } = table;
    for (let i = 0, p = 0; i < n; i++, p += 2) {
      const bin = bins[i]!;
      if (bin >= 0) sums[bin] = sums[bin]! + perMode * (data[p]! ** 2 + data[p + 1]! ** 2);
    }
  }
  return shells.rows().map((r) => ({ k: r.k, power: r.sums[0]! / r.modes, modes: r.modes }));
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

/** K, K_v, K_q and the bulk-flow velocity dispersion, with spectral gradients (work grids 0 and 1 of `fft`). */
export function kineticSplit(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms = new SimpleTransforms(grid.shape)): KineticSplit {
  const n = grid.size;
  const spectrum = fft.work(0);
  spectrum.set(psi);
  fft.forward(spectrum);
  const grad = fft.work(1);
  const jSum: number[] = [];
  // Σ_axes Σ_cells j²/ρ, j = Im(ψ* ∂ψ)
  let bulk2 = 0;
  for (const ax of simulatedAxes(grid)) {
    spectralDerivative(grid, fft, spectrum, ax, grad);
    let js = 0;
    for (let i = 0; i < n; i++) {
      const re = psi[2 * i]!;
      const im = psi[2 * i + 1]!;
      const j = re * grad[2 * i + 1]! - im * grad[2 * i]!;
      const rho = re * re + im * im;
      if (rho > 0) bulk2 += (j * j) / rho;
      js += j;
    }
    jSum.push(js);
  }
  let mass = 0;
  for (let i = 0; i < n; i++) mass += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  return kineticFromSums(grid, a, { gradient: parsevalGradient(grid, spectrum), bulk2, jSum, mass });
}

/** The sums behind a KineticSplit: Σ k²|ψ_k|², Σ j²/ρ over axes and cells, Σ j per axis, Σ ρ. */
export interface KineticSums {
  readonly gradient: number;
  readonly bulk2: number;
  readonly jSum: readonly number[];
  readonly mass: number;
}

/** The kinetic split from its sums (K from Parseval with the full k², Nyquist included, as the solver's kinetic operator has it). */
export function kineticFromSums(grid: Grid, a: number, s: KineticSums): KineticSplit {
  const dv = grid.cellVolume;
  const kinetic = (0.5 / (a * a)) * (s.gradient / grid.size) * dv;
  const bulk = (0.5 / (a * a)) * s.bulk2 * dv;
  const meanVelocity = s.jSum.map((j) => j / (a * s.mass));
  const v2 = s.bulk2 / (a * a * s.mass);
  const vbar2 = meanVelocity.reduce((sum, v) => sum + v * v, 0);
  return { kinetic, bulk, quantum: kinetic - bulk, meanVelocity, velocityDispersion: Math.sqrt(Math.max(0, v2 - vbar2)) };
}

/** Σ k²|ψ_k|² over a spectrum, with the full k². */
export function parsevalGradient(grid: Grid, spectrum: Float64Array): number {
  const [n0, n1, n2] = grid.shape;
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  let sum = 0;
  let p = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++) {
      const kab = k0[a]! * k0[a]! + k1[b]! * k1[b]!;
      for (let c = 0; c < n2; c++, p += 2) sum += (kab + k2[c]! * k2[c]!) * (spectrum[p]! ** 2 + spectrum[p + 1]! ** 2);
    }
  return sum;
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
