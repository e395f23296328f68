// Cosmological initial conditions: transfer functions against published values, the statistics of the
// generated field against its input spectrum, and its linear flow against the growth factor.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { ComplexFft } from "../../src/fields/fft.js";
import { LinearPower, topHat, transferBbks, transferEisensteinHu, transferFdm, type PowerParameters } from "../../src/physics/cosmology/power.js";
import { gaussianRandomField } from "../../src/initial-conditions/cosmological.js";
import { LcdmBackground } from "../../src/physics/cosmology/background.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { evolve } from "../../src/simulation/evolve.js";

// Planck 2018 (Planck Collaboration 2020, A&A 641, A6): h, Ω_m, Ω_b h², T_CMB, σ₈, n_s.
const h = 0.6736;
const params: PowerParameters = {
  littleH: h,
  omegaMatter: 0.3153,
  omegaBaryon: 0.02237 / (h * h),
  cmbTemperature: 2.7255,
  spectralIndex: 0.9649,
  sigma8: 0.8111,
  transfer: "eisenstein-hu",
  m22: 1,
};

describe("transfer functions", () => {
  it("match a check table of the published formulas (Eisenstein & Hu 1998 no-wiggle; BBKS 1986), computed independently, to 1e-6", () => {
    const table: [number, number, number][] = [
      [0.001, 9.818639e-1, 9.846786e-1],
      [0.01, 7.21328e-1, 6.873142e-1],
      [0.1, 1.137744e-1, 8.319924e-2],
      [1, 3.592836e-3, 2.484494e-3],
      [10, 6.42838e-5, 4.491965e-5],
    ];
    for (const [k, bbks, eh] of table) {
      expect(Math.abs(transferBbks(k, params) / bbks - 1)).toBeLessThan(1e-6);
      expect(Math.abs(transferEisensteinHu(k, params) / eh - 1)).toBeLessThan(1e-6);
    }
  });

  it("the wave-dark-matter suppression halves T at k = 5.078 m22^{4/9}/Mpc and T² at 4.584 (computed independently); Hu, Barkana & Gruzinov 2000 quote about 4.5 for T² (from memory): within 5%", () => {
    for (const m22 of [0.1, 1, 10]) {
      const half = (target: number, square: boolean) => {
        let lo = 0.1;
        let hi = 100;
        for (let i = 0; i < 200; i++) {
          const mid = Math.sqrt(lo * hi);
          const t = transferFdm(mid, m22);
          if ((square ? t * t : t) > target) lo = mid;
          else hi = mid;
        }
        return lo;
      };
      expect(half(0.5, false) / Math.pow(m22, 4 / 9)).toBeCloseTo(5.078, 3);
      expect(half(0.5, true) / Math.pow(m22, 4 / 9)).toBeCloseTo(4.584, 3);
      expect(Math.abs(half(0.5, true) / Math.pow(m22, 4 / 9) / 4.5 - 1)).toBeLessThan(0.05);
    }
  });

  it("σ₈ normalisation: an independent Simpson integral of k²P(k)W²(kR)/(2π²) over ln k gives σ₈²", () => {
    const power = new LinearPower(params);
    const R = 8 / h;
    const n = 4000;
    const a = Math.log(1e-4);
    const b = Math.log(1e2);
    let sum = 0;
    for (let i = 0; i <= n; i++) {
      const k = Math.exp(a + ((b - a) * i) / n);
      const f = (k ** 3 * power.at(k) * topHat(k * R) ** 2) / (2 * Math.PI ** 2);
      sum += f * (i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2);
    }
    expect(Math.sqrt((sum * (b - a)) / n / 3)).toBeCloseTo(0.8111, 4);
  });
});

/** Binned power of a real field: P̂ = V ⟨|δ_k|²⟩ / N² over shells in |k|. */
function measurePower(grid: Grid, delta: Float64Array, lengthMpc: number, bins: number) {
  const data = new Float64Array(2 * grid.size);
  for (let i = 0; i < grid.size; i++) data[2 * i] = delta[i]!;
  new ComplexFft(grid.shape).forward(data);
  const kNy = Math.PI * grid.cells[0]! / (grid.lengths[0]! * lengthMpc);
  const kF = (2 * Math.PI) / (grid.lengths[0]! * lengthMpc);
  const sums = new Float64Array(bins);
  const counts = new Float64Array(bins);
  const kMean = new Float64Array(bins);
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  const [n0, n1, n2] = grid.shape;
  const volume = grid.volume * lengthMpc ** 3;
  let p = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++)
      for (let c = 0; c < n2; c++, p += 2) {
        const k = Math.sqrt(k0[a]! ** 2 + k1[b]! ** 2 + k2[c]! ** 2) / lengthMpc;
        if (k === 0 || k >= kNy) continue;
        const bin = Math.floor(((k - kF / 2) / (kNy - kF / 2)) * bins);
        if (bin < 0 || bin >= bins) continue;
        sums[bin] = sums[bin]! + (volume * (data[p]! ** 2 + data[p + 1]! ** 2)) / grid.size ** 2;
        counts[bin] = counts[bin]! + 1;
        kMean[bin] = kMean[bin]! + k;
      }
  return { sums, counts, kMean, data };
}

describe("Gaussian random field", () => {
  const lengthMpc = 256 / h; // a 256 Mpc/h box
  const grid = new Grid([64, 64, 64], [1, 1, 1]);
  const power = new LinearPower(params);
  const seeds = [1, 2, 3, 4];
  const fields = seeds.map((seed) => gaussianRandomField(grid, power, { seed, fixedAmplitude: false, paired: false, growthRatio: 1, flowFactor: 0, lengthUnitMpc: lengthMpc }));

  it("its binned power spectrum matches the input within the cosmic variance of each bin (4 seeds)", () => {
    const bins = 12;
    const total = new Float64Array(bins);
    const counts = new Float64Array(bins);
    const expected = new Float64Array(bins);
    for (const f of fields) {
      const m = measurePower(grid, f.delta, lengthMpc, bins);
      for (let i = 0; i < bins; i++) {
        total[i] = total[i]! + m.sums[i]!;
        counts[i] = counts[i]! + m.counts[i]!;
      }
    }
    // the input averaged over the same modes
    const m0 = measurePower(grid, fields[0]!.delta, lengthMpc, bins);
    for (let i = 0; i < bins; i++) expected[i] = power.at(m0.kMean[i]! / m0.counts[i]!);
    for (let i = 0; i < bins; i++) {
      const ratio = total[i]! / counts[i]! / expected[i]!;
      // each ±k pair is one independent complex mode: relative error 1/√(modes/2)
      const sigma = 1 / Math.sqrt(counts[i]! / 2);
      expect(Math.abs(ratio - 1), `bin ${i}`).toBeLessThan(4 * sigma + 0.03);
    }
  });

  it("σ₈ measured by top-hat filtering the z = 0 field matches the requested 0.8111 within sampling error", () => {
    const R = 8 / h;
    let measured = 0;
    let expectedBox = 0;
    let varianceOfEstimate = 0;
    const volume = grid.volume * lengthMpc ** 3;
    for (const f of fields) {
      const { data } = measurePower(grid, f.delta, lengthMpc, 1);
      const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
      let s = 0;
      let p = 0;
      for (let a = 0; a < 64; a++)
        for (let b = 0; b < 64; b++)
          for (let c = 0; c < 64; c++, p += 2) {
            const k = Math.sqrt(k0[a]! ** 2 + k1[b]! ** 2 + k2[c]! ** 2) / lengthMpc;
            const w = topHat(k * R) ** 2;
            s += ((data[p]! ** 2 + data[p + 1]! ** 2) * w) / grid.size ** 2;
            if (f === fields[0]) {
              const pk = (power.at(k) * w) / volume;
              expectedBox += pk;
              varianceOfEstimate += pk * pk; // Var(|δ_k|²) = ⟨|δ_k|²⟩² per mode, ±k counted together
            }
          }
      measured += s / fields.length;
    }
    // the box's modes hold nearly all of σ₈² at this size (the rest is below the fundamental mode)
    expect(Math.abs(Math.sqrt(expectedBox) / 0.8111 - 1)).toBeLessThan(0.05);
    const sampling = Math.sqrt((2 * varianceOfEstimate) / fields.length);
    expect(Math.abs(measured - expectedBox)).toBeLessThan(4 * sampling);
    expect(Math.abs(Math.sqrt(measured) / 0.8111 - 1)).toBeLessThan(0.08);
  });

  it("is reproducible from its seed; paired fields are exact negatives; fixed fields have every |δ_k| on the mean", () => {
    const again = gaussianRandomField(grid, power, { seed: 1, fixedAmplitude: false, paired: false, growthRatio: 1, flowFactor: 0, lengthUnitMpc: lengthMpc });
    expect(Buffer.from(again.delta.buffer).equals(Buffer.from(fields[0]!.delta.buffer))).toBe(true);
    const paired = gaussianRandomField(grid, power, { seed: 1, fixedAmplitude: false, paired: true, growthRatio: 1, flowFactor: 0, lengthUnitMpc: lengthMpc });
    for (let i = 0; i < grid.size; i += 997) expect(paired.delta[i]).toBe(-fields[0]!.delta[i]!);
    const fixed = gaussianRandomField(grid, power, { seed: 1, fixedAmplitude: true, paired: false, growthRatio: 1, flowFactor: 0, lengthUnitMpc: lengthMpc });
    const { data } = measurePower(grid, fixed.delta, lengthMpc, 1);
    const volume = grid.volume * lengthMpc ** 3;
    const k1 = (2 * Math.PI) / lengthMpc;
    // the fundamental mode along the last axis: |δ_k|² V/N² = P(k) exactly
    expect(((data[2]! ** 2 + data[3]! ** 2) * volume) / grid.size ** 2 / power.at(k1)).toBeCloseTo(1, 9);
  });
});

describe("linear flow of the initial field", () => {
  it("evolving a fresh field in the solver grows every linear mode as D(a), to 1% (no decaying-mode transient)", () => {
    const hubble0 = 1e5; // code units: puts the quantum Jeans scale (k_J ∝ √H0) far below these modes
    const bg = new LcdmBackground({ hubble0, omegaMatter: 0.3153, omegaRadiation: 0 });
    const grid = new Grid([32, 32, 32], [1, 1, 1]);
    const lengthMpc = 20 / h;
    const power = new LinearPower({ ...params, m22: undefined });
    // early enough that second-order mode coupling (∝ δ²) stays far below 1%
    const a0 = 0.002;
    const a1 = 0.004;
    const { delta, phase } = gaussianRandomField(grid, power, {
      seed: 7,
      fixedAmplitude: true,
      paired: false,
      growthRatio: bg.growth(a0) / bg.growth(1),
      flowFactor: a0 * a0 * bg.hubble(a0) * bg.growthRate(a0),
      lengthUnitMpc: lengthMpc,
    });
    const rhoBar = 1.5 * 0.3153 * hubble0 * hubble0;
    const psi = new Float64Array(2 * grid.size);
    for (let i = 0; i < grid.size; i++) {
      const amp = Math.sqrt(rhoBar * (1 + delta[i]!));
      psi[2 * i] = amp * Math.cos(phase[i]!);
      psi[2 * i + 1] = amp * Math.sin(phase[i]!);
    }
    const stepper = new SplitStepper(grid, bg, makePoissonSolver(grid, "periodic"));
    stepper.setState(psi, bg.time(a0));
    const modes = (field: Float64Array) => {
      const d = new Float64Array(2 * grid.size);
      for (let i = 0; i < grid.size; i++) d[2 * i] = (field[2 * i]! ** 2 + field[2 * i + 1]! ** 2) / rhoBar - 1;
      new ComplexFft(grid.shape).forward(d);
      return d;
    };
    const before = modes(psi);
    const result = evolve(stepper, { safety: 0.25, maxDlnA: 0.005 }, { endTime: bg.time(a1), massTolerance: 1e-8, maxSteps: 1e6 });
    expect(result.status).toBe("completed");
    const after = modes(stepper.psi);
    const growth = bg.growth(a1) / bg.growth(a0);
    // the lowest modes (|k| ≤ 2 k_F), well in the linear range
    let checked = 0;
    for (const [a, b, c] of [[0, 0, 1], [0, 1, 0], [1, 0, 0], [0, 1, 1], [1, 1, 0], [1, 0, 1], [0, 0, 2], [1, 1, 1]] as const) {
      const p = 2 * ((a * 32 + b) * 32 + c);
      const ratio = Math.hypot(after[p]!, after[p + 1]!) / Math.hypot(before[p]!, before[p + 1]!);
      expect(Math.abs(ratio / growth - 1), `mode ${a},${b},${c}`).toBeLessThan(0.01);
      checked++;
    }
    expect(checked).toBe(8);
  });
});
