/**
 * Which FFT implementation a stepper uses: the WebAssembly SIMD kernels
 * (default, when the runtime supports them and the grid fits a 4 GiB
 * WebAssembly memory) or fft.js in JavaScript.
 */
import { ConfigError } from "../core/errors.js";
import { WASM_MAX_BYTES, wasmBytesNeeded, type FftBackend } from "../fields/step-memory.js";
import type { StepPlan } from "./step-plan.js";
import { kernelModule } from "../fields/wasm-kernels.js";

/** A backend or "auto". */
export type FftChoice = FftBackend | "auto";

/** The backends a config may name. */
export const FFT_CHOICES = ["auto", "wasm", "js"] as const;

/** Resolve a choice for a step's plan (its grid and transforms); an explicit "wasm" that cannot run is a config error. */
export function resolveFftBackend(choice: FftChoice, plan: StepPlan, slots: number): FftBackend {
  if (choice === "js") return "js";
  const shape = plan.geometry.shape;
  const fits = wasmBytesNeeded(plan.geometry, plan.transforms(), slots) <= WASM_MAX_BYTES;
  const available = kernelModule() !== null;
  if (choice === "auto") return fits && available ? "wasm" : "js";
  if (!available) throw new ConfigError("integrator.fft", `the WebAssembly kernels did not load (is psibox built? run npm run build): use "js" or "auto"`);
  if (!fits) throw new ConfigError("integrator.fft", `a ${shape.join("×")} grid does not fit a 4 GiB WebAssembly memory: use "js" or "auto"`);
  return "wasm";
}
