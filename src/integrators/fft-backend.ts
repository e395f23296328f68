/**
 * Which FFT implementation a stepper uses: the WebAssembly SIMD kernels
 * (default, when the runtime supports them; grids beyond one 4 GiB
 * WebAssembly memory are spread over several, fields/wasm-banks.ts) or
 * fft.js in JavaScript.
 */
import { ConfigError } from "../core/errors.js";
import type { FftBackend } from "../fields/step-memory.js";
import { wasmStepBytes } from "../fields/wasm-banks.js";
import type { StepPlan } from "./step-plan.js";
import { kernelModule } from "../fields/wasm-kernels.js";

/** A backend or "auto". */
export type FftChoice = FftBackend | "auto";

/** The backends a config may name. */
export const FFT_CHOICES = ["auto", "wasm", "js"] as const;

/** Whether the wasm backend can hold a plan's step: in one memory, or with each grid whole in one of several. */
export function wasmCanHold(plan: StepPlan, slots: number): boolean {
  return wasmStepBytes(plan.geometry, plan.transforms(), slots) !== undefined;
}

/** Resolve a choice for a step's plan (its grid and transforms); an explicit "wasm" that cannot run is a config error. */
export function resolveFftBackend(choice: FftChoice, plan: StepPlan, slots: number): FftBackend {
  if (choice === "js") return "js";
  const shape = plan.geometry.shape;
  const fits = wasmCanHold(plan, slots);
  const available = kernelModule() !== null;
  if (choice === "auto") return fits && available ? "wasm" : "js";
  if (!available) throw new ConfigError("integrator.fft", `the WebAssembly kernels did not load (is psibox built? run npm run build): use "js" or "auto"`);
  if (!fits) throw new ConfigError("integrator.fft", `a ${shape.join("×")} grid has a field larger than a 4 GiB WebAssembly memory: use "js" or "auto"`);
  return "wasm";
}
