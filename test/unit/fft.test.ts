// The FFTs against a direct O(N²) discrete Fourier transform (the DFT's definition).
import { describe, expect, it } from "vitest";
import { ComplexFft, RealFft } from "../../src/fields/fft.js";
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
