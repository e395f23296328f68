/**
 * The split-step's passes on one thread, each over a range of units so that
 * one thread or several run the very same arithmetic per cell. Two engines
 * share the elementwise passes (fields/engine-base.ts) and differ in the
 * transforms: fft.js in JavaScript (fields/js-step-engine.ts), or the
 * WebAssembly SIMD kernels (fields/wasm-step-engine.ts). Units are rows of
 * the last axis for row passes and outerCount() units for passes along
 * axes 0 and 1. Passes name the grids they work on by their region names
 * in the step's memory (fields/step-memory.ts).
 *
 * "Outer" passes fuse a forward transform along the outermost simulated
 * strided axis, a multiplication in Fourier space and the inverse transform
 * (the drift's phase, the Poisson kernel), so the block never leaves cache.
 */
import { outerCount } from "./fft.js";
import type { StepSetup } from "./step-memory.js";
import { JsStepEngine } from "./js-step-engine.js";
import { WasmStepEngine } from "./wasm-step-engine.js";
import { BankedStepEngine } from "./banked-step-engine.js";

/**
 * A complex grid of the step, by region name: the reference field ψ and its
 * undo copy (also scratch for measurements), and extra field i (1 … K)
 * advanced in lockstep with it, and its undo copy.
 */
export type ComplexGrid = "psi" | "undo" | `field.${number}` | `undo.${number}`;

/**
 * A real grid that holds a density and then, after the Poisson passes, its
 * potential: φ (the reference's, shared by species), or "aux", scratch for
 * an extra field's own potential.
 */
export type RealGrid = "phi" | "aux";

/** Which Poisson grid a real-transform pass works on: the periodic half spectrum or the isolated solve's padded grid. */
/** What a long grid's rows pass does (`longRows`). */
export type LongRowsMode = "forward" | "inverse" | "drift";

export type PoissonTarget = "periodic" | "isolated";

export interface StepEngine {
  /** The one WebAssembly memory of this engine's regions (the wasm backend on one memory), where the diagnostics' passes can run too. */
  readonly memory?: WebAssembly.Memory;
  /** field ← e^{−i·factor·(potential + contact·|source|²)} field over rows (source: the field itself, or a tangent's ψ). */
  kick(field: ComplexGrid, potential: RealGrid, factor: number, contact: number, source: ComplexGrid, lo: number, hi: number): void;
  /** Phase set `set`: (cos, sin)(−½ k² D) per index of every axis, D = `factor`. */
  fillPhases(set: number, factor: number): void;
  /** FFT pass of a field along `axis` over units. */
  axis(field: ComplexGrid, axis: number, inverse: boolean, lo: number, hi: number): void;
  /**
   * FFT pass of a field along the last axis over rows; with `kick` ≠ 0 the
   * rows get e^{−i·kick·(potential + contact·|source|²)} first, with `density`
   * potential ← |field|² afterwards (returns Σ|field|²).
   */
  rows(field: ComplexGrid, inverse: boolean, kick: number, potential: RealGrid, density: boolean, contact: number, source: ComplexGrid, lo: number, hi: number): number;
  /**
   * A 3D field's planes [lo, hi) along axis 0, each transformed along its last two axes while it is in cache:
   * forward, the rows (with the folded kick, as `rows`) and then axis 1; inverse, axis 1 and then the rows (with
   * the density, as `rows`; returns Σ|field|²).
   */
  plane(field: ComplexGrid, inverse: boolean, kick: number, potential: RealGrid, density: boolean, contact: number, source: ComplexGrid, lo: number, hi: number): number;
  /** The periodic Poisson solve's planes [lo, hi) along axis 0: forward, real rows into the half spectrum and then its axis 1; inverse, the reverse. */
  realPlane(real: RealGrid, inverse: boolean, lo: number, hi: number): void;
  /** Copy rows of one complex grid to another. */
  copy(from: ComplexGrid, to: ComplexGrid, lo: number, hi: number): void;
  /** Over rows: Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ and max |ψ|² into out[0…3]. */
  moments(lo: number, hi: number, out: Float64Array): void;
  /** Drift phase of set `phases` over rows of a transformed field (1D grids). */
  drift(field: ComplexGrid, phases: number, lo: number, hi: number): void;
  /** Σ k²|ψ_k|² over rows of a transformed field. */
  gradient(field: ComplexGrid, lo: number, hi: number): number;
  /** Forward along outer `axis`, the drift phase of set `phases`, inverse; returns Σ k²|ψ_k|² when `gradient`. */
  driftOuter(field: ComplexGrid, phases: number, axis: number, lo: number, hi: number, gradient: boolean): number;
  /** Σ|field|² over rows (nothing written). */
  norm(field: ComplexGrid, lo: number, hi: number): number;
  /** target ← |field|² (or += with `add`) over rows; returns Σ|field|² over them. */
  density(field: ComplexGrid, target: RealGrid, add: boolean, lo: number, hi: number): number;
  /** Real transforms of rows (of a real grid, or of the padded work array) into the half spectrum. */
  realRows(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void;
  /** Inverse real transforms of half-spectrum rows (into a real grid, or into the padded work array). */
  realRowsInverse(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void;
  /** FFT pass of a half spectrum along axis 0 or 1. */
  halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void;
  /** Isolated solve: rows [lo, hi) of a real grid, zero-padded, real-transformed into their rows of the padded half spectrum. */
  isolatedRows(real: RealGrid, lo: number, hi: number): void;
  /** Isolated solve: zero the padded half-spectrum rows [lo, hi) that no grid row maps to. */
  isolatedZero(lo: number, hi: number): void;
  /** Isolated solve: inverse real transforms of the padded rows that map to rows [lo, hi) of a real grid, copied into it. */
  isolatedRowsInverse(real: RealGrid, lo: number, hi: number): void;
  /** Isolated solve: multiply half-spectrum rows [lo, hi) of the padded grid by the Green's function's transform. */
  convolve(lo: number, hi: number): void;
  /** spec ← −spec/k² over half-spectrum rows (1D periodic solve). */
  poisson(lo: number, hi: number): void;
  /** Forward along outer `axis` of the half spectrum, −1/k², inverse. */
  poissonOuter(axis: number, lo: number, hi: number): void;
  /**
   * A long 1D grid (step-memory.ts LongLayout): a pass over blocks of columns
   * [lo, hi) of a complex field's matrix, or of a real grid's m = N/2 complex pairs.
   */
  longColumns(grid: ComplexGrid | RealGrid, inverse: boolean, lo: number, hi: number): void;
  /**
   * A long grid's rows [lo, hi) of that matrix: "forward" twiddles and transforms, "inverse" transforms back
   * and untwiddles, "drift" does both with the phase of set `phases` between; with `gradient` returns Σ k²|ψ_k|².
   */
  longRows(grid: ComplexGrid | RealGrid, mode: LongRowsMode, phases: number, gradient: boolean, lo: number, hi: number): number;
  /** A long grid's periodic Poisson solve on the transformed pairs of `real`, row pairs [lo, hi) (kernels.as.ts longPairs). */
  longPairs(real: RealGrid, lo: number, hi: number): void;
  /** Tangent fields: target ← 2 Re(ψ̄ field) over rows (the source of the linearised potential). */
  crossDensity(field: ComplexGrid, target: RealGrid, lo: number, hi: number): void;
  /** Tangent fields: field ← field − i·factor·(potential + 2·contact·Re(ψ̄ field))·ψ over rows (the linear term of the kick). */
  tangentSource(field: ComplexGrid, potential: RealGrid, factor: number, contact: number, lo: number, hi: number): void;
  /** Over rows: Σ Re(ψ̄ field), Σ Im(ψ̄ field), Σ|field|² into out[0…2]. */
  overlap(field: ComplexGrid, lo: number, hi: number, out: Float64Array): void;
  /** field ← scale·(field − (re + i·im)ψ) over rows. */
  combine(field: ComplexGrid, scale: number, re: number, im: number, lo: number, hi: number): void;
}

/** The engine for a layout on this thread (`slot` picks the wasm scratch block). */
export function createEngine(setup: StepSetup, slot: number): StepEngine {
  if (setup.backend === "js") return new JsStepEngine(setup);
  return setup.banks ? new BankedStepEngine(setup, slot) : new WasmStepEngine(setup, slot);
}

export { JsStepEngine, WasmStepEngine };

/** Units of a pass along `axis` of `shape` (re-exported for the steppers). */
export { outerCount };
