/**
 * The density PDF: the histogram of log₁₀(ρ/ρ̄) over the cells, by volume
 * and by mass, in two passes over blocks of cells (row-blocks.ts) that the
 * step's thread pool can share (block-tasks.ts): the range of ρ, then the
 * histogram. Each block counts into its own slots and the blocks are added
 * in order: the same numbers on any number of threads. A cell's bin is found
 * by comparing its contrast with the bins' edges (binEdges: where the
 * defining formula steps, to the last double), not by a logarithm per cell.
 */
import { addBlockSums, blockRows, MAX_BLOCKS, sharedFloats, type RowBlocks } from "./row-blocks.js";
import type { BlockRunner } from "./block-tasks.js";
import type { OnMemory } from "./split-tasks.js";
import { PDF_MAX_BINS, type BlockTables } from "./block-tables.js";
import type { FieldKernels } from "../fields/field-kernels.js";

/** A pass of the PDF over blocks of cells of ψ. */
export type PdfTask =
  /** Block u's Σρ, smallest ρ > 0 and largest ρ into sums[3u …]. */
  | { readonly kind: "pdf-range"; readonly at: RowBlocks; readonly psi: Float64Array; readonly sums: Float64Array }
  /** Block u's volume and mass fractions per bin into sums[2 bins u …] (volume, then mass); `edges` from binEdges. */
  | { readonly kind: "pdf-histogram"; readonly at: RowBlocks; readonly psi: Float64Array; readonly sums: Float64Array; readonly mean: number; readonly lo: number; readonly width: number; readonly bins: number; readonly edges: Float64Array };

/** Run a PDF task over blocks [lo, hi) (the histogram by `kernels` when the task is marked for them). */
export function runPdfTask(t: PdfTask & OnMemory, lo: number, hi: number, kernels?: FieldKernels): void {
  const k = t.wasm ? kernels : undefined;
  for (let u = lo; u < hi; u++) {
    const [first, end] = blockRows(t.at, u);
    if (t.kind === "pdf-range") {
      if (k) k.rangeCells(t.psi, first, end, t.sums, 3 * u);
      else rangeCells(t.psi, 2 * first, 2 * end, t.sums, 3 * u);
    } else if (k) k.histogramCells(t.psi, t.sums, 2 * t.bins * u, t.edges, t.psi.length / 2, t.mean, t.lo, t.width, t.bins, EDGE_MARGIN, first, end);
    else histogramCells(t, 2 * first, 2 * end, 2 * t.bins * u);
  }
}

function rangeCells(psi: Float64Array, p: number, end: number, out: Float64Array, at: number): void {
  let sum = 0;
  let minRho = Infinity;
  let maxRho = 0;
  for (; p < end; p += 2) {
    const rho = psi[p]! ** 2 + psi[p + 1]! ** 2;
    sum += rho;
    if (rho > 0 && rho < minRho) minRho = rho;
    if (rho > maxRho) maxRho = rho;
  }
  [out[at], out[at + 1], out[at + 2]] = [sum, minRho, maxRho];
}

/** The bin of contrast r: floor((log₁₀ r − lo)/width), clamped to the bins (the definition; binEdges finds where it steps). */
function binOf(r: number, lo: number, width: number, bins: number): number {
  return Math.min(bins - 1, Math.max(0, Math.floor((Math.log10(r) - lo) / width)));
}

/** Relative distance from an edge within which a cell's bin is taken from binOf itself (log₁₀ is good to an ulp or so). */
const EDGE_MARGIN = 1e-12;

/**
 * Where binOf steps: edges[j] (1 ≤ j < bins) is the least double r with binOf(r) ≥ j, found by bisection on
 * the doubles; edges[0] = 0 and edges[bins] = ∞. A cell's bin is then found by comparisons with them, with no
 * logarithm per cell (within EDGE_MARGIN of an edge, binOf decides): the same bin binOf gives.
 */
export function binEdges(lo: number, width: number, bins: number): Float64Array {
  const edges = new Float64Array(bins + 1);
  edges[bins] = Infinity;
  for (let j = 1; j < bins; j++) {
    const guess = 10 ** (lo + j * width);
    let [below, above] = [guess * (1 - 1e-9), guess * (1 + 1e-9)];
    while (binOf(below, lo, width, bins) >= j) below *= 1 - 1e-6;
    while (binOf(above, lo, width, bins) < j) above *= 1 + 1e-6;
    for (;;) {
      const mid = below + (above - below) / 2;
      if (mid === below || mid === above) break;
      if (binOf(mid, lo, width, bins) >= j) above = mid;
      else below = mid;
    }
    edges[j] = above;
  }
  return edges;
}

/** log₂ of a positive double to within 0.09, from its exponent and leading mantissa bits (a first guess of its bin). */
const BITS = new Float64Array(1);
const HIGH = new Int32Array(BITS.buffer, new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 4 : 0, 1);
function roughLog2(r: number): number {
  BITS[0] = r;
  const high = HIGH[0]!;
  return (high >>> 20) - 1023 + (high & 0xfffff) / 0x100000;
}

function histogramCells(t: Extract<PdfTask, { kind: "pdf-histogram" }>, p: number, end: number, at: number): void {
  const { psi, sums, mean, lo, width, bins, edges } = t;
  const n = psi.length / 2;
  const perLog2 = Math.LOG10E * Math.LN2;
  for (; p < end; p += 2) {
    const r = Math.max((psi[p]! ** 2 + psi[p + 1]! ** 2) / mean, 1e-30);
    let b = Math.min(bins - 1, Math.max(0, Math.floor((roughLog2(r) * perLog2 - lo) / width)));
    while (b < bins - 1 && r >= edges[b + 1]!) b++;
    while (r < edges[b]!) b--;
    if (r < edges[b]! * (1 + EDGE_MARGIN) || r >= edges[b + 1]! * (1 - EDGE_MARGIN)) b = binOf(r, lo, width, bins);
    sums[at + b] = sums[at + b]! + 1 / n;
    sums[at + bins + b] = sums[at + bins + b]! + r / n;
  }
}

/** The cells of ψ as blocks (one cell a row). */
function cellBlocks(psi: Float64Array): RowBlocks {
  const cells = psi.length / 2;
  return { rows: cells, blocks: Math.min(cells, MAX_BLOCKS), n2: 1 };
}

/**
 * Histogram of log₁₀(ρ/ρ̄): bin centres and the fraction of cells (volume) and of mass in each; the passes on
 * `run`'s threads, the histogram's in WebAssembly when `tables` are given (ψ in their memory).
 */
export function densityPdf(psi: Float64Array, bins = 40, run: BlockRunner, tables?: BlockTables): { log10Contrast: number; volumeFraction: number; massFraction: number }[] {
  const n = psi.length / 2;
  const at = cellBlocks(psi);
  // the range of ρ, then of ρ/ρ̄: dividing by ρ̄ > 0 keeps the order, so the extremes are the same cells'
  // (log₁₀ is monotonic: empty cells count as 1e-30 but do not set the lower end)
  const range = tables ? tables.sums.subarray(0, 3 * at.blocks) : sharedFloats(3 * at.blocks);
  run(at.blocks, { kind: "pdf-range", at, psi, sums: range, wasm: tables !== undefined });
  let [sum, minRho, maxRho] = [0, Infinity, 0];
  for (let u = 0; u < at.blocks; u++) [sum, minRho, maxRho] = [sum + range[3 * u]!, Math.min(minRho, range[3 * u + 1]!), Math.max(maxRho, range[3 * u + 2]!)];
  const mean = sum / n;
  const lo = Math.log10(minRho / mean);
  const hi = Math.log10(Math.max(maxRho / mean, 1e-30));
  if (!(hi > lo)) return [{ log10Contrast: hi, volumeFraction: 1, massFraction: 1 }];
  const width = (hi - lo) / bins;
  const wasm = tables !== undefined && bins <= PDF_MAX_BINS;
  // (the range's sums are read: the histogram's take their place)
  const sums = wasm ? tables.sums.subarray(0, 2 * bins * at.blocks).fill(0) : sharedFloats(2 * bins * at.blocks);
  const edges = binEdges(lo, width, bins);
  if (wasm) tables.edges.set(edges);
  run(at.blocks, { kind: "pdf-histogram", at, psi, sums, mean, lo, width, bins, edges: wasm ? tables.edges.subarray(0, bins + 1) : edges, wasm });
  const total = new Float64Array(2 * bins);
  addBlockSums(sums, at.blocks, 2 * bins, total);
  return Array.from({ length: bins }, (_, b) => ({ log10Contrast: lo + (b + 0.5) * width, volumeFraction: total[b]!, massFraction: total[bins + b]! }));
}
