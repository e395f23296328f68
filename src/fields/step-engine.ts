/**
 * The split-step's passes on one thread, each over a range of units so that
 * one thread or several run the very same arithmetic per cell. Two engines
 * share the elementwise passes and differ in the transforms: fft.js in
 * JavaScript, or the WebAssembly SIMD kernels. Units are rows of the last
 * axis for row passes and outerCount() units for passes along axes 0 and 1.
 *
 * "Outer" passes fuse a forward transform along the outermost simulated
 * strided axis, a multiplication in Fourier space and the inverse transform
 * (the drift's phase, the Poisson kernel), so the block never leaves cache.
 */
import type { Triple } from "../grid/grid.js";
import { ComplexFft, outerCount, PENCIL_BLOCK, RealFft } from "./fft.js";
import { densityRows, driftRows, gradientNormRows, kickRows, poissonRows } from "./step-kernels.js";
import { perAxis, regionView, type StepSetup } from "./step-memory.js";
import { instantiateKernels, kernelModule, type WasmKernelExports } from "./wasm-kernels.js";

/** Which complex field a transform pass works on: ψ, or the undo copy (measurements). */
export type ComplexField = "psi" | "undo";

/** Which Poisson grid a real-transform pass works on: the periodic half spectrum or the isolated solve's padded grid. */
export type PoissonTarget = "periodic" | "isolated";

export interface StepEngine {
  /** ψ ← e^{−iφK} ψ over rows. */
  kick(factor: number, lo: number, hi: number): void;
  /** The drift's phase tables: (cos, sin)(−½ k² D) per index of every axis. */
  fillPhases(factor: number): void;
  /** FFT pass of a field along `axis` over units. */
  axis(field: ComplexField, axis: number, inverse: boolean, lo: number, hi: number): void;
  /**
   * FFT pass of a field along the last axis over rows; with `kick` ≠ 0 the
   * rows get e^{−iφ·kick} first, with `density` φ ← |ψ|² afterwards (returns
   * Σ|ψ|²); both only for ψ.
   */
  rows(field: ComplexField, inverse: boolean, kick: number, density: boolean, lo: number, hi: number): number;
  /** Copy rows of ψ to the undo copy (`toUndo`) or back. */
  copy(toUndo: boolean, lo: number, hi: number): void;
  /** Over rows: Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ and max |ψ|² into out[0…3]. */
  moments(lo: number, hi: number, out: Float64Array): void;
  /** Drift phase over rows of the transformed ψ (1D grids). */
  drift(lo: number, hi: number): void;
  /** Σ k²|ψ_k|² over rows of a transformed field. */
  gradient(field: ComplexField, lo: number, hi: number): number;
  /** Forward along outer `axis`, the drift phase, inverse; returns Σ k²|ψ_k|² when `gradient`. */
  driftOuter(axis: number, lo: number, hi: number, gradient: boolean): number;
  /** φ ← |ψ|² over rows; returns Σ|ψ|² over them. */
  density(lo: number, hi: number): number;
  /** Real transforms of rows (of φ, or of the padded work array) into the half spectrum. */
  realRows(target: PoissonTarget, lo: number, hi: number): void;
  /** Inverse real transforms of half-spectrum rows (into φ, or into the padded work array). */
  realRowsInverse(target: PoissonTarget, lo: number, hi: number): void;
  /** FFT pass of a half spectrum along axis 0 or 1. */
  halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void;
  /**
   * Isolated solve: φ's rows [lo, hi), zero-padded to the padded row length,
   * real-transformed into their rows of the padded half spectrum.
   */
  isolatedRows(lo: number, hi: number): void;
  /** Isolated solve: zero the padded half-spectrum rows [lo, hi) that no row of φ fills. */
  isolatedZero(lo: number, hi: number): void;
  /** Isolated solve: φ's rows [lo, hi) ← the start of their padded rows after the inverse real transform. */
  isolatedRowsInverse(lo: number, hi: number): void;
  /** Padded half-spectrum rows [lo, hi) times the Green's function's transform. */
  convolve(lo: number, hi: number): void;
  /** spec ← −spec/k² over half-spectrum rows (1D grids). */
  poisson(lo: number, hi: number): void;
  /** Forward along outer `axis` of the half spectrum, −1/k², inverse. */
  poissonOuter(axis: number, lo: number, hi: number): void;
}

/** The elementwise passes, on views of the step's memory. */
abstract class EngineBase implements StepEngine {
  protected readonly shape: Triple;
  protected readonly half: Triple;
  protected readonly psi: Float64Array;
  protected readonly undo: Float64Array;
  protected readonly phi: Float64Array;
  protected readonly spec: Float64Array | undefined;
  protected readonly phase: [Float64Array, Float64Array, Float64Array];
  protected readonly kk: [Float64Array, Float64Array, Float64Array];
  protected readonly kp: [Float64Array, Float64Array, Float64Array] | undefined;
  protected readonly iso: { shape: Triple; half: Triple; work: Float64Array; spec: Float64Array; hat: Float64Array } | undefined;

  constructor(setup: StepSetup) {
    this.shape = setup.shape;
    const [n0, n1, n2] = setup.shape;
    this.half = [n0, n1, n2 / 2 + 1];
    this.psi = regionView(setup, setup.psi);
    this.undo = regionView(setup, setup.undo);
    this.phi = regionView(setup, setup.phi);
    this.spec = setup.spectrum ? regionView(setup, setup.spectrum) : undefined;
    this.phase = perAxis(regionView(setup, setup.phase), setup.shape, 2);
    this.kk = perAxis(regionView(setup, setup.kGrad), setup.shape);
    this.kp = setup.kPoisson ? perAxis(regionView(setup, setup.kPoisson), this.half) : undefined;
    const iso = setup.isolated;
    this.iso = iso
      ? {
          shape: iso.shape,
          half: [iso.shape[0], iso.shape[1], iso.shape[2] / 2 + 1],
          work: regionView(setup, iso.work),
          spec: regionView(setup, iso.spectrum),
          hat: regionView(setup, iso.hat),
        }
      : undefined;
  }

  /** Call f(first padded row, first row, count) for each run of rows [lo, hi) of φ that are consecutive in the padded grid. */
  private paddedRuns(lo: number, hi: number, f: (padded: number, row: number, count: number) => void): void {
    const [, n1] = this.shape;
    const p1 = this.iso!.shape[1];
    for (let row = lo; row < hi; ) {
      const a = Math.floor(row / n1);
      const b = row - a * n1;
      const count = Math.min(hi - row, n1 - b);
      f(a * p1 + b, row, count);
      row += count;
    }
  }

  isolatedRows(lo: number, hi: number): void {
    const { shape, work } = this.iso!;
    const n2 = this.shape[2];
    const p2 = shape[2];
    const phi = this.phi;
    this.paddedRuns(lo, hi, (padded, row, count) => {
      for (let i = 0; i < count; i++) {
        const dst = (padded + i) * p2;
        const src = (row + i) * n2;
        for (let c = 0; c < n2; c++) work[dst + c] = phi[src + c]!;
        work.fill(0, dst + n2, dst + p2);
      }
      this.realRows("isolated", padded, padded + count);
    });
  }

  isolatedZero(lo: number, hi: number): void {
    const { half, spec } = this.iso!;
    const [n0, n1] = this.shape;
    const [, h1, h2] = half;
    for (let row = lo; row < hi; row++) {
      const a = Math.floor(row / h1);
      const b = row - a * h1;
      if (a >= n0 || b >= n1) spec.fill(0, 2 * row * h2, 2 * (row + 1) * h2);
    }
  }

  isolatedRowsInverse(lo: number, hi: number): void {
    const { shape, work } = this.iso!;
    const n2 = this.shape[2];
    const p2 = shape[2];
    const phi = this.phi;
    this.paddedRuns(lo, hi, (padded, row, count) => {
      this.realRowsInverse("isolated", padded, padded + count);
      for (let i = 0; i < count; i++) {
        const src = (padded + i) * p2;
        const dst = (row + i) * n2;
        for (let c = 0; c < n2; c++) phi[dst + c] = work[src + c]!;
      }
    });
  }

  convolve(lo: number, hi: number): void {
    const { half, spec, hat } = this.iso!;
    const h2 = half[2];
    for (let i = lo * h2; i < hi * h2; i++) {
      const g = hat[i]!;
      spec[2 * i] = spec[2 * i]! * g;
      spec[2 * i + 1] = spec[2 * i + 1]! * g;
    }
  }

  kick(factor: number, lo: number, hi: number): void {
    kickRows(this.psi, this.phi, factor, this.shape[2], lo, hi);
  }
  fillPhases(factor: number): void {
    for (let ax = 0; ax < 3; ax++) {
      const kk = this.kk[ax]!;
      const table = this.phase[ax]!;
      for (let j = 0; j < kk.length; j++) {
        const angle = -0.5 * kk[j]! * factor;
        table[2 * j] = Math.cos(angle);
        table[2 * j + 1] = Math.sin(angle);
      }
    }
  }
  drift(lo: number, hi: number): void {
    driftRows(this.psi, this.shape, this.phase[0], this.phase[1], this.phase[2], lo, hi);
  }
  gradient(field: ComplexField, lo: number, hi: number): number {
    return gradientNormRows(this.complex(field), this.shape, this.kk[0], this.kk[1], this.kk[2], lo, hi);
  }

  protected complex(field: ComplexField): Float64Array {
    return field === "psi" ? this.psi : this.undo;
  }

  copy(toUndo: boolean, lo: number, hi: number): void {
    const n2 = this.shape[2];
    const [from, to] = toUndo ? [this.psi, this.undo] : [this.undo, this.psi];
    to.set(from.subarray(2 * lo * n2, 2 * hi * n2), 2 * lo * n2);
  }

  moments(lo: number, hi: number, out: Float64Array): void {
    const psi = this.psi;
    const phi = this.phi;
    let mass = 0;
    let rho2 = 0;
    let rhoPhi = 0;
    let max = 0;
    const n2 = this.shape[2];
    for (let i = lo * n2; i < hi * n2; i++) {
      const rho = psi[2 * i]! * psi[2 * i]! + psi[2 * i + 1]! * psi[2 * i + 1]!;
      mass += rho;
      rho2 += rho * rho;
      rhoPhi += rho * phi[i]!;
      if (rho > max) max = rho;
    }
    out[0] = mass;
    out[1] = rho2;
    out[2] = rhoPhi;
    out[3] = max;
  }
  density(lo: number, hi: number): number {
    return densityRows(this.psi, this.phi, this.shape[2], lo, hi);
  }
  poisson(lo: number, hi: number): void {
    const kp = this.kp!;
    poissonRows(this.spec!, this.half, kp[0], kp[1], kp[2], lo, hi);
  }
  abstract axis(field: ComplexField, axis: number, inverse: boolean, lo: number, hi: number): void;
  abstract rows(field: ComplexField, inverse: boolean, kick: number, density: boolean, lo: number, hi: number): number;
  abstract driftOuter(axis: number, lo: number, hi: number, gradient: boolean): number;
  abstract realRows(target: PoissonTarget, lo: number, hi: number): void;
  abstract realRowsInverse(target: PoissonTarget, lo: number, hi: number): void;
  abstract halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void;
  abstract poissonOuter(axis: number, lo: number, hi: number): void;
}

/**
 * Visit the pencils of outer units [lo, hi) along `axis` (0 or 1) of a complex
 * array of `shape`: f(index of point j, j, outer index, lane index c).
 */
function forEachUnitPoint(shape: Triple, axis: number, lo: number, hi: number, f: (p: number, j: number, o: number, c: number) => void): void {
  const [n0, n1, n2] = shape;
  const n = axis === 1 ? n1 : n0;
  const pointStride = axis === 1 ? n2 : n1 * n2;
  const outerStride = axis === 1 ? n1 * n2 : n2;
  const blocks = Math.ceil(n2 / PENCIL_BLOCK);
  for (let u = lo; u < hi; u++) {
    const o = Math.floor(u / blocks);
    const c0 = (u - o * blocks) * PENCIL_BLOCK;
    const c1 = Math.min(n2, c0 + PENCIL_BLOCK);
    for (let j = 0; j < n; j++) {
      const base = o * outerStride + j * pointStride;
      for (let c = c0; c < c1; c++) f(base + c, j, o, c);
    }
  }
}

/** Transforms by fft.js (the JavaScript backend). */
export class JsStepEngine extends EngineBase {
  private readonly cfft: ComplexFft;
  private readonly rfft: RealFft | undefined;
  private readonly rfftPadded: RealFft | undefined;

  constructor(setup: StepSetup) {
    super(setup);
    this.cfft = new ComplexFft(setup.shape);
    this.rfft = setup.spectrum ? new RealFft(setup.shape) : undefined;
    this.rfftPadded = setup.isolated ? new RealFft(setup.isolated.shape) : undefined;
  }

  /** The real FFT, its real array and its half spectrum for a target. */
  private real(target: PoissonTarget): [RealFft, Float64Array, Float64Array] {
    return target === "periodic" ? [this.rfft!, this.phi, this.spec!] : [this.rfftPadded!, this.iso!.work, this.iso!.spec];
  }

  axis(field: ComplexField, axis: number, inverse: boolean, lo: number, hi: number): void {
    this.cfft.pass(this.complex(field), axis, inverse, lo, hi);
  }

  rows(field: ComplexField, inverse: boolean, kick: number, density: boolean, lo: number, hi: number): number {
    if (kick !== 0) this.kick(kick, lo, hi);
    this.cfft.pass(this.complex(field), 2, inverse, lo, hi);
    return density ? this.density(lo, hi) : 0;
  }

  driftOuter(axis: number, lo: number, hi: number, gradient: boolean): number {
    const psi = this.psi;
    this.cfft.pass(psi, axis, false, lo, hi);
    const kA = this.kk[axis]!;
    const kO = this.kk[1 - axis]!;
    const kL = this.kk[2];
    const pA = this.phase[axis]!;
    const pO = this.phase[1 - axis]!;
    const pL = this.phase[2];
    let sum = 0;
    forEachUnitPoint(this.shape, axis, lo, hi, (p, j, o, c) => {
      const re = psi[2 * p]!;
      const im = psi[2 * p + 1]!;
      if (gradient) sum += (kA[j]! + kO[o]! + kL[c]!) * (re * re + im * im);
      // e = (pL[c] · pO[o]) · pA[j], the wasm kernel's order
      const qr = pL[2 * c]! * pO[2 * o]! - pL[2 * c + 1]! * pO[2 * o + 1]!;
      const qi = pL[2 * c]! * pO[2 * o + 1]! + pL[2 * c + 1]! * pO[2 * o]!;
      const er = qr * pA[2 * j]! - qi * pA[2 * j + 1]!;
      const ei = qr * pA[2 * j + 1]! + qi * pA[2 * j]!;
      psi[2 * p] = re * er - im * ei;
      psi[2 * p + 1] = re * ei + im * er;
    });
    this.cfft.pass(psi, axis, true, lo, hi);
    return sum;
  }

  realRows(target: PoissonTarget, lo: number, hi: number): void {
    const [fft, real, spec] = this.real(target);
    fft.forwardRows(real, spec, lo, hi);
  }

  realRowsInverse(target: PoissonTarget, lo: number, hi: number): void {
    const [fft, real, spec] = this.real(target);
    fft.inverseRows(spec, real, lo, hi);
  }

  halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void {
    const [fft, , spec] = this.real(target);
    fft.outerPass(spec, axis as 0 | 1, inverse, lo, hi);
  }

  poissonOuter(axis: number, lo: number, hi: number): void {
    const spec = this.spec!;
    const [kA, kO, kL] = [this.kp![axis]!, this.kp![1 - axis]!, this.kp![2]];
    this.rfft!.outerPass(spec, axis as 0 | 1, false, lo, hi);
    forEachUnitPoint(this.half, axis, lo, hi, (p, j, o, c) => {
      const kk = kA[j]! + kO[o]! + kL[c]!;
      const g = kk > 0 ? -1 / kk : 0;
      spec[2 * p] = spec[2 * p]! * g;
      spec[2 * p + 1] = spec[2 * p + 1]! * g;
    });
    this.rfft!.outerPass(spec, axis as 0 | 1, true, lo, hi);
  }
}

/** Transforms by the WebAssembly SIMD kernels on the shared memory. */
export class WasmStepEngine extends EngineBase {
  private readonly k: WasmKernelExports;
  private readonly setup: StepSetup;
  private readonly buf: number;
  private readonly buf2: number;

  /** @param slot this thread's scratch block */
  constructor(setup: StepSetup, slot: number) {
    super(setup);
    const module = kernelModule();
    const wasm = setup.wasm;
    if (!module || !wasm) throw new Error("the wasm FFT backend is not available");
    this.setup = setup;
    this.k = instantiateKernels(module, wasm.memory);
    this.buf = wasm.scratch[slot]!;
    this.buf2 = this.buf + wasm.scratchBytes;
  }

  private tables(n: number) {
    return this.setup.wasm!.tables[n]!;
  }

  /** Byte address of entry `index` of a region of width `width` values per entry. */
  private at(region: { offset: number }, index: number, width: number): number {
    return region.offset + 8 * width * index;
  }

  override fillPhases(factor: number): void {
    const s = this.setup;
    this.k.phaseTable(s.kGrad.offset, factor, s.phase.offset, s.kGrad.length);
  }

  override kick(factor: number, lo: number, hi: number): void {
    const n2 = this.shape[2];
    this.k.kick(this.setup.psi.offset, this.setup.phi.offset, factor, lo * n2, hi * n2);
  }

  axis(field: ComplexField, axis: number, inverse: boolean, lo: number, hi: number): void {
    this.pass(this.address(field), this.shape, axis, inverse, lo, hi);
  }

  private address(field: ComplexField): number {
    return field === "psi" ? this.setup.psi.offset : this.setup.undo.offset;
  }

  rows(field: ComplexField, inverse: boolean, kick: number, density: boolean, lo: number, hi: number): number {
    const n2 = this.shape[2];
    const t = this.tables(n2);
    const s = this.setup;
    return this.k.rowsPass(this.address(field), n2, lo, hi, this.buf, inverse ? t.inverse : t.forward, t.reversal, inverse ? 1 : 0, inverse ? 1 / n2 : 1, s.phi.offset, kick, density ? 1 : 0);
  }

  halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void {
    const { spectrum, half } = this.realTarget(target);
    this.pass(spectrum, half, axis, inverse, lo, hi);
  }

  /** Addresses and shapes of a target's real array and half spectrum. */
  private realTarget(target: PoissonTarget): { real: number; spectrum: number; n2: number; half: Triple } {
    const s = this.setup;
    if (target === "periodic") return { real: s.phi.offset, spectrum: s.spectrum!.offset, n2: this.shape[2], half: this.half };
    const iso = s.isolated!;
    return { real: iso.work.offset, spectrum: iso.spectrum.offset, n2: iso.shape[2], half: this.iso!.half };
  }

  private pass(data: number, shape: Triple, axis: number, inverse: boolean, lo: number, hi: number): void {
    const n = shape[axis]!;
    const t = this.tables(n);
    this.k.axisPass(data, shape[0], shape[1], shape[2], axis, lo, hi, this.buf, inverse ? t.inverse : t.forward, t.reversal, inverse ? 1 : 0, inverse ? 1 / n : 1);
  }

  driftOuter(axis: number, lo: number, hi: number, gradient: boolean): number {
    const s = this.setup;
    const [n0, n1, n2] = this.shape;
    const t = this.tables(this.shape[axis]!);
    const starts = [0, n0, n0 + n1];
    const other = 1 - axis;
    return this.k.driftOuter(
      s.psi.offset, n0, n1, n2, axis, lo, hi, this.buf, this.buf2, t.forward, t.inverse, t.reversal,
      this.at(s.phase, starts[axis]!, 2), this.at(s.phase, starts[other]!, 2), this.at(s.phase, starts[2]!, 2),
      gradient ? this.at(s.kGrad, starts[axis]!, 1) : 0, this.at(s.kGrad, starts[other]!, 1), this.at(s.kGrad, starts[2]!, 1),
    );
  }

  poissonOuter(axis: number, lo: number, hi: number): void {
    const s = this.setup;
    const [h0, h1, h2] = this.half;
    const t = this.tables(this.half[axis]!);
    const starts = [0, h0, h0 + h1];
    const kp = s.kPoisson!;
    this.k.poissonOuter(
      s.spectrum!.offset, h0, h1, h2, axis, lo, hi, this.buf, this.buf2, t.forward, t.inverse, t.reversal,
      this.at(kp, starts[axis]!, 1), this.at(kp, starts[1 - axis]!, 1), this.at(kp, starts[2]!, 1),
    );
  }

  realRows(target: PoissonTarget, lo: number, hi: number): void {
    const { real, spectrum, n2 } = this.realTarget(target);
    const t = this.tables(n2 / 2);
    this.k.realRows(real, spectrum, n2, lo, hi, this.buf, t.forward, t.reversal, this.setup.wasm!.realTwiddles[n2]!);
  }

  realRowsInverse(target: PoissonTarget, lo: number, hi: number): void {
    const { real, spectrum, n2 } = this.realTarget(target);
    const t = this.tables(n2 / 2);
    this.k.realRowsInverse(spectrum, real, n2, lo, hi, this.buf, t.inverse, t.reversal, this.setup.wasm!.realTwiddles[n2]!);
  }
}

/** The engine for a layout on this thread (`slot` picks the wasm scratch block). */
export function createEngine(setup: StepSetup, slot: number): StepEngine {
  return setup.backend === "wasm" ? new WasmStepEngine(setup, slot) : new JsStepEngine(setup);
}

/** Units of a pass along `axis` of `shape` (re-exported for the steppers). */
export { outerCount };
