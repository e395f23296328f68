/**
 * Fields advanced in lockstep with the stepper's reference field ψ: K more
 * complex fields on the same grid, sharing its tables, its plan of passes
 * and its threads, each with a kick of its own kind.
 *
 * - "own-gravity": a field with gravity of its own, kicked by the potential
 *   of its own density exactly as the reference is by its own (two such
 *   fields evolve bit for bit as each does alone).
 * - "species": a second species of particle mass m_i = μ m in mass units:
 *   i ∂ψ_i/∂t = −∇²ψ_i/(2μa²) + μ(φ/a)ψ_i (code units, ħ/m = 1), so its drift
 *   factor is D/μ and its kick factor μK; all species share the one
 *   potential φ sourced by the summed density, ∇²φ = Σ_j |ψ_j|² − ρ̄.
 *
 * - "tangent": a tangent-linear field dψ, the exact derivative of the
 *   split-step map at the reference: the drift is linear and unchanged, and
 *   each kick e^{−iKφ} becomes dψ ← e^{−iKφ}(dψ − iK dφ ψ), with dφ the
 *   potential of 2 Re(ψ̄ dψ) through the same Poisson passes (into "aux"),
 *   ψ and φ the reference's at the same stage. It neither sources φ nor
 *   has a potential of its own to kick with; it is not allowed beside
 *   species (whose densities would enter φ). A tangent field owes the same
 *   closing kick as ψ and is kicked only together with it (the stepper
 *   applies the tangents' owed kicks first, while ψ is still the field they
 *   were owed at), so its kick always sees the stored ψ.
 *
 * Folding the closing kick of one step into the opening kick of the next is
 * exact for tangents too: the kick leaves |ψ|² and Re(ψ̄ dψ) unchanged, so two
 * linearised kicks by K₂ and K₁ on the same φ and dφ are one by K₂ + K₁.
 *
 * Like the reference, each field owes its closing kick, folded into the next
 * step's first pass. A field with its own potential recomputes it from its
 * stored |ψ_i|² (kicks do not change it) just before each kick, so all such
 * fields share one scratch grid. Memory per field: one complex grid and its
 * undo copy (the guard rails undo a whole step, every field with it), plus
 * the one "aux" real grid if any field has its own potential.
 */
import type { ComplexGrid, RealGrid } from "../fields/step-engine.js";
import type { ExtraLayout } from "../fields/step-memory.js";
import type { StepPlan, PlannedPass } from "./step-plan.js";
import type { StepTask } from "./step-task.js";

/**
 * The kind of an extra field's kick. A species may carry its own contact
 * coefficient g (code units, see physics/contact.ts `contactCode`): its kick
 * is e^{−iμK(φ + g|ψ_i|²)}, its own density only (no cross-species contact).
 * Own-gravity and tangent fields take the reference field's coefficient.
 */
export type FieldKind =
  | { readonly kind: "own-gravity" }
  | { readonly kind: "species"; readonly massRatio: number; readonly contact?: number }
  | { readonly kind: "tangent" };

/** How a kind takes part in the step. */
interface KindRule {
  /** The real grid its kicks multiply by. */
  readonly potential: RealGrid;
  /** Its potential is its own: solved from its own density into `potential` before each kick. */
  readonly ownPotential: boolean;
  /** Its density adds to the shared source φ. */
  readonly sources: boolean;
  /** Its drift factor over the reference's (m/m_i). */
  readonly driftScale: number;
  /** Its kick factor over the reference's (m_i/m). */
  readonly kickScale: number;
  /** Its kicks are the reference's, linearised: dφ of 2 Re(ψ̄ dψ) solved into "aux" before each. */
  readonly linearised: boolean;
  /** Its contact coefficient g (0: none); a tangent's is the reference's, linearised. */
  readonly contact: number;
}

function ruleOf(kind: FieldKind, reference: number): KindRule {
  switch (kind.kind) {
    case "own-gravity":
      return { potential: "aux", ownPotential: true, sources: false, driftScale: 1, kickScale: 1, linearised: false, contact: reference };
    case "species": {
      if (!(kind.massRatio > 0) || !Number.isFinite(kind.massRatio)) throw new RangeError(`a species' mass ratio must be positive, got ${kind.massRatio}`);
      const contact = kind.contact ?? 0;
      if (!Number.isFinite(contact)) throw new RangeError(`a species' contact coefficient must be finite, got ${contact}`);
      return { potential: "phi", ownPotential: false, sources: true, driftScale: 1 / kind.massRatio, kickScale: kind.massRatio, linearised: false, contact };
    }
    case "tangent":
      return { potential: "phi", ownPotential: false, sources: false, driftScale: 1, kickScale: 1, linearised: true, contact: reference };
  }
}

/** What the extra fields ask of their stepper. */
export interface PassRunner {
  readonly plan: StepPlan;
  /** Whether the step has gravity (without, φ = 0 and fields have no potentials of their own). */
  readonly gravity: boolean;
  /** Whether the step kicks at all: gravity, or any contact term. */
  readonly kicks: boolean;
  runPass(units: number, task: StepTask): number;
  runPasses(passes: readonly PlannedPass[]): void;
  /** Fill phase set `set` for drift factor D (skipped when it already holds it). */
  fillPhases(set: number, factor: number): void;
  /** What multiplies a contact coefficient in a kick at the current time (1/a², 1 in a static box: see the stepper). */
  contactScale(): number;
}

/** The extra fields of one stepper: their kinds, owed kicks and undo state. */
export class ExtraFields {
  readonly count: number;
  private readonly rules: readonly KindRule[];
  /** Each field's owed closing kick factor (already scaled by its kickScale). */
  private readonly owed: Float64Array;
  private readonly undoOwed: Float64Array;

  /** @param referenceContact the reference field's contact coefficient (taken by own-gravity and tangent fields) */
  constructor(kinds: readonly FieldKind[], referenceContact = 0) {
    this.count = kinds.length;
    this.rules = kinds.map((k) => ruleOf(k, referenceContact));
    if (this.rules.some((r) => r.linearised) && this.rules.some((r) => r.sources)) {
      throw new RangeError("tangent fields cannot be advanced beside species: the tangents of the species' densities would enter the potential");
    }
    this.owed = new Float64Array(this.count + 1);
    this.undoOwed = new Float64Array(this.count + 1);
  }

  /** What the step's memory must hold for them. */
  get layout(): ExtraLayout {
    const phaseSets = this.rules.flatMap((r, i) => (r.driftScale !== 1 ? [i + 1] : []));
    return { fields: this.count, phaseSets, aux: this.rules.some((r) => r.potential === "aux" || r.linearised) };
  }

  /** The largest drift and kick factors over the reference's (1 and 1 without species of other masses): the time step's phase rules scale by them. */
  get largestScales(): { readonly drift: number; readonly kick: number } {
    return { drift: Math.max(1, ...this.rules.map((r) => r.driftScale)), kick: Math.max(1, ...this.rules.map((r) => r.kickScale)) };
  }

  /** The region of field i (1 … K). */
  grid(i: number): ComplexGrid {
    this.check(i);
    return `field.${i}`;
  }

  private check(i: number): void {
    if (!Number.isInteger(i) || i < 1 || i > this.count) throw new RangeError(`extra field ${i} does not exist (1 … ${this.count})`);
  }

  private rule(i: number): KindRule {
    return this.rules[i - 1]!;
  }

  /** Whether any field has a contact term. */
  get contact(): boolean {
    return this.rules.some((r) => r.contact !== 0);
  }

  /** The fields (not tangents, whose kick is ψ's) with a contact term, with μ_i|g_i|: their contact phase per kick factor and density. */
  contactFields(): { index: number; scale: number }[] {
    return this.rules.flatMap((r, i) => (r.contact !== 0 && !r.linearised ? [{ index: i + 1, scale: r.kickScale * Math.abs(r.contact) }] : []));
  }

  /** The fields (not tangents) with a contact term: their coefficient g_i and mass ratio μ_i. */
  contactCoefficients(): { index: number; contact: number; massRatio: number }[] {
    return this.rules.flatMap((r, i) => (r.contact !== 0 && !r.linearised ? [{ index: i + 1, contact: r.contact, massRatio: r.kickScale }] : []));
  }

  /** Whether field i is a tangent field (kicked only together with ψ). */
  isTangent(i: number): boolean {
    this.check(i);
    return this.rule(i).linearised;
  }

  /** Set the owed kick of field i (0 after a field was loaded; a checkpoint's on restore). */
  reset(i: number, owed = 0): void {
    this.check(i);
    this.owed[i] = owed;
  }

  /** The owed kick factor of field i. */
  owedKick(i: number): number {
    return this.owed[i]!;
  }

  /**
   * What comes before field i's kick by `kick`: its own potential solved from
   * its stored density, or for a tangent dφ of 2 Re(ψ̄ dψ) and the linear
   * term dψ ← dψ − i·kick·dφ·ψ (the phase e^{−iKφ} is then the ordinary kick).
   */
  private prepareKick(r: PassRunner, i: number, kick: number): void {
    const rule = this.rule(i);
    const field = this.grid(i);
    if (rule.ownPotential && r.gravity) {
      r.runPass(r.plan.rows, { op: "density", field, target: rule.potential, add: false });
      r.runPasses(r.plan.potential(rule.potential));
    } else if (rule.linearised) {
      // without gravity dφ = 0: φ itself is zero then
      if (r.gravity) {
        r.runPass(r.plan.rows, { op: "cross-density", field, target: "aux" });
        r.runPasses(r.plan.potential("aux"));
      }
      r.runPass(r.plan.rows, { op: "tangent-source", field, potential: r.gravity ? "aux" : "phi", factor: kick, contact: this.contactNow(r, i) });
    }
  }

  /** Field i's contact coefficient in a kick at the current time. */
  private contactNow(r: PassRunner, i: number): number {
    const g = this.rule(i).contact;
    return g === 0 ? 0 : g * r.contactScale();
  }

  /** The potential field i's kicks multiply (φ = 0 stands in for an own potential without gravity). */
  private kickPotential(r: PassRunner, i: number): RealGrid {
    const rule = this.rule(i);
    return rule.ownPotential && !r.gravity ? "phi" : rule.potential;
  }

  /** Where the contact term of field i's kick takes |·|² from: ψ for a tangent, else the field itself. */
  private contactSource(i: number): ComplexGrid {
    return this.rule(i).linearised ? "psi" : this.grid(i);
  }

  /** Apply field i's owed kick (a tangent's only while ψ still owes the same kick: see the stepper). */
  synchronize(r: PassRunner, i: number): void {
    const k = this.owed[i]!;
    this.owed[i] = 0;
    if (k === 0 || !r.kicks) return;
    this.prepareKick(r, i, k);
    r.runPass(r.plan.rows, { op: "kick", field: this.grid(i), potential: this.kickPotential(r, i), factor: k, contact: this.contactNow(r, i), source: this.contactSource(i) });
  }

  /** Apply the owed kicks of every tangent field (before ψ applies its own). */
  synchronizeTangents(r: PassRunner): void {
    for (let i = 1; i <= this.count; i++) if (this.rule(i).linearised) this.synchronize(r, i);
  }

  /**
   * The first part of a step, before the reference's drift overwrites φ:
   * each field's opening kick (K₁ scaled, plus its owed kick) folded into
   * its drift by D scaled, all on the potentials of the state before the step.
   */
  drift(r: PassRunner, drift: number, k1: number): void {
    for (let i = 1; i <= this.count; i++) {
      const rule = this.rule(i);
      const kick = r.kicks ? this.owed[i]! + k1 * rule.kickScale : 0;
      this.owed[i] = 0;
      if (kick !== 0) this.prepareKick(r, i, kick);
      const set = rule.driftScale !== 1 ? i : 0;
      r.fillPhases(set, drift * rule.driftScale);
      const options = { kick, potential: this.kickPotential(r, i), density: false, gradient: false, contact: this.contactNow(r, i), source: this.contactSource(i) };
      r.runPasses(r.plan.drift(this.grid(i), set, options));
    }
  }

  /** After the reference wrote |ψ|² into φ: add the densities of the fields that source it. */
  addSources(r: PassRunner): void {
    for (let i = 1; i <= this.count; i++) {
      if (this.rule(i).sources) r.runPass(r.plan.rows, { op: "density", field: this.grid(i), target: "phi", add: true });
    }
  }

  /** The closing kick K₂ of the step, owed by every field. */
  owe(r: PassRunner, k2: number): void {
    for (let i = 1; i <= this.count; i++) this.owed[i] = r.kicks ? k2 * this.rule(i).kickScale : 0;
  }

  /** Copy every field to its undo copy (`save`) or back, with its owed kick. */
  copyUndo(r: PassRunner, save: boolean): void {
    for (let i = 1; i <= this.count; i++) {
      const field = this.grid(i);
      const undo: ComplexGrid = `undo.${i}`;
      r.runPasses([save ? r.plan.copy(field, undo) : r.plan.copy(undo, field)]);
      if (save) this.undoOwed[i] = this.owed[i]!;
      else this.owed[i] = this.undoOwed[i]!;
    }
  }
}
