/**
 * The kinetic energy split of Nore, Abid & Brachet (1997, PRL 78, 3896), in
 * code units (ħ/m = 1). With ψ = √ρ e^{iS},
 *
 *   |∇ψ|² = |∇√ρ|² + ρ|∇S|² = |Re(ψ*∇ψ)|²/ρ + |Im(ψ*∇ψ)|²/ρ,
 *
 * so K = (1/2a²)∫|∇ψ|² dV splits pointwise into the quantum part, from
 * u = Re(ψ*∇ψ)/√ρ = ∇√ρ, and the classical part, from the density-weighted
 * velocity w = Im(ψ*∇ψ)/√ρ = √ρ ∇S = a √ρ v. The classical part is split by
 * Helmholtz into compressible (curl-free, k̂(k̂·w_k)) and incompressible
 * (divergence-free) parts; the mean of w (a uniform flow, free of both
 * divergence and curl) is counted as incompressible. The spectra are those
 * of u and w, not of v, which is singular at the vortices.
 *
 * ∇ψ is the spectral derivative with the Nyquist plane's derivative set to
 * zero (so a real field has no flow); the energy of the Nyquist planes,
 * (1/2a²)∫ over the modes with k_i = π/Δx of k_i²|ψ_k|², is reported apart
 * as the unresolved part, and the four parts sum to the solver's K to
 * round-off. A well-resolved field has almost none. In a cell where ρ = 0
 * exactly, all of |∇ψ|² is counted as quantum.
 */
import type { Grid } from "../grid/grid.js";
import { ComplexFft } from "../fields/fft.js";
import { mirrorIndex, Shells, simulatedAxes, spectralDerivative } from "./shells.js";

/** One shell of the energy spectra (code units). */
export interface EnergyShell {
  readonly k: number;
  /** Energy of each part in the shell; summed over the shells (plus k = 0) they give the parts. */
  readonly quantum: number;
  readonly incompressible: number;
  readonly compressible: number;
  /** Power spectrum of the density-weighted peculiar velocity √(ρ/ρ̄) v: V⟨|u_k|²⟩/N² summed over components. */
  readonly velocityPower: number;
  readonly modes: number;
}

/** The split and its spectra. */
export interface EnergySplit {
  readonly kinetic: number;
  readonly quantum: number;
  readonly incompressible: number;
  readonly compressible: number;
  /** Energy of the Nyquist planes' derivative: K minus the other three parts. */
  readonly unresolved: number;
  /** The part of the incompressible energy in the mean of w (uniform flow), which no shell holds. */
  readonly uniformFlow: number;
  /** Energy of the k = 0 mode of u and w (uniform flow and the mean of ∇√ρ): what the shells leave out. */
  readonly zeroMode: number;
  readonly spectra: EnergyShell[];
}

const TINY = 1e-300;

/** u and w of one axis packed as u + i w, transformed in place in `out`. */
function packedComponents(grid: Grid, fft: ComplexFft, psi: Float64Array, spec: Float64Array, axis: 0 | 1 | 2, out: Float64Array): void {
  spectralDerivative(grid, fft, spec, axis, out);
  for (let i = 0; i < grid.size; i++) {
    const re = psi[2 * i]!;
    const im = psi[2 * i + 1]!;
    const gr = out[2 * i]!;
    const gi = out[2 * i + 1]!;
    const rho = re * re + im * im;
    if (rho > TINY) {
      const s = Math.sqrt(rho);
      out[2 * i] = (re * gr + im * gi) / s;
      out[2 * i + 1] = (re * gi - im * gr) / s;
    } else {
      out[2 * i] = Math.sqrt(gr * gr + gi * gi);
      out[2 * i + 1] = 0;
    }
  }
  fft.forward(out);
}

/** Quantum, incompressible and compressible kinetic energy and their shell spectra, at scale factor a. */
export function energySplit(grid: Grid, psi: Float64Array, a: number): EnergySplit {
  const n = grid.size;
  const fft = new ComplexFft(grid.shape);
  const axes = simulatedAxes(grid);
  const spec = Float64Array.from(psi);
  fft.forward(spec);
  let mass = 0;
  for (let i = 0; i < n; i++) mass += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  const rhoBar = mass / n;
  const energyPerMode = (0.5 / (a * a)) * (grid.cellVolume / n);
  let unresolved = 0;
  grid.forEachMode((p, kx, ky, kz, i0, i1, i2) => {
    const idx = [i0, i1, i2];
    const kv = [kx, ky, kz];
    for (const ax of axes) if (2 * idx[ax]! === grid.shape[ax]) unresolved += kv[ax]! * kv[ax]! * (spec[p]! ** 2 + spec[p + 1]! ** 2) * energyPerMode;
  });
  // the last axis reuses the spectrum's array once its derivative is taken
  const packed = axes.map((ax, j) => {
    const out = j === axes.length - 1 ? spec : new Float64Array(2 * n);
    packedComponents(grid, fft, psi, spec, ax, out);
    return out;
  });
  const velocityPerMode = grid.volume / (n * n) / (a * a * rhoBar);
  const shells = new Shells(grid, 4);
  let quantum = 0;
  let incompressible = 0;
  let compressible = 0;
  let uniformFlow = 0;
  let zeroMode = 0;
  const wr = [0, 0, 0];
  const wi = [0, 0, 0];
  grid.forEachMode((p, kx, ky, kz) => {
    const i = p / 2;
    const m = 2 * mirrorIndex(grid, i);
    const kv = [kx, ky, kz];
    let uu = 0;
    let ww = 0;
    let kwr = 0;
    let kwi = 0;
    for (let j = 0; j < axes.length; j++) {
      const z = packed[j]!;
      const zr = z[p]!;
      const zi = z[p + 1]!;
      const mr = z[m]!;
      const mi = z[m + 1]!;
      // U = (Z_k + conj Z_−k)/2, W = (Z_k − conj Z_−k)/(2i)
      const ur = 0.5 * (zr + mr);
      const ui = 0.5 * (zi - mi);
      wr[j] = 0.5 * (zi + mi);
      wi[j] = -0.5 * (zr - mr);
      uu += ur * ur + ui * ui;
      ww += wr[j]! * wr[j]! + wi[j]! * wi[j]!;
      kwr += kv[axes[j]!]! * wr[j]!;
      kwi += kv[axes[j]!]! * wi[j]!;
    }
    const k2 = kx * kx + ky * ky + kz * kz;
    const cc = k2 > 0 ? (kwr * kwr + kwi * kwi) / k2 : 0;
    const eq = uu * energyPerMode;
    const ec = cc * energyPerMode;
    const ei = (ww - cc) * energyPerMode;
    quantum += eq;
    compressible += ec;
    incompressible += ei;
    if (k2 === 0) {
      uniformFlow += ei;
      zeroMode += eq + ei + ec;
    }
    const b = shells.addMode(Math.sqrt(k2));
    shells.add(b, 0, eq);
    shells.add(b, 1, ei);
    shells.add(b, 2, ec);
    shells.add(b, 3, ww * velocityPerMode);
  });
  const spectra = shells.rows().map((r) => ({ k: r.k, quantum: r.sums[0]!, incompressible: r.sums[1]!, compressible: r.sums[2]!, velocityPower: r.sums[3]! / r.modes, modes: r.modes }));
  return { kinetic: quantum + incompressible + compressible + unresolved, quantum, incompressible, compressible, unresolved, uniformFlow, zeroMode, spectra };
}
