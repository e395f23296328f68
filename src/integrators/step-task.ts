/**
 * One pass of the split-step as plain data, so that the main thread or a
 * worker thread runs it on its own engine over a range of units.
 */
import type { ComplexField, PoissonTarget, StepEngine } from "../fields/step-engine.js";

/** One pass of the step, without its unit range. */
export type StepTask =
  | { readonly op: "kick"; readonly factor: number }
  | { readonly op: "axis"; readonly field: ComplexField; readonly axis: number; readonly inverse: boolean }
  | { readonly op: "gradient"; readonly field: ComplexField }
  | { readonly op: "copy"; readonly toUndo: boolean }
  | { readonly op: "half-axis"; readonly target: PoissonTarget; readonly axis: number; readonly inverse: boolean }
  | { readonly op: "real-rows" | "real-rows-inverse"; readonly target: PoissonTarget }
  | { readonly op: "rows"; readonly field: ComplexField; readonly inverse: boolean; readonly kick: number; readonly density: boolean }
  | { readonly op: "drift-outer"; readonly axis: number; readonly gradient: boolean }
  | { readonly op: "poisson-outer"; readonly axis: number }
  | { readonly op: "moments" }
  | { readonly op: "drift" | "density" | "poisson" | "isolated-rows" | "isolated-zero" | "isolated-rows-inverse" | "convolve" };

/** Length of a task's result vector: sums in entries 0–2, a maximum in entry 3. */
export const RESULT_LENGTH = 4;

/** Combine per-thread result vectors (RESULT_LENGTH each, concatenated) into `out`. */
export function combineResults(parts: Float64Array, threads: number, out: Float64Array): void {
  out.fill(0);
  for (let t = 0; t < threads; t++) {
    for (let i = 0; i < 3; i++) out[i]! += parts[RESULT_LENGTH * t + i]!;
    out[3] = Math.max(out[3]!, parts[RESULT_LENGTH * t + 3]!);
  }
}

/** Run a task over units [lo, hi), writing its result vector (a partial sum in entry 0 for most passes) to `out`. */
export function runTask(engine: StepEngine, t: StepTask, lo: number, hi: number, out: Float64Array): void {
  out.fill(0);
  if (t.op === "moments") engine.moments(lo, hi, out);
  else out[0] = runScalar(engine, t, lo, hi);
}

function runScalar(engine: StepEngine, t: Exclude<StepTask, { op: "moments" }>, lo: number, hi: number): number {
  switch (t.op) {
    case "kick":
      engine.kick(t.factor, lo, hi);
      return 0;
    case "axis":
      engine.axis(t.field, t.axis, t.inverse, lo, hi);
      return 0;
    case "copy":
      engine.copy(t.toUndo, lo, hi);
      return 0;
    case "rows":
      return engine.rows(t.field, t.inverse, t.kick, t.density, lo, hi);
    case "half-axis":
      engine.halfAxis(t.target, t.axis, t.inverse, lo, hi);
      return 0;
    case "drift-outer":
      return engine.driftOuter(t.axis, lo, hi, t.gradient);
    case "poisson-outer":
      engine.poissonOuter(t.axis, lo, hi);
      return 0;
    case "drift":
      engine.drift(lo, hi);
      return 0;
    case "gradient":
      return engine.gradient(t.field, lo, hi);
    case "density":
      return engine.density(lo, hi);
    case "real-rows":
      engine.realRows(t.target, lo, hi);
      return 0;
    case "real-rows-inverse":
      engine.realRowsInverse(t.target, lo, hi);
      return 0;
    case "isolated-rows":
      engine.isolatedRows(lo, hi);
      return 0;
    case "isolated-zero":
      engine.isolatedZero(lo, hi);
      return 0;
    case "isolated-rows-inverse":
      engine.isolatedRowsInverse(lo, hi);
      return 0;
    case "convolve":
      engine.convolve(lo, hi);
      return 0;
    case "poisson":
      engine.poisson(lo, hi);
      return 0;
  }
}
