/**
 * What a run will need, before it allocates anything: the step's grids
 * (with any companion fields) and tables (from the one table of step memory, fields/step-memory.ts, for the
 * backend the run will use), the worker threads, the snapshot and
 * checkpoint I/O (the copy of ψ a checkpoint keeps while it writes, the
 * state a resume reads, the slabs) and the program itself; and the address
 * space, which adds what Node.js and V8 reserve without using. Compared with
 * the machine's memory and any address-space limit (ulimit -v), a run that
 * cannot fit is refused with one line that says which grid would.
 */
import os from "node:os";
import { ConfigError } from "../core/errors.js";
import { Grid, type Triple } from "../grid/grid.js";
import { ELEMENT_BYTES, defaultPadding, isGridRegion, stepGeometry, stepRegions, type GravityKind } from "../fields/step-memory.js";
import { wasmStepBytes } from "../fields/wasm-banks.js";
import { StepPlan } from "../integrators/step-plan.js";
import { resolveFftBackend, type FftChoice } from "../integrators/fft-backend.js";
import { ExtraFields, type FieldKind } from "../integrators/extra-fields.js";
import { slabBytes } from "../io/row-read.js";
import { addressSpaceLimit } from "../core/system-limits.js";

const MiB = 2 ** 20;
const GiB = 2 ** 30;

/**
 * Measured on Node.js 20 (Linux x64) from the peak resident memory and
 * the peak address space (VmHWM and VmPeak) of 3D runs of 16³–128³ cells
 * and a resume: the program (Node.js, the libraries, HDF5's heap; a
 * resume's is the larger, about 150 MiB on a quiet machine and up to 207 MiB
 * on a busy one (load 8 on 2 cores), where the garbage collector runs later: 210 MiB is used) and each
 * worker thread; and the
 * address space reserved with V8's WebAssembly trap handler off and HDF5's
 * heap capped (as psibox runs under ulimit -v, see cli/address-space.ts):
 * about 1.55 GiB for the program and 0.3 GiB per worker thread.
 */
export const PROGRAM_BYTES = 210 * MiB;
export const THREAD_BYTES = 12 * MiB;
export const PROGRAM_ADDRESS_BYTES = 1.6 * GiB;
export const THREAD_ADDRESS_BYTES = 0.3 * GiB;

/** The parts of a run's memory in bytes. */
export interface MemoryEstimate {
  /** The grids the step holds: ψ, φ, the undo copy, the potential's spectrum or the isolated solve's padded grids. */
  readonly fields: number;
  /** The transforms' tables, each thread's scratch, the isolated kernel kept by the solver. */
  readonly scratch: number;
  /** Worker threads beyond the main thread. */
  readonly threads: number;
  /** Snapshot and checkpoint I/O: the copy of ψ a checkpoint holds while it writes, the state a resume reads, the slabs. */
  readonly io: number;
  /** Node.js, the libraries and HDF5's heap. */
  readonly program: number;
  /** All of the above: the resident memory to expect at the peak. */
  readonly total: number;
  /** The address space the process reserves (under ulimit -v). */
  readonly addressSpace: number;
}

/** What the estimate needs to know of a run. */
export interface MemoryInputs {
  readonly cells: readonly number[];
  readonly gravity: GravityKind;
  readonly threads: number;
  readonly fft: FftChoice;
  /** Kinds of the companion fields advanced beside ψ (e.g. the tangent of a measured Lyapunov rate). */
  readonly fields?: readonly FieldKind[];
}

/** The memory a run of `inputs` needs. */
export function estimateMemory(inputs: MemoryInputs): MemoryEstimate {
  const shape = new Grid(inputs.cells, inputs.cells.map(() => 1)).shape as Triple;
  const size = shape[0] * shape[1] * shape[2];
  const extra = new ExtraFields(inputs.fields ?? []).layout;
  const geometry = stepGeometry(shape, inputs.gravity, defaultPadding(shape), extra);
  const plan = new StepPlan(geometry);
  const transforms = plan.transforms();
  const backend = resolveFftBackend(inputs.fft, plan, inputs.threads);
  const specs = stepRegions(geometry, transforms, inputs.threads).filter((s) => backend === "wasm" || !s.wasmOnly);
  const bytes = (s: (typeof specs)[number]) => ELEMENT_BYTES[s.type] * s.length;
  const fields = specs.filter((s) => isGridRegion(s.name)).reduce((t, s) => t + bytes(s), 0);
  // the wasm backend: one memory, or banks (each with its own tables and windows, fields/wasm-banks.ts)
  const stepTotal = backend === "wasm" ? wasmStepBytes(geometry, transforms, inputs.threads)! : specs.reduce((t, s) => t + bytes(s), 0);
  const padded = geometry.paddedHalf ? geometry.paddedHalf[0] * geometry.paddedHalf[1] * geometry.paddedHalf[2] : 0;
  const scratch = stepTotal - fields + 8 * padded;
  const threads = inputs.threads > 1 ? inputs.threads * THREAD_BYTES : 0;
  // a resume reads ψ, φ and the companion fields as stored (24 + 16 bytes a cell per field); a checkpoint copies ψ
  // and the fields (16 each); two slabs and HDF5's copies of them
  const io = (24 + 16 * extra.fields) * size + 4 * slabBytes();
  const program = PROGRAM_BYTES;
  const total = fields + scratch + threads + io + program;
  const addressSpace = total - program + PROGRAM_ADDRESS_BYTES + (inputs.threads > 1 ? inputs.threads * THREAD_ADDRESS_BYTES : 0);
  return { fields, scratch, threads, io, program, total, addressSpace };
}

/** Bytes for people: "512 MiB", "6.4 GiB". */
export function formatBytes(bytes: number): string {
  if (bytes >= GiB) return `${(bytes / GiB).toPrecision(bytes >= 10 * GiB ? 3 : 2)} GiB`;
  return `${Math.max(1, Math.round(bytes / MiB))} MiB`;
}

/** The parts of an estimate, for a message. */
export function describeEstimate(e: MemoryEstimate, threads: number): string {
  const parts = [`fields ${formatBytes(e.fields)}`, `step tables and scratch ${formatBytes(e.scratch)}`];
  if (threads > 1) parts.push(`${threads} threads ${formatBytes(e.threads)}`);
  parts.push(`snapshot and checkpoint I/O ${formatBytes(e.io)}`, `program ${formatBytes(e.program)}`);
  return parts.join(", ");
}

/** What this machine allows: its memory, and the address-space limit of this process if one is set. */
export interface MemoryLimits {
  readonly memory: number;
  readonly addressSpace?: number | undefined;
}

/** This machine's memory and this process's address-space limit. */
export function machineLimits(): MemoryLimits {
  return { memory: os.totalmem(), addressSpace: addressSpaceLimit() };
}

/** Why `e` does not fit `limits`, or undefined when it does. */
function overLimit(e: MemoryEstimate, limits: MemoryLimits): string | undefined {
  if (e.total > limits.memory) return `more than this machine's ${formatBytes(limits.memory)} of memory`;
  if (limits.addressSpace !== undefined && e.addressSpace > limits.addressSpace) {
    return `it reserves about ${formatBytes(e.addressSpace)} of address space, more than the limit of ${formatBytes(limits.addressSpace)} (ulimit -v)`;
  }
  return undefined;
}

/** The largest grid like `cells` (the largest axis halved again and again) that fits `limits`, or undefined. */
function largestThatFits(inputs: MemoryInputs, limits: MemoryLimits): number[] | undefined {
  const cells = [...inputs.cells];
  for (;;) {
    const axis = cells.indexOf(Math.max(...cells));
    if ((cells[axis] as number) <= 4) return undefined;
    cells[axis] = (cells[axis] as number) / 2;
    if (!overLimit(estimateMemory({ ...inputs, cells }), limits)) return cells;
  }
}

const shapeText = (cells: readonly number[]): string => (cells.every((n) => n === cells[0]) && cells.length > 1 ? `${cells[0]}${["", "", "²", "³"][cells.length]}` : cells.join("×"));

/** Refuse a run that cannot fit (a ConfigError on grid.cells saying what fits); returns the estimate. */
export function checkMemory(inputs: MemoryInputs, limits: MemoryLimits = machineLimits()): MemoryEstimate {
  const e = estimateMemory(inputs);
  const why = overLimit(e, limits);
  if (!why) return e;
  const fits = largestThatFits(inputs, limits);
  const advice = fits ? `${shapeText(fits)} cells fit (about ${formatBytes(estimateMemory({ ...inputs, cells: fits }).total)})` : "no grid of this shape fits";
  throw new ConfigError(
    "grid.cells",
    `a ${shapeText(inputs.cells)} run needs about ${formatBytes(e.total)} (${describeEstimate(e, inputs.threads)}); ${why}: ${advice}`,
  );
}
