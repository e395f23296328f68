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
import { derivativeWavenumbers, modeShells, Shells, simulatedAxes } from "./shells.js";
import { kineticFromSums, type KineticSplit } from "./analysis.js";
import { halfSpaceLength, nyquistRows, SHELL_TOTALS, shellSumsLength, type ShellData } from "./split-passes.js";
import { addBlockSums, rowBlocks, sharedFloats } from "./row-blocks.js";
import { runnerOf, type BlockRunner } from "./block-tasks.js";
import { spectrumMoments, type SpectrumMoments } from "./spectrum-moments.js";
import { blockTablesOf, type BlockTables } from "./block-tables.js";

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

/** The energy of the Nyquist planes' derivative, Σ over the modes with k_i = π/Δx of k_i²|ψ_k|² (summed per axis), times `perMode` (in WebAssembly with `tables`). */
function nyquistEnergy(grid: Grid, spec: Float64Array, perMode: number, tables: BlockTables | undefined): number {
  const [n0, n1, n2] = grid.shape;
  let sum = 0;
  for (const ax of simulatedAxes(grid)) {
    const lo = [0, 0, 0];
    const hi = [n0, n1, n2];
    lo[ax] = grid.shape[ax] / 2;
    hi[ax] = lo[ax]! + 1;
    const k = grid.wavenumbers(ax)[lo[ax]!]!;
    if (tables) {
      sum = tables.kernels.nyquistPlane(spec, grid.shape, ax, k, perMode, sum);
      continue;
    }
    for (let a = lo[0]!; a < hi[0]!; a++)
      for (let b = lo[1]!; b < hi[1]!; b++)
        for (let c = lo[2]!; c < hi[2]!; c++) {
          const p = 2 * ((a * n1 + b) * n2 + c);
          sum += k * k * (spec[p]! ** 2 + spec[p + 1]! ** 2) * perMode;
        }
  }
  return sum;
}

/**
 * Quantum, incompressible and compressible kinetic energy and their shell
 * spectra, at scale factor a. Uses work grid 0 of `fft` and the first half of work grid 1.
 */
export function energySplit(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms = new SimpleTransforms(grid.shape)): EnergySplit {
  return energyAndKineticSplit(grid, psi, a, fft).split;
}

/** Σ|ψ|² over the cells. */
function massOf(psi: Float64Array): number {
  let mass = 0;
  for (let p = 0; p < psi.length; p += 2) mass += psi[p]! ** 2 + psi[p + 1]! ** 2;
  return mass;
}

/**
 * The shell passes' data of `grid` at factors per mode (perMode for the energies, velocityPerMode for the velocity
 * power); k·W into `div`. With `tables` (block-tables.ts) everything is in their memory, else on the JavaScript heap.
 */
function shellData(grid: Grid, count: number, div: Float64Array, perMode: number, velocityPerMode: number, tables: BlockTables | undefined): ShellData {
  const [n0, n1, n2] = grid.shape;
  if (tables) {
    const [k0, k1, k2] = tables.k;
    return { shape: [n0, n1, n2], k0, k1, k2, bins: tables.bins, binRow: Math.floor(n2 / 2) + 1, count, perMode, velocityPerMode, div, nyquist: tables.nyquist };
  }
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  return { shape: [n0, n1, n2], k0, k1, k2, bins: modeShells(grid).bins, binRow: n2, count, perMode, velocityPerMode, div, nyquist: sharedFloats(nyquistRows(grid.shape) * (n2 + 2)) };
}

/**
 * The derivative of ψ along each axis packed into u + i w and transformed, each into the shells: the sums of
 * the shell passes (split-passes.ts: totals, then four series per shell), Σ j²/ρ, and Σ j per axis.
 */
function shellSums(grid: Grid, psi: Float64Array, spec: Float64Array, data: ShellData, fft: FieldTransforms, run: BlockRunner, tables: BlockTables | undefined): { total: Float64Array; bulk2: number; jSum: number[] } {
  const at = rowBlocks(grid.shape);
  const length = shellSumsLength(data.count);
  const wasm = tables !== undefined;
  // the shells' sums and the packing's in one array (the packing's after the shells')
  const sums = wasm ? tables.sums.subarray(0, at.blocks * (length + 2)).fill(0) : sharedFloats(at.blocks * (length + 2));
  const [shellSums, packSums] = [sums.subarray(0, at.blocks * length), sums.subarray(at.blocks * length)];
  const [total, flow] = [new Float64Array(length), new Float64Array(2)];
  const jSum: number[] = [];
  const kz = wasm ? tables.d[2] : derivativeWavenumbers(grid, 2);
  simulatedAxes(grid).forEach((axis, j) => {
    // each axis's derivative from ψ by the transforms along that axis alone, in place of the spectrum
    run(at.blocks, { kind: "copy", at, from: psi, to: spec });
    fft.alongAxis(spec, axis, false);
    run(at.blocks, { kind: "ik", at, z: spec, n1: grid.shape[1], axis, k: wasm ? tables.d[axis] : derivativeWavenumbers(grid, axis), kz, wasm });
    fft.alongAxis(spec, axis, true);
    flow[1] = 0;
    run(at.blocks, { kind: "pack", at, psi, z: spec, sums: packSums, wasm });
    addBlockSums(packSums, at.blocks, 2, flow);
    jSum.push(flow[1]!);
    fft.forward(spec);
    run(at.blocks, { kind: "shells", at, data, z: spec, axis, first: j === 0, sums: shellSums, wasm });
    addBlockSums(shellSums, at.blocks, length, total);
  });
  run(at.blocks, { kind: "compressible", at, data, sums: shellSums, wasm });
  addBlockSums(shellSums, at.blocks, length, total);
  return { total, bulk2: flow[0]!, jSum };
}

/**
 * The energy split and, from the same transforms, the bulk-flow / quantum
 * split of `kineticSplit` (analysis.ts; the same numbers) and the moments of
 * ψ's spectrum (spectrum-moments.ts), and ρ̄ (analysis.ts meanDensity, the
 * same number). Work grid 0 of `fft` and the first half of work grid 1
 * (halfSpaceLength numbers). The passes
 * over the grid run on the transforms' threads where they have them
 * (block-tasks.ts), with the same result bit for bit on any number of threads.
 */
export function energyAndKineticSplit(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms): { split: EnergySplit; kinetic: KineticSplit; moments: SpectrumMoments; meanDensity: number } {
  const n = grid.size;
  const run = runnerOf(fft, psi);
  const spec = fft.work(0);
  run(rowBlocks(grid.shape).blocks, { kind: "copy", at: rowBlocks(grid.shape), from: psi, to: spec });
  fft.forward(spec);
  const tables = blockTablesOf(fft, grid, psi, spec);
  const mass = tables ? tables.kernels.massCells(psi, 0, n) : massOf(psi);
  const perMode = (0.5 / (a * a)) * (grid.cellVolume / n);
  const unresolved = nyquistEnergy(grid, spec, perMode, tables);
  const moments = spectrumMoments(grid, spec, tables);
  const shells = new Shells(grid, 4);
  shells.countModes(tables ?? modeShells(grid));
  const velocityPerMode = grid.volume / (n * n) / (a * a * (mass / n));
  // k·W in the first half of work grid 1 (its other half is never touched)
  const div = fft.work(1).subarray(0, halfSpaceLength(grid.shape));
  const { total: t, bulk2, jSum } = shellSums(grid, psi, spec, shellData(grid, shells.count, div, perMode, velocityPerMode, tables), fft, run, tables);
  for (let i = 0; i < 4; i++) shells.series(i).set(t.subarray(SHELL_TOTALS + i * shells.count, SHELL_TOTALS + (i + 1) * shells.count));
  const [quantum, incompressible, compressible, uniformFlow, zeroMode] = [t[0]!, t[1]!, t[2]!, t[3]!, t[4]!];
  const spectra = shells.rows().map((r) => ({ k: r.k, quantum: r.sums[0]!, incompressible: r.sums[1]!, compressible: r.sums[2]!, velocityPower: r.sums[3]! / r.modes, modes: r.modes }));
  return {
    split: { kinetic: quantum + incompressible + compressible + unresolved, quantum, incompressible, compressible, unresolved, uniformFlow, zeroMode, spectra },
    kinetic: kineticFromSums(grid, a, { gradient: moments.k2, bulk2, jSum, mass }),
    moments,
    // Σ|ψ|² over the cells in storage order, divided as meanDensity divides it: the same number
    meanDensity: mass / n,
  };
}
