/**
 * The WebAssembly transform kernels (fields/wasm/kernels.as.ts, compiled by
 * the build): loading the module, and the tables it reads (twiddles in its
 * layout, bit-reversal permutations).
 */
import fs from "node:fs";
import { fileURLToPath } from "node:url";
import { BLOCK, CONSTANTS_ADDRESS, RESERVED_BYTES, TWIDDLE_STRIDE } from "./wasm/layout.js";

/** The kernels' exports; addresses are byte offsets into the shared memory. */
export interface WasmKernelExports {
  rowsPass(
    data: number, n2: number, lo: number, hi: number, buf: number, tw: number, rev: number, inverse: number, scale: number,
    phi: number, kickFactor: number, density: number, src: number, contact: number,
  ): number;
  initConstants(): void;
  /** The shared numbers of wasm/layout.ts as the module was built with them, and the constants table's size. */
  readonly LAYOUT_BLOCK: { readonly value: number };
  readonly LAYOUT_CONSTANTS_ADDRESS: { readonly value: number };
  readonly LAYOUT_RESERVED_BYTES: { readonly value: number };
  readonly LAYOUT_TWIDDLE_STRIDE: { readonly value: number };
  readonly CONSTANTS_BYTES: { readonly value: number };
  axisPass(data: number, n0: number, n1: number, n2: number, axis: number, lo: number, hi: number, buf: number, tw: number, rev: number, inverse: number, scale: number): void;
  driftOuter(
    data: number, n0: number, n1: number, n2: number, axis: number, lo: number, hi: number, buf: number, buf2: number,
    twF: number, twI: number, rev: number, pAxis: number, pOuter: number, pLane: number, kAxis: number, kOuter: number, kLane: number,
  ): number;
  poissonOuter(
    data: number, n0: number, n1: number, n2: number, axis: number, lo: number, hi: number, buf: number, buf2: number,
    twF: number, twI: number, rev: number, kAxis: number, kOuter: number, kLane: number,
  ): void;
  longRows(
    data: number, rows: number, n2: number, lo: number, hi: number, buf: number, buf2: number, twF: number, twI: number, rev: number,
    ltw: number, coarse: number, tStep: number, mode: number, phase: number, kk: number,
  ): number;
  longPairs(data: number, rows: number, n2: number, lo: number, hi: number, kp: number, ctw: number): void;
  realRows(input: number, out: number, n2: number, lo: number, hi: number, buf: number, tw: number, rev: number, ctw: number): void;
  realRowsInverse(spec: number, out: number, n2: number, lo: number, hi: number, buf: number, tw: number, rev: number, ctw: number): void;
  kick(psi: number, src: number, phi: number, factor: number, contact: number, lo: number, hi: number): void;
  moments(psi: number, phi: number, lo: number, hi: number, out: number): void;
  density(psi: number, phi: number, lo: number, hi: number): number;
  sinCos(angles: number, out: number, count: number): void;
  phaseTable(kk: number, factor: number, out: number, count: number): void;
}

/** Bytes at the start of the memory reserved for the kernels' constants table. */
export const WASM_RESERVED_BYTES = RESERVED_BYTES;

/** Pencils a kernel pass holds in its scratch block at once. */
export const WASM_BLOCK = BLOCK;

/** Where the compiled module is: next to this file when built, in dist/ when running from the sources (tests). */
function modulePath(): string {
  const built = fileURLToPath(new URL("./wasm/kernels.wasm", import.meta.url));
  if (fs.existsSync(built)) return built;
  return fileURLToPath(new URL("../../dist/fields/wasm/kernels.wasm", import.meta.url));
}

let compiled: WebAssembly.Module | null | undefined;

/**
 * The compiled module, or null when it is missing or this runtime lacks SIMD
 * or shared memory. A module whose shared numbers differ from wasm/layout.ts
 * (a stale build) is an error.
 */
export function kernelModule(): WebAssembly.Module | null {
  if (compiled === undefined) {
    try {
      compiled = new WebAssembly.Module(fs.readFileSync(modulePath()));
    } catch {
      compiled = null;
    }
    if (compiled) checkLayout(compiled);
  }
  return compiled;
}

/** Compare the module's exported layout numbers with this side's. */
function checkLayout(module: WebAssembly.Module): void {
  const k = instantiateKernels(module, new WebAssembly.Memory({ initial: 1, maximum: 1, shared: true }));
  const expected: [string, number, number][] = [
    ["BLOCK", k.LAYOUT_BLOCK?.value, BLOCK],
    ["CONSTANTS_ADDRESS", k.LAYOUT_CONSTANTS_ADDRESS?.value, CONSTANTS_ADDRESS],
    ["RESERVED_BYTES", k.LAYOUT_RESERVED_BYTES?.value, RESERVED_BYTES],
    ["TWIDDLE_STRIDE", k.LAYOUT_TWIDDLE_STRIDE?.value, TWIDDLE_STRIDE],
  ];
  for (const [name, got, want] of expected) {
    if (got !== want) {
      compiled = null;
      throw new Error(`the WebAssembly kernels were built with ${name} = ${got}, this psibox uses ${want}: rebuild them (npm run build)`);
    }
  }
  if (CONSTANTS_ADDRESS + k.CONSTANTS_BYTES.value > RESERVED_BYTES) throw new Error("the WebAssembly kernels' constants table does not fit the reserved bytes");
}

/** Instantiate the kernels on a shared memory. */
export function instantiateKernels(module: WebAssembly.Module, memory: WebAssembly.Memory): WasmKernelExports {
  const instance = new WebAssembly.Instance(module, { env: { memory, sin: Math.sin, cos: Math.cos } });
  return instance.exports as unknown as WasmKernelExports;
}

/** Bytes of the twiddle table of an n-point transform (TWIDDLE_STRIDE per butterfly index per radix-4 stage). */
export function twiddleBytes(n: number): number {
  let count = 0;
  for (let h = Math.log2(n) % 2 === 1 ? 2 : 1; h < n; h *= 4) count += h;
  return TWIDDLE_STRIDE * count;
}

/** Fill the twiddle table of an n-point transform (forward: e^{−2πi/4h}; inverse: e^{+2πi/4h}). */
export function fillTwiddles(out: Float64Array, n: number, inverse: boolean): void {
  const sign = inverse ? 1 : -1;
  let p = 0;
  for (let h = Math.log2(n) % 2 === 1 ? 2 : 1; h < n; h *= 4) {
    for (let k = 0; k < h; k++) {
      for (let m = 1; m <= 3; m++) {
        const angle = (sign * 2 * Math.PI * m * k) / (4 * h);
        // TWIDDLE_STRIDE bytes: (wr, wr), (−wi, wi) per power
        const wr = Math.cos(angle);
        const wi = Math.sin(angle);
        out[p++] = wr;
        out[p++] = wr;
        out[p++] = -wi;
        out[p++] = wi;
      }
    }
  }
}

/** The bit-reversal permutation of 0 … n−1. */
export function fillBitReversal(out: Int32Array, n: number): void {
  const bits = Math.log2(n);
  for (let j = 0; j < n; j++) {
    let x = j;
    let y = 0;
    for (let b = 0; b < bits; b++) {
      y = (y << 1) | (x & 1);
      x >>= 1;
    }
    out[j] = y;
  }
}
