/**
 * One pass of the split-step as plain data, so that the main thread or a
 * worker thread runs it on its own engine over a range of units; and what
 * transform each pass needs, from which the step's twiddle tables and
 * scratch blocks follow (integrators/step-plan.ts).
 */
import type { ComplexGrid, LongRowsMode, PoissonTarget, RealGrid, StepEngine } from "../fields/step-engine.js";
import { isRealGrid, type StepGeometry, type Transform } from "../fields/step-memory.js";
import { runBlockTask, type BlockTask } from "../diagnostics/block-tasks.js";

/** One pass of the step, without its unit range. */
export type StepTask =
  | {
      readonly op: "kick";
      readonly field: ComplexGrid;
      readonly potential: RealGrid;
      readonly factor: number;
      /** The contact coefficient g: the kick is e^{−i·factor·(potential + g|source|²)} (0: none). */
      readonly contact: number;
      /** Whose |·|² the contact term takes: the field itself, or "psi" for a tangent field. */
      readonly source: ComplexGrid;
    }
  | { readonly op: "axis"; readonly field: ComplexGrid; readonly axis: number; readonly inverse: boolean }
  | { readonly op: "gradient"; readonly field: ComplexGrid }
  | { readonly op: "copy"; readonly from: ComplexGrid; readonly to: ComplexGrid }
  | { readonly op: "half-axis"; readonly target: PoissonTarget; readonly axis: number; readonly inverse: boolean }
  | { readonly op: "real-rows" | "real-rows-inverse"; readonly target: PoissonTarget; readonly real: RealGrid }
  | { readonly op: "real-plane"; readonly real: RealGrid; readonly inverse: boolean }
  | {
      /** "rows": rows along the last axis; "plane": 3D planes along axis 0, their rows and axis 1 (StepEngine.plane). */
      readonly op: "rows" | "plane";
      readonly field: ComplexGrid;
      readonly inverse: boolean;
      readonly kick: number;
      readonly potential: RealGrid;
      readonly density: boolean;
      /** The folded kick's contact coefficient and source, as for "kick". */
      readonly contact: number;
      readonly source: ComplexGrid;
    }
  | { readonly op: "drift"; readonly field: ComplexGrid; readonly phases: number }
  | { readonly op: "drift-outer"; readonly field: ComplexGrid; readonly phases: number; readonly axis: number; readonly gradient: boolean }
  | { readonly op: "density"; readonly field: ComplexGrid; readonly target: RealGrid; readonly add: boolean }
  | { readonly op: "norm"; readonly field: ComplexGrid }
  | { readonly op: "isolated-rows" | "isolated-rows-inverse"; readonly real: RealGrid }
  | { readonly op: "poisson-outer"; readonly axis: number }
  | { readonly op: "long-columns"; readonly grid: ComplexGrid | RealGrid; readonly inverse: boolean }
  | { readonly op: "long-rows"; readonly grid: ComplexGrid | RealGrid; readonly mode: LongRowsMode; readonly phases: number; readonly gradient: boolean }
  | { readonly op: "long-pairs"; readonly real: RealGrid }
  | { readonly op: "moments" }
  | { readonly op: "cross-density"; readonly field: ComplexGrid; readonly target: RealGrid }
  | { readonly op: "tangent-source"; readonly field: ComplexGrid; readonly potential: RealGrid; readonly factor: number; readonly contact: number }
  | { readonly op: "overlap"; readonly field: ComplexGrid }
  | { readonly op: "combine"; readonly field: ComplexGrid; readonly scale: number; readonly re: number; readonly im: number }
  | { readonly op: "poisson" | "isolated-zero" | "convolve" }
  /** A diagnostics' pass over blocks of rows (diagnostics/block-tasks.ts), on the pool's threads; no engine, no transform. */
  | { readonly op: "blocks"; readonly task: BlockTask };

/** Length of a task's result vector: sums in entries 0–2, maxima in entries 3 and 5, a minimum in entry 4. */
export const RESULT_LENGTH = 6;

/** Neutral per-thread result vectors (for threads given no range): zero sums and maxima, an infinite minimum and maximum of φ. */
export function clearResults(parts: Float64Array, threads: number): void {
  parts.fill(0);
  for (let t = 0; t < threads; t++) {
    parts[RESULT_LENGTH * t + 4] = Infinity;
    parts[RESULT_LENGTH * t + 5] = -Infinity;
  }
}

/**
 * Combine per-thread result vectors (RESULT_LENGTH each, concatenated) into `out`: entries 0–2 are sums,
 * 3 and 5 maxima, 4 a minimum (the moments pass's Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ, max |ψ|², min φ, max φ).
 */
export function combineResults(parts: Float64Array, threads: number, out: Float64Array): void {
  out.fill(0);
  out[4] = Infinity;
  out[5] = -Infinity;
  for (let t = 0; t < threads; t++) {
    const at = RESULT_LENGTH * t;
    for (let i = 0; i < 3; i++) out[i]! += parts[at + i]!;
    out[3] = Math.max(out[3]!, parts[at + 3]!);
    out[4] = Math.min(out[4]!, parts[at + 4]!);
    out[5] = Math.max(out[5]!, parts[at + 5]!);
  }
}

/** Run a task over units [lo, hi), writing its result vector (a partial sum in entry 0 for most passes) to `out`. */
export function runTask(engine: StepEngine, t: StepTask, lo: number, hi: number, out: Float64Array): void {
  out.fill(0);
  if (t.op === "moments") engine.moments(lo, hi, out);
  else if (t.op === "overlap") engine.overlap(t.field, lo, hi, out);
  else out[0] = runScalar(engine, t, lo, hi);
}

function runScalar(engine: StepEngine, t: Exclude<StepTask, { op: "moments" | "overlap" }>, lo: number, hi: number): number {
  switch (t.op) {
    case "cross-density":
      engine.crossDensity(t.field, t.target, lo, hi);
      return 0;
    case "tangent-source":
      engine.tangentSource(t.field, t.potential, t.factor, t.contact, lo, hi);
      return 0;
    case "combine":
      engine.combine(t.field, t.scale, t.re, t.im, lo, hi);
      return 0;
    case "kick":
      engine.kick(t.field, t.potential, t.factor, t.contact, t.source, lo, hi);
      return 0;
    case "axis":
      engine.axis(t.field, t.axis, t.inverse, lo, hi);
      return 0;
    case "copy":
      engine.copy(t.from, t.to, lo, hi);
      return 0;
    case "rows":
      return engine.rows(t.field, t.inverse, t.kick, t.potential, t.density, t.contact, t.source, lo, hi);
    case "half-axis":
      engine.halfAxis(t.target, t.axis, t.inverse, lo, hi);
      return 0;
    case "plane":
      return engine.plane(t.field, t.inverse, t.kick, t.potential, t.density, t.contact, t.source, lo, hi);
    case "real-plane":
      engine.realPlane(t.real, t.inverse, lo, hi);
      return 0;
    case "drift-outer":
      return engine.driftOuter(t.field, t.phases, t.axis, lo, hi, t.gradient);
    case "poisson-outer":
      engine.poissonOuter(t.axis, lo, hi);
      return 0;
    case "drift":
      engine.drift(t.field, t.phases, lo, hi);
      return 0;
    case "gradient":
      return engine.gradient(t.field, lo, hi);
    case "density":
      return engine.density(t.field, t.target, t.add, lo, hi);
    case "norm":
      return engine.norm(t.field, lo, hi);
    case "real-rows":
      engine.realRows(t.target, t.real, lo, hi);
      return 0;
    case "real-rows-inverse":
      engine.realRowsInverse(t.target, t.real, lo, hi);
      return 0;
    case "isolated-rows":
      engine.isolatedRows(t.real, lo, hi);
      return 0;
    case "isolated-zero":
      engine.isolatedZero(lo, hi);
      return 0;
    case "isolated-rows-inverse":
      engine.isolatedRowsInverse(t.real, lo, hi);
      return 0;
    case "convolve":
      engine.convolve(lo, hi);
      return 0;
    case "poisson":
      engine.poisson(lo, hi);
      return 0;
    case "long-columns":
      engine.longColumns(t.grid, t.inverse, lo, hi);
      return 0;
    case "long-rows":
      return engine.longRows(t.grid, t.mode, t.phases, t.gradient, lo, hi);
    case "long-pairs":
      engine.longPairs(t.real, lo, hi);
      return 0;
    case "blocks":
      runBlockTask(t.task, lo, hi, engine.memory);
      return 0;
  }
}

/** Cells of a shape. */
function cells(shape: readonly number[]): number {
  return shape[0]! * shape[1]! * shape[2]!;
}

/** A complex transform along `axis` of a grid of `shape` (its pencils are the grid's cells over n). */
function along(shape: readonly number[], axis: number, realRow = 0): Transform {
  const n = shape[axis]!;
  return { n, pencils: cells(shape) / n, realRow };
}

/**
 * The transform a task runs, if any: its complex length, its number of
 * pencils, and for real-row transforms the real row length (whose
 * untangling twiddles it also needs).
 */
export function transformOf(t: StepTask, g: StepGeometry): Transform | undefined {
  switch (t.op) {
    case "rows":
    case "plane":
      return along(g.shape, 2);
    case "real-plane":
      return realRows(g.shape);
    case "axis":
    case "drift-outer":
      return along(g.shape, t.axis);
    case "half-axis":
      return along(t.target === "periodic" ? g.half : g.paddedHalf!, t.axis);
    case "poisson-outer":
      return along(g.half, t.axis);
    case "long-columns":
    case "long-rows":
    case "long-pairs":
      return longTransform(t, g);
    case "real-rows":
    case "real-rows-inverse":
      return t.target === "periodic" ? realRows(g.shape) : realRows(g.padded!);
    case "isolated-rows":
    case "isolated-rows-inverse":
      return realRows(g.padded!);
    case "kick":
    case "gradient":
    case "copy":
    case "drift":
    case "density":
    case "norm":
    case "moments":
    case "cross-density":
    case "tangent-source":
    case "overlap":
    case "combine":
    case "poisson":
    case "isolated-zero":
    case "convolve":
    case "blocks":
      return undefined;
  }
}

/** Every transform a task runs: a plane pass's second one (axis 1 of the grid or of its half spectrum) with its first. */
export function transformsOf(t: StepTask, g: StepGeometry): Transform[] {
  const first = transformOf(t, g);
  if (t.op === "plane") return [first!, along(g.shape, 1)];
  if (t.op === "real-plane") return [first!, along(g.half, 1)];
  return first ? [first] : [];
}

/** The transform of a long grid's pass: along its columns or rows, of the field's matrix or of the density's half-length one. */
function longTransform(t: Extract<StepTask, { op: "long-columns" | "long-rows" | "long-pairs" }>, g: StepGeometry): Transform {
  const { n1, n2 } = g.long!;
  if (t.op === "long-pairs") return { n: n2, pencils: n1 / 2, realRow: n1 * n2 };
  const rows = isRealGrid(t.grid) ? n1 / 2 : n1;
  return t.op === "long-columns" ? { n: rows, pencils: n2, realRow: 0 } : { n: n2, pencils: rows, realRow: 0 };
}

/** Real rows of length n2 of a shape, transformed as complex rows of n2/2. */
function realRows(shape: readonly number[]): Transform {
  const n2 = shape[2]!;
  return { n: n2 / 2, pencils: cells(shape) / n2, realRow: n2 };
}
