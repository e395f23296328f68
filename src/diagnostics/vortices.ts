/**
 * Quantised vortices: the zeros of ψ, found by the phase winding around
 * each plaquette of the grid. The four phase differences around a
 * plaquette, each wrapped into (−π, π], sum to 2π times an integer: the
 * charge of the zeros inside (positive for a counter-clockwise phase rise
 * in the plane of the first and second simulated axis, or about the
 * plaquette's normal axis in 3D by the right-hand rule).
 *
 * In 2D a vortex's position is refined to the zero of the bilinear
 * interpolant of ψ over its plaquette. In 3D every pierced plaquette is a
 * point of a vortex line; the line length is estimated by giving each
 * piercing of a face normal to axis i the length 1 / Σ_j |t_j|/Δx_j, with t
 * the line's unit tangent ∝ ∇Re ψ × ∇Im ψ from centred differences at the
 * face (a straight line crossing faces of all three orientations is counted
 * once per unit length whatever its direction).
 */
import type { Grid } from "../grid/grid.js";
import { simulatedAxes } from "./shells.js";
import { HIT, orientationsOf, scanPlanes, type PiercingLength } from "./vortex-scan.js";

/** One vortex of a 2D field, or one piercing of a plaquette by a vortex line in 3D. */
export interface VortexPoint {
  /** Position along the simulated axes (code lengths). */
  readonly position: readonly number[];
  readonly charge: number;
  /** 3D: the simulated axis (0, 1 or 2) the pierced plaquette is normal to; 2D: −1. */
  readonly normal: number;
  /** 3D: the length of line this piercing stands for (code lengths); 2D: 0. */
  readonly length: number;
}

/** The vortex census of a 2D or 3D field. */
export interface VortexCensus {
  readonly dims: 2 | 3;
  readonly points: VortexPoint[];
  readonly positive: number;
  readonly negative: number;
  /** Σ charges: zero in a periodic box. */
  readonly netCharge: number;
  /** 2D: vortices (either sign) per unit area; 3D: line length per unit volume. */
  readonly density: number;
  /** 3D: total line length (code lengths); 2D: 0. */
  readonly lineLength: number;
  /** 3D: line length per column, projected along the first simulated axis ([n1 × n2], row-major); 2D: vortex count per cell. */
  readonly projection: Float64Array;
}

/** The zero of the bilinear interpolant of four corner values (s, t ∈ [0, 1]), by Newton's method from the centre. */
function bilinearZero(re: readonly number[], im: readonly number[]): [number, number] {
  // f(s,t) = f00 (1−s)(1−t) + f10 s(1−t) + f01 (1−s) t + f11 s t, corners ordered [00, 10, 01, 11]
  let s = 0.5;
  let t = 0.5;
  for (let it = 0; it < 20; it++) {
    const val = (f: readonly number[]) => f[0]! * (1 - s) * (1 - t) + f[1]! * s * (1 - t) + f[2]! * (1 - s) * t + f[3]! * s * t;
    const ds = (f: readonly number[]) => (f[1]! - f[0]!) * (1 - t) + (f[3]! - f[2]!) * t;
    const dt = (f: readonly number[]) => (f[2]! - f[0]!) * (1 - s) + (f[3]! - f[1]!) * s;
    const [a, b, c, d] = [ds(re), dt(re), ds(im), dt(im)];
    const det = a * d - b * c;
    if (det === 0) return [0.5, 0.5];
    const fr = val(re);
    const fi = val(im);
    const stepS = (d * fr - b * fi) / det;
    const stepT = (a * fi - c * fr) / det;
    s -= stepS;
    t -= stepT;
    if (Math.abs(stepS) + Math.abs(stepT) < 1e-12) break;
  }
  return s >= 0 && s <= 1 && t >= 0 && t <= 1 ? [s, t] : [0.5, 0.5];
}

/** Receives each vortex (2D) or piercing (3D): its position along the internal axes (all three; code lengths; reused between calls), charge, normal (the simulated axis' index, −1 in 2D) and length. */
export type VortexSink = (position: Float64Array, charge: number, normal: number, length: number) => void;

/** The census of a 2D or 3D field with its points handed to `sink` one by one (in the order findVortices lists them) instead of kept. */
export function scanVortices(grid: Grid, psi: Float64Array, sink: VortexSink): Omit<VortexCensus, "points"> {
  if (grid.dims < 2) throw new RangeError("vortices need a 2D or 3D field");
  const [, n1, n2] = grid.shape;
  const axes = simulatedAxes(grid);
  const projection = new Float64Array(n1 * n2);
  let [positive, negative, lineLength] = [0, 0, 0];
  const orientations = orientationsOf(grid);
  // 3D: each piercing's length, taken during the scan while its planes are in cache
  const found = scanPlanes(grid, psi, grid.dims === 3 ? piercingLengths(grid, psi, orientations) : undefined);
  const pos = new Float64Array(3);
  // one set of scratch for all the points (a census of many thousand piercings allocates nothing per point)
  const corners = new Int32Array(4);
  const idx = new Int32Array(3);
  const h = grid.spacing;
  for (let o = 0; o < orientations.length; o++) {
    const [pa, qa, normal] = orientations[o]!;
    const list = found[o]!;
    const normalIndex = normal >= 0 ? axes.indexOf(normal as 0 | 1 | 2) : -1;
    for (let k = 0; k < list.length; k += HIT) {
      const i = list[k]!;
      const charge = list[k + 1]!;
      if (charge > 0) positive += charge;
      else negative -= charge;
      idx[0] = Math.floor(i / (n1 * n2));
      idx[1] = Math.floor(i / n2) % n1;
      idx[2] = i % n2;
      // 3D: the plaquette's centre; 2D: the zero of ψ's bilinear interpolant over its corners [i, i + sp, i + sq, i + sp + sq]
      let s = 0.5;
      let u = 0.5;
      if (grid.dims === 2) {
        plaquetteCorners(corners, i, list[k + 2]!, list[k + 3]!);
        const zero = bilinearZero(Array.from(corners, (c) => psi[2 * c]!), Array.from(corners, (c) => psi[2 * c + 1]!));
        s = zero[0];
        u = zero[1];
      }
      for (let ax = 0; ax < 3; ax++) pos[ax] = idx[ax]! * h[ax]!;
      pos[pa] = pos[pa]! + s * h[pa]!;
      pos[qa] = pos[qa]! + u * h[qa]!;
      const length = list[k + 4]!;
      lineLength += length;
      const column = idx[1]! * n2 + idx[2]!;
      projection[column] = projection[column]! + (normal >= 0 ? length : 1);
      sink(pos, charge, normalIndex, length);
    }
  }
  const measure = grid.volume;
  return { dims: grid.dims as 2 | 3, positive, negative, netCharge: positive - negative, density: grid.dims === 2 ? (positive + negative) / measure : lineLength / measure, lineLength, projection };
}

/** A plaquette's corners [i, i + sp, i + sq, i + sp + sq] into `out`. */
function plaquetteCorners(out: Int32Array, i: number, sp: number, sq: number): void {
  out[0] = i;
  out[1] = i + sp;
  out[2] = i + sq;
  out[3] = i + sp + sq;
}

/** A 3D census's piercing lengths for the scan (pierceLength of each pierced plaquette; its own scratch). */
function piercingLengths(grid: Grid, psi: Float64Array, orientations: readonly (readonly number[])[]): PiercingLength {
  const [, n1, n2] = grid.shape;
  const corners = new Int32Array(4);
  // per orientation: the axes spanning it and its normal; per axis the index step
  const [pa, qa, normal] = [0, 1, 2].map((k) => Int32Array.from(orientations, (o) => o[k]!)) as [Int32Array, Int32Array, Int32Array];
  const strides = [n1 * n2, n2, 1];
  return (i, tp, tq, o) => {
    plaquetteCorners(corners, i, tp, tq);
    const r = normal[o]!;
    const j = r === 0 ? Math.floor(i / (n1 * n2)) : r === 1 ? Math.floor(i / n2) % n1 : i % n2;
    return pierceLength(grid, psi, corners, j, r, strides[r]!, pa[o]!, qa[o]!);
  };
}

/** Vortices of a 2D or 3D field (throws RangeError for a 1D grid). */
export function findVortices(grid: Grid, psi: Float64Array): VortexCensus {
  const axes = simulatedAxes(grid);
  const points: VortexPoint[] = [];
  const census = scanVortices(grid, psi, (pos, charge, normal, length) => points.push({ position: axes.map((ax) => pos[ax]!), charge, normal, length }));
  return { ...census, points };
}

/**
 * The length a piercing of a face normal to `normal` stands for: 1 / Σ_j |t_j|/Δx_j with t ∝ ∇Re ψ × ∇Im ψ
 * at the face; `j` is the face's index along the normal axis (the same for its four corners), `stride` the index step along it.
 */
function pierceLength(grid: Grid, psi: Float64Array, corners: Int32Array, j: number, normal: number, stride: number, pa: number, qa: number): number {
  const h = grid.spacing;
  const g = GRADIENTS; // ∇Re ψ in [0, 3), ∇Im ψ in [3, 6)
  const c00 = corners[0]!;
  const c10 = corners[1]!;
  const c01 = corners[2]!;
  const c11 = corners[3]!;
  // in-plane derivatives: mean of the two edge differences
  g[pa] = (psi[2 * c10]! - psi[2 * c00]! + psi[2 * c11]! - psi[2 * c01]!) / (2 * h[pa]!);
  g[3 + pa] = (psi[2 * c10 + 1]! - psi[2 * c00 + 1]! + psi[2 * c11 + 1]! - psi[2 * c01 + 1]!) / (2 * h[pa]!);
  g[qa] = (psi[2 * c01]! - psi[2 * c00]! + psi[2 * c11]! - psi[2 * c10]!) / (2 * h[qa]!);
  g[3 + qa] = (psi[2 * c01 + 1]! - psi[2 * c00 + 1]! + psi[2 * c11 + 1]! - psi[2 * c10 + 1]!) / (2 * h[qa]!);
  // normal derivative: centred difference, averaged over the four corners
  const m = grid.shape[normal]!;
  // the next and previous face along the normal, periodic (as index arithmetic: no branch first taken at the grid's end)
  const up = (((j + 1) % m) - j) * stride;
  const down = (((j + m - 1) % m) - j) * stride;
  let dr = 0;
  let di = 0;
  for (let q = 0; q < 4; q++) {
    const c = corners[q]!;
    dr += psi[2 * (c + up)]! - psi[2 * (c + down)]!;
    di += psi[2 * (c + up) + 1]! - psi[2 * (c + down) + 1]!;
  }
  g[normal] = dr / (8 * h[normal]!);
  g[3 + normal] = di / (8 * h[normal]!);
  const t0 = g[1]! * g[5]! - g[2]! * g[4]!;
  const t1 = g[2]! * g[3]! - g[0]! * g[5]!;
  const t2 = g[0]! * g[4]! - g[1]! * g[3]!;
  const norm = Math.hypot(t0, t1, t2);
  if (norm === 0) return (1 / (1 / h[0]! + 1 / h[1]! + 1 / h[2]!)) * 2;
  return 1 / (Math.abs(t0) / norm / h[0]! + Math.abs(t1) / norm / h[1]! + Math.abs(t2) / norm / h[2]!);
}

/** pierceLength's gradients (every entry written before it is read: the scratch of one call at a time). */
const GRADIENTS = new Float64Array(6);
