/**
 * One pass of the split-step as plain data, so that the main thread or a
 * worker thread runs it on its own engine over a range of units.
 */
import type { PoissonTarget, StepEngine } from "../fields/step-engine.js";

/** One pass of the step, without its unit range. */
export type StepTask =
  | { readonly op: "kick"; readonly factor: number }
  | { readonly op: "axis"; readonly axis: number; readonly inverse: boolean }
  | { readonly op: "half-axis"; readonly target: PoissonTarget; readonly axis: number; readonly inverse: boolean }
  | { readonly op: "real-rows" | "real-rows-inverse"; readonly target: PoissonTarget }
  | { readonly op: "rows"; readonly inverse: boolean; readonly kick: number; readonly density: boolean }
  | { readonly op: "drift-outer"; readonly axis: number; readonly gradient: boolean }
  | { readonly op: "poisson-outer"; readonly axis: number }
  | { readonly op: "drift" | "gradient" | "density" | "poisson" | "isolated-rows" | "isolated-zero" | "isolated-rows-inverse" | "convolve" };

/** Run a task over units [lo, hi); returns its partial sum (0 for passes without one). */
export function runTask(engine: StepEngine, t: StepTask, lo: number, hi: number): number {
  switch (t.op) {
    case "kick":
      engine.kick(t.factor, lo, hi);
      return 0;
    case "axis":
      engine.axis(t.axis, t.inverse, lo, hi);
      return 0;
    case "rows":
      return engine.rows(t.inverse, t.kick, t.density, lo, hi);
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
      return engine.gradient(lo, hi);
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
