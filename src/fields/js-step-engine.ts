/**
 * The step engine whose transforms are fft.js (the JavaScript backend,
 * integrator.fft = "js"), on the regions of the step's memory.
 */
import type { Triple } from "../grid/grid.js";
import { ComplexFft, PENCIL_BLOCK, RealFft } from "./fft.js";
import { EngineBase } from "./engine-base.js";
import { isRealGrid, regionName, type StepSetup } from "./step-memory.js";
import type { ComplexGrid, LongRowsMode, PoissonTarget, RealGrid } from "./step-engine.js";
import { longPairRows, longPhaseRows, twiddleRows } from "./long-kernels.js";

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

/** Transforms by fft.js. */
export class JsStepEngine extends EngineBase {
  private readonly cfft: ComplexFft;
  private readonly rfft: RealFft | undefined;
  private readonly rfftPadded: RealFft | undefined;
  private readonly longFfts = new Map<number, ComplexFft>();

  constructor(setup: StepSetup) {
    super(setup);
    const g = setup.geometry;
    this.cfft = new ComplexFft(g.shape);
    this.rfft = g.gravity === "periodic" && !g.long ? new RealFft(g.shape) : undefined;
    this.rfftPadded = g.padded ? new RealFft(g.padded) : undefined;
  }

  /** The real FFT, its real array and its half spectrum for a target. */
  private real(target: PoissonTarget, real: RealGrid): [RealFft, Float64Array, Float64Array] {
    return target === "periodic" ? [this.rfft!, this.view(real), this.view("spectrum")] : [this.rfftPadded!, this.iso!.work, this.iso!.spec];
  }

  axis(field: ComplexGrid, axis: number, inverse: boolean, lo: number, hi: number): void {
    this.cfft.pass(this.view(field), axis, inverse, lo, hi);
  }

  rows(field: ComplexGrid, inverse: boolean, kick: number, potential: RealGrid, density: boolean, contact: number, source: ComplexGrid, lo: number, hi: number): number {
    if (kick !== 0) this.kick(field, potential, kick, contact, source, lo, hi);
    this.cfft.pass(this.view(field), 2, inverse, lo, hi);
    return density ? this.density(field, potential, false, lo, hi) : 0;
  }

  driftOuter(field: ComplexGrid, phases: number, axis: number, lo: number, hi: number, gradient: boolean): number {
    const psi = this.view(field);
    this.cfft.pass(psi, axis, false, lo, hi);
    const kA = this.kk[axis]!;
    const kO = this.kk[1 - axis]!;
    const kL = this.kk[2];
    const pA = this.view(regionName.phase(phases, axis));
    const pO = this.view(regionName.phase(phases, 1 - axis));
    const pL = this.view(regionName.phase(phases, 2));
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

  realRows(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void {
    const [fft, values, spec] = this.real(target, real);
    fft.forwardRows(values, spec, lo, hi);
  }

  realRowsInverse(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void {
    const [fft, values, spec] = this.real(target, real);
    fft.inverseRows(spec, values, lo, hi);
  }

  halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void {
    const [fft, , spec] = this.real(target, "phi");
    fft.outerPass(spec, axis as 0 | 1, inverse, lo, hi);
  }

  /** fft.js on a long grid's matrix of `rows` rows (made once per row count). */
  private longFft(rows: number): ComplexFft {
    let f = this.longFfts.get(rows);
    if (!f) {
      f = new ComplexFft([rows, 1, this.setup.geometry.long!.n2]);
      this.longFfts.set(rows, f);
    }
    return f;
  }

  longColumns(grid: ComplexGrid | RealGrid, inverse: boolean, lo: number, hi: number): void {
    const rows = isRealGrid(grid) ? this.setup.geometry.long!.n1 / 2 : this.setup.geometry.long!.n1;
    this.longFft(rows).pass(this.view(grid), 0, inverse, lo, hi);
  }

  longRows(grid: ComplexGrid | RealGrid, mode: LongRowsMode, phases: number, gradient: boolean, lo: number, hi: number): number {
    const { n1, n2 } = this.setup.geometry.long!;
    const real = isRealGrid(grid);
    const rows = real ? n1 / 2 : n1;
    const data = this.view(grid);
    const tw = this.view(regionName.longTwiddles);
    const fft = this.longFft(rows);
    let sum = 0;
    if (mode !== "inverse") {
      twiddleRows(data, tw, n1 / 16, n2, real ? 2 : 1, lo, hi, false);
      fft.pass(data, 2, false, lo, hi);
      sum = longPhaseRows(data, rows, n2, lo, hi, mode === "drift" ? this.view(regionName.phase(phases, 2)) : undefined, gradient ? this.kk[2] : undefined);
    }
    if (mode === "forward") return sum;
    fft.pass(data, 2, true, lo, hi);
    twiddleRows(data, tw, n1 / 16, n2, real ? 2 : 1, lo, hi, true);
    return sum;
  }

  longPairs(real: RealGrid, lo: number, hi: number): void {
    const { n1, n2 } = this.setup.geometry.long!;
    longPairRows(this.view(real), n1 / 2, n2, lo, hi, this.kp![2]);
  }

  poissonOuter(axis: number, lo: number, hi: number): void {
    const spec = this.view("spectrum");
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
