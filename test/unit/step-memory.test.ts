// The step's memory as one table: both backends lay out the same regions from it, the wasm
// memory holds them without overlap inside exactly its size, every transform of the plan has
// its tables, and the kernels carry the shared layout numbers this side uses.
import { describe, expect, it } from "vitest";
import { allocateStepMemory } from "../../src/fields/step-allocate.js";
import { ELEMENT_BYTES, stepGeometry, stepRegions, wasmBytesNeeded, type GravityKind } from "../../src/fields/step-memory.js";
import { instantiateKernels, kernelModule } from "../../src/fields/wasm-kernels.js";
import { BLOCK, CONSTANTS_ADDRESS, REGION_ALIGN, RESERVED_BYTES, TWIDDLE_STRIDE } from "../../src/fields/wasm/layout.js";
import { StepPlan } from "../../src/integrators/step-plan.js";
import type { Triple } from "../../src/grid/grid.js";

const CASES: [Triple, GravityKind][] = [
  [[1, 1, 64], "periodic"],
  [[1, 16, 32], "isolated"],
  [[8, 16, 32], "periodic"],
  [[8, 8, 16], "isolated"],
  [[4, 8, 8], "none"],
];

describe("the step's memory table", () => {
  for (const [shape, gravity] of CASES) {
    it(`lays out ${shape.join("×")} (${gravity}) on both backends from one table`, () => {
      const plan = new StepPlan(stepGeometry(shape, gravity));
      const transforms = plan.transforms();
      const kSquared = shape.map((n) => new Float64Array(n));
      const tables = { kSquared, kPoisson: plan.geometry.half.map((n) => new Float64Array(n)), isolatedHat: new Float64Array(plan.geometry.paddedHalf ? plan.geometry.paddedHalf.reduce((p, n) => p * n, 1) : 0) };
      const specs = stepRegions(plan.geometry, transforms, 2);
      expect(new Set(specs.map((s) => s.name)).size).toBe(specs.length);
      const wasm = allocateStepMemory("wasm", plan.geometry, transforms, tables, 2).setup;
      const js = allocateStepMemory("js", plan.geometry, transforms, tables, 2).setup;
      expect(Object.keys(js.regions).sort()).toEqual(specs.filter((s) => !s.wasmOnly).map((s) => s.name).sort());
      expect(Object.keys(wasm.regions).sort()).toEqual(specs.map((s) => s.name).sort());
      // wasm: aligned, after the reserved bytes, no overlaps, inside a memory of the computed size
      const spans = Object.values(wasm.regions)
        .map((r) => [r.offset, r.offset + ELEMENT_BYTES[r.type] * r.length] as const)
        .sort((a, b) => a[0] - b[0]);
      expect(spans[0]![0]).toBeGreaterThanOrEqual(RESERVED_BYTES);
      for (let i = 0; i < spans.length; i++) {
        expect(spans[i]![0] % REGION_ALIGN).toBe(0);
        if (i > 0) expect(spans[i]![0]).toBeGreaterThanOrEqual(spans[i - 1]![1]);
      }
      const needed = wasmBytesNeeded(plan.geometry, transforms, 2);
      expect(spans[spans.length - 1]![1]).toBeLessThanOrEqual(needed);
      expect(wasm.memory!.buffer.byteLength).toBeGreaterThanOrEqual(needed);
      for (const t of transforms) if (t.n > 1) expect(wasm.regions[`tw.${t.n}`], `tables of ${t.n}`).toBeDefined();
      for (const [name, r] of Object.entries(js.regions)) expect(r.buffer!.byteLength, name).toBe(ELEMENT_BYTES[r.type] * r.length);
    });
  }

  it("uses the numbers the kernels were built with (BLOCK, constants address, reserved bytes, twiddle stride)", () => {
    const k = instantiateKernels(kernelModule()!, new WebAssembly.Memory({ initial: 1, maximum: 1, shared: true }));
    expect([k.LAYOUT_BLOCK.value, k.LAYOUT_CONSTANTS_ADDRESS.value, k.LAYOUT_RESERVED_BYTES.value, k.LAYOUT_TWIDDLE_STRIDE.value]).toEqual([
      BLOCK,
      CONSTANTS_ADDRESS,
      RESERVED_BYTES,
      TWIDDLE_STRIDE,
    ]);
  });
});
