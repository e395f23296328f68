/**
 * The step engine whose transforms (and kicks and phase tables) are the
 * WebAssembly SIMD kernels, on the one shared memory of the step: each
 * region is passed to the kernels as its byte address.
 */
import type { Triple } from "../grid/grid.js";
import { EngineBase } from "./engine-base.js";
import { isRealGrid, region, regionName, type StepSetup } from "./step-memory.js";
import type { ComplexGrid, LongRowsMode, PoissonTarget, RealGrid } from "./step-engine.js";
import { instantiateKernels, kernelModule, type WasmKernelExports } from "./wasm-kernels.js";

/** Byte addresses of an n-point transform's tables. */
interface Tables {
  readonly forward: number;
  readonly inverse: number;
  readonly reversal: number;
}

/** The kernels' numbers of the long rows pass's modes (kernels.as.ts LONG_FORWARD, LONG_INVERSE, LONG_DRIFT). */
const LONG_MODES: readonly LongRowsMode[] = ["forward", "inverse", "drift"];

/** Transforms by the WebAssembly SIMD kernels on the shared memory. */
export class WasmStepEngine extends EngineBase {
  private readonly k: WasmKernelExports;
  private readonly buf: number;
  private readonly buf2: number;
  private readonly tableCache = new Map<number, Tables>();

  /** @param slot this thread's scratch block */
  constructor(setup: StepSetup, slot: number) {
    super(setup);
    const module = kernelModule();
    if (!module || !setup.memory) throw new Error("the wasm FFT backend is not available");
    this.k = instantiateKernels(module, setup.memory);
    this.buf = this.at(regionName.scratch(slot));
    this.buf2 = this.buf + setup.scratchBytes;
  }

  get memory(): WebAssembly.Memory | undefined {
    return this.setup.memory;
  }

  /** Byte address of a region. */
  private at(name: string): number {
    return region(this.setup, name).offset;
  }

  /** The tables of an n-point transform (laid out for every transform of the step's plan). */
  private tables(n: number): Tables {
    let t = this.tableCache.get(n);
    if (!t) {
      t = { forward: this.at(regionName.twiddles(n, false)), inverse: this.at(regionName.twiddles(n, true)), reversal: this.at(regionName.reversal(n)) };
      this.tableCache.set(n, t);
    }
    return t;
  }

  override fillPhases(set: number, factor: number): void {
    for (let axis = 0; axis < 3; axis++) {
      const kk = region(this.setup, regionName.kSquared(axis));
      this.k.phaseTable(kk.offset, factor, this.at(regionName.phase(set, axis)), kk.length);
    }
  }

  override kick(field: ComplexGrid, potential: RealGrid, factor: number, contact: number, source: ComplexGrid, lo: number, hi: number): void {
    const n2 = this.rowLength;
    this.k.kick(this.at(field), this.at(source), this.at(potential), factor, contact, lo * n2, hi * n2);
  }

  /** The moments on the SIMD kernel (written to this thread's scratch block, then copied out). */
  override moments(lo: number, hi: number, out: Float64Array): void {
    const n2 = this.rowLength;
    this.k.moments(this.at("psi"), this.at("phi"), lo * n2, hi * n2, this.buf);
    out.set(new Float64Array(this.setup.memory!.buffer, this.buf, 6));
  }

  /** |field|² on the SIMD kernel (the sums run two cells at a time, so they differ from fft.js's engine by round-off only). */
  override density(field: ComplexGrid, target: RealGrid, add: boolean, lo: number, hi: number): number {
    if (add) return super.density(field, target, add, lo, hi);
    const n2 = this.rowLength;
    return this.k.density(this.at(field), this.at(target), lo * n2, hi * n2);
  }

  axis(field: ComplexGrid, axis: number, inverse: boolean, lo: number, hi: number): void {
    this.pass(this.at(field), this.shape, axis, inverse, lo, hi);
  }

  rows(field: ComplexGrid, inverse: boolean, kick: number, potential: RealGrid, density: boolean, contact: number, source: ComplexGrid, lo: number, hi: number): number {
    const n2 = this.shape[2];
    const t = this.tables(n2);
    const { forward, inverse: back, reversal } = t;
    return this.k.rowsPass(
      this.at(field), n2, lo, hi, this.buf, inverse ? back : forward, reversal, inverse ? 1 : 0, inverse ? 1 / n2 : 1,
      this.at(potential), kick, density ? 1 : 0, this.at(source), contact,
    );
  }

  halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void {
    const { spectrum, half } = this.realTarget(target, "phi");
    this.pass(spectrum, half, axis, inverse, lo, hi);
  }

  /** Addresses and shapes of a target's real array and half spectrum. */
  private realTarget(target: PoissonTarget, real: RealGrid): { real: number; spectrum: number; n2: number; half: Triple } {
    if (target === "periodic") return { real: this.at(real), spectrum: this.at("spectrum"), n2: this.shape[2], half: this.half };
    const g = this.setup.geometry;
    return { real: this.at("iso.work"), spectrum: this.at("iso.spectrum"), n2: g.padded![2], half: g.paddedHalf! };
  }

  private pass(data: number, shape: Triple, axis: number, inverse: boolean, lo: number, hi: number): void {
    const n = shape[axis]!;
    const t = this.tables(n);
    this.k.axisPass(data, shape[0], shape[1], shape[2], axis, lo, hi, this.buf, inverse ? t.inverse : t.forward, t.reversal, inverse ? 1 : 0, inverse ? 1 / n : 1);
  }

  driftOuter(field: ComplexGrid, phases: number, axis: number, lo: number, hi: number, gradient: boolean): number {
    const [n0, n1, n2] = this.shape;
    const t = this.tables(this.shape[axis]!);
    const other = 1 - axis;
    const phase = (a: number) => this.at(regionName.phase(phases, a));
    const k2 = (a: number) => this.at(regionName.kSquared(a));
    return this.k.driftOuter(
      this.at(field), n0, n1, n2, axis, lo, hi, this.buf, this.buf2, t.forward, t.inverse, t.reversal,
      phase(axis), phase(other), phase(2), gradient ? k2(axis) : 0, k2(other), k2(2),
    );
  }

  poissonOuter(axis: number, lo: number, hi: number): void {
    const [h0, h1, h2] = this.half;
    const t = this.tables(this.half[axis]!);
    const kp = (a: number) => this.at(regionName.kPoisson(a));
    this.k.poissonOuter(this.at("spectrum"), h0, h1, h2, axis, lo, hi, this.buf, this.buf2, t.forward, t.inverse, t.reversal, kp(axis), kp(1 - axis), kp(2));
  }

  longColumns(grid: ComplexGrid | RealGrid, inverse: boolean, lo: number, hi: number): void {
    const { n1, n2 } = this.setup.geometry.long!;
    const rows = isRealGrid(grid) ? n1 / 2 : n1;
    const t = this.tables(rows);
    this.k.axisPass(this.at(grid), rows, 1, n2, 0, lo, hi, this.buf, inverse ? t.inverse : t.forward, t.reversal, inverse ? 1 : 0, inverse ? 1 / rows : 1);
  }

  longRows(grid: ComplexGrid | RealGrid, mode: LongRowsMode, phases: number, gradient: boolean, lo: number, hi: number): number {
    const { n1, n2 } = this.setup.geometry.long!;
    const real = isRealGrid(grid);
    const t = this.tables(n2);
    const phase = mode === "drift" ? this.at(regionName.phase(phases, 2)) : 0;
    return this.k.longRows(
      this.at(grid), real ? n1 / 2 : n1, n2, lo, hi, this.buf, this.buf2, t.forward, t.inverse, t.reversal,
      this.at(regionName.longTwiddles), n1 / 16, real ? 2 : 1, LONG_MODES.indexOf(mode), phase, gradient ? this.at(regionName.kSquared(2)) : 0,
    );
  }

  longPairs(real: RealGrid, lo: number, hi: number): void {
    const { n1, n2 } = this.setup.geometry.long!;
    this.k.longPairs(this.at(real), n1 / 2, n2, lo, hi, this.at(regionName.kPoisson(2)), this.at(regionName.realTwiddles(n1 * n2)));
  }

  realRows(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void {
    const r = this.realTarget(target, real);
    const t = this.tables(r.n2 / 2);
    this.k.realRows(r.real, r.spectrum, r.n2, lo, hi, this.buf, t.forward, t.reversal, this.at(regionName.realTwiddles(r.n2)));
  }

  realRowsInverse(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void {
    const r = this.realTarget(target, real);
    const t = this.tables(r.n2 / 2);
    this.k.realRowsInverse(r.spectrum, r.real, r.n2, lo, hi, this.buf, t.inverse, t.reversal, this.at(regionName.realTwiddles(r.n2)));
  }
}
