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
 *
 * A contact interaction (the Gross–Pitaevskii term) adds g|ψ|²/a³ to the
 * potential φ/a, so its kick factor is C = ∫dt/a³ where gravity's is
 * K = ∫dt/a. A kick applied at time t_k takes C = K/a(t_k)²: the opening kick
 * at the step's start t₀ and the closing one at its end t₁, which is a
 * symmetric (so second-order) quadrature of ∫dt/a³, and one number K still
 * describes a kick. The kick at t_k is ψ ← e^{−iK(φ + g|ψ|²/a(t_k)²)} ψ, and
 * the closing kick owed at t₁ and the next opening one, both at t₁, fold as
 * before (static box: a = 1 and C = K). The kick leaves |ψ| unchanged, so it
 * is exact and the scheme unitary. Without gravity φ = 0 and only the
 * contact term kicks.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import { IsolatedPoisson, PeriodicPoisson, type PoissonSolver } from "../fields/poisson.js";
import { ComplexFft } from "../fields/fft.js";
import { createEngine, type StepEngine } from "../fields/step-engine.js";
import { regionView, stepGeometry, type FftBackend, type GravityKind } from "../fields/step-memory.js";
import { allocateStepMemory, type StepMemory, type TableInputs } from "../fields/step-allocate.js";
import { resolveFftBackend, type FftChoice } from "./fft-backend.js";
import { ExtraFields, type FieldKind, type PassRunner } from "./extra-fields.js";
import { StepPlan, type PlannedPass } from "./step-plan.js";
import { RESULT_LENGTH, runTask, type StepTask } from "./step-task.js";
import { maxDensity } from "../diagnostics/energies.js";

/** Sums over the grid of |ψ|² = ρ and φ, without the cell volume. */
export interface FieldMoments {
  readonly rho: number;
  readonly rho2: number;
  readonly rhoPhi: number;
  readonly maxRho: number;
  /** Smallest and largest φ on the grid. */
  readonly phiMin: number;
  readonly phiMax: number;
}

/**
 * The evolving field and the machinery to advance it, with any extra fields
 * advanced in lockstep (integrators/extra-fields.ts).
 */
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
  /** The contact coefficient g of ψ (code units; 0: none): the kick at time t is e^{−iK(φ + g|ψ|²/a(t)²)}. */
  readonly contact: number;
  /**
   * A uniform density subtracted from ψ's in the box before the potential is
   * solved (0: none); with periodic gravity it changes nothing (the mean is
   * removed anyway). Truncated-Wigner members remove their half quantum of
   * noise per cell from the source of isolated gravity with it.
   */
  sourceShift = 0;
  /** The last step's factors D = ∫dt/a² and K = K₁ + K₂ = ∫dt/a. */
  lastDrift = 0;
  lastKick = 0;
  /** The FFT implementation the step runs on. */
  readonly backend: FftBackend;
  /** The passes of this grid's step. */
  readonly plan: StepPlan;
  /** Fields advanced with ψ (numbered 1 … count). */
  private readonly extras: ExtraFields;
  /** What the extra fields run their passes through. */
  private readonly runner: PassRunner;
  protected readonly memory: StepMemory;
  private engineOnThisThread: StepEngine | undefined;
  private complexFft: ComplexFft | undefined;
  /** The closing kick's factor K₂ not yet applied to the stored ψ. */
  private owedKick = 0;
  /** moments() of the current |ψ| and φ (kicks change neither), until they change. */
  private momentsCache: FieldMoments | undefined;
  /** The drift factor each phase set holds. */
  private readonly phaseFactors = new Map<number, number>();
  /** A pass's result vector. */
  private readonly results = new Float64Array(RESULT_LENGTH);
  /** The summed results of the last pass list, by meaning. */
  private readonly sums = { kinetic: 0, mass: 0 };
  /** Time and owed kick of the state in the undo copy (undefined: none kept). */
  private undoState: { time: number; owedKick: number } | undefined;

  /**
   * @param fft the FFT backend ("auto": WebAssembly when the grid fits its 4 GiB memory)
   * @param slots threads that will run the step's passes (subclasses with worker threads)
   * @param fields kinds of the extra fields advanced with ψ (none by default)
   * @param contact ψ's contact coefficient g in code units (physics/contact.ts `contactCode`)
   */
  constructor(grid: Grid, background: Background, gravity: PoissonSolver, fft: FftChoice = "auto", slots = 1, fields: readonly FieldKind[] = [], contact = 0) {
    this.grid = grid;
    this.background = background;
    this.gravity = gravity;
    if (!Number.isFinite(contact)) throw new RangeError(`the contact coefficient must be finite, got ${contact}`);
    this.contact = contact;
    this.extras = new ExtraFields(fields, contact);
    const kind: GravityKind = gravity instanceof PeriodicPoisson ? "periodic" : gravity instanceof IsolatedPoisson ? "isolated" : "none";
    const padded = gravity instanceof IsolatedPoisson ? [...gravity.paddedShape] as const : undefined;
    const geometry = stepGeometry(grid.shape, kind, padded, this.extras.layout);
    this.plan = new StepPlan(geometry);
    const transforms = this.plan.transforms();
    const tables: TableInputs = {
      kSquared: [0, 1, 2].map((ax) => grid.wavenumbers(ax as 0 | 1 | 2).map((k) => k * k)),
      kPoisson: gravity instanceof PeriodicPoisson ? gravity.kSquared : undefined,
      isolatedHat: gravity instanceof IsolatedPoisson ? gravity.kernelHat : undefined,
    };
    let backend = resolveFftBackend(fft, this.plan, slots);
    let memory: StepMemory;
    try {
      memory = allocateStepMemory(backend, geometry, transforms, tables, slots);
    } catch (e) {
      // "auto" falls back to fft.js when the runtime refuses one memory of this size
      if (fft !== "auto" || backend !== "wasm" || !(e instanceof RangeError)) throw e;
      backend = "js";
      memory = allocateStepMemory(backend, geometry, transforms, tables, slots);
    }
    this.backend = backend;
    this.memory = memory;
    this.phi = this.memory.phi;
    this.runner = {
      plan: this.plan,
      gravity: gravity.kind !== "none",
      kicks: this.kicks,
      runPass: (units, task) => this.runPass(units, task),
      runPasses: (passes) => this.runPasses(passes),
      fillPhases: (set, factor) => this.fillPhaseTables(factor, set),
      contactScale: () => this.contactScale(this.time),
    };
  }

  /** Whether steps kick: with gravity, or with a contact term on any field. */
  get kicks(): boolean {
    return this.gravity.kind !== "none" || this.contact !== 0 || this.extras.contact;
  }

  /** The largest drift and kick factors of any field over ψ's (species of other particle masses). */
  get largestScales(): { readonly drift: number; readonly kick: number } {
    return this.extras.largestScales;
  }

  /** How many extra fields advance with ψ. */
  get extraFields(): number {
    return this.extras.count;
  }

  /** Extra field i (1 … extraFields), interleaved complex, with its owed kick applied (a tangent's with ψ's). */
  field(i: number): Float64Array {
    if (this.extras.isTangent(i)) this.synchronize();
    else this.extras.synchronize(this.runner, i);
    return this.rawField(i);
  }

  /** Extra field i as stored (it may owe its closing kick, so only its modulus is current). */
  rawField(i: number): Float64Array {
    return regionView(this.memory.setup, this.extras.grid(i));
  }

  /** The closing kick extra field i owes (0 when it is current). */
  fieldOwedKick(i: number): number {
    return this.extras.owedKick(i);
  }

  /**
   * Load extra field i (copied), owing `owed` (a checkpoint's; 0 for a current field). Do it
   * before setState, which computes the shared potential. A current tangent field is loaded
   * beside the current ψ (an owed kick is applied first); a tangent's owed kick must be ψ's.
   */
  setField(i: number, psi: Float64Array, owed = 0): void {
    const view = this.rawField(i);
    if (psi.length !== view.length) throw new RangeError(`field has ${psi.length / 2} cells, grid has ${this.grid.size}`);
    if (this.extras.isTangent(i) && owed === 0) this.synchronize();
    view.set(psi);
    this.extras.reset(i, owed);
    this.undoState = undefined;
  }

  /** Of tangent (or any extra) field i and the current ψ: ⟨ψ|dψ⟩ = Σψ̄ dψ ΔV (re, im) and ‖dψ‖² = Σ|dψ|² ΔV. */
  fieldOverlap(i: number): { re: number; im: number; norm2: number } {
    this.field(i);
    this.synchronize();
    this.runPassInto(this.plan.rows, { op: "overlap", field: this.extras.grid(i) }, this.results);
    const dv = this.grid.cellVolume;
    return { re: this.results[0]! * dv, im: this.results[1]! * dv, norm2: this.results[2]! * dv };
  }

  /** Field i ← scale·(field i − (re + i·im)ψ), with the current ψ. */
  combineField(i: number, scale: number, re: number, im: number): void {
    this.field(i);
    this.synchronize();
    this.runPass(this.plan.rows, { op: "combine", field: this.extras.grid(i), scale, re, im });
    this.undoState = undefined;
  }

  /** Mass Σ|ψ_i|² ΔV of extra field i. */
  fieldMass(i: number): number {
    return this.runPass(this.plan.rows, { op: "norm", field: this.extras.grid(i) }) * this.grid.cellVolume;
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

  /** Apply an owed kick, so that the stored ψ is the current field (the tangent fields' first, which need ψ before it). */
  synchronize(): void {
    this.extras.synchronizeTangents(this.runner);
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

  /** Run a list of passes in order; their kept results are summed into `sums` by meaning. */
  private runPasses(passes: readonly PlannedPass[]): void {
    this.sums.kinetic = 0;
    this.sums.mass = 0;
    for (const p of passes) {
      const r = this.runPass(p.units, p.task);
      if (p.result) this.sums[p.result] += r;
    }
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
   * Restore a saved state exactly (ψ as stored, φ, mass and the kick ψ still
   * owes), without recomputing φ, so that a resumed run continues bit for bit.
   */
  restoreState(psi: Float64Array, phi: Float64Array, time: number, mass: number, owedKick = 0): void {
    if (psi.length !== this.memory.psi.length || phi.length !== this.phi.length) {
      throw new RangeError(`saved state has ${phi.length} cells, grid has ${this.grid.size}`);
    }
    this.memory.psi.set(psi);
    this.owedKick = owedKick;
    this.undoState = undefined;
    this.momentsCache = undefined;
    this.phi.set(phi);
    this.time = time;
    this.mass = mass;
  }

  /** Recompute φ and the mass from ψ. */
  updatePotential(): void {
    this.momentsCache = undefined;
    this.mass = this.runPass(this.plan.rows, { op: "density", field: "psi", target: "phi", add: false }) * this.grid.cellVolume;
    this.extras.addSources(this.runner);
    this.solvePotential();
  }

  /** φ from the density φ holds. */
  private solvePotential(): void {
    if (this.gravity.kind === "none") return this.gravity.solveInPlace(this.phi);
    if (this.sourceShift !== 0) for (let i = 0; i < this.grid.size; i++) this.phi[i] = (this.phi[i] as number) - this.sourceShift;
    this.runPasses(this.plan.potential("phi"));
  }

  /**
   * What multiplies a contact coefficient g in a kick at time t: C/K = 1/a(t)² (see above; exactly 1
   * in a static box, so static runs compute with g itself).
   */
  contactScale(t: number): number {
    if (this.background.kind === "static") return 1;
    const a = this.background.scaleFactor(t);
    return 1 / (a * a);
  }

  /** ψ's contact coefficient in a kick at time t, g/a(t)². */
  private contactAt(t: number): number {
    return this.contact === 0 ? 0 : this.contact * this.contactScale(t);
  }

  /** ψ ← e^{−iK(φ + g|ψ|²/a²)} ψ, at the current time. */
  kick(factor: number): void {
    if (factor === 0 || !this.kicks) return;
    this.runPass(this.plan.rows, { op: "kick", field: "psi", potential: "phi", factor, contact: this.contactAt(this.time), source: "psi" });
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
    this.fillPhaseTables(factor);
    this.runPasses(this.plan.drift("psi", 0, { kick, potential: "phi", density, gradient: this.trackKinetic, contact: this.contactAt(this.time) }));
    // Parseval: ½∫|∇ψ|² dV = ½ Σ_k k²|ψ_k|² ΔV/N
    this.midKineticTilde = this.trackKinetic ? (0.5 * this.sums.kinetic * this.grid.cellVolume) / this.grid.size : Number.NaN;
    return this.sums.mass;
  }

  /** cos and sin of −k²D/2 per axis (the drift's phase factors) in phase set `set` (0: ψ's). */
  protected fillPhaseTables(factor: number, set = 0): void {
    // recomputed only when the drift factor changes (a fixed step in a static box keeps it)
    if (factor === this.phaseFactors.get(set)) return;
    this.phaseFactors.set(set, factor);
    this.engineOnThisThread ??= createEngine(this.memory.setup, 0);
    this.engineOnThisThread.fillPhases(set, factor);
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
    const kicks = this.kicks;
    this.momentsCache = undefined;
    // the extra fields first: their kicks need the potentials before the step, and ψ's drift overwrites φ
    this.extras.drift(this.runner, this.lastDrift, k1);
    const opening = kicks ? this.owedKick + k1 : 0;
    this.owedKick = 0;
    this.mass = this.driftPasses(this.lastDrift, opening, true) * this.grid.cellVolume;
    this.extras.addSources(this.runner);
    this.solvePotential();
    this.owedKick = kicks ? k2 : 0;
    this.extras.owe(this.runner, k2);
    this.time = t1;
  }

  /** Keep a copy of the current state (in the undo buffers, the extra fields' too) for undo(). */
  saveUndo(): void {
    this.runPass(this.plan.rows, this.plan.copy("psi", "undo").task);
    this.extras.copyUndo(this.runner, true);
    this.undoState = { time: this.time, owedKick: this.owedKick };
  }

  /** Return to the state saveUndo() kept (φ recomputed); false when none is kept any more. */
  undo(): boolean {
    const kept = this.undoState;
    if (!kept) return false;
    this.runPass(this.plan.rows, this.plan.copy("undo", "psi").task);
    this.extras.copyUndo(this.runner, false);
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
    this.runPasses(this.plan.kinetic("psi", "undo"));
    return (0.5 * this.sums.kinetic * this.grid.cellVolume) / this.grid.size;
  }

  /** ½∫|∇ψ_i|² dV of the current extra field i (its owed kick applied first), spectrally, with its undo copy as scratch (used up). */
  fieldKineticTilde(i: number): number {
    this.field(i);
    this.undoState = undefined;
    this.runPasses(this.plan.kinetic(this.extras.grid(i), `undo.${i}`));
    return (0.5 * this.sums.kinetic * this.grid.cellVolume) / this.grid.size;
  }

  /** Sums over the grid of the current field: Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ (no ΔV), max |ψ|², and φ's range. */
  moments(): FieldMoments {
    if (!this.momentsCache) {
      this.runPass(this.plan.rows, { op: "moments" });
      const r = this.results;
      this.momentsCache = { rho: r[0]!, rho2: r[1]!, rhoPhi: r[2]!, maxRho: r[3]!, phiMin: r[4]!, phiMax: r[5]! };
    }
    return this.momentsCache;
  }

  /**
   * The fastest contact phase rate of any field in code time, max over fields of μ_i|g_i| max|ψ_i|²/a³
   * (0 without a contact term; the physical density is the comoving one over a³): a step of Δt turns
   * a cell by at most this times Δt beyond its potential's phase.
   */
  contactPhaseRate(): number {
    let rate = this.contact !== 0 ? Math.abs(this.contact) * this.moments().maxRho : 0;
    for (const f of this.extras.contactFields()) rate = Math.max(rate, f.scale * maxDensity(this.rawField(f.index)));
    if (rate === 0 || this.background.kind === "static") return rate;
    const a = this.background.scaleFactor(this.time);
    return rate / (a * a * a);
  }

  /**
   * Every field with a contact term (0: ψ, then extra fields), its coefficient g and mass ratio μ (ψ's 1),
   * and its stored density source (only |·|² is meant: it may owe its closing kick).
   */
  contactFields(): { index: number; contact: number; massRatio: number; field: Float64Array }[] {
    const own = this.contact !== 0 ? [{ index: 0, contact: this.contact, massRatio: 1, field: this.rawPsi }] : [];
    return [...own, ...this.extras.contactCoefficients().map((f) => ({ ...f, field: this.rawField(f.index) }))];
  }

  /** Range max φ − min φ of the current potential (0 without gravity), from the moments pass (cached until φ changes). */
  potentialRange(): number {
    if (this.gravity.kind === "none") return 0;
    const m = this.moments();
    return m.phiMax - m.phiMin;
  }
}
