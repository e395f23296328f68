/**
 * The density PDF: the histogram of log₁₀(ρ/ρ̄) over the cells, by volume
 * and by mass, in two passes over blocks of cells (row-blocks.ts) that the
 * step's thread pool can share (block-tasks.ts): the range of ρ, then the
 * histogram. Each block counts into its own slots and the blocks are added
 * in order: the same numbers on any number of threads.
 */
import { addBlockSums, blockRows, sharedFloats, type RowBlocks } from "./row-blocks.js";
import type { BlockRunner } from "./block-tasks.js";

/** A pass of the PDF over blocks of cells of ψ. */
export type PdfTask =
  /** Block u's Σρ, smallest ρ > 0 and largest ρ into sums[3u …]. */
  | { readonly kind: "pdf-range"; readonly at: RowBlocks; readonly psi: Float64Array; readonly sums: Float64Array }
  /** Block u's volume and mass fractions per bin into sums[2 bins u …] (volume, then mass). */
  | { readonly kind: "pdf-histogram"; readonly at: RowBlocks; readonly psi: Float64Array; readonly sums: Float64Array; readonly mean: number; readonly lo: number; readonly width: number; readonly bins: number };

/** Run a PDF task over blocks [lo, hi). */
export function runPdfTask(t: PdfTask, lo: number, hi: number): void {
  for (let u = lo; u < hi; u++) {
    const [first, end] = blockRows(t.at, u);
    if (t.kind === "pdf-range") rangeCells(t.psi, 2 * first, 2 * end, t.sums, 3 * u);
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

function histogramCells(t: Extract<PdfTask, { kind: "pdf-histogram" }>, p: number, end: number, at: number): void {
  const { psi, sums, mean, lo, width, bins } = t;
  const n = psi.length / 2;
  for (; p < end; p += 2) {
    const r = Math.max((psi[p]! ** 2 + psi[p + 1]! ** 2) / mean, 1e-30);
    const b = Math.min(bins - 1, Math.max(0, Math.floor((Math.log10(r) - lo) / width)));
    sums[at + b] = sums[at + b]! + 1 / n;
    sums[at + bins + b] = sums[at + bins + b]! + r / n;
  }
}

/** The cells of ψ as blocks (one cell a row). */
function cellBlocks(psi: Float64Array): RowBlocks {
  const cells = psi.length / 2;
  return { rows: cells, blocks: Math.min(cells, 64), n2: 1 };
}

/** Histogram of log₁₀(ρ/ρ̄): bin centres and the fraction of cells (volume) and of mass in each; the passes on `run`'s threads. */
export function densityPdf(psi: Float64Array, bins = 40, run: BlockRunner): { log10Contrast: number; volumeFraction: number; massFraction: number }[] {
  const n = psi.length / 2;
  const at = cellBlocks(psi);
  // the range of ρ, then of ρ/ρ̄: dividing by ρ̄ > 0 keeps the order, so the extremes are the same cells'
  // (log₁₀ is monotonic: empty cells count as 1e-30 but do not set the lower end)
  const range = sharedFloats(3 * at.blocks);
  run(at.blocks, { kind: "pdf-range", at, psi, sums: range });
  let [sum, minRho, maxRho] = [0, Infinity, 0];
  for (let u = 0; u < at.blocks; u++) [sum, minRho, maxRho] = [sum + range[3 * u]!, Math.min(minRho, range[3 * u + 1]!), Math.max(maxRho, range[3 * u + 2]!)];
  const mean = sum / n;
  const lo = Math.log10(minRho / mean);
  const hi = Math.log10(Math.max(maxRho / mean, 1e-30));
  if (!(hi > lo)) return [{ log10Contrast: hi, volumeFraction: 1, massFraction: 1 }];
  const width = (hi - lo) / bins;
  const sums = sharedFloats(2 * bins * at.blocks);
  run(at.blocks, { kind: "pdf-histogram", at, psi, sums, mean, lo, width, bins });
  const total = new Float64Array(2 * bins);
  addBlockSums(sums, at.blocks, 2 * bins, total);
  return Array.from({ length: bins }, (_, b) => ({ log10Contrast: lo + (b + 0.5) * width, volumeFraction: total[b]!, massFraction: total[bins + b]! }));
}
