/**
 * The diagnostics' WebAssembly passes (wasm/field-passes.as.ts,
 * compiled by the build) on a shared memory: loading the module once,
 * one instance per memory and thread, and calls that take views of that
 * memory (their byte offsets are the addresses the passes use). Each pass
 * computes what its JavaScript version computes, in the same order, so the
 * two give the same bits (tested).
 */
import fs from "node:fs";
import v8 from "node:v8";
import { fileURLToPath } from "node:url";

interface Exports {
  shellTable(bins: number, ksum: number, modes: number, k0: number, k1: number, k2: number, n0: number, n1: number, n2: number, kF: number, count: number, row: number): void;
  ikRows(z: number, k: number, kz: number, n1: number, n2: number, axis: number, first: number, end: number): void;
  packCells(psi: number, z: number, from: number, to: number, acc: number): void;
  shellRows(
    z: number, div: number, nyq: number, bins: number, k0: number, k1: number, k2: number, n0: number, n1: number, n2: number, count: number,
    perMode: number, velocityPerMode: number, axis: number, first: number, s: number, from: number, end: number,
  ): number;
  compressibleRows(div: number, nyq: number, bins: number, k0: number, k1: number, k2: number, n0: number, n1: number, n2: number, count: number, perMode: number, s: number, from: number, end: number): void;
  contrastCells(psi: number, out: number, mean: number, from: number, to: number): void;
  powerRows(data: number, bins: number, n2: number, perMode: number, sums: number, from: number, end: number): void;
  histogramCells(psi: number, sums: number, edges: number, n: number, mean: number, lo: number, width: number, bins: number, margin: number, from: number, to: number): void;
  rangeCells(psi: number, from: number, to: number, out: number): void;
  massCells(psi: number, from: number, to: number): number;
  momentRows(spec: number, k0: number, k1: number, k2: number, n1: number, n2: number, from: number, end: number, acc: number): void;
  contrastCounts(psi: number, mean: number, width: number, counts: number, bins: number, data: number, n: number): number;
  powerCells(data: number, n: number): void;
  nyquistPlane(spec: number, n0: number, n1: number, n2: number, axis: number, k: number, perMode: number, sum: number): number;
  densityCells(psi: number, rho: number, n: number): void;
  inverseK2Rows(spec: number, k0: number, k1: number, k2: number, n1: number, n2: number, from: number, end: number, sum: number): number;
  peakRows(rho: number, n0: number, n1: number, n2: number, from: number, out: number, cap: number): number;
  radialCells(psi: number, n1: number, n2: number, la: number, na: number, lb: number, nb: number, lc: number, nc: number, h: number, bins: number, sum: number, rs: number, cnt: number): void;
  distanceShells(data: number, rows: number, last: number, count: number, n2: number, h: number, limit: number, sum: number, rs: number, cnt: number, bins: number): void;
}

/** Where the compiled module is: beside the transform kernels when built, in dist/ when running from the sources (tests). */
function modulePath(): string {
  const built = fileURLToPath(new URL("./wasm/field-passes.wasm", import.meta.url));
  if (fs.existsSync(built)) return built;
  return fileURLToPath(new URL("../../dist/fields/wasm/field-passes.wasm", import.meta.url));
}

let compiled: WebAssembly.Module | null | undefined;

/**
 * The compiled module, or null when it is missing (the passes then run in JavaScript). Every function is
 * compiled by the optimising compiler at once (about 11 ms of CPU on the compiler's threads, 6 ms of wall
 * time): most passes are one call over a whole grid, and a call begun in the baseline code stays there to its
 * end (4-6 times slower: 7-8 ms against 1.3 ms for Σ|ψ|² over 2²¹ cells), while compiling each function
 * optimised at its first call costs that call a few ms (the module is compiled once per process: other
 * threads get the same code).
 */
function passModule(): WebAssembly.Module | null {
  if (compiled === undefined) {
    try {
      const bytes = fs.readFileSync(modulePath());
      v8.setFlagsFromString("--no-liftoff --no-wasm-lazy-compilation");
      try {
        compiled = new WebAssembly.Module(bytes);
      } finally {
        v8.setFlagsFromString("--liftoff --wasm-lazy-compilation");
      }
    } catch {
      compiled = null;
    }
  }
  return compiled;
}

/** A view's address in its memory. */
const at = (a: ArrayBufferView): number => a.byteOffset;

/** The passes on one memory; every array given must be a view of that memory. */
export class FieldKernels {
  private constructor(private readonly k: Exports) {}

  private static readonly instances = new WeakMap<WebAssembly.Memory, FieldKernels>();

  /** The passes on `memory` (one instance per memory in this thread), or undefined without the module. */
  static of(memory: WebAssembly.Memory): FieldKernels | undefined {
    let kernels = FieldKernels.instances.get(memory);
    if (!kernels) {
      const module = passModule();
      if (!module) return undefined;
      const instance = new WebAssembly.Instance(module, { env: { memory, log10: Math.log10 } });
      kernels = new FieldKernels(instance.exports as unknown as Exports);
      FieldKernels.instances.set(memory, kernels);
    }
    return kernels;
  }

  /** The shells of the half space into `t.bins`, Σ|k| and the mode counts (zeroed before) into `t.ksum`, `t.modes`; `row` is scratch of n2/2 + 1. */
  shellTable(
    t: { bins: Int16Array; ksum: Float64Array; modes: Float64Array; k: readonly Float64Array[]; count: number },
    shape: readonly [number, number, number],
    kF: number,
    row: Float64Array,
  ): void {
    this.k.shellTable(at(t.bins), at(t.ksum), at(t.modes), at(t.k[0]!), at(t.k[1]!), at(t.k[2]!), shape[0], shape[1], shape[2], kF, t.count, at(row));
  }

  ikRows(z: Float64Array, k: Float64Array, kz: Float64Array, n1: number, n2: number, axis: number, first: number, end: number): void {
    this.k.ikRows(at(z), at(k), at(kz), n1, n2, axis, first, end);
  }

  /** Cells [from, to); the two sums at acc[accAt], acc[accAt + 1]. */
  packCells(psi: Float64Array, z: Float64Array, from: number, to: number, acc: Float64Array, accAt: number): void {
    this.k.packCells(at(psi), at(z), from, to, at(acc) + 8 * accAt);
  }

  shellRows(
    d: { shape: readonly [number, number, number]; k0: Float64Array; k1: Float64Array; k2: Float64Array; bins: Int16Array | Int32Array; count: number; perMode: number; velocityPerMode: number; div: Float64Array; nyquist: Float64Array },
    z: Float64Array, axis: number, first: boolean, s: Float64Array, sAt: number, from: number, end: number,
  ): void {
    const [n0, n1, n2] = d.shape;
    this.k.shellRows(at(z), at(d.div), at(d.nyquist), at(d.bins), at(d.k0), at(d.k1), at(d.k2), n0, n1, n2, d.count, d.perMode, d.velocityPerMode, axis, first ? 1 : 0, at(s) + 8 * sAt, from, end);
  }

  compressibleRows(
    d: { shape: readonly [number, number, number]; k0: Float64Array; k1: Float64Array; k2: Float64Array; bins: Int16Array | Int32Array; count: number; perMode: number; div: Float64Array; nyquist: Float64Array },
    s: Float64Array, sAt: number, from: number, end: number,
  ): void {
    const [n0, n1, n2] = d.shape;
    this.k.compressibleRows(at(d.div), at(d.nyquist), at(d.bins), at(d.k0), at(d.k1), at(d.k2), n0, n1, n2, d.count, d.perMode, at(s) + 8 * sAt, from, end);
  }

  contrastCells(psi: Float64Array, out: Float64Array, mean: number, from: number, to: number): void {
    this.k.contrastCells(at(psi), at(out), mean, from, to);
  }

  powerRows(data: Float64Array, bins: Int16Array, n2: number, perMode: number, sums: Float64Array, from: number, end: number): void {
    this.k.powerRows(at(data), at(bins), n2, perMode, at(sums), from, end);
  }

  /** Σρ, the least ρ > 0 and the largest ρ of cells [from, to) into out[outAt …]. */
  rangeCells(psi: Float64Array, from: number, to: number, out: Float64Array, outAt: number): void {
    this.k.rangeCells(at(psi), from, to, at(out) + 8 * outAt);
  }

  /** Σ|ψ|² over cells [from, to), in storage order. */
  massCells(psi: Float64Array, from: number, to: number): number {
    return this.k.massCells(at(psi), from, to);
  }

  /** The moments of a spectrum's rows [from, end) (k0, k1, k2 the grid's wavenumbers) added into acc[0…4]. */
  momentRows(spec: Float64Array, k: readonly Float64Array[], shape: readonly [number, number, number], from: number, end: number, acc: Float64Array): void {
    this.k.momentRows(at(spec), at(k[0]!), at(k[1]!), at(k[2]!), shape[1], shape[2], from, end, at(acc));
  }

  /** x = |ψ|²/ρ̄ of every cell counted in `counts` (bins of `width`), δ = x − 1 into `data` when given; returns var(δ). */
  contrastCounts(psi: Float64Array, mean: number, width: number, counts: Float64Array, data: Float64Array | undefined): number {
    return this.k.contrastCounts(at(psi), mean, width, at(counts), counts.length, data ? at(data) : 0, psi.length / 2);
  }

  /** sum + Σ k² |spec|² perMode over the modes with index n_axis/2 along `axis` (the Nyquist plane; n_axis even), in storage order. */
  nyquistPlane(spec: Float64Array, shape: readonly [number, number, number], axis: number, k: number, perMode: number, sum: number): number {
    return this.k.nyquistPlane(at(spec), shape[0], shape[1], shape[2], axis, k, perMode, sum);
  }

  /** Σ_{k≠0} |spec_k|²/k² over a spectrum's rows [from, end) (k the grid's wavenumbers), in storage order. */
  inverseK2Rows(spec: Float64Array, k: readonly Float64Array[], shape: readonly [number, number, number], from: number, end: number): number {
    return this.k.inverseK2Rows(at(spec), at(k[0]!), at(k[1]!), at(k[2]!), shape[1], shape[2], from, end, 0);
  }

  /** ρ = |ψ|² of every cell of ψ into rho. */
  densityCells(psi: Float64Array, rho: Float64Array): void {
    this.k.densityCells(at(psi), at(rho), rho.length);
  }

  /**
   * The local maxima of ρ (no neighbour along a simulated axis exceeds them, periodic) in storage order, found a
   * few rows at a time into `room` (an array of this memory of more than n2 / 2 numbers).
   */
  peakCandidates(rho: Float64Array, shape: readonly [number, number, number], room: Float64Array): Int32Array {
    const [n0, n1, n2] = shape;
    const list = new Int32Array(room.buffer, room.byteOffset, 2 * room.length);
    const found: Int32Array[] = [];
    let total = 0;
    for (let row = 0; row < n0 * n1; ) {
      row = this.k.peakRows(at(rho), n0, n1, n2, row, at(room), list.length - 1);
      const count = list[0]!;
      found.push(list.slice(1, 1 + count));
      total += count;
    }
    const out = new Int32Array(total);
    let p = 0;
    for (const part of found) {
      out.set(part, p);
      p += part.length;
    }
    return out;
  }

  /** radialCells over index lists (each: its indices, then their squared distances), shells of width h into sum, rs, cnt (their length: the shells). */
  radialCells(psi: Float64Array, shape: readonly [number, number, number], lists: readonly Float64Array[], h: number, sum: Float64Array, rs: Float64Array, cnt: Float64Array): void {
    const [la, lb, lc] = lists as [Float64Array, Float64Array, Float64Array];
    this.k.radialCells(at(psi), shape[1], shape[2], at(la), la.length / 2, at(lb), lb.length / 2, at(lc), lc.length / 2, h, sum.length, at(sum), at(rs), at(cnt));
  }

  /** data ← |data|²/n (real), every cell. */
  powerCells(data: Float64Array): void {
    this.k.powerCells(at(data), data.length / 2);
  }

  /** The real parts of `data` in shells of width h by √(rows[r] + last[c]) (rows at or beyond `limit` skipped) into sum, rs, cnt (their length: the shells). */
  distanceShells(data: Float64Array, rows: Float64Array, last: Float64Array, h: number, limit: number, sum: Float64Array, rs: Float64Array, cnt: Float64Array): void {
    this.k.distanceShells(at(data), at(rows), at(last), rows.length, last.length, h, limit, at(sum), at(rs), at(cnt), sum.length);
  }

  histogramCells(psi: Float64Array, sums: Float64Array, sAt: number, edges: Float64Array, n: number, mean: number, lo: number, width: number, bins: number, margin: number, from: number, to: number): void {
    this.k.histogramCells(at(psi), at(sums) + 8 * sAt, at(edges), n, mean, lo, width, bins, margin, from, to);
  }
}
