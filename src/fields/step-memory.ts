/**
 * The memory of one split-step, declared once: `stepRegions` is the table of
 * every region the step touches (name, element type, length), and every
 * byte size, offset and view of both backends derives from it. With the
 * "js" FFT backend each region is its own SharedArrayBuffer; with "wasm"
 * all of them, the kernels' twiddle tables and one scratch block per thread
 * live in a single shared WebAssembly memory of exactly the size needed,
 * one region after another from RESERVED_BYTES, each aligned to
 * REGION_ALIGN. Either way the layout is plain data that worker threads
 * receive to build their engines. The transforms whose tables the wasm
 * backend lays out come from the step's plan of passes
 * (integrators/step-plan.ts), not from here.
 */
import type { Triple } from "../grid/grid.js";
import { REGION_ALIGN, RESERVED_BYTES } from "./wasm/layout.js";
import { twiddleBytes, WASM_BLOCK } from "./wasm-kernels.js";

/** The FFT implementations of the step. */
export type FftBackend = "wasm" | "js";

/** The step's gravity. */
export type GravityKind = "periodic" | "isolated" | "none";

/** The grids a step works on. */
export interface StepGeometry {
  readonly shape: Triple;
  /** The half spectrum of a real transform of `shape`: n0 × n1 × (n2/2 + 1). */
  readonly half: Triple;
  readonly gravity: GravityKind;
  /** The isolated solve's zero-padded grid (isolated gravity only). */
  readonly padded: Triple | undefined;
  readonly paddedHalf: Triple | undefined;
  /** The fields beside the reference ψ. */
  readonly extra: ExtraLayout;
  /** A long 1D grid's transforms in four steps (see LongLayout); undefined otherwise. */
  readonly long: LongLayout | undefined;
}

/**
 * A long 1D grid of N = n1·n2 cells seen as n1 rows of n2 cells (cell
 * x = a·n2 + b at row a, column b). Its transform runs in four steps: the
 * columns (length n1, blocks of pencils), a twiddle e^{−2πi·a'·b/N} per cell,
 * the rows (length n2); the spectrum stays in transposed order, wavenumber
 * index k = a' + n1·k2 at row a', column k2, and the inverse retraces the
 * steps back to natural order. The periodic Poisson solve does the same on
 * the density's N/2 complex pairs (n1/2 rows of n2), in place. Elementwise
 * passes work on the n1 rows, so every pass splits across threads.
 */
export interface LongLayout {
  readonly n1: number;
  readonly n2: number;
}

/** Whether a grid name is a real grid (φ or aux): a long grid's real transforms run on its N/2 complex pairs. */
export function isRealGrid(grid: string): grid is "phi" | "aux" {
  return grid === "phi" || grid === "aux";
}

/**
 * Rows of n2 values in a long grid's twiddle table: the twiddle e^{−2πi·a·j/N}
 * of row a, column j is the product of coarse row ⌊a/16⌋ (e^{−2πi·16c·j/N},
 * c < n1/16) and fine row a mod 16 (e^{−2πi·f·j/N}), a table of 1/16 + 16/n1
 * of the grid's size.
 */
export function longTwiddleRows(long: LongLayout): number {
  return long.n1 / 16 + LONG_FINE_ROWS;
}

/** Fine rows of the long twiddle table. */
export const LONG_FINE_ROWS = 16;

/** Cells from which a 1D grid (a power of two) is transformed in four steps: from here a transform outgrows the caches. */
export const LONG_MIN_CELLS = 1 << 14;

/** The four-step layout of a 1D grid of `shape`, if it gets one: rows of n2 = 2^⌈log₂N/2⌉ cells. */
export function longLayout(shape: Triple, gravity: GravityKind): LongLayout | undefined {
  const n = shape[2];
  if (shape[0] !== 1 || shape[1] !== 1 || gravity === "isolated" || n < LONG_MIN_CELLS || (n & (n - 1)) !== 0) return undefined;
  const n2 = 2 ** Math.ceil(Math.log2(n) / 2);
  return { n1: n / n2, n2 };
}

/** What the fields advanced beside the reference ψ need laid out. */
export interface ExtraLayout {
  /** How many (fields 1 … K, each a complex grid and its undo copy). */
  readonly fields: number;
  /** Phase sets of their own (a field whose drift factor differs from the reference's uses the set of its index). */
  readonly phaseSets: readonly number[];
  /** Whether one needs a potential of its own (a real grid "aux", shared by all such fields one after another). */
  readonly aux: boolean;
}

/** No extra fields. */
export const NO_EXTRA: ExtraLayout = { fields: 0, phaseSets: [], aux: false };

/** The zero-padded shape of the isolated solve: twice the cells along every simulated axis. */
export function defaultPadding(shape: Triple): Triple {
  return [shape[0] > 1 ? 2 * shape[0] : 1, shape[1] > 1 ? 2 * shape[1] : 1, 2 * shape[2]];
}

/** The geometry of a step on `shape`. */
export function stepGeometry(shape: Triple, gravity: GravityKind, padded: Triple = defaultPadding(shape), extra: ExtraLayout = NO_EXTRA): StepGeometry {
  const halfOf = (s: Triple): Triple => [s[0], s[1], s[2] / 2 + 1];
  const isolated = gravity === "isolated";
  const long = longLayout(shape, gravity);
  return { shape, half: halfOf(shape), gravity, padded: isolated ? padded : undefined, paddedHalf: isolated ? halfOf(padded) : undefined, extra, long };
}

/** A complex transform the step runs: length, pencils in all, and for real rows their real length (else 0). */
export interface Transform {
  readonly n: number;
  readonly pencils: number;
  readonly realRow: number;
}

/** Element types of regions: a float64, a complex float64 pair (or one v128), an int32. */
export type ElementType = "f64" | "complex" | "i32";

/** Bytes per element. */
export const ELEMENT_BYTES: Readonly<Record<ElementType, number>> = { f64: 8, complex: 16, i32: 4 };

/** One line of the table. */
export interface RegionSpec {
  readonly name: string;
  readonly type: ElementType;
  /** Elements. */
  readonly length: number;
  /** Laid out only for the wasm backend (kernel tables, scratch). */
  readonly wasmOnly?: boolean;
}

/** A region as laid out: byte offset into its buffer, element type and length. */
export interface Region {
  readonly offset: number;
  readonly type: ElementType;
  readonly length: number;
  /** The region's own buffer (js backend); absent when it lives in the wasm memory. */
  readonly buffer?: SharedArrayBuffer;
  /** Which of the banked wasm memories holds it (fields/wasm-banks.ts); absent: the one memory, or every bank (tables). */
  readonly bank?: number;
}

/** Names of the per-axis tables and kernel tables. */
export const regionName = {
  /** (cos, sin) of the drift phase along `axis` of phase set `set` (0: the reference field's). */
  phase: (set: number, axis: number) => `phase.${set}.${axis}`,
  /** k² along `axis`, for the kinetic sums and the phases. */
  kSquared: (axis: number) => `k2.${axis}`,
  /** The periodic Poisson kernel's k² along `axis` of the half spectrum. */
  kPoisson: (axis: number) => `kp.${axis}`,
  /** Twiddles (forward, inverse) and the bit-reversal permutation of an n-point transform. */
  twiddles: (n: number, inverse: boolean) => `${inverse ? "twi" : "tw"}.${n}`,
  reversal: (n: number) => `rev.${n}`,
  /** (cos, sin)(2πk/n), k = 0 … n/2, for untangling real rows of length n. */
  realTwiddles: (n: number) => `rtw.${n}`,
  /** The four-step twiddles of a long 1D grid (rows of n2, see longTwiddleRows). */
  longTwiddles: "long.tw",
  /** A thread's two scratch blocks. */
  scratch: (slot: number) => `scratch.${slot}`,
  /** The diagnostics' tables beside their work grids (diagnostics/block-tables.ts lays them out). */
  fieldTables: "field.tables",
} as const;

/** Table lengths along an axis of n cells: rounded up to even (the kernels work on pairs). */
function even(n: number): number {
  return n + (n & 1);
}

/** Bytes of one scratch block: the largest block of BLOCK pencils of any transform. */
export function scratchBytes(transforms: readonly Transform[]): number {
  return 16 * Math.max(0, ...transforms.map((t) => Math.min(WASM_BLOCK, t.pencils) * t.n));
}

/**
 * The table of the step's memory regions. Adding a region is one line here
 * (its users then look it up by name).
 * @param transforms every transform the step's plan runs
 * @param slots threads that will run kernels (each gets a scratch region)
 */
export function stepRegions(g: StepGeometry, transforms: readonly Transform[], slots: number): RegionSpec[] {
  const [n0, n1, n2] = g.shape;
  const size = n0 * n1 * n2;
  const cells = (s: Triple) => s[0] * s[1] * s[2];
  const out: RegionSpec[] = [];
  const add = (name: string, type: ElementType, length: number, wasmOnly = false) => out.push({ name, type, length, wasmOnly });
  add("psi", "complex", size);
  add("phi", "f64", size);
  // a copy of ψ to undo a failed step, and afterwards scratch for measuring the kinetic energy
  add("undo", "complex", size);
  for (let i = 1; i <= g.extra.fields; i++) {
    add(`field.${i}`, "complex", size);
    add(`undo.${i}`, "complex", size);
  }
  if (g.extra.aux) add("aux", "f64", size);
  for (let axis = 0; axis < 3; axis++) {
    for (const set of [0, ...g.extra.phaseSets]) add(regionName.phase(set, axis), "complex", even(g.shape[axis]!));
    add(regionName.kSquared(axis), "f64", even(g.shape[axis]!));
  }
  if (g.long) add(regionName.longTwiddles, "complex", longTwiddleRows(g.long) * g.long.n2);
  if (g.gravity === "periodic") {
    // a long grid's Poisson solve runs in place on its density (LongLayout)
    if (!g.long) add("spectrum", "complex", cells(g.half));
    for (let axis = 0; axis < 3; axis++) add(regionName.kPoisson(axis), "f64", g.half[axis]!);
  }
  if (g.gravity === "isolated") {
    add("iso.work", "f64", cells(g.padded!));
    add("iso.spectrum", "complex", cells(g.paddedHalf!));
    add("iso.hat", "f64", cells(g.paddedHalf!));
  }
  return [...out, ...kernelRegions(transforms, slots)];
}

/** The wasm kernels' regions for a list of transforms: twiddles, bit reversals, real-row twiddles, a scratch block per thread. */
function kernelRegions(transforms: readonly Transform[], slots: number): RegionSpec[] {
  const out: RegionSpec[] = [];
  const add = (name: string, type: ElementType, length: number) => out.push({ name, type, length, wasmOnly: true });
  for (const n of new Set(transforms.map((t) => t.n))) {
    if (n < 2) continue;
    add(regionName.twiddles(n, false), "complex", twiddleBytes(n) / 16);
    add(regionName.twiddles(n, true), "complex", twiddleBytes(n) / 16);
    add(regionName.reversal(n), "i32", n);
  }
  for (const n of new Set(transforms.map((t) => t.realRow).filter((n) => n > 0))) add(regionName.realTwiddles(n), "complex", n / 2 + 1);
  const scratch = scratchBytes(transforms);
  for (let slot = 0; slot < slots; slot++) add(regionName.scratch(slot), "complex", (2 * scratch) / 16);
  return out;
}

/**
 * The memory of whole-grid transforms without a step (the diagnostics'
 * work grids, integrators/pooled-transforms.ts): `grids` complex grids
 * named as extra fields ("field.1" …), the k² tables the engines read,
 * `tables` doubles for the diagnostics' passes in WebAssembly (wasm only),
 * and the kernels' regions for `transforms`.
 */
export function transformRegions(g: StepGeometry, grids: number, transforms: readonly Transform[], slots: number, tables = 0): RegionSpec[] {
  const size = g.shape[0] * g.shape[1] * g.shape[2];
  const out: RegionSpec[] = [];
  for (let i = 1; i <= grids; i++) out.push({ name: `field.${i}`, type: "complex", length: size });
  for (let axis = 0; axis < 3; axis++) out.push({ name: regionName.kSquared(axis), type: "f64", length: even(g.shape[axis]!) });
  if (tables > 0) out.push({ name: regionName.fieldTables, type: "f64", length: tables, wasmOnly: true });
  return [...out, ...kernelRegions(transforms, slots)];
}

/** Byte offsets of the regions in one wasm memory, and the memory's size. */
export function wasmLayout(specs: readonly RegionSpec[]): { offsets: number[]; total: number } {
  let top = RESERVED_BYTES;
  const offsets = specs.map((s) => {
    const at = top;
    top += Math.ceil((ELEMENT_BYTES[s.type] * s.length) / REGION_ALIGN) * REGION_ALIGN;
    return at;
  });
  return { offsets, total: top };
}

/** Bytes of a WebAssembly page. */
export const WASM_PAGE = 65536;
/** Largest wasm memory (4 GiB of 32-bit addresses). */
export const WASM_MAX_BYTES = 65536 * WASM_PAGE;

/** Bytes the wasm backend needs (to decide whether it fits in a 4 GiB memory). */
export function wasmBytesNeeded(g: StepGeometry, transforms: readonly Transform[], slots: number): number {
  return wasmLayout(stepRegions(g, transforms, slots)).total;
}

/** Everything an engine needs, in any thread. */
export interface StepSetup {
  readonly backend: FftBackend;
  readonly geometry: StepGeometry;
  readonly regions: Readonly<Record<string, Region>>;
  /** The one memory of the wasm backend (with banks: the first bank). */
  readonly memory?: WebAssembly.Memory;
  /** Grids too large for one memory: the wasm memories they are spread over (fields/wasm-banks.ts). */
  readonly banks?: readonly WebAssembly.Memory[];
  /** Bytes of one of a thread's two scratch blocks (wasm). */
  readonly scratchBytes: number;
}

/** A region of a layout by name (an error names a missing one). */
export function region(setup: StepSetup, name: string): Region {
  const r = setup.regions[name];
  if (!r) throw new Error(`the step's memory has no region "${name}"`);
  return r;
}

/** A Float64Array over a float64 or complex region (complex: interleaved re, im). */
export function regionView(setup: StepSetup, name: string): Float64Array {
  const r = region(setup, name);
  if (r.type === "i32") throw new Error(`region "${name}" holds int32`);
  const buffer = regionBuffer(setup, r);
  if (!buffer) throw new Error(`region "${name}" has no buffer`);
  return new Float64Array(buffer, r.offset, (ELEMENT_BYTES[r.type] / 8) * r.length);
}

/** An Int32Array over an int32 region. */
export function regionInts(setup: StepSetup, name: string): Int32Array {
  const r = region(setup, name);
  return new Int32Array(regionBuffer(setup, r)!, r.offset, r.length);
}

/** The buffer a region lives in: its own, its bank's, or the one wasm memory's. */
function regionBuffer(setup: StepSetup, r: Region): ArrayBufferLike | undefined {
  if (r.buffer) return r.buffer;
  if (r.bank !== undefined) return setup.banks![r.bank]!.buffer;
  return setup.memory?.buffer;
}

/** Cells of a row of the step's elementwise passes (the last axis, or a long grid's rows). */
export function rowCells(g: StepGeometry): number {
  return g.long ? g.long.n2 : g.shape[2];
}

/** Whether a region is a grid (a field, a potential, a spectrum, the isolated solve's arrays) rather than a table or scratch. */
export function isGridRegion(name: string): boolean {
  return ["psi", "phi", "undo", "spectrum", "aux"].includes(name) || /^(iso|field|undo)\./.test(name);
}
