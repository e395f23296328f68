/**
 * Conserved and monitored quantities of a field, in code units:
 *   M = ∫ |ψ|² dV
 *   K = (1/(2a²)) ∫ |∇ψ|² dV          (bulk-flow plus quantum-gradient kinetic energy)
 *   W = (1/(2a)) ∫ (ρ − ρ̄) φ dV       (periodic; W = ½ ∫ ρ φ dV for isolated gravity)
 *   U = (g/(2a³)) ∫ ρ² dV              (a contact interaction of coefficient g)
 * K, W and U are the comoving energies of the Layzer–Irvine equation
 * d(K + W + U)/dt + H (2K + W + 3U) = 0 (Layzer 1963, ApJ 138, 174; Irvine
 * 1961; U's term follows from U ∝ a⁻³ at a fixed comoving field, as K ∝ a⁻²
 * and W ∝ a⁻¹ give theirs: see the README).
 * K is evaluated spectrally (Parseval): ∫|∇ψ|² dV = ΔV/N Σ_k k² |ψ_k|².
 */
import type { BlockTables } from "./block-tables.js";
import type { Grid } from "../grid/grid.js";
import type { FieldTransforms } from "../fields/field-transforms.js";

/** M = Σ |ψ|² ΔV. */
export function fieldMass(grid: Grid, psi: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < psi.length; i += 2) {
    const re = psi[i] as number;
    const im = psi[i + 1] as number;
    sum += re * re + im * im;
  }
  return sum * grid.cellVolume;
}

/** Largest |ψ|². */
export function maxDensity(psi: Float64Array): number {
  let max = 0;
  for (let i = 0; i < psi.length; i += 2) {
    const re = psi[i] as number;
    const im = psi[i + 1] as number;
    const rho = re * re + im * im;
    if (rho > max) max = rho;
  }
  return max;
}

/**
 * K = (1/(2a²)) ∫ |∇ψ|² dV. `scratch` (length 2N) receives a copy of ψ and is
 * transformed in place; ψ itself is not changed.
 */
export function kineticEnergy(grid: Grid, psi: Float64Array, a: number, fft: Pick<FieldTransforms, "forward">, scratch: Float64Array): number {
  scratch.set(psi);
  fft.forward(scratch);
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  const [n0, n1, n2] = grid.shape;
  let sum = 0;
  let p = 0;
  for (let i = 0; i < n0; i++) {
    const ka = (k0[i] as number) ** 2;
    for (let j = 0; j < n1; j++) {
      const kab = ka + (k1[j] as number) ** 2;
      for (let l = 0; l < n2; l++, p += 2) {
        const kk = kab + (k2[l] as number) ** 2;
        const re = scratch[p] as number;
        const im = scratch[p + 1] as number;
        sum += kk * (re * re + im * im);
      }
    }
  }
  return kineticFromGradient(grid, sum, a);
}

/** K = (1/(2a²)) ΔV/N Σ_k k²|ψ_k|² from the sum Σ_k k²|ψ_k|² (spectrum-moments.ts gives it). */
export function kineticFromGradient(grid: Grid, sum: number, a: number): number {
  return (0.5 / (a * a)) * (sum * grid.cellVolume) / grid.size;
}

/** W = (1/(2a)) Σ |ψ|² φ ΔV, with φ the stepper's potential (zero mean when periodic). */
export function potentialEnergy(grid: Grid, psi: Float64Array, phi: Float64Array, a: number): number {
  let sum = 0;
  for (let i = 0; i < phi.length; i++) {
    const re = psi[2 * i] as number;
    const im = psi[2 * i + 1] as number;
    sum += (re * re + im * im) * (phi[i] as number);
  }
  return (0.5 / a) * sum * grid.cellVolume;
}

/**
 * W of periodic gravity from the spectrum of ρ (work grid 0 of `fft`): by
 * Parseval Σ ρφ = −(1/N) Σ_{k≠0} |ρ_k|²/k², φ being the periodic solver's
 * (spectral kernel, zero mean), so W = (1/(2a)) ΔV Σ ρφ.
 */
export function periodicPotentialEnergy(grid: Grid, psi: Float64Array, a: number, fft: FieldTransforms): number {
  const data = fft.work(0);
  for (let i = 0; i < grid.size; i++) {
    data[2 * i] = psi[2 * i]! * psi[2 * i]! + psi[2 * i + 1]! * psi[2 * i + 1]!;
    data[2 * i + 1] = 0;
  }
  fft.forward(data);
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  const [n0, n1, n2] = grid.shape;
  let sum = 0;
  let p = 0;
  for (let i = 0; i < n0; i++)
    for (let j = 0; j < n1; j++) {
      const kab = k0[i]! * k0[i]! + k1[j]! * k1[j]!;
      for (let l = 0; l < n2; l++, p += 2) {
        const kk = kab + k2[l]! * k2[l]!;
        if (kk > 0) sum -= (data[p]! * data[p]! + data[p + 1]! * data[p + 1]!) / kk;
      }
    }
  return (0.5 / a) * (sum / grid.size) * grid.cellVolume;
}

/**
 * The same W from the spectrum of the density contrast δ = ρ/ρ̄ − 1 (as the
 * power spectrum leaves it, densityPowerSpectrum): ρ_k = ρ̄ δ_k for k ≠ 0,
 * so W = −(ρ̄²/(2a)) (ΔV/N) Σ_{k≠0} |δ_k|²/k² (equal to the above to round-off). The sum in WebAssembly with
 * `tables` (block-tables.ts) of the spectrum's memory (the same number).
 */
export function periodicPotentialFromContrast(grid: Grid, deltaSpectrum: Float64Array, meanDensity: number, a: number, tables?: BlockTables): number {
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  const [n0, n1] = grid.shape;
  const acc = new Float64Array(1);
  if (tables?.sums.buffer === deltaSpectrum.buffer) acc[0] = tables.kernels.inverseK2Rows(deltaSpectrum, tables.k, grid.shape, 0, n0 * n1);
  else for (let i = 0, p = 0; i < n0; i++) for (let j = 0; j < n1; j++, p += 2 * k2.length) inverseK2Row(deltaSpectrum, p, k0[i]! * k0[i]! + k1[j]! * k1[j]!, k2, acc);
  return (-0.5 / a) * meanDensity * meanDensity * (acc[0]! / grid.size) * grid.cellVolume;
}

/** One row of Σ_{k≠0} |s_k|²/k²: modes [p, p + 2 n2) at k_a² + k_b² = kab, added into acc[0]. */
function inverseK2Row(spec: Float64Array, p: number, kab: number, k2: Float64Array, acc: Float64Array): void {
  let sum = acc[0]!;
  for (let l = 0; l < k2.length; l++, p += 2) {
    const kk = kab + k2[l]! * k2[l]!;
    if (kk > 0) sum += (spec[p]! * spec[p]! + spec[p + 1]! * spec[p + 1]!) / kk;
  }
  acc[0] = sum;
}

/** U = (g/(2a³)) Σ ρ² ΔV from the sum Σρ² = Σ|ψ|⁴ (no ΔV): the contact energy, ρ/a³ being the physical density. */
export function contactEnergy(grid: Grid, contact: number, rho2Sum: number, a: number): number {
  return contact === 0 ? 0 : (0.5 * contact * rho2Sum * grid.cellVolume) / (a * a * a);
}
