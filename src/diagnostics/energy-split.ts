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
import { SimpleTransforms, type FieldTransforms } from "../fields/field-transforms.js";
import { modeShells, Shells, simulatedAxes, spectralDerivative } from "./shells.js";
import { kineticFromSums, parsevalGradient, type KineticSplit } from "./analysis.js";

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

/** Sums of the current j = Im(ψ*∂ψ) along the axes done so far: Σ j²/ρ (over ρ > 0) and Σ j per axis. */
interface FlowSums {
  bulk2: number;
  readonly jSum: number[];
}

/** z ← u + i w of one axis from ψ and its derivative along the axis (in z), then transformed in place; adds the axis's current to `flow`. */
function packComponents(fft: FieldTransforms, psi: Float64Array, z: Float64Array, flow: FlowSums): void {
  const n = psi.length / 2;
  let js = 0;
  let bulk2 = flow.bulk2;
  for (let i = 0, p = 0; i < n; i++, p += 2) {
    const re = psi[p]!;
    const im = psi[p + 1]!;
    const gr = z[p]!;
    const gi = z[p + 1]!;
    const rho = re * re + im * im;
    const j = re * gi - im * gr;
    if (rho > 0) bulk2 += (j * j) / rho;
    js += j;
    if (rho > TINY) {
      const s = Math.sqrt(rho);
      z[p] = (re * gr + im * gi) / s;
      z[p + 1] = j / s;
    } else {
      z[p] = Math.sqrt(gr * gr + gi * gi);
      z[p + 1] = 0;
    }
  }
  flow.bulk2 = bulk2;
  flow.jSum.push(js);
  fft.forward(z);
}

/** Running totals of the split (code energies). */
interface Totals {
  quantum: number;
  /** Σ|W|² energy (incompressible + compressible) until the compressible part is taken out. */
  incompressible: number;
  compressible: number;
  uniformFlow: number;
  zeroMode: number;
}

/** The energy of the Nyquist planes' derivative, Σ over the modes with k_i = π/Δx of k_i²|ψ_k|² (summed per axis), times `perMode`. */
function nyquistEnergy(grid: Grid, spec: Float64Array, perMode: number): number {
  const [n0, n1, n2] = grid.shape;
  let sum = 0;
  for (const ax of simulatedAxes(grid)) {
    const lo = [0, 0, 0];
    const hi = [n0, n1, n2];
    lo[ax] = grid.shape[ax] / 2;
    hi[ax] = lo[ax]! + 1;
    const k = grid.wavenumbers(ax)[lo[ax]!]!;
    for (let a = lo[0]!; a < hi[0]!; a++)
      for (let b = lo[1]!; b < hi[1]!; b++)
        for (let c = lo[2]!; c < hi[2]!; c++) {
          const p = 2 * ((a * n1 + b) * n2 + c);
          sum += k * k * (spec[p]! ** 2 + spec[p + 1]! ** 2) * perMode;
        }
  }
  return sum;
}

/** Where one axis's modes go: the shells' sums by quantity (quantum, flow, compressible, velocity power) and each mode's shell. */
interface ShellSums {
  readonly bins: Int16Array | Int32Array;
  readonly quantum: Float64Array;
  readonly flow: Float64Array;
  readonly compressible: Float64Array;
  readonly velocity: Float64Array;
}

/**
 * One axis's packed transform Z = U + iW into the shells and totals: U and
 * W from Z_k and Z_−k, |U|² (quantum) and |W|² (flow) energies per mode,
 * |W|² for the velocity power, and k_axis W added into `div` (k·W over the axes).
 */
function addAxis(grid: Grid, z: Float64Array, axis: number, div: Float64Array, s: ShellSums, t: Totals, perMode: number, velocityPerMode: number): void {
  const [n0, n1, n2] = grid.shape;
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  const { bins, quantum: sq, flow: sw, velocity: sv } = s;
  let [quantum, incompressible] = [t.quantum, t.incompressible];
  let p = 0;
  for (let a = 0; a < n0; a++) {
    const ma = a === 0 ? 0 : n0 - a;
    for (let b = 0; b < n1; b++) {
      const mirrorRow = (ma * n1 + (b === 0 ? 0 : n1 - b)) * n2;
      const kab = k0[a]! * k0[a]! + k1[b]! * k1[b]!;
      const kRow = axis === 0 ? k0[a]! : k1[b]!;
      for (let c = 0; c < n2; c++, p += 2) {
        const m = 2 * (mirrorRow + (c === 0 ? 0 : n2 - c));
        // U = (Z_k + conj Z_−k)/2, W = (Z_k − conj Z_−k)/(2i)
        const ur = 0.5 * (z[p]! + z[m]!);
        const ui = 0.5 * (z[p + 1]! - z[m + 1]!);
        const wr = 0.5 * (z[p + 1]! + z[m + 1]!);
        const wi = -0.5 * (z[p]! - z[m]!);
        const kj = axis === 2 ? k2[c]! : kRow;
        div[p] = div[p]! + kj * wr;
        div[p + 1] = div[p + 1]! + kj * wi;
        const eq = (ur * ur + ui * ui) * perMode;
        const ww = wr * wr + wi * wi;
        quantum += eq;
        incompressible += ww * perMode;
        if (kab + k2[c]! * k2[c]! === 0) {
          t.uniformFlow += ww * perMode;
          t.zeroMode += eq + ww * perMode;
        }
        const bin = bins[p >> 1]!;
        if (bin < 0) continue;
        sq[bin] = sq[bin]! + eq;
        sw[bin] = sw[bin]! + ww * perMode;
        sv[bin] = sv[bin]! + ww * velocityPerMode;
      }
    }
  }
  [t.quantum, t.incompressible] = [quantum, incompressible];
}

/** The compressible part |k̂·W|² from `div` = k·W: counted in the shells, and moved out of the incompressible part. */
function takeCompressible(grid: Grid, div: Float64Array, s: ShellSums, t: Totals, perMode: number): void {
  const [n0, n1, n2] = grid.shape;
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  const { bins, flow: sw, compressible: sc } = s;
  let [compressible, incompressible] = [t.compressible, t.incompressible];
  let p = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++) {
      const kab = k0[a]! * k0[a]! + k1[b]! * k1[b]!;
      for (let c = 0; c < n2; c++, p += 2) {
        const kk = kab + k2[c]! * k2[c]!;
        if (kk === 0) continue;
        const ec = ((div[p]! * div[p]! + div[p + 1]! * div[p + 1]!) / kk) * perMode;
        compressible += ec;
        incompressible -= ec;
        const bin = bins[p >> 1]!;
        sc[bin] = sc[bin]! + ec;
        sw[bin] = sw[bin]! - ec;
      }
    }
  [t.compressible, t.incompressible] = [compressible, incompressible];
}

/**
 * Quantum, incompressible and compressible kinetic energy and their shell
 * spectra, at scale factor a. Uses work grids 0 and 1 of `fft`.
 */
export function energySplit(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms = new SimpleTransforms(grid.shape)): EnergySplit {
  return energyAndKineticSplit(grid, psi, a, fft).split;
}

/**
 * The energy split and, from the same transforms, the bulk-flow / quantum
 * split of `kineticSplit` (analysis.ts; the same numbers). Work grids 0 and 1 of `fft`.
 */
export function energyAndKineticSplit(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms): { split: EnergySplit; kinetic: KineticSplit } {
  const n = grid.size;
  const axes = simulatedAxes(grid);
  const spec = fft.work(0);
  spec.set(psi);
  fft.forward(spec);
  let mass = 0;
  for (let i = 0; i < n; i++) mass += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  const rhoBar = mass / n;
  const perMode = (0.5 / (a * a)) * (grid.cellVolume / n);
  const unresolved = nyquistEnergy(grid, spec, perMode);
  const gradient = parsevalGradient(grid, spec);
  const flow: FlowSums = { bulk2: 0, jSum: [] };
  const velocityPerMode = grid.volume / (n * n) / (a * a * rhoBar);
  const shells = new Shells(grid, 4);
  shells.countModes(modeShells(grid));
  const sums: ShellSums = { bins: modeShells(grid).bins, quantum: shells.series(0), flow: shells.series(1), compressible: shells.series(2), velocity: shells.series(3) };
  const totals: Totals = { quantum: 0, incompressible: 0, compressible: 0, uniformFlow: 0, zeroMode: 0 };
  const div = fft.work(1);
  div.fill(0);
  axes.forEach((ax, j) => {
    // each axis's derivative in place of the spectrum, transformed again after the first (a grid less memory)
    if (j > 0) {
      spec.set(psi);
      fft.forward(spec);
    }
    spectralDerivative(grid, fft, spec, ax, spec);
    const z = spec;
    packComponents(fft, psi, z, flow);
    addAxis(grid, z, ax, div, sums, totals, perMode, velocityPerMode);
  });
  takeCompressible(grid, div, sums, totals, perMode);
  const { quantum, incompressible, compressible, uniformFlow, zeroMode } = totals;
  const spectra = shells.rows().map((r) => ({ k: r.k, quantum: r.sums[0]!, incompressible: r.sums[1]!, compressible: r.sums[2]!, velocityPower: r.sums[3]! / r.modes, modes: r.modes }));
  return {
    split: { kinetic: quantum + incompressible + compressible + unresolved, quantum, incompressible, compressible, unresolved, uniformFlow, zeroMode, spectra },
    kinetic: kineticFromSums(grid, a, { gradient, bulk2: flow.bulk2, jSum: flow.jSum, mass }),
  };
}
