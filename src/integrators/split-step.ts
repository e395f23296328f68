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
  private readonly phase: readonly [Float64Array, Float64Array, Float64Array];

  constructor(grid: Grid, background: Background, gravity: PoissonSolver) {
    this.grid = grid;
    this.background = background;
    this.gravity = gravity;
    this.psi = new Float64Array(2 * grid.size);
    this.phi = new Float64Array(grid.size);
    this.fft = new ComplexFft(grid.shape);
    this.phase = [
      new Float64Array(2 * grid.shape[0]),
      new Float64Array(2 * grid.shape[1]),
      new Float64Array(2 * grid.shape[2]),
    ];
  }

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
    const psi = this.psi;
    const phi = this.phi;
    let sum = 0;
    for (let i = 0; i < phi.length; i++) {
      const re = psi[2 * i] as number;
      const im = psi[2 * i + 1] as number;
      const rho = re * re + im * im;
      phi[i] = rho;
      sum += rho;
    }
    this.mass = sum * this.grid.cellVolume;
    this.gravity.solveInPlace(phi);
  }

  /** ψ ← e^{−iφK} ψ. */
  kick(factor: number): void {
    if (factor === 0 || this.gravity.kind === "none") return;
    const psi = this.psi;
    const phi = this.phi;
    for (let i = 0; i < phi.length; i++) {
      const angle = -(phi[i] as number) * factor;
      const c = Math.cos(angle);
      const s = Math.sin(angle);
      const re = psi[2 * i] as number;
      const im = psi[2 * i + 1] as number;
      psi[2 * i] = re * c - im * s;
      psi[2 * i + 1] = re * s + im * c;
    }
  }

  /** ψ ← F⁻¹ e^{−ik²D/2} F ψ, with the phase factored per axis (no sin/cos per cell). */
  drift(factor: number): void {
    const psi = this.psi;
    this.fft.forward(psi);
    for (let ax = 0; ax < 3; ax++) {
      const k = this.grid.wavenumbers(ax as 0 | 1 | 2);
      const table = this.phase[ax] as Float64Array;
      for (let j = 0; j < k.length; j++) {
        const angle = -0.5 * (k[j] as number) * (k[j] as number) * factor;
        table[2 * j] = Math.cos(angle);
        table[2 * j + 1] = Math.sin(angle);
      }
    }
    const [n0, n1, n2] = this.grid.shape;
    const [p0, p1, p2] = this.phase;
    if (this.trackKinetic) this.midKineticTilde = this.spectralGradientNorm();
    let p = 0;
    for (let a = 0; a < n0; a++) {
      const ar = p0[2 * a] as number;
      const ai = p0[2 * a + 1] as number;
      for (let b = 0; b < n1; b++) {
        const br = p1[2 * b] as number;
        const bi = p1[2 * b + 1] as number;
        const abr = ar * br - ai * bi;
        const abi = ar * bi + ai * br;
        for (let c = 0; c < n2; c++, p += 2) {
          const cr = p2[2 * c] as number;
          const ci = p2[2 * c + 1] as number;
          const er = abr * cr - abi * ci;
          const ei = abr * ci + abi * cr;
          const re = psi[p] as number;
          const im = psi[p + 1] as number;
          psi[p] = re * er - im * ei;
          psi[p + 1] = re * ei + im * er;
        }
      }
    }
    this.fft.inverse(psi);
  }

  /** ½ Σ_k k²|ψ_k|² ΔV/N of the transformed field in `psi` (Parseval: ½∫|∇ψ|² dV). */
  private spectralGradientNorm(): number {
    const psi = this.psi;
    const [k0, k1, k2] = [this.grid.wavenumbers(0), this.grid.wavenumbers(1), this.grid.wavenumbers(2)];
    const [n0, n1, n2] = this.grid.shape;
    let sum = 0;
    let p = 0;
    for (let a = 0; a < n0; a++) {
      const ka = k0[a]! * k0[a]!;
      for (let b = 0; b < n1; b++) {
        const kab = ka + k1[b]! * k1[b]!;
        for (let c = 0; c < n2; c++, p += 2) sum += (kab + k2[c]! * k2[c]!) * (psi[p]! * psi[p]! + psi[p + 1]! * psi[p + 1]!);
      }
    }
    return (0.5 * sum * this.grid.cellVolume) / this.grid.size;
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
