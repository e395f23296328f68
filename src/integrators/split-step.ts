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
 * and one Poisson solve, and allocates no arrays.
 *
 * Both kicks multiply by a phase of the same φ, so the closing kick of one
 * step and the opening kick of the next are applied together, as one
 * e^{−iφ(K₂+K₁)} folded into the next step's first transform pass: one sin
 * and cos per cell and step instead of two. Until then the closing kick is
 * owed; reading `psi` applies it (`rawPsi` gives ψ without it, which has the
 * same |ψ|). The density for the potential is taken in the drift's last pass.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import { IsolatedPoisson, PeriodicPoisson, type PoissonSolver } from "../fields/poisson.js";
import { ComplexFft } from "../fields/fft.js";
import { createEngine, outerCount, type StepEngine } from "../fields/step-engine.js";
import { allocateStepMemory, type FftBackend, type GravityLayout, type StepMemory } from "../fields/step-memory.js";
import { resolveFftBackend, type FftChoice } from "./fft-backend.js";
import { RESULT_LENGTH, runTask, type StepTask } from "./step-task.js";

/** Sums over the grid of |ψ|² = ρ and φ, without the cell volume. */
export interface FieldMoments {
  readonly rho: number;
  readonly rho2: number;
  readonly rhoPhi: number;
  readonly maxRho: number;
}

/** The evolving field and the machinery to advance it. */
export class SplitStepper {
  readonly grid: Grid;
  readonly background: Background;
  readonly gravity: PoissonSolver;
  /** φ of the current ψ (∇²φ = ρ − ρ̄ or ρ); the potential is Φ = φ/a. */
  readonly phi: Float64Array;
  /** Cosmic (or ordinary) time in code units. */
  time = 0;
  /** Mass Σ|ψ|² ΔV of the current field. */
  mass = 0;
  /** When set, each drift also measures ½∫|∇ψ|² dV (the a-free kinetic energy Ka²) at the step's middle. */
  trackKinetic = false;
  /** ½∫|∇ψ|² dV measured during the last drift (NaN unless trackKinetic). */
  midKineticTilde = Number.NaN;
  /** The last step's factors D = ∫dt/a² and K = K₁ + K₂ = ∫dt/a. */
  lastDrift = 0;
  lastKick = 0;
  /** The FFT implementation the step runs on. */
  readonly backend: FftBackend;
  protected readonly memory: StepMemory;
  protected readonly phase: readonly [Float64Array, Float64Array, Float64Array];
  private engineOnThisThread: StepEngine | undefined;
  private complexFft: ComplexFft | undefined;
  /** The closing kick's factor K₂ not yet applied to the stored ψ. */
  private owedKick = 0;
  /** moments() of the current |ψ| and φ (kicks change neither), until they change. */
  private momentsCache: FieldMoments | undefined;
  /** The drift factor the phase tables hold. */
  private phaseFactor = Number.NaN;
  /** A pass's result vector. */
  private readonly results = new Float64Array(RESULT_LENGTH);
  /** Time and owed kick of the state in the undo copy (undefined: none kept). */
  private undoState: { time: number; owedKick: number } | undefined;

  /**
   * @param fft the FFT backend ("auto": WebAssembly when the grid fits its 4 GiB memory)
   * @param slots threads that will run the step's passes (subclasses with worker threads)
   */
  constructor(grid: Grid, background: Background, gravity: PoissonSolver, fft: FftChoice = "auto", slots = 1) {
    this.grid = grid;
    this.background = background;
    this.gravity = gravity;
    const layout: GravityLayout =
      gravity instanceof PeriodicPoisson
        ? { kind: "periodic", kSquared: gravity.kSquared }
        : gravity instanceof IsolatedPoisson
          ? { kind: "isolated", padded: gravity.paddedShape, hat: gravity.kernelHat }
          : { kind: "none" };
    const kSquared = [0, 1, 2].map((ax) => grid.wavenumbers(ax as 0 | 1 | 2).map((k) => k * k));
    let backend = resolveFftBackend(fft, grid.shape, layout.kind, slots);
    let memory: StepMemory;
    try {
      memory = allocateStepMemory(backend, grid.shape, kSquared, layout, slots);
    } catch (e) {
      // "auto" falls back to fft.js when the runtime refuses one memory of this size
      if (fft !== "auto" || backend !== "wasm" || !(e instanceof RangeError)) throw e;
      backend = "js";
      memory = allocateStepMemory(backend, grid.shape, kSquared, layout, slots);
    }
    this.backend = backend;
    this.memory = memory;
    this.phi = this.memory.phi;
    this.phase = this.memory.phase;
  }

  /** ψ, interleaved complex, √(mass density) in code units (applies an owed kick first). */
  get psi(): Float64Array {
    this.synchronize();
    return this.memory.psi;
  }

  /** ψ as stored: it may owe the closing kick, a phase per cell, so only |ψ| is current. */
  get rawPsi(): Float64Array {
    return this.memory.psi;
  }

  /** The owed kick factor (0 when ψ is current). */
  get owedKickFactor(): number {
    return this.owedKick;
  }

  /** Apply an owed kick, so that the stored ψ is the current field. */
  synchronize(): void {
    const k = this.owedKick;
    this.owedKick = 0;
    this.kick(k);
  }

  /** A complex FFT of the grid's shape (JavaScript) for measurements outside the step. */
  get fft(): ComplexFft {
    this.complexFft ??= new ComplexFft(this.grid.shape);
    return this.complexFft;
  }

  /** Run `task` over units [0, count) into the result vector `out` (one thread here; subclasses split it). */
  protected runPassInto(count: number, task: StepTask, out: Float64Array): void {
    this.engineOnThisThread ??= createEngine(this.memory.setup, 0);
    runTask(this.engineOnThisThread, task, 0, count, out);
  }

  /** Run `task` over units [0, count) and return its summed scalar result. */
  protected runPass(count: number, task: StepTask): number {
    this.runPassInto(count, task, this.results);
    return this.results[0]!;
  }

  private get rows(): number {
    return this.grid.shape[0] * this.grid.shape[1];
  }

  /** Release resources (worker threads in subclasses). */
  close(): void {}

  /** Load a field (copied) at time t and compute its potential. */
  setState(psi: Float64Array, time: number): void {
    if (psi.length !== this.memory.psi.length) {
      throw new RangeError(`field has ${psi.length / 2} cells, grid has ${this.grid.size}`);
    }
    if (psi !== this.memory.psi) this.memory.psi.set(psi);
    this.owedKick = 0;
    this.undoState = undefined;
    this.time = time;
    this.updatePotential();
  }

  /**
   * Restore a saved state exactly (ψ, φ and mass as they were), without
   * recomputing φ, so that a resumed run continues bit for bit.
   */
  restoreState(psi: Float64Array, phi: Float64Array, time: number, mass: number): void {
    if (psi.length !== this.memory.psi.length || phi.length !== this.phi.length) {
      throw new RangeError(`saved state has ${phi.length} cells, grid has ${this.grid.size}`);
    }
    this.memory.psi.set(psi);
    this.owedKick = 0;
    this.undoState = undefined;
    this.momentsCache = undefined;
    this.phi.set(phi);
    this.time = time;
    this.mass = mass;
  }

  /** Recompute φ and the mass from ψ. */
  updatePotential(): void {
    this.momentsCache = undefined;
    this.mass = this.runPass(this.rows, { op: "density" }) * this.grid.cellVolume;
    this.solvePotential();
  }

  /** φ from the density φ holds. */
  private solvePotential(): void {
    const setup = this.memory.setup;
    if (setup.spectrum) {
      const [n0, n1, n2] = this.grid.shape;
      this.runPass(n0 * n1, { op: "real-rows", target: "periodic" });
      const half = [n0, n1, n2 / 2 + 1] as const;
      const outer = n0 > 1 ? 0 : n1 > 1 ? 1 : -1;
      const middle = outer === 0 && n1 > 1;
      if (middle) this.runPass(outerCount(half, 1), { op: "half-axis", target: "periodic", axis: 1, inverse: false });
      if (outer >= 0) this.runPass(outerCount(half, outer), { op: "poisson-outer", axis: outer });
      else this.runPass(n0 * n1, { op: "poisson" });
      if (middle) this.runPass(outerCount(half, 1), { op: "half-axis", target: "periodic", axis: 1, inverse: true });
      this.runPass(n0 * n1, { op: "real-rows-inverse", target: "periodic" });
    } else if (setup.isolated) {
      // free-space convolution on the zero-padded grid (as IsolatedPoisson.solveInPlace), transforming
      // only what is not zero on the way in and only what is kept on the way out
      const [n0, n1] = this.grid.shape;
      const [p0, p1, p2] = setup.isolated.shape;
      const half = [p0, p1, p2 / 2 + 1] as const;
      this.runPass(n0 * n1, { op: "isolated-rows" });
      this.runPass(p0 * p1, { op: "isolated-zero" });
      // along axis 1, pencils with a ≥ n0 (the units from n0 · blocks on) are zero in and unused out
      const middle = outerCount([n0, p1, half[2]], 1);
      if (p1 > 1 && p0 > 1) this.runPass(middle, { op: "half-axis", target: "isolated", axis: 1, inverse: false });
      const outer = p0 > 1 ? 0 : p1 > 1 ? 1 : -1;
      if (outer >= 0) this.runPass(outerCount(half, outer), { op: "half-axis", target: "isolated", axis: outer, inverse: false });
      this.runPass(p0 * p1, { op: "convolve" });
      if (outer >= 0) this.runPass(outerCount(half, outer), { op: "half-axis", target: "isolated", axis: outer, inverse: true });
      if (p1 > 1 && p0 > 1) this.runPass(middle, { op: "half-axis", target: "isolated", axis: 1, inverse: true });
      this.runPass(n0 * n1, { op: "isolated-rows-inverse" });
    } else {
      this.gravity.solveInPlace(this.phi);
    }
  }

  /** ψ ← e^{−iφK} ψ. */
  kick(factor: number): void {
    if (factor === 0 || this.gravity.kind === "none") return;
    this.runPass(this.rows, { op: "kick", factor });
  }

  /**
   * ψ ← F⁻¹ e^{−ik²D/2} F ψ, with the phase factored per axis (no sin/cos per
   * cell). The outermost simulated axis transforms forward, multiplies and
   * transforms back in one pass.
   */
  drift(factor: number): void {
    this.synchronize();
    this.momentsCache = undefined;
    this.driftPasses(factor, 0, false);
  }

  /**
   * The drift's passes; the first (along the last axis) kicks with `kick`
   * before transforming, and with `density` the last one leaves |ψ|² in φ.
   * Returns Σ|ψ|² when `density`.
   */
  private driftPasses(factor: number, kick: number, density: boolean): number {
    const shape = this.grid.shape;
    this.fillPhaseTables(factor);
    const outer = shape[0] > 1 ? 0 : shape[1] > 1 ? 1 : -1;
    // the last axis has at least 4 cells, so it always comes first
    const middle = outer === 0 && shape[1] > 1;
    this.runPass(this.rows, { op: "rows", field: "psi", inverse: false, kick, density: false });
    if (middle) this.runPass(outerCount(shape, 1), { op: "axis", field: "psi", axis: 1, inverse: false });
    let sum: number;
    if (outer >= 0) {
      sum = this.runPass(outerCount(shape, outer), { op: "drift-outer", axis: outer, gradient: this.trackKinetic });
    } else {
      sum = this.trackKinetic ? this.runPass(this.rows, { op: "gradient", field: "psi" }) : 0;
      this.runPass(this.rows, { op: "drift" });
    }
    // Parseval: ½∫|∇ψ|² dV = ½ Σ_k k²|ψ_k|² ΔV/N
    this.midKineticTilde = this.trackKinetic ? (0.5 * sum * this.grid.cellVolume) / this.grid.size : Number.NaN;
    if (middle) this.runPass(outerCount(shape, 1), { op: "axis", field: "psi", axis: 1, inverse: true });
    return this.runPass(this.rows, { op: "rows", field: "psi", inverse: true, kick: 0, density });
  }

  /** cos and sin of −k²D/2 per axis (the drift's phase factors). */
  protected fillPhaseTables(factor: number): void {
    // recomputed only when the drift factor changes (a fixed step in a static box keeps it)
    if (factor === this.phaseFactor) return;
    this.phaseFactor = factor;
    this.engineOnThisThread ??= createEngine(this.memory.setup, 0);
    this.engineOnThisThread.fillPhases(factor);
  }

  /** Advance by Δt (code time) with one kick–drift–kick step (the closing kick stays owed, see above). */
  step(dt: number): void {
    const bg = this.background;
    const t0 = this.time;
    const tHalf = t0 + 0.5 * dt;
    const t1 = t0 + dt;
    const k1 = bg.kickFactor(t0, tHalf);
    const k2 = bg.kickFactor(tHalf, t1);
    this.lastDrift = bg.driftFactor(t0, t1);
    this.lastKick = k1 + k2;
    const gravity = this.gravity.kind !== "none";
    this.momentsCache = undefined;
    const opening = gravity ? this.owedKick + k1 : 0;
    this.owedKick = 0;
    this.mass = this.driftPasses(this.lastDrift, opening, true) * this.grid.cellVolume;
    this.solvePotential();
    this.owedKick = gravity ? k2 : 0;
    this.time = t1;
  }

  /** Keep a copy of the current state (in the undo buffer) for undo(). */
  saveUndo(): void {
    this.runPass(this.rows, { op: "copy", toUndo: true });
    this.undoState = { time: this.time, owedKick: this.owedKick };
  }

  /** Return to the state saveUndo() kept (φ recomputed); false when none is kept any more. */
  undo(): boolean {
    const kept = this.undoState;
    if (!kept) return false;
    this.runPass(this.rows, { op: "copy", toUndo: false });
    this.owedKick = kept.owedKick;
    this.time = kept.time;
    this.updatePotential();
    return true;
  }

  /**
   * ½∫|∇ψ|² dV of the current ψ (the a-free kinetic energy Ka²), spectrally:
   * a forward transform of a copy in the undo buffer, which this uses up.
   */
  kineticTilde(): number {
    this.synchronize();
    this.undoState = undefined;
    const shape = this.grid.shape;
    this.runPass(this.rows, { op: "copy", toUndo: true });
    this.runPass(this.rows, { op: "rows", field: "undo", inverse: false, kick: 0, density: false });
    for (const axis of [1, 0]) if (shape[axis]! > 1) this.runPass(outerCount(shape, axis), { op: "axis", field: "undo", axis, inverse: false });
    const sum = this.runPass(this.rows, { op: "gradient", field: "undo" });
    return (0.5 * sum * this.grid.cellVolume) / this.grid.size;
  }

  /** Sums over the grid of the current field: Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ (no ΔV) and max |ψ|². */
  moments(): FieldMoments {
    if (!this.momentsCache) {
      this.runPass(this.rows, { op: "moments" });
      const r = this.results;
      this.momentsCache = { rho: r[0]!, rho2: r[1]!, rhoPhi: r[2]!, maxRho: r[3]! };
    }
    return this.momentsCache;
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
