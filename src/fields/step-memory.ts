/**
 * The memory of one split-step: ψ, φ, the Poisson half spectrum, the drift's
 * phase tables and the k² tables, laid out once. With the "js" FFT backend
 * every region is its own SharedArrayBuffer; with "wasm" all of them, the
 * kernels' twiddle tables and one scratch block per thread live in a single
 * shared WebAssembly memory of exactly the size needed. Either way the
 * layout is plain data that worker threads receive to build their engines.
 */
import type { Triple } from "../grid/grid.js";
import { fillBitReversal, fillTwiddles, instantiateKernels, kernelModule, twiddleBytes, WASM_BLOCK, WASM_RESERVED_BYTES } from "./wasm-kernels.js";

/** The FFT implementations of the step. */
export type FftBackend = "wasm" | "js";

/** A run of float64 values: byte offset into its buffer and length in values. */
export interface Region {
  readonly offset: number;
  readonly length: number;
  /** The region's own buffer (js backend); absent when it lives in the wasm memory. */
  readonly buffer?: SharedArrayBuffer;
}

/** Tables of one transform length in the wasm memory (byte offsets). */
export interface WasmFftTables {
  readonly forward: number;
  readonly inverse: number;
  readonly reversal: number;
}

/** The zero-padded grid of the isolated Poisson solve (twice the cells along every simulated axis). */
export interface IsolatedRegions {
  /** Padded shape. */
  readonly shape: Triple;
  /** Padded real work array (density in, potential out). */
  readonly work: Region;
  /** Half spectrum of the padded grid. */
  readonly spectrum: Region;
  /** The Green's function's transform (real) on the padded half spectrum. */
  readonly hat: Region;
}

/** What the step's gravity needs laid out. */
export type GravityLayout =
  | { readonly kind: "periodic"; readonly kSquared: readonly Float64Array[] }
  | { readonly kind: "isolated"; readonly padded: Triple; readonly hat: Float64Array }
  | { readonly kind: "none" };

/** Everything an engine needs, in any thread. */
export interface StepSetup {
  readonly backend: FftBackend;
  readonly shape: Triple;
  /** ψ, interleaved complex. */
  readonly psi: Region;
  /** φ (and |ψ|² on the way). */
  readonly phi: Region;
  /** A copy of ψ to undo a failed step, and afterwards scratch for measuring the kinetic energy. */
  readonly undo: Region;
  /** Half spectrum of the periodic Poisson solve (shape n0 × n1 × (n2/2 + 1)). */
  readonly spectrum: Region | undefined;
  /** (cos, sin) of the drift phase per index, axes 0, 1, 2 concatenated. */
  readonly phase: Region;
  /** k² per index along axes 0, 1, 2 concatenated (kinetic sums). */
  readonly kGrad: Region;
  /** The Poisson kernel's k² along axes 0, 1 and the half axis 2, concatenated. */
  readonly kPoisson: Region | undefined;
  /** The isolated solve's padded grid. */
  readonly isolated: IsolatedRegions | undefined;
  readonly wasm?: {
    readonly memory: WebAssembly.Memory;
    /** Tables per transform length. */
    readonly tables: Readonly<Record<number, WasmFftTables>>;
    /** Per real row length n: (cos, sin)(2πk/n), k = 0 … n/2, for the real row transforms. */
    readonly realTwiddles: Readonly<Record<number, number>>;
    /** Per thread slot: two scratch blocks of `scratchBytes` each. */
    readonly scratch: readonly number[];
    readonly scratchBytes: number;
  };
}

/** What the stepper is given back: the layout and views of the regions on this thread. */
export interface StepMemory {
  readonly setup: StepSetup;
  readonly psi: Float64Array;
  readonly phi: Float64Array;
  readonly undo: Float64Array;
  readonly spectrum: Float64Array | undefined;
  readonly phase: readonly [Float64Array, Float64Array, Float64Array];
}

/** A Float64Array over a region. */
export function regionView(setup: StepSetup, region: Region): Float64Array {
  const buffer = region.buffer ?? setup.wasm?.memory.buffer;
  if (!buffer) throw new Error("region without a buffer");
  return new Float64Array(buffer, region.offset, region.length);
}

/** Split a concatenated per-axis table into its three axes. */
export function perAxis(table: Float64Array, lengths: Triple, width = 1): [Float64Array, Float64Array, Float64Array] {
  const [a, b, c] = lengths;
  return [table.subarray(0, width * a), table.subarray(width * a, width * (a + b)), table.subarray(width * (a + b), width * (a + b + c))];
}

/** Bytes the wasm backend needs for a grid (used to decide whether it fits in a 4 GiB memory). */
export function wasmBytesNeeded(shape: Triple, gravity: GravityLayout["kind"], slots: number): number {
  const padded: Triple = [shape[0] > 1 ? 2 * shape[0] : 1, shape[1] > 1 ? 2 * shape[1] : 1, 2 * shape[2]];
  return planWasm(shape, gravity, padded, slots).total;
}

const WASM_PAGE = 65536;
/** Largest wasm memory (4 GiB of 32-bit addresses). */
export const WASM_MAX_BYTES = 65536 * WASM_PAGE;

/** n0 + n1 + n2 rounded up to even: the length of the per-axis tables. */
export function evenAxes(shape: Triple): number {
  const axes = shape[0] + shape[1] + shape[2];
  return axes + (axes & 1);
}

/** Cells of a half spectrum of `shape`. */
function halfCells(shape: Triple): number {
  return shape[0] * shape[1] * (shape[2] / 2 + 1);
}

function planWasm(shape: Triple, gravity: GravityLayout["kind"], padded: Triple, slots: number) {
  const [n0, n1, n2] = shape;
  const size = n0 * n1 * n2;
  const h2 = n2 / 2 + 1;
  let top = WASM_RESERVED_BYTES;
  const take = (bytes: number): number => {
    const at = top;
    top += Math.ceil(bytes / 64) * 64;
    return at;
  };
  const periodic = gravity === "periodic";
  const isolated = gravity === "isolated";
  const psi = take(16 * size);
  const phi = take(8 * size);
  const undo = take(16 * size);
  const spectrum = periodic ? take(16 * halfCells(shape)) : 0;
  // the per-axis tables padded to an even length (the kernels work on pairs)
  const axes = evenAxes(shape);
  const phase = take(16 * axes);
  const kGrad = take(8 * axes);
  const kPoisson = periodic ? take(8 * (n0 + n1 + h2)) : 0;
  const [p0, p1, p2] = padded;
  const iso = isolated
    ? { work: take(8 * p0 * p1 * p2), spectrum: take(16 * halfCells(padded)), hat: take(8 * halfCells(padded)) }
    : undefined;
  // every transform of the step: (length, number of pencils)
  const passes: [number, number][] = [
    [n2, n0 * n1],
    [n1, n0 * n2],
    [n0, n1 * n2],
  ];
  if (periodic) passes.push([n2 / 2, n0 * n1], [n1, n0 * h2], [n0, n1 * h2]);
  if (isolated) passes.push([p2 / 2, p0 * p1], [p1, p0 * (p2 / 2 + 1)], [p0, p1 * (p2 / 2 + 1)]);
  const tables: Record<number, WasmFftTables> = {};
  for (const [n] of passes) {
    if (n > 1 && !tables[n]) tables[n] = { forward: take(twiddleBytes(n)), inverse: take(twiddleBytes(n)), reversal: take(4 * n) };
  }
  const realTwiddles: Record<number, number> = {};
  for (const n of periodic ? [n2] : isolated ? [p2] : []) realTwiddles[n] = take(16 * (n / 2 + 1));
  // a block holds at most WASM_BLOCK pencils of a transform (fewer when there are fewer pencils)
  const scratchBytes = 16 * Math.max(...passes.map(([n, count]) => Math.min(WASM_BLOCK, count) * n));
  const scratch = Array.from({ length: slots }, () => take(2 * scratchBytes));
  return { psi, phi, undo, spectrum, phase, kGrad, kPoisson, iso, tables, realTwiddles, scratch, scratchBytes, total: top };
}

/**
 * Lay out and allocate the step's memory.
 * @param kSquared k² per axis for the kinetic sums
 * @param gravity what the Poisson solve needs (periodic: its kernel's k² per axis, half axis 2; isolated: the padded shape and the Green's function's transform)
 * @param slots threads that will run kernels (the wasm backend gives each a scratch block)
 */
export function allocateStepMemory(backend: FftBackend, shape: Triple, kSquared: readonly Float64Array[], gravity: GravityLayout, slots: number): StepMemory {
  const [n0, n1, n2] = shape;
  const size = n0 * n1 * n2;
  const h2 = n2 / 2 + 1;
  const axes = evenAxes(shape);
  const periodic = gravity.kind === "periodic";
  const padded: Triple = gravity.kind === "isolated" ? gravity.padded : [1, 1, 1];
  const paddedCells = padded[0] * padded[1] * padded[2];
  let setup: StepSetup;
  if (backend === "js") {
    const own = (length: number): Region => ({ offset: 0, length, buffer: new SharedArrayBuffer(8 * length) });
    setup = {
      backend,
      shape,
      psi: own(2 * size),
      phi: own(size),
      undo: own(2 * size),
      spectrum: periodic ? own(2 * halfCells(shape)) : undefined,
      phase: own(2 * axes),
      kGrad: own(axes),
      kPoisson: periodic ? own(n0 + n1 + h2) : undefined,
      isolated:
        gravity.kind === "isolated"
          ? { shape: padded, work: own(paddedCells), spectrum: own(2 * halfCells(padded)), hat: own(halfCells(padded)) }
          : undefined,
    };
  } else {
    const plan = planWasm(shape, gravity.kind, padded, slots);
    if (plan.total > WASM_MAX_BYTES) throw new RangeError(`the wasm FFT backend needs ${plan.total} bytes, more than a 4 GiB WebAssembly memory`);
    const pages = Math.ceil(plan.total / WASM_PAGE);
    const memory = new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
    const at = (offset: number, length: number): Region => ({ offset, length });
    setup = {
      backend,
      shape,
      psi: at(plan.psi, 2 * size),
      phi: at(plan.phi, size),
      undo: at(plan.undo, 2 * size),
      spectrum: periodic ? at(plan.spectrum, 2 * halfCells(shape)) : undefined,
      phase: at(plan.phase, 2 * axes),
      kGrad: at(plan.kGrad, axes),
      kPoisson: periodic ? at(plan.kPoisson, n0 + n1 + h2) : undefined,
      isolated: plan.iso
        ? { shape: padded, work: at(plan.iso.work, paddedCells), spectrum: at(plan.iso.spectrum, 2 * halfCells(padded)), hat: at(plan.iso.hat, halfCells(padded)) }
        : undefined,
      wasm: { memory, tables: plan.tables, realTwiddles: plan.realTwiddles, scratch: plan.scratch, scratchBytes: plan.scratchBytes },
    };
    const module = kernelModule();
    if (!module) throw new Error("the wasm FFT backend is not available");
    instantiateKernels(module, memory).initConstants();
    const buffer = memory.buffer;
    for (const [n, t] of Object.entries(plan.tables)) {
      const len = Number(n);
      fillTwiddles(new Float64Array(buffer, t.forward, twiddleBytes(len) / 8), len, false);
      fillTwiddles(new Float64Array(buffer, t.inverse, twiddleBytes(len) / 8), len, true);
      fillBitReversal(new Int32Array(buffer, t.reversal, len), len);
    }
    for (const [n, address] of Object.entries(plan.realTwiddles)) {
      const len = Number(n);
      const ctw = new Float64Array(buffer, address, 2 * (len / 2 + 1));
      for (let k = 0; k <= len / 2; k++) {
        ctw[2 * k] = Math.cos((2 * Math.PI * k) / len);
        ctw[2 * k + 1] = Math.sin((2 * Math.PI * k) / len);
      }
    }
  }
  const kg = regionView(setup, setup.kGrad);
  kg.set(kSquared[0]!, 0);
  kg.set(kSquared[1]!, n0);
  kg.set(kSquared[2]!, n0 + n1);
  if (gravity.kind === "periodic" && setup.kPoisson) {
    const kp = regionView(setup, setup.kPoisson);
    kp.set(gravity.kSquared[0]!, 0);
    kp.set(gravity.kSquared[1]!, n0);
    kp.set(gravity.kSquared[2]!, n0 + n1);
  }
  if (gravity.kind === "isolated" && setup.isolated) regionView(setup, setup.isolated.hat).set(gravity.hat);
  return {
    setup,
    psi: regionView(setup, setup.psi),
    phi: regionView(setup, setup.phi),
    undo: regionView(setup, setup.undo),
    spectrum: setup.spectrum ? regionView(setup, setup.spectrum) : undefined,
    phase: perAxis(regionView(setup, setup.phase), shape, 2),
  };
}
