/**
 * Ground state of the self-gravitating field by imaginary-time evolution
 * (t → −iτ) with the mass renormalised after every sub-step: a gradient flow
 * of the energy at fixed mass that relaxes any start to the lowest-energy
 * state, the soliton (e.g. Guzmán & Ureña-López 2004, PRD 69, 124033, for
 * Schrödinger–Poisson). Each iteration freezes the potential of the current
 * field, φ = φ[ψ], and applies the fourth-order factorisation with positive
 * coefficients of Chin (1997, Phys. Lett. A 226, 344; scheme "4A", used for
 * imaginary time by Chin & Krotscheck 2005, PRE 72, 036705):
 *   e^{−Δτ H} ≈ e^{−Δτ φ/6} e^{−Δτ T/2} e^{−2Δτ Ṽ/3} e^{−Δτ T/2} e^{−Δτ φ/6},
 *   Ṽ = φ + (Δτ²/48) |∇φ|²,   T = −∇²/2,
 * then renormalises the mass. A fixed point is an eigenvector of
 * H[ψ] = T + φ[ψ] up to O(Δτ⁴), i.e. the self-consistent ground state.
 * Further stages (Δτ/2 each) are optional and measure the remaining bias.
 */
import type { Grid } from "../grid/grid.js";
import type { PoissonSolver } from "../fields/poisson.js";
import { ComplexFft } from "../fields/fft.js";
import { kineticEnergy, potentialEnergy } from "../diagnostics/energies.js";

/** Settings of the relaxation. */
export interface RelaxOptions {
  /** Relative energy change per iteration below which a stage has converged. @default 1e-11 */
  readonly energyTolerance?: number;
  /** Number of Δτ stages (each Δτ/2 of the previous). @default 1 */
  readonly stages?: number;
  /** Δτ of the first stage in units of 1/|μ| of the initial field. @default 0.5 */
  readonly stepScale?: number;
  /** Iteration cap over all stages. @default 20000 */
  readonly maxIterations?: number;
  /** Called every few iterations with the stage, iteration and energy. */
  readonly onProgress?: (info: { stage: number; iteration: number; energy: number }) => void;
}

/** Result of a relaxation, in code units. */
export interface GroundState {
  /** ψ (interleaved complex; real and non-negative up to round-off). */
  readonly psi: Float64Array;
  /** Potential φ of ψ (∇²φ = ρ, or ρ − ρ̄ when periodic). */
  readonly phi: Float64Array;
  readonly mass: number;
  /** Kinetic energy K. */
  readonly kinetic: number;
  /** Potential energy W. */
  readonly potential: number;
  /** Eigenvalue per unit mass μ = (K + 2W)/M (in code units ħ/m = 1 this is ε/m). */
  readonly eigenvalue: number;
  readonly iterations: number;
  readonly converged: boolean;
}

/**
 * Relax `initial` (copied; its mass is kept) to the ground state on `grid`
 * with static (a = 1) gravity from `gravity`.
 */
export function relaxGroundState(
  grid: Grid,
  gravity: PoissonSolver,
  initial: Float64Array,
  options: RelaxOptions = {},
): GroundState {
  const tol = options.energyTolerance ?? 1e-11;
  const stages = options.stages ?? 1;
  const maxIterations = options.maxIterations ?? 20000;
  const fft = new ComplexFft(grid.shape);
  const psi = Float64Array.from(initial);
  const phi = new Float64Array(grid.size);
  const scratch = new Float64Array(psi.length);
  const vTilde = new Float64Array(grid.size);
  const mass = massOf(grid, psi);
  if (!(mass > 0)) throw new RangeError("the initial field of a relaxation has no mass");

  const updatePotential = (): void => {
    for (let i = 0; i < phi.length; i++) phi[i] = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
    gravity.solveInPlace(phi);
  };
  const energies = (): { kinetic: number; potential: number } => ({
    kinetic: kineticEnergy(grid, psi, 1, fft, scratch),
    potential: potentialEnergy(grid, psi, phi, 1),
  });
  updatePotential();
  let { kinetic, potential } = energies();
  const mu0 = Math.abs((kinetic + 2 * potential) / mass);
  let dtau = (options.stepScale ?? 0.5) / Math.max(mu0, 1e-300);

  const kineticDamping = buildDampingTables(grid);
  let iterations = 0;
  let converged = false;
  const checkEvery = 10;
  for (let stage = 0; stage < stages && iterations < maxIterations; stage++) {
    let last = kinetic + potential;
    converged = false;
    while (iterations < maxIterations) {
      for (let j = 0; j < checkEvery; j++) {
        updatePotential();
        gradientSquared(grid, phi, vTilde);
        const c = (dtau * dtau) / 48;
        for (let i = 0; i < phi.length; i++) vTilde[i] = phi[i]! + c * vTilde[i]!;
        potentialDamping(psi, phi, dtau / 6);
        fft.forward(psi);
        applyKineticDamping(grid, psi, kineticDamping, dtau / 2);
        fft.inverse(psi);
        potentialDamping(psi, vTilde, (2 * dtau) / 3);
        fft.forward(psi);
        applyKineticDamping(grid, psi, kineticDamping, dtau / 2);
        fft.inverse(psi);
        potentialDamping(psi, phi, dtau / 6);
        renormalise(grid, psi, mass);
        iterations++;
      }
      updatePotential();
      ({ kinetic, potential } = energies());
      const energy = kinetic + potential;
      options.onProgress?.({ stage, iteration: iterations, energy });
      if (Math.abs(energy - last) <= tol * checkEvery * Math.abs(energy)) {
        converged = true;
        break;
      }
      last = energy;
    }
    dtau /= 2;
  }
  return {
    psi,
    phi,
    mass,
    kinetic,
    potential,
    eigenvalue: (kinetic + 2 * potential) / mass,
    iterations,
    converged,
  };
}

function massOf(grid: Grid, psi: Float64Array): number {
  let s = 0;
  for (let i = 0; i < psi.length; i++) s += psi[i]! * psi[i]!;
  return s * grid.cellVolume;
}

function renormalise(grid: Grid, psi: Float64Array, mass: number): void {
  const f = Math.sqrt(mass / massOf(grid, psi));
  for (let i = 0; i < psi.length; i++) psi[i] = psi[i]! * f;
}

function potentialDamping(psi: Float64Array, phi: Float64Array, dtau: number): void {
  // Subtract the minimum so the factors stay ≤ 1 (a constant only rescales ψ).
  let min = Infinity;
  for (let i = 0; i < phi.length; i++) min = Math.min(min, phi[i]!);
  for (let i = 0; i < phi.length; i++) {
    const f = Math.exp(-(phi[i]! - min) * dtau);
    psi[2 * i] = psi[2 * i]! * f;
    psi[2 * i + 1] = psi[2 * i + 1]! * f;
  }
}

function buildDampingTables(grid: Grid): Float64Array[] {
  return [0, 1, 2].map((ax) => {
    const k = grid.wavenumbers(ax as 0 | 1 | 2);
    return Float64Array.from(k, (v) => 0.5 * v * v);
  });
}

function applyKineticDamping(grid: Grid, psiK: Float64Array, halfK2: Float64Array[], dtau: number): void {
  const [n0, n1, n2] = grid.shape;
  const [t0, t1, t2] = halfK2 as [Float64Array, Float64Array, Float64Array];
  const e2 = Float64Array.from(t2, (v) => Math.exp(-v * dtau));
  let p = 0;
  for (let a = 0; a < n0; a++) {
    for (let b = 0; b < n1; b++) {
      const f = Math.exp(-(t0[a]! + t1[b]!) * dtau);
      for (let c = 0; c < n2; c++, p += 2) {
        const g = f * e2[c]!;
        psiK[p] = psiK[p]! * g;
        psiK[p + 1] = psiK[p + 1]! * g;
      }
    }
  }
}

/**
 * |∇f|² by fourth-order central differences with periodic wrap (local, so a
 * non-periodic isolated potential rings nowhere; only cells at the faces,
 * where the field vanishes, see the wrap).
 */
function gradientSquared(grid: Grid, f: Float64Array, out: Float64Array): void {
  out.fill(0);
  const [n0, n1, n2] = grid.shape;
  const strides = [n1 * n2, n2, 1];
  for (let ax = 0; ax < 3; ax++) {
    const n = grid.shape[ax]!;
    if (n === 1) continue;
    const s = strides[ax]!;
    const h = grid.spacing[ax]!;
    let p = 0;
    for (let a = 0; a < n0; a++)
      for (let b = 0; b < n1; b++)
        for (let c = 0; c < n2; c++, p++) {
          const i = ax === 0 ? a : ax === 1 ? b : c;
          const at = (d: number): number => f[p + (((i + d + n) % n) - i) * s]!;
          const g = (8 * (at(1) - at(-1)) - (at(2) - at(-2))) / (12 * h);
          out[p] = out[p]! + g * g;
        }
  }
}
