// Fourier resampling of periodic fields: band-limited interpolation checked against analytic functions,
// Parseval's theorem (mass and kinetic energy) and the round trip up and down.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { ComplexFft } from "../../src/fields/fft.js";
import { fieldMass, kineticEnergy } from "../../src/diagnostics/energies.js";
import { resampleField } from "../../src/initial-conditions/resample.js";
import { fillComplex, maxRelative, seededRandom } from "../helpers/fields.js";

/** A random field with Fourier modes only below `limit` of each axis' Nyquist frequency (band-limited). */
function bandLimited(grid: Grid, limit: number, seed: number): Float64Array {
  const rnd = seededRandom(seed);
  const spec = new Float64Array(2 * grid.size);
  const [n0, n1, n2] = grid.shape;
  const inBand = (j: number, n: number) => n === 1 || Math.abs(j < n / 2 ? j : j - n) < limit * (n / 2);
  let p = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++)
      for (let c = 0; c < n2; c++, p += 2) {
        if (inBand(a, n0) && inBand(b, n1) && inBand(c, n2)) {
          spec[p] = rnd();
          spec[p + 1] = rnd();
        }
      }
  new ComplexFft(grid.shape).inverse(spec);
  return spec;
}

describe("Fourier resampling", () => {
  it("a band-limited 2D field upsampled and then downsampled returns to 1e-14", () => {
    const grid = new Grid([16, 8], [1, 0.5]);
    const psi = bandLimited(grid, 0.5, 3);
    const up = resampleField(psi, [16, 8], [64, 32]);
    expect(up.droppedMassFraction).toBe(0);
    const down = resampleField(up.psi, [64, 32], [16, 8]);
    expect(down.droppedMassFraction).toBeLessThan(1e-28);
    expect(maxRelative(down.psi, psi)).toBeLessThan(1e-14);
  });

  it("upsampling a 3D field with power up to its Nyquist modes keeps the old samples, the mass and the kinetic energy to round-off (Parseval)", () => {
    const coarse = new Grid([8, 8, 8], [1, 1, 1]);
    const fine = new Grid([16, 32, 8], [1, 1, 1]);
    const psi = bandLimited(coarse, 1.01, 7); // every mode, the Nyquist modes included
    const up = resampleField(psi, [8, 8, 8], [16, 32, 8]).psi;
    // interpolation: the fine grid's every second (fourth) point is an old sample point
    let worst = 0;
    for (let a = 0; a < 8; a++)
      for (let b = 0; b < 8; b++)
        for (let c = 0; c < 8; c++)
          for (const part of [0, 1]) {
            const old = psi[2 * ((a * 8 + b) * 8 + c) + part]!;
            const now = up[2 * ((2 * a * 32 + 4 * b) * 8 + c) + part]!;
            worst = Math.max(worst, Math.abs(now - old));
          }
    expect(worst).toBeLessThan(1e-14 * 8);
    expect(Math.abs(fieldMass(fine, up) / fieldMass(coarse, psi) - 1)).toBeLessThan(1e-13);
    const kCoarse = kineticEnergy(coarse, psi, 1, new ComplexFft(coarse.shape), new Float64Array(psi.length));
    const kFine = kineticEnergy(fine, up, 1, new ComplexFft(fine.shape), new Float64Array(up.length));
    expect(Math.abs(kFine / kCoarse - 1)).toBeLessThan(1e-12);
  });

  it("a smooth periodic function upsampled matches its analytic values at the new points (spectral accuracy)", () => {
    // ψ = exp(cos 2πx) e^{i sin 2πx}: analytic and periodic, its spectrum falls off like 1/k! (Bessel coefficients)
    const f = (x: number): [number, number] => [Math.exp(Math.cos(2 * Math.PI * x)) * Math.cos(Math.sin(2 * Math.PI * x)), Math.exp(Math.cos(2 * Math.PI * x)) * Math.sin(Math.sin(2 * Math.PI * x))];
    const coarse = new Grid([32], [1]);
    const fine = new Grid([256], [1]);
    const up = resampleField(fillComplex(coarse, (_, __, x) => f(x)), [32], [256]).psi;
    expect(maxRelative(up, fillComplex(fine, (_, __, x) => f(x)))).toBeLessThan(1e-13);
  });

  it("downsampling keeps the mass and reports the fraction the dropped modes carried", () => {
    const grid = new Grid([64], [1]);
    // a mode at k = 20 (dropped on 32 cells) carrying 1/5 of the mass and one at k = 3 (kept)
    const psi = fillComplex(grid, (_, __, x) => [Math.cos(2 * Math.PI * 3 * x) * 2, Math.sin(2 * Math.PI * 20 * x)]);
    const down = resampleField(psi, [64], [32]);
    expect(down.droppedMassFraction).toBeCloseTo(0.2, 12);
    expect(fieldMass(new Grid([32], [1]), down.psi) / fieldMass(grid, psi)).toBeCloseTo(1, 13);
  });
});
