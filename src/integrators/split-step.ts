/**
 * Kick–drift–kick Strang splitting for the comoving Schrödinger–Poisson
 * system in code units (ħ/m = 1, 4πG = 1):
 *   i ∂ψ/∂t = −∇²ψ / (2a²) + (φ/a) ψ,   ∇²φ = |ψ|² − ρ̄   (periodic)
 *   ∇²φ = |ψ|²                                            (isolated, a = 1)
 * One step from t to t + Δt:
 *   ψ ← e^{−iφK₁} ψ,  K₁ = ∫_t^{t+Δt/2} dt/a
 *   ψ ← F⁻¹ e^{−ik²D/2} F ψ,  D = ∫_t^{t+Δt} dt/a²
 *   φ ← Poisson(|ψ|²)
 *   ψ ← e^{−iφK₂} ψ,  K₂ = ∫_{t+Δt/2}^{t+Δt} dt/a
 * The factors come from the background, not from a frozen at the step's
 * start. The scheme is unitary, time-reversible and second order in Δt
 * (Strang 1968, SIAM J. Numer. Anal. 5, 506). The potential after a step is
 * kept for the first kick of the next, so a step costs one complex FFT pair
 * and one Poisson solve, and allocates nothing.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import type { PoissonSolver } from "../fields/poisson.js";
import { ComplexFft } from "../fields/fft.js";
import { densityRows, driftRows, gradientNormRows, kickRows } from "../fields/step-kernels.js";

/** The evolving field and the machinery to advance it. */
export class SplitStepper {
  readonly grid: Grid;
  readonly background: Background;
  readonly gravity: PoissonSolver;
  /** ψ, interleaved complex, √(mass density) in code units. */
  readonly psi: Float64Array;
  /** φ of the current ψ (∇²φ = ρ − ρ̄ or ρ); the potential is Φ = φ/a. */
  readonly phi: Float64Array;
  /** Cosmic (or ordinary) time in code units. */
  time = 0;
  /** Mass Σ|ψ|² ΔV of the current field. */
  mass = 0;
  readonly fft: ComplexFft;
  /** When set, each drift also measures ½∫|∇ψ|² dV (the a-free kinetic energy Ka²) at the step's middle. */
  trackKinetic = false;
  /** ½∫|∇ψ|² dV measured during the last drift (NaN unless trackKinetic). */
  midKineticTilde = Number.NaN;
  /** The last step's factors D = ∫dt/a² and K = K₁ + K₂ = ∫dt/a. */
  lastDrift = 0;
  lastKick = 0;
  protected readonly phase: readonly [Float64Array, Float64Array, Float64Array];

  /**
   * @param shared allocate ψ, φ and the phase tables in shared memory (for worker threads)
   */
  constructor(grid: Grid, background: Background, gravity: PoissonSolver, shared = false) {
    this.grid = grid;
    this.background = background;
    this.gravity = gravity;
    const alloc = (n: number) => (shared ? new Float64Array(new SharedArrayBuffer(8 * n)) : new Float64Array(n));
    this.psi = alloc(2 * grid.size);
    this.phi = alloc(grid.size);
    this.fft = new ComplexFft(grid.shape);
    const [n0, n1, n2] = grid.shape;
    const tables = alloc(2 * (n0 + n1 + n2));
    this.phase = [tables.subarray(0, 2 * n0), tables.subarray(2 * n0, 2 * (n0 + n1)), tables.subarray(2 * (n0 + n1))];
  }

  /** Release resources (worker threads in subclasses). */
  close(): void {}

  /** Load a field (copied) at time t and compute its potential. */
  setState(psi: Float64Array, time: number): void {
    if (psi.length !== this.psi.length) {
      throw new RangeError(`field has ${psi.length / 2} cells, grid has ${this.grid.size}`);
    }
    this.psi.set(psi);
    this.time = time;
    this.updatePotential();
  }

  /**
   * Restore a saved state exactly (ψ, φ and mass as they were), without
   * recomputing φ, so that a resumed run continues bit for bit.
   */
  restoreState(psi: Float64Array, phi: Float64Array, time: number, mass: number): void {
    if (psi.length !== this.psi.length || phi.length !== this.phi.length) {
      throw new RangeError(`saved state has ${phi.length} cells, grid has ${this.grid.size}`);
    }
    this.psi.set(psi);
    this.phi.set(phi);
    this.time = time;
    this.mass = mass;
  }

  /** Recompute φ and the mass from ψ. */
  updatePotential(): void {
    const [n0, n1, n2] = this.grid.shape;
    this.mass = densityRows(this.psi, this.phi, n2, 0, n0 * n1) * this.grid.cellVolume;
    this.gravity.solveInPlace(this.phi);
  }

  /** ψ ← e^{−iφK} ψ. */
  kick(factor: number): void {
    if (factor === 0 || this.gravity.kind === "none") return;
    const [n0, n1, n2] = this.grid.shape;
    kickRows(this.psi, this.phi, factor, n2, 0, n0 * n1);
  }

  /** ψ ← F⁻¹ e^{−ik²D/2} F ψ, with the phase factored per axis (no sin/cos per cell). */
  drift(factor: number): void {
    const psi = this.psi;
    this.fft.forward(psi);
    this.fillPhaseTables(factor);
    const [n0, n1] = this.grid.shape;
    if (this.trackKinetic) this.midKineticTilde = this.spectralGradientNorm();
    driftRows(psi, this.grid.shape, this.phase[0], this.phase[1], this.phase[2], 0, n0 * n1);
    this.fft.inverse(psi);
  }

  /** cos and sin of −k²D/2 per axis (the drift's phase factors). */
  protected fillPhaseTables(factor: number): void {
    for (let ax = 0; ax < 3; ax++) {
      const k = this.grid.wavenumbers(ax as 0 | 1 | 2);
      const table = this.phase[ax] as Float64Array;
      for (let j = 0; j < k.length; j++) {
        const angle = -0.5 * (k[j] as number) * (k[j] as number) * factor;
        table[2 * j] = Math.cos(angle);
        table[2 * j + 1] = Math.sin(angle);
      }
    }
  }

  /** ½ Σ_k k²|ψ_k|² ΔV/N of the transformed field in `psi` (Parseval: ½∫|∇ψ|² dV). */
  protected spectralGradientNorm(): number {
    const [n0, n1] = this.grid.shape;
    const sum = gradientNormRows(this.psi, this.grid.shape, this.grid.wavenumbers(0), this.grid.wavenumbers(1), this.grid.wavenumbers(2), 0, n0 * n1);
    return (sum * this.grid.cellVolume) / this.grid.size;
  }

  /** Advance by Δt (code time) with one kick–drift–kick step. */
  step(dt: number): void {
    const bg = this.background;
    const t0 = this.time;
    const tHalf = t0 + 0.5 * dt;
    const t1 = t0 + dt;
    const k1 = bg.kickFactor(t0, tHalf);
    const k2 = bg.kickFactor(tHalf, t1);
    this.lastDrift = bg.driftFactor(t0, t1);
    this.lastKick = k1 + k2;
    this.kick(k1);
    this.drift(this.lastDrift);
    this.updatePotential();
    this.kick(k2);
    this.time = t1;
  }

  /** Range max φ − min φ of the current potential (0 without gravity). */
  potentialRange(): number {
    if (this.gravity.kind === "none") return 0;
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < this.phi.length; i++) {
      const v = this.phi[i] as number;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    return hi - lo;
  }
}
