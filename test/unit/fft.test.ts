// The FFTs against a direct O(N²) discrete Fourier transform (the DFT's definition).
import { describe, expect, it } from "vitest";
import { ComplexFft, outerCount, PENCIL_BLOCK, RealFft } from "../../src/fields/fft.js";
import { WasmStepEngine } from "../../src/fields/step-engine.js";
import { allocateStepMemory } from "../../src/fields/step-allocate.js";
import { stepGeometry } from "../../src/fields/step-memory.js";
import { StepPlan } from "../../src/integrators/step-plan.js";
import { WASM_BLOCK } from "../../src/fields/wasm-kernels.js";
import type { Triple } from "../../src/grid/grid.js";
import { maxAbs, maxAbsDiff, seededRandom } from "../helpers/fields.js";

function directDft(data: Float64Array, shape: Triple): Float64Array {
  const [n0, n1, n2] = shape;
  const out = new Float64Array(data.length);
  for (let k0 = 0; k0 < n0; k0++)
    for (let k1 = 0; k1 < n1; k1++)
      for (let k2 = 0; k2 < n2; k2++) {
        let sr = 0;
        let si = 0;
        for (let x0 = 0; x0 < n0; x0++)
          for (let x1 = 0; x1 < n1; x1++)
            for (let x2 = 0; x2 < n2; x2++) {
              const p = 2 * ((x0 * n1 + x1) * n2 + x2);
              const ang = -2 * Math.PI * ((k0 * x0) / n0 + (k1 * x1) / n1 + (k2 * x2) / n2);
              const c = Math.cos(ang);
              const s = Math.sin(ang);
              sr += data[p]! * c - data[p + 1]! * s;
              si += data[p]! * s + data[p + 1]! * c;
            }
        const q = 2 * ((k0 * n1 + k1) * n2 + k2);
        out[q] = sr;
        out[q + 1] = si;
      }
  return out;
}

const shapes: Triple[] = [
  [1, 1, 16],
  [1, 8, 4],
  [4, 8, 16],
  [8, 4, 4],
  [2, 32, 8],
];

describe("complex FFT", () => {
  for (const shape of shapes) {
    it(`matches the direct DFT and inverts, shape ${shape.join("×")}`, () => {
      const rnd = seededRandom(7);
      const n = shape[0] * shape[1] * shape[2];
      const data = Float64Array.from({ length: 2 * n }, rnd);
      const reference = directDft(data, shape);
      const fft = new ComplexFft(shape);
      const work = data.slice();
      fft.forward(work);
      expect(maxAbsDiff(work, reference)).toBeLessThan(1e-12 * n);
      fft.inverse(work);
      expect(maxAbsDiff(work, data)).toBeLessThan(1e-14 * n);
    });
  }
});

describe("real FFT", () => {
  for (const shape of shapes) {
    it(`equals the complex transform's half spectrum and inverts, shape ${shape.join("×")}`, () => {
      const rnd = seededRandom(11);
      const n = shape[0] * shape[1] * shape[2];
      const real = Float64Array.from({ length: n }, rnd);
      const complex = new Float64Array(2 * n);
      for (let i = 0; i < n; i++) complex[2 * i] = real[i]!;
      const reference = directDft(complex, shape);
      const rfft = new RealFft(shape);
      const half = new Float64Array(rfft.halfLength);
      rfft.forward(real, half);
      const h2 = shape[2] / 2 + 1;
      let worst = 0;
      for (let r = 0; r < shape[0] * shape[1]; r++)
        for (let k = 0; k < h2; k++) {
          worst = Math.max(
            worst,
            Math.abs(half[2 * (r * h2 + k)]! - reference[2 * (r * shape[2] + k)]!),
            Math.abs(half[2 * (r * h2 + k) + 1]! - reference[2 * (r * shape[2] + k) + 1]!),
          );
        }
      expect(worst).toBeLessThan(1e-12 * n);
      const back = new Float64Array(n);
      rfft.inverse(half, back);
      expect(maxAbsDiff(back, real)).toBeLessThan(1e-14 * n * maxAbs(real));
    });
  }
});

/** The WebAssembly step engine of a shape, with its views. */
function wasmEngine(shape: Triple) {
  const zeros = shape.map((n) => new Float64Array(n));
  const half = [shape[0], shape[1], shape[2] / 2 + 1] as const;
  const plan = new StepPlan(stepGeometry(shape, "periodic"));
  const memory = allocateStepMemory("wasm", plan.geometry, plan.transforms(), { kSquared: zeros, kPoisson: half.map((n) => new Float64Array(n)) }, 1);
  return { memory, engine: new WasmStepEngine(memory.setup, 0) };
}

describe("WebAssembly SIMD transforms", () => {
  it("block pencils as many at once as the JavaScript passes (the unit counts agree)", () => {
    expect(WASM_BLOCK).toBe(PENCIL_BLOCK);
  });

  for (const shape of shapes) {
    it(`match the direct DFT and invert, shape ${shape.join("×")}`, () => {
      const rnd = seededRandom(17);
      const n = shape[0] * shape[1] * shape[2];
      const data = Float64Array.from({ length: 2 * n }, rnd);
      const reference = directDft(data, shape);
      const { memory, engine } = wasmEngine(shape);
      memory.psi.set(data);
      for (const axis of [2, 1, 0]) if (shape[axis]! > 1) engine.axis("psi", axis, false, 0, outerCount(shape, axis));
      expect(maxAbsDiff(memory.psi, reference)).toBeLessThan(1e-12 * n);
      for (const axis of [0, 1, 2]) if (shape[axis]! > 1) engine.axis("psi", axis, true, 0, outerCount(shape, axis));
      expect(maxAbsDiff(memory.psi, data)).toBeLessThan(1e-14 * n);
    });

    it(`take real rows to the complex transform's half spectrum and back, shape ${shape.join("×")}`, () => {
      const rnd = seededRandom(19);
      const n = shape[0] * shape[1] * shape[2];
      const real = Float64Array.from({ length: n }, rnd);
      const complex = new Float64Array(2 * n);
      for (let i = 0; i < n; i++) complex[2 * i] = real[i]!;
      const reference = directDft(complex, shape);
      const { memory, engine } = wasmEngine(shape);
      const half = [shape[0], shape[1], shape[2] / 2 + 1] as const;
      const rows = shape[0] * shape[1];
      memory.phi.set(real);
      engine.realRows("periodic", "phi", 0, rows);
      for (const axis of [1, 0]) if (half[axis]! > 1) engine.halfAxis("periodic", axis, false, 0, outerCount(half, axis));
      const spec = memory.spectrum!;
      const h2 = half[2];
      let worst = 0;
      for (let r = 0; r < rows; r++)
        for (let k = 0; k < h2; k++) {
          worst = Math.max(
            worst,
            Math.abs(spec[2 * (r * h2 + k)]! - reference[2 * (r * shape[2] + k)]!),
            Math.abs(spec[2 * (r * h2 + k) + 1]! - reference[2 * (r * shape[2] + k) + 1]!),
          );
        }
      expect(worst).toBeLessThan(1e-12 * n);
      for (const axis of [0, 1]) if (half[axis]! > 1) engine.halfAxis("periodic", axis, true, 0, outerCount(half, axis));
      memory.phi.fill(0);
      engine.realRowsInverse("periodic", "phi", 0, rows);
      expect(maxAbsDiff(memory.phi, real)).toBeLessThan(1e-14 * n * maxAbs(real));
    });
  }
});
