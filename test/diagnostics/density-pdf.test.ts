// The density PDF (histogram of log₁₀ ρ/ρ̄ by volume and by mass) against a direct count computed independently
// (each cell's bin found by comparing ρ/ρ̄ with the bin edges 10^edge, no logarithm per cell), and its passes run
// block by block in any order giving the same numbers.
import { describe, expect, it } from "vitest";
import { densityPdf } from "../../src/diagnostics/analysis.js";
import { runBlockTask, type BlockRunner } from "../../src/diagnostics/block-tasks.js";
import { FieldKernels } from "../../src/fields/field-kernels.js";
import { binEdges, runPdfTask } from "../../src/diagnostics/density-pdf.js";

/** The double just below x > 0 (its bits less one). */
function below(x: number): number {
  const v = new DataView(new ArrayBuffer(8));
  v.setFloat64(0, x);
  v.setBigUint64(0, v.getBigUint64(0) - 1n);
  return v.getFloat64(0);
}

/** ψ of `cells` cells with ρ spread over four decades (a few cells empty), from a fixed seed. */
function field(cells: number): Float64Array {
  let seed = 7;
  const rand = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) + 0.5) / 4294967296;
  const psi = new Float64Array(2 * cells);
  for (let i = 0; i < cells; i++) {
    if (i % 97 === 5) continue;
    const amp = Math.sqrt(10 ** (4 * rand() - 2));
    const phase = 2 * Math.PI * rand();
    [psi[2 * i], psi[2 * i + 1]] = [amp * Math.cos(phase), amp * Math.sin(phase)];
  }
  return psi;
}

describe("the density PDF", () => {
  const cells = 5000;
  const psi = field(cells);
  const pdf = densityPdf(psi, 40);

  it("equals a direct count of the cells between the bin edges (computed independently); volume and mass fractions each sum to 1", () => {
    const rho = Array.from({ length: cells }, (_, i) => psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2);
    const mean = rho.reduce((s, r) => s + r, 0) / cells;
    const width = pdf[1]!.log10Contrast - pdf[0]!.log10Contrast;
    const edges = pdf.map((b) => 10 ** (b.log10Contrast - width / 2));
    expect(Math.log10(Math.min(...rho.filter((r) => r > 0)) / mean)).toBeCloseTo(pdf[0]!.log10Contrast - width / 2, 12);
    const volume = new Array<number>(40).fill(0);
    const mass = new Array<number>(40).fill(0);
    for (const r of rho) {
      const x = r / mean;
      // the last edge at or below x (empty cells in the first bin, the largest in the last)
      let b = 0;
      while (b + 1 < 40 && edges[b + 1]! <= x) b++;
      volume[b]! += 1 / cells;
      mass[b]! += x / cells;
    }
    pdf.forEach((bin, b) => {
      expect(bin.volumeFraction).toBeCloseTo(volume[b]!, 12);
      expect(bin.massFraction).toBeCloseTo(mass[b]!, 12);
    });
    expect(pdf.reduce((s, b) => s + b.volumeFraction, 0)).toBeCloseTo(1, 12);
    expect(pdf.reduce((s, b) => s + b.massFraction, 0)).toBeCloseTo(1, 12);
  });

  it("gives the same numbers bit for bit when its blocks run in another order (as on several threads)", () => {
    const backwards: BlockRunner = (blocks, task) => {
      for (let u = blocks - 1; u >= 0; u--) runBlockTask(task, u, u + 1);
    };
    expect(densityPdf(psi, 40, backwards)).toStrictEqual(pdf);
  });

  it("finds each bin's lower edge where floor((log₁₀ r − lo)/width) steps, to the last double (the formula evaluated here with Math.log10, independently)", () => {
    for (const [lo, width, bins] of [[-3.7, 0.15, 40], [-0.01, 0.0005, 40], [-12, 0.7, 30], [0.2, 1e-7, 8]] as const) {
      const bin = (r: number) => Math.min(bins - 1, Math.max(0, Math.floor((Math.log10(r) - lo) / width)));
      const edges = binEdges(lo, width, bins);
      for (let j = 1; j < bins; j++) {
        expect(bin(edges[j]!)).toBeGreaterThanOrEqual(j);
        expect(bin(below(edges[j]!))).toBeLessThan(j);
      }
    }
  });

  it("bins cells on and next to the edges as the formula does (evaluated here with Math.log10)", () => {
    const [lo, width, bins] = [-2.3, 0.11, 40];
    const edges = binEdges(lo, width, bins);
    const bin = (r: number) => Math.min(bins - 1, Math.max(0, Math.floor((Math.log10(Math.max(r, 1e-30)) - lo) / width)));
    for (let j = 1; j < bins; j++) {
      const re = Math.sqrt(edges[j]!);
      for (const x of [re, below(re), below(below(re)), re * (1 + 2e-16), re * (1 + 1e-12), re * (1 - 1e-12)]) {
        const sums = new Float64Array(2 * bins);
        runPdfTask({ kind: "pdf-histogram", at: { rows: 1, blocks: 1, n2: 1 }, psi: Float64Array.of(x, 0), sums, mean: 1, lo, width, bins, edges }, 0, 1);
        expect(sums.findIndex((v) => v > 0)).toBe(bin(x * x));
      }
    }
  });

  it("in WebAssembly (fields/field-kernels.ts) bins cells on and next to the edges, and tiny, huge and empty cells, as the formula does; a NaN cell counts nowhere, as in JavaScript", () => {
    const [lo, width, bins] = [-2.3, 0.11, 40];
    const memory = new WebAssembly.Memory({ initial: 1, maximum: 1, shared: true });
    const kernels = FieldKernels.of(memory)!;
    const [psi, edges, sums] = [new Float64Array(memory.buffer, 0, 2), new Float64Array(memory.buffer, 64, bins + 1), new Float64Array(memory.buffer, 1024, 2 * bins)];
    edges.set(binEdges(lo, width, bins));
    const bin = (r: number) => Math.min(bins - 1, Math.max(0, Math.floor((Math.log10(Math.max(r, 1e-30)) - lo) / width)));
    const xs = [0, 1e-40, 1e-3, 1e3, 1e200];
    for (let j = 1; j < bins; j++) {
      const re = Math.sqrt(edges[j]!);
      xs.push(re, below(re), below(below(re)), re * (1 + 2e-16), re * (1 + 1e-12), re * (1 - 1e-12), re * (1 + 1e-9), re * (1 - 1e-9));
    }
    for (const x of xs) {
      psi.set([x, 0]);
      sums.fill(0);
      runPdfTask({ kind: "pdf-histogram", at: { rows: 1, blocks: 1, n2: 1 }, psi, sums, mean: 1, lo, width, bins, edges, wasm: true }, 0, 1, kernels);
      expect(sums.findIndex((v) => v > 0)).toBe(bin(x * x));
      expect(sums[bin(x * x)]).toBe(1);
    }
    psi.set([NaN, 0]);
    sums.fill(0);
    runPdfTask({ kind: "pdf-histogram", at: { rows: 1, blocks: 1, n2: 1 }, psi, sums, mean: 1, lo, width, bins, edges, wasm: true }, 0, 1, kernels);
    expect(sums.every((v) => v === 0)).toBe(true);
  });
});
