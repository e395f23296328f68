/**
 * What both step engines share: views of the step's regions by name, the
 * elementwise passes (kicks, densities, moments, phases, the Poisson kernel
 * on rows) and the isolated solve's padding. The transforms are the
 * subclasses' (fields/js-step-engine.ts, fields/wasm-step-engine.ts).
 */
import type { Triple } from "../grid/grid.js";
import { outerCount } from "./fft.js";
import { densityRows, driftRows, gradientNormRows, kickRows, normRows, poissonRows } from "./step-kernels.js";
import { combineRows, crossDensityRows, overlapRows, tangentSourceRows } from "./tangent-kernels.js";
import { regionName, regionView, type StepSetup } from "./step-memory.js";
import type { ComplexGrid, LongRowsMode, PoissonTarget, RealGrid, StepEngine } from "./step-engine.js";

type Axes = [Float64Array, Float64Array, Float64Array];

export abstract class EngineBase implements StepEngine {
  protected readonly setup: StepSetup;
  protected readonly shape: Triple;
  protected readonly half: Triple;
  /** Cells per row of the elementwise passes: the last axis, or a long 1D grid's rows (step-memory.ts LongLayout). */
  protected readonly rowLength: number;
  private readonly views = new Map<string, Float64Array>();
  /** k² per axis. */
  protected readonly kk: Axes;
  /** The periodic Poisson kernel's k² per axis of the half spectrum. */
  protected readonly kp: Axes | undefined;
  protected readonly iso: { shape: Triple; half: Triple; work: Float64Array; spec: Float64Array; hat: Float64Array } | undefined;

  constructor(setup: StepSetup) {
    this.setup = setup;
    const g = setup.geometry;
    this.shape = g.shape;
    this.half = g.half;
    this.rowLength = g.long ? g.long.n2 : g.shape[2];
    this.kk = this.axes(regionName.kSquared);
    this.kp = g.gravity === "periodic" ? this.axes(regionName.kPoisson) : undefined;
    this.iso =
      g.gravity === "isolated"
        ? { shape: g.padded!, half: g.paddedHalf!, work: this.view("iso.work"), spec: this.view("iso.spectrum"), hat: this.view("iso.hat") }
        : undefined;
  }

  /** A view of a region on this thread (made once). */
  protected view(name: string): Float64Array {
    let v = this.views.get(name);
    if (!v) {
      v = regionView(this.setup, name);
      this.views.set(name, v);
    }
    return v;
  }

  /** Views of a per-axis table. */
  protected axes(name: (axis: number) => string): Axes {
    return [this.view(name(0)), this.view(name(1)), this.view(name(2))];
  }

  /** Call f(first padded row, first row, count) for each run of rows [lo, hi) of the grid that are consecutive in the padded grid. */
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

  isolatedRows(real: RealGrid, lo: number, hi: number): void {
    const { shape, work } = this.iso!;
    const n2 = this.shape[2];
    const p2 = shape[2];
    const src = this.view(real);
    this.paddedRuns(lo, hi, (padded, row, count) => {
      for (let i = 0; i < count; i++) {
        const d = (padded + i) * p2;
        const s = (row + i) * n2;
        for (let c = 0; c < n2; c++) work[d + c] = src[s + c]!;
        work.fill(0, d + n2, d + p2);
      }
      this.realRows("isolated", real, padded, padded + count);
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

  isolatedRowsInverse(real: RealGrid, lo: number, hi: number): void {
    const { shape, work } = this.iso!;
    const n2 = this.shape[2];
    const p2 = shape[2];
    const dst = this.view(real);
    this.paddedRuns(lo, hi, (padded, row, count) => {
      this.realRowsInverse("isolated", real, padded, padded + count);
      for (let i = 0; i < count; i++) {
        const s = (padded + i) * p2;
        const d = (row + i) * n2;
        for (let c = 0; c < n2; c++) dst[d + c] = work[s + c]!;
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

  kick(field: ComplexGrid, potential: RealGrid, factor: number, contact: number, source: ComplexGrid, lo: number, hi: number): void {
    kickRows(this.view(field), this.view(potential), factor, this.rowLength, lo, hi, contact, this.view(source));
  }

  fillPhases(set: number, factor: number): void {
    for (let axis = 0; axis < 3; axis++) {
      const kk = this.kk[axis]!;
      const table = this.view(regionName.phase(set, axis));
      for (let j = 0; j < kk.length; j++) {
        const angle = -0.5 * kk[j]! * factor;
        table[2 * j] = Math.cos(angle);
        table[2 * j + 1] = Math.sin(angle);
      }
    }
  }

  drift(field: ComplexGrid, phases: number, lo: number, hi: number): void {
    const [p0, p1, p2] = this.axes((axis) => regionName.phase(phases, axis));
    driftRows(this.view(field), this.shape, p0, p1, p2, lo, hi);
  }

  gradient(field: ComplexGrid, lo: number, hi: number): number {
    return gradientNormRows(this.view(field), this.shape, this.kk[0], this.kk[1], this.kk[2], lo, hi);
  }

  copy(from: ComplexGrid, to: ComplexGrid, lo: number, hi: number): void {
    const n2 = this.rowLength;
    this.view(to).set(this.view(from).subarray(2 * lo * n2, 2 * hi * n2), 2 * lo * n2);
  }

  moments(lo: number, hi: number, out: Float64Array): void {
    const psi = this.view("psi");
    const phi = this.view("phi");
    let mass = 0;
    let rho2 = 0;
    let rhoPhi = 0;
    let max = 0;
    let phiMin = Infinity;
    let phiMax = -Infinity;
    const n2 = this.rowLength;
    for (let i = lo * n2; i < hi * n2; i++) {
      const rho = psi[2 * i]! * psi[2 * i]! + psi[2 * i + 1]! * psi[2 * i + 1]!;
      const p = phi[i]!;
      mass += rho;
      rho2 += rho * rho;
      rhoPhi += rho * p;
      if (rho > max) max = rho;
      if (p < phiMin) phiMin = p;
      if (p > phiMax) phiMax = p;
    }
    out[0] = mass;
    out[1] = rho2;
    out[2] = rhoPhi;
    out[3] = max;
    out[4] = phiMin;
    out[5] = phiMax;
  }

  norm(field: ComplexGrid, lo: number, hi: number): number {
    return normRows(this.view(field), this.rowLength, lo, hi);
  }

  density(field: ComplexGrid, target: RealGrid, add: boolean, lo: number, hi: number): number {
    return densityRows(this.view(field), this.view(target), add, this.rowLength, lo, hi);
  }

  poisson(lo: number, hi: number): void {
    const kp = this.kp!;
    poissonRows(this.view("spectrum"), this.half, kp[0], kp[1], kp[2], lo, hi);
  }

  crossDensity(field: ComplexGrid, target: RealGrid, lo: number, hi: number): void {
    crossDensityRows(this.view("psi"), this.view(field), this.view(target), this.rowLength, lo, hi);
  }

  tangentSource(field: ComplexGrid, potential: RealGrid, factor: number, contact: number, lo: number, hi: number): void {
    tangentSourceRows(this.view("psi"), this.view(field), this.view(potential), factor, this.rowLength, lo, hi, contact);
  }

  overlap(field: ComplexGrid, lo: number, hi: number, out: Float64Array): void {
    overlapRows(this.view("psi"), this.view(field), this.rowLength, lo, hi, out);
  }

  combine(field: ComplexGrid, scale: number, re: number, im: number, lo: number, hi: number): void {
    combineRows(this.view("psi"), this.view(field), scale, re, im, this.rowLength, lo, hi);
  }

  plane(field: ComplexGrid, inverse: boolean, kick: number, potential: RealGrid, density: boolean, contact: number, source: ComplexGrid, lo: number, hi: number): number {
    const [n0, n1] = this.shape;
    const blocks = outerCount(this.shape, 1) / n0;
    let sum = 0;
    // rows first both ways: the plane is read from memory row by row, and axis 1 finds it in cache
    for (let x = lo; x < hi; x++) {
      this.rows(field, inverse, inverse ? 0 : kick, potential, false, contact, source, x * n1, (x + 1) * n1);
      this.axis(field, 1, inverse, x * blocks, (x + 1) * blocks);
      if (density) sum += this.density(field, potential, false, x * n1, (x + 1) * n1);
    }
    return sum;
  }

  realPlane(real: RealGrid, inverse: boolean, lo: number, hi: number): void {
    const [n0, n1] = this.shape;
    const blocks = outerCount(this.half, 1) / n0;
    for (let x = lo; x < hi; x++) {
      if (!inverse) this.realRows("periodic", real, x * n1, (x + 1) * n1);
      this.halfAxis("periodic", 1, inverse, x * blocks, (x + 1) * blocks);
      if (inverse) this.realRowsInverse("periodic", real, x * n1, (x + 1) * n1);
    }
  }

  abstract axis(field: ComplexGrid, axis: number, inverse: boolean, lo: number, hi: number): void;
  abstract rows(field: ComplexGrid, inverse: boolean, kick: number, potential: RealGrid, density: boolean, contact: number, source: ComplexGrid, lo: number, hi: number): number;
  abstract driftOuter(field: ComplexGrid, phases: number, axis: number, lo: number, hi: number, gradient: boolean): number;
  abstract realRows(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void;
  abstract realRowsInverse(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void;
  abstract halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void;
  abstract poissonOuter(axis: number, lo: number, hi: number): void;
  abstract longColumns(grid: ComplexGrid | RealGrid, inverse: boolean, lo: number, hi: number): void;
  abstract longRows(grid: ComplexGrid | RealGrid, mode: LongRowsMode, phases: number, gradient: boolean, lo: number, hi: number): number;
  abstract longPairs(real: RealGrid, lo: number, hi: number): void;
}
