/**
 * The diagnostics' passes that run over blocks of rows (row-blocks.ts) on
 * the step's thread pool (integrators/step-task.ts, op "blocks") or on this
 * thread: the energy split's (split-tasks.ts) and the density PDF's
 * (density-pdf.ts).
 */
import { runSplitTask, type OnMemory, type SplitTask } from "./split-tasks.js";
import { runPdfTask, type PdfTask } from "./density-pdf.js";
import { FieldKernels } from "../fields/field-kernels.js";

export type BlockTask = (SplitTask | PdfTask) & OnMemory;

/** Run a task over blocks [lo, hi); `memory`: the transforms' WebAssembly memory as this thread has it, where a task marked `wasm` runs its passes. */
export function runBlockTask(t: BlockTask, lo: number, hi: number, memory?: WebAssembly.Memory): void {
  const kernels = t.wasm && memory ? FieldKernels.of(memory) : undefined;
  if (t.kind === "pdf-range" || t.kind === "pdf-histogram") runPdfTask(t, lo, hi, kernels);
  else runSplitTask(t, lo, hi, kernels);
}

/** Runs a task over all of a grid's blocks: on the step's threads, or here. */
export type BlockRunner = (blocks: number, task: BlockTask) => void;

/** The runner of this thread alone. */
export const runHere: BlockRunner = (blocks, task) => runBlockTask(task, 0, blocks);

/** Transforms that run the diagnostics' block tasks on threads of their own (integrators/pooled-transforms.ts). */
export interface BlockThreads {
  runBlocks(blocks: number, task: BlockTask): void;
}

/** Where block tasks on ψ run: on the threads of `owner` when it has them and ψ is in shared memory (a message shares it), else here. */
export function runnerOf(owner: unknown, psi: Float64Array): BlockRunner {
  const threads = owner as Partial<BlockThreads> | undefined;
  if (typeof threads?.runBlocks !== "function" || !(psi.buffer instanceof SharedArrayBuffer)) return runHere;
  return (blocks, task) => threads.runBlocks!(blocks, task);
}
