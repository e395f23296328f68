/**
 * Run plug-ins: objects the run loop calls at the start of a run, after
 * every accepted step, at every output and at the stop, without the loop
 * knowing what they compute. A plug-in sees neutral facts (step, t, Δt, a,
 * the step's drift and kick factors) and the measured sums it declared in
 * `measures`; it never touches the stepper, except through the extra fields
 * it asked for (`fields`: tangent-linear or with their own gravity, handed to
 * `attach`). It declares its own time-series
 * columns, returns its part of summary.json, and saves and restores its own
 * versioned state in checkpoints, so that a resumed run with the plug-in on
 * is bit for bit an uninterrupted one. The quantum sidecar is one
 * (quantum/sidecar-plugin.ts); a researcher's own per-step quantity is
 * another (see the README).
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import type { FieldMoments } from "../integrators/split-step.js";
import type { OutputScales } from "./scales.js";

/**
 * Sums a plug-in can ask the run loop to measure on the step's own passes:
 * "kinetic" is ½∫|∇ψ|² dV (the a-free kinetic energy K·a², code units), of
 * the current field at the start and measured inside each step's drift, at
 * the step's middle, afterwards; "moments" are Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ (without
 * the cell volume) and max |ψ|² of the field after the step; "field" hands
 * the field itself to output() at every time-series row (OutputFacts.psi);
 * "species" hands every species' field, current, to output() at every row
 * (OutputFacts.species; a run of one species hands ψ alone).
 */
export type MeasuredSum = "kinetic" | "moments" | "field" | "overlaps" | "species";

/** The sums a plug-in asked for (the others are absent). */
export interface MeasuredSums {
  readonly kinetic?: number;
  readonly moments?: FieldMoments;
  /**
   * "overlaps": ∫conj(ψ) ψ_i dV (re, im) of each of the plug-in's fields with the run's field,
   * both current (their owed kicks applied), in the order of its `fields`, after every step.
   */
  readonly overlaps?: readonly (readonly [number, number])[];
}

/**
 * A field a plug-in asks the run to advance in lockstep with ψ (one engine for both,
 * integrators/extra-fields.ts), kept in checkpoints (a resumed run continues it exactly):
 * - "tangent": a tangent-linear field dψ, the exact derivative of the step at ψ, started at 0
 *   (the plug-in loads its start with `set`);
 * - "own-gravity": a nonlinear field kicked by the potential of its own density, started as
 *   `startScale` × ψ at the run's start (or loaded by the plug-in with `set`).
 */
export type ExtraField = { readonly kind: "tangent" } | { readonly kind: "own-gravity"; readonly startScale: number };

/** What a plug-in knows about the run it joins. All values in code units unless `scales` converts them. */
export interface RunContext {
  readonly grid: Grid;
  readonly background: Background;
  /** The run has gravity (grid.gravity is not "none"). */
  readonly gravity: boolean;
  /** Code → physical units of the outputs. */
  readonly scales: OutputScales;
  /** The run's particle mass in code mass units. */
  readonly particleMass: number;
  readonly startTime: number;
  readonly endTime: number;
  /** The run folder (a plug-in may write its own files there, atomically). */
  readonly outputDir: string;
  /** Tell the user something that does not stop the run: printed as a warning and written to run.log. */
  warn(text: string): void;
}

/** The state at the start of the run (or at the step a resumed run continues from). */
export interface StartFacts {
  readonly step: number;
  readonly t: number;
  readonly a: number;
  /** Mass at the very start of the run (code units; the same after a resume). */
  readonly mass0: number;
  /** The run continues from a checkpoint (restore() was called before start()). */
  readonly resumed: boolean;
  readonly sums: MeasuredSums;
}

/** Facts of one accepted step, neutral with respect to the integrator. */
export interface StepFacts {
  /** Steps taken so far (1 after the first). */
  readonly step: number;
  /** Time after the step. */
  readonly t: number;
  readonly dt: number;
  /** Scale factor after the step. */
  readonly a: number;
  /** The step's drift factor D = ∫dt/a². */
  readonly drift: number;
  /** The step's kick factor K = ∫dt/a. */
  readonly kick: number;
  readonly sums: MeasuredSums;
}

/** An output moment: a time-series row, or a snapshot file just written. */
export interface OutputFacts {
  readonly kind: "row" | "snapshot";
  readonly step: number;
  readonly t: number;
  readonly a: number;
  /** The snapshot file (kind "snapshot"). */
  readonly file?: string;
  /**
   * Rows and snapshots, for a plug-in that measures "field": ψ in code units, interleaved
   * (re, im), read-only and valid during the call. It is the stepper's raw
   * field: exact in |ψ| and in its zeros, its phase short of the smooth factor
   * the folded closing kick still owes (reading it never changes the run).
   */
  readonly psi?: Float64Array;
  /**
   * Rows, for a plug-in that measures "species": every species' field in code units, the first
   * species' (ψ) first, current (their owed kicks applied), read-only and valid during the call.
   */
  readonly species?: readonly Float64Array[];
}

/** How the run ended. */
export interface StopFacts {
  readonly status: "completed" | "stopped";
  readonly steps: number;
  readonly t: number;
  readonly a: number;
}

/**
 * The extra fields a plug-in asked for (`fields`), advanced by the stepper beside ψ, numbered
 * 1 … count in the order asked for, in code units. Each call applies the kick ψ and the fields
 * owe (an exact split of the folded kick: ψ's trajectory changes by round-off only).
 */
export interface PluginFields {
  readonly count: number;
  /** The current ψ, interleaved (re, im); read-only, valid during the call. */
  reference(): Float64Array;
  /** Mass ∫|ψ|² dV of the current field. */
  mass(): number;
  /** Field j, current (its owed kick applied); read-only, valid during the call. */
  field(j: number): Float64Array;
  /** Load field j (a tangent: a perturbation of the current ψ; a nonlinear field: a field beside it). */
  set(j: number, field: Float64Array): void;
  /** ⟨ψ|f_j⟩ = ∫ψ̄ f_j dV (re, im) and ‖f_j‖² = ∫|f_j|² dV. */
  overlap(j: number): { re: number; im: number; norm2: number };
  /** f_j ← scale·(f_j − (re + i·im)ψ). */
  combine(j: number, scale: number, re: number, im: number): void;
}

/** A plug-in of the run loop: a name and the hooks it needs. */
export interface RunPlugin {
  /** Unique among a run's plug-ins: letters, digits, "-" and "_"; names its checkpoint state. */
  readonly name: string;
  /** Version of the state save() returns (required with save); a checkpoint with another version is refused. */
  readonly stateVersion?: number;
  /** Sums it needs (see MeasuredSum). */
  readonly measures?: readonly MeasuredSum[];
  /** Extra fields it needs advanced with ψ (see ExtraField), handed to attach() before start(). */
  readonly fields?: readonly ExtraField[];
  /** Called once, before start() (and before restore() on resume), with its fields. */
  attach?(fields: PluginFields): void;
  /** Its time-series columns (names with units), after the run's own. */
  readonly columns?: readonly string[];
  /** Called once, before the first step (after restore() on resume). */
  start?(context: RunContext, facts: StartFacts): void;
  /** Called after every accepted step, before any output of that step. */
  afterStep?(facts: StepFacts): void;
  /** Called at every output; for a row, returns the values of its columns (one per column). */
  output?(facts: OutputFacts): readonly (number | string)[] | void;
  /** Called once at the end; returns its part of summary.json (top-level keys), if any. */
  stop?(facts: StopFacts): Readonly<Record<string, unknown>> | void;
  /** Its state as JSON-safe data, for a checkpoint. */
  save?(): unknown;
  /** Restore what save() returned (of the same stateVersion). */
  restore?(state: unknown): void;
  /** Why a saved state (of this stateVersion, read from a checkpoint) cannot be restored, or undefined when it can; checked before a resume writes anything. */
  checkState?(state: unknown): string | undefined;
}
