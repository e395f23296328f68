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
 *
 * With a contact interaction g (the Gross–Pitaevskii term) the frozen
 * potential is V = φ + g|ψ|², in the factorisation and in Ṽ, and the energy
 * gains U = (g/2)∫|ψ|⁴. An attractive interaction has no ground state above
 * a largest mass: the flow then shrinks the field until its interaction
 * length 1/√(2|g|ρ_max) is below a cell's Δx/π, where the relaxation stops
 * with a RelaxationCollapse instead of iterating to its cap.
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
  /** The contact coefficient g (code units, static a = 1): V = φ + g|ψ|². @default 0 */
  readonly contact?: number;
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
  /** Contact energy U = (g/2)∫|ψ|⁴ dV (0 without a contact term). */
  readonly contact: number;
  /** Eigenvalue per unit mass μ = (K + 2W + 2U)/M (in code units ħ/m = 1 this is ε/m). */
  readonly eigenvalue: number;
  readonly iterations: number;
  readonly converged: boolean;
}

/** A relaxation of an attractive field that collapsed to the grid's scale: no ground state of this mass on this grid. */
export class RelaxationCollapse extends RangeError {
  /** The relaxed mass [code]. */
  readonly mass: number;
  constructor(mass: number, iterations: number) {
    super(`the relaxation collapsed to the grid's scale after ${iterations} iterations (an attractive contact term with no ground state of this mass on this grid)`);
    this.name = "RelaxationCollapse";
    this.mass = mass;
  }
}

/** (π/Δx)²/2 on the finest simulated axis: an attractive |g|ρ_max above it has collapsed below a cell. */
function collapseLevel(grid: Grid): number {
  let h = Infinity;
  for (let ax = 0; ax < 3; ax++) if (grid.shape[ax]! > 1) h = Math.min(h, grid.spacing[ax]!);
  return 0.5 * (Math.PI / h) ** 2;
}

/**
 * Relax `initial` (copied; its mass is kept) to the ground state on `grid`
 * with static (a = 1) gravity from `gravity`, and the contact term of `options.contact`.
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
  const field = new RelaxingField(grid, gravity, initial, options.contact ?? 0);
  let e = field.energies();
  const eigenvalue = (): number => (e.kinetic + 2 * e.potential + 2 * e.contact) / field.mass;
  let dtau = (options.stepScale ?? 0.5) / Math.max(Math.abs(eigenvalue()), 1e-300);
  let iterations = 0;
  let converged = false;
  const checkEvery = 10;
  for (let stage = 0; stage < stages && iterations < maxIterations; stage++) {
    let last = e.kinetic + e.potential + e.contact;
    converged = false;
    while (iterations < maxIterations) {
      for (let j = 0; j < checkEvery; j++) field.iterate(dtau);
      iterations += checkEvery;
      e = field.energies();
      if (field.collapsed()) throw new RelaxationCollapse(field.mass, iterations);
      const energy = e.kinetic + e.potential + e.contact;
      options.onProgress?.({ stage, iteration: iterations, energy });
      if (Math.abs(energy - last) <= tol * checkEvery * Math.abs(energy)) {
        converged = true;
        break;
      }
      last = energy;
    }
    dtau /= 2;
  }
  return { psi: field.psi, phi: field.phi, mass: field.mass, ...e, eigenvalue: eigenvalue(), iterations, converged };
}

/** The field being relaxed, its frozen potential V = φ + g|ψ|² and the scratch of an iteration. */
class RelaxingField {
  readonly psi: Float64Array;
  readonly phi: Float64Array;
  readonly mass: number;
  /** V = φ + g|ψ|² (φ itself without a contact term). */
  private readonly v: Float64Array;
  private readonly vTilde: Float64Array;
  private readonly scratch: Float64Array;
  private readonly fft: ComplexFft;
  private readonly damping: Float64Array[];

  constructor(
    private readonly grid: Grid,
    private readonly gravity: PoissonSolver,
    initial: Float64Array,
    private readonly contact: number,
  ) {
    this.fft = new ComplexFft(grid.shape);
    this.psi = Float64Array.from(initial);
    this.phi = new Float64Array(grid.size);
    this.v = contact !== 0 ? new Float64Array(grid.size) : this.phi;
    this.scratch = new Float64Array(this.psi.length);
    this.vTilde = new Float64Array(grid.size);
    this.damping = buildDampingTables(grid);
    this.mass = massOf(grid, this.psi);
    if (!(this.mass > 0)) throw new RangeError("the initial field of a relaxation has no mass");
  }

  /** φ of the current field and V = φ + g|ψ|². */
  private updatePotential(): void {
    const { psi, phi, v, contact } = this;
    for (let i = 0; i < phi.length; i++) phi[i] = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
    this.gravity.solveInPlace(phi);
    if (contact !== 0) for (let i = 0; i < phi.length; i++) v[i] = phi[i]! + contact * (psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2);
  }

  /** K, W and U of the current field (φ recomputed). */
  energies(): { kinetic: number; potential: number; contact: number } {
    this.updatePotential();
    const { grid, psi } = this;
    let rho2 = 0;
    if (this.contact !== 0) for (let i = 0; i < psi.length; i += 2) rho2 += (psi[i]! ** 2 + psi[i + 1]! ** 2) ** 2;
    return {
      kinetic: kineticEnergy(grid, psi, 1, this.fft, this.scratch),
      potential: potentialEnergy(grid, psi, this.phi, 1),
      contact: 0.5 * this.contact * rho2 * grid.cellVolume,
    };
  }

  /** One iteration of Chin's 4A factorisation on the frozen V, then the mass renormalised. */
  iterate(dtau: number): void {
    const { grid, psi, v, vTilde, fft, damping } = this;
    this.updatePotential();
    gradientSquared(grid, v, vTilde);
    const c = (dtau * dtau) / 48;
    for (let i = 0; i < v.length; i++) vTilde[i] = v[i]! + c * vTilde[i]!;
    potentialDamping(psi, v, dtau / 6);
    fft.forward(psi);
    applyKineticDamping(grid, psi, damping, dtau / 2);
    fft.inverse(psi);
    potentialDamping(psi, vTilde, (2 * dtau) / 3);
    fft.forward(psi);
    applyKineticDamping(grid, psi, damping, dtau / 2);
    fft.inverse(psi);
    potentialDamping(psi, v, dtau / 6);
    renormalise(grid, psi, this.mass);
  }

  /** An attractive field whose interaction length fell below a cell: |g| ρ_max > (π/Δx)²/2. */
  collapsed(): boolean {
    if (!(this.contact < 0)) return false;
    let max = 0;
    for (let i = 0; i < this.psi.length; i += 2) max = Math.max(max, this.psi[i]! ** 2 + this.psi[i + 1]! ** 2);
    return -this.contact * max > collapseLevel(this.grid);
  }
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
