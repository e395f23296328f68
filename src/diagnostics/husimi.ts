/**
 * The Husimi distribution (Widrow & Kaiser 1993, ApJ 416, L71), in code
 * units (ħ/m = 1, momentum as the wavevector k = p/ħ):
 *
 *   f(x, k) = (2π)^{−d} |∫ K_η(y − x) e^{−ik·(y − x)} ψ(y) dᵈy|²,
 *   K_η(y) = (2πη²)^{−d/4} exp(−|y|²/(4η²))   (∫K² = 1),
 *
 * so ∫ f dᵈk = ∫ K_η²(y − x) |ψ(y)|² dᵈy: the density smoothed by a Gaussian
 * of variance η² per axis, and ∫∫ f = M. At each point the window is cut at
 * ±8η (K² is e⁻³² of its peak there) on a sub-box of the smallest power of
 * two ≥ 16η/Δx cells per axis (or the whole axis), whose DFT samples the
 * windowed field's transform at Δk = 2π/(mΔx), exactly enough for the
 * momentum integral (Parseval). The window must be at least one cell wide
 * (η ≥ Δx) and its ±8η support must fit in the box.
 *
 * The Wehrl entropy S = −∫∫ Q ln Q dᵈx dᵈk/(2π)ᵈ of Q = (2π)ᵈ f/M is at
 * least d, with equality for the coherent states whose width matches the
 * window (Lieb 1978, Commun. Math. Phys. 62, 35).
 */
import type { Grid } from "../grid/grid.js";
import { SimpleTransforms, type FieldTransforms } from "../fields/field-transforms.js";
import { simulatedAxes } from "./shells.js";

/** The allowed window widths of a grid: [one cell, 1/16 of the shortest side]. */
export function husimiWindowRange(grid: Grid): { min: number; max: number } {
  const axes = simulatedAxes(grid);
  return { min: Math.max(...axes.map((ax) => grid.spacing[ax])), max: Math.min(...axes.map((ax) => grid.extent[ax])) / 16 };
}

/** The default window, √(L Δx/4π): position and momentum resolution take equal shares of the grid's ranges. */
export function defaultHusimiWindow(grid: Grid): number {
  const { min, max } = husimiWindowRange(grid);
  const L = Math.min(...simulatedAxes(grid).map((ax) => grid.extent[ax]));
  return Math.min(max, Math.max(min, Math.sqrt((L * min) / (4 * Math.PI))));
}

/** The momentum distribution at one point. */
export interface HusimiAt {
  /** Sub-box cells per simulated axis. */
  readonly cells: number[];
  /** Wavevector spacing per simulated axis. */
  readonly dk: number[];
  /** f(x, k) on the sub-box's k grid, simulated axes only, row-major, k in FFT order (index q ↦ q or q − m). */
  readonly f: Float64Array;
}

/** Evaluates f(x, ·) at points of one grid for one window, reusing its sub-box transform. */
export class HusimiSampler {
  readonly cells: number[];
  private readonly axes: (0 | 1 | 2)[];
  private readonly shape: [number, number, number];
  private readonly fft: FieldTransforms;

  /**
   * @param transforms the sub-box's transforms, made from its cells per simulated axis (work grid 0 is used);
   * by default fft.js on this thread
   */
  constructor(private readonly grid: Grid, readonly eta: number, transforms?: (cells: number[]) => FieldTransforms) {
    const { min, max } = husimiWindowRange(grid);
    if (!(eta >= min * (1 - 1e-12)) || !(eta <= max * (1 + 1e-12))) throw new RangeError(`window ${eta} outside [${min}, ${max}]`);
    this.axes = simulatedAxes(grid);
    const shape: [number, number, number] = [1, 1, 1];
    for (const ax of this.axes) {
      let m = 1;
      while (m < (16 * eta) / grid.spacing[ax] - 1e-9) m *= 2;
      shape[ax] = Math.min(Math.max(m, 4), grid.shape[ax]);
    }
    this.shape = shape;
    this.cells = this.axes.map((ax) => shape[ax]);
    this.fft = transforms ? transforms(this.cells) : new SimpleTransforms(shape);
  }

  /** Wavevector spacing per simulated axis. */
  get dk(): number[] {
    return this.axes.map((ax) => (2 * Math.PI) / (this.shape[ax] * this.grid.spacing[ax]));
  }

  /** f(x, k) at the point x (internal 3-vector of coordinates; absent axes 0), written into `out` (length of the sub-box). */
  sample(psi: Float64Array, x: readonly number[], out: Float64Array): void {
    const { grid, shape, eta } = this;
    const buf = this.fft.work(0);
    const [m0, m1, m2] = shape;
    const start: number[] = [0, 0, 0];
    const offsets: Float64Array[] = [];
    for (let ax = 0; ax < 3; ax++) {
      const n = grid.shape[ax]!;
      const h = grid.spacing[ax]!;
      const m = shape[ax]!;
      const w = new Float64Array(m);
      if (n === 1) {
        w[0] = 1;
      } else {
        const centre = Math.round(x[ax]! / h);
        start[ax] = centre - m / 2;
        for (let j = 0; j < m; j++) {
          let d = (start[ax]! + j) * h - x[ax]!;
          d -= grid.extent[ax]! * Math.round(d / grid.extent[ax]!);
          w[j] = Math.pow(2 * Math.PI * eta * eta, -0.25) * Math.exp(-(d * d) / (4 * eta * eta));
        }
      }
      offsets.push(w);
    }
    const [n0, n1, n2] = grid.shape;
    const wrap = (i: number, n: number) => ((i % n) + n) % n;
    // the sub-box's cells along the last axis, wrapped into the grid once
    const cells = Int32Array.from({ length: m2 }, (_, c) => wrap(start[2]! + c, n2));
    for (let a = 0, p = 0; a < m0; a++) {
      const ia = wrap(start[0]! + a, n0);
      const wa = offsets[0]![a]!;
      for (let b = 0; b < m1; b++, p += 2 * m2) {
        const ib = wrap(start[1]! + b, n1);
        windowRow(psi, buf, p, (ia * n1 + ib) * n2, cells, wa * offsets[1]![b]!, offsets[2]!, grid.cellVolume);
      }
    }
    this.fft.forward(buf);
    const norm = Math.pow(2 * Math.PI, -grid.dims);
    for (let i = 0; i < out.length; i++) out[i] = norm * (buf[2 * i]! ** 2 + buf[2 * i + 1]! ** 2);
  }

  /** Number of momentum samples per point. */
  get size(): number {
    return this.shape[0] * this.shape[1] * this.shape[2];
  }
}

/** One row of the windowed sub-box: buf[p…] ← wab · w_c · ΔV · ψ at the grid cells `row` + cells[c]. */
function windowRow(psi: Float64Array, buf: Float64Array, p: number, row: number, cells: Int32Array, wab: number, w: Float64Array, dv: number): void {
  for (let c = 0; c < cells.length; c++, p += 2) {
    const q = 2 * (row + cells[c]!);
    const k = wab * w[c]! * dv;
    buf[p] = k * psi[q]!;
    buf[p + 1] = k * psi[q + 1]!;
  }
}

/** The momentum distribution f(x, ·) at one point (coordinates along the simulated axes). */
export function husimiAt(grid: Grid, psi: Float64Array, point: readonly number[], eta: number): HusimiAt {
  const sampler = new HusimiSampler(grid, eta);
  const f = new Float64Array(sampler.size);
  sampler.sample(psi, internalPoint(grid, point), f);
  return { cells: sampler.cells, dk: sampler.dk, f };
}

/** Coordinates along the simulated axes → an internal 3-vector. */
export function internalPoint(grid: Grid, point: readonly number[]): number[] {
  const x = [0, 0, 0];
  simulatedAxes(grid).forEach((ax, i) => (x[ax] = point[i] ?? 0));
  return x;
}

/** A 1D field's full x–k image: f at every `stride`-th cell, k in FFT order. */
export function husimiImage1D(grid: Grid, psi: Float64Array, eta: number, stride = 1): { x: Float64Array; k: Float64Array; f: Float64Array } {
  if (grid.dims !== 1) throw new RangeError("the full phase-space image is for 1D fields");
  const sampler = new HusimiSampler(grid, eta);
  const m = sampler.size;
  const nx = Math.ceil(grid.shape[2] / stride);
  const f = new Float64Array(nx * m);
  const row = new Float64Array(m);
  const x = new Float64Array(nx);
  for (let i = 0; i < nx; i++) {
    x[i] = i * stride * grid.spacing[2];
    sampler.sample(psi, [0, 0, x[i]!], row);
    f.set(row, i * m);
  }
  const dk = sampler.dk[0]!;
  const k = Float64Array.from({ length: m }, (_, q) => (q < m / 2 ? q : q - m) * dk);
  return { x, k, f };
}

/**
 * The Wehrl entropy −∫∫ Q ln Q dᵈx dᵈk/(2π)ᵈ, Q = (2π)ᵈ f/M, with x on every
 * `stride`-th cell per axis (the trapezoid rule, spectrally accurate for the
 * smooth periodic f; a stride up to η/Δx keeps 1e-6).
 */
export function wehrlEntropy(grid: Grid, psi: Float64Array, eta: number, stride = 1): number {
  const sampler = new HusimiSampler(grid, eta);
  const row = new Float64Array(sampler.size);
  let mass = 0;
  for (let i = 0; i < psi.length; i += 2) mass += psi[i]! ** 2 + psi[i + 1]! ** 2;
  mass *= grid.cellVolume;
  const axes = simulatedAxes(grid);
  const counts = [0, 1, 2].map((ax) => (grid.shape[ax]! > 1 ? Math.ceil(grid.shape[ax]! / stride) : 1));
  const dx = axes.reduce<number>((p, ax) => p * stride * grid.spacing[ax], 1);
  const dk = sampler.dk.reduce((p, v) => p * v, 1);
  const twoPiD = Math.pow(2 * Math.PI, grid.dims);
  let s = 0;
  for (let a = 0; a < counts[0]!; a++)
    for (let b = 0; b < counts[1]!; b++)
      for (let c = 0; c < counts[2]!; c++) {
        sampler.sample(psi, [a * stride * grid.spacing[0], b * stride * grid.spacing[1], c * stride * grid.spacing[2]], row);
        for (let i = 0; i < row.length; i++) {
          const q = (twoPiD * row[i]!) / mass;
          if (q > 0) s -= q * Math.log(q);
        }
      }
  return (s * dx * dk) / twoPiD;
}
