/**
 * Spherical-overdensity halos of a field: around each density peak (a cell
 * at least as dense as its neighbours along every simulated axis, and above
 * the threshold), densest first, the radius R at which the mean enclosed
 * density falls to the threshold, the mass inside it, the peak density, and
 * the mass-weighted bulk velocity and velocity dispersion inside R. A peak
 * that lies inside a halo already found is part of it (no subhalos).
 *
 * - Centres are sub-cell: a parabola through the peak cell and its two
 *   neighbours along each axis.
 * - The enclosed mass counts each cell with the weight
 *   w = clamp((r − d)/Δx + ½, 0, 1), d its centre's distance from the halo
 *   centre: a cell enters the sphere over one cell width instead of at once,
 *   which removes most of the staircase of a sum over whole cells; R follows
 *   by bisection to 1e-10 of a cell.
 * - Velocities come from ψ itself, v = (ħ/(m a)) Im(ψ* ∇ψ)/|ψ|² (code units
 *   ħ/m = 1), with fourth-order central differences; the dispersion is that
 *   of the full wave kinetic energy, ⟨|∇ψ|²⟩/⟨|ψ|²⟩/a² minus the bulk
 *   velocity squared, per simulated axis (it includes the quantum part).
 * - Volumes are those of the run's dimension: 2R, πR² or 4πR³/3 (a 1D or 2D
 *   run describes a sheet or a line, and its densities are 3D densities).
 */
import type { Grid } from "../grid/grid.js";
import { densityGrid } from "./peaks.js";

/** One halo, in code units (comoving lengths and densities in comoving runs). */
export interface Halo {
  /** Sub-cell centre, one coordinate per simulated axis, within the box. */
  readonly centre: readonly number[];
  readonly radius: number;
  readonly mass: number;
  readonly peakDensity: number;
  /** Bulk peculiar velocity per simulated axis. */
  readonly velocity: readonly number[];
  /** One-dimensional velocity dispersion (wave kinetic energy minus bulk flow). */
  readonly dispersion: number;
}

/** What the finder needs besides the field. */
export interface HaloSearch {
  /** Threshold of the mean enclosed density (code density, comoving in comoving runs). */
  readonly threshold: number;
  /** Halos below this mass are left out (code mass). */
  readonly minMass: number;
  /** Scale factor (velocities are peculiar: ∇S/a). */
  readonly a: number;
}

/** The volume of a ball of radius r in `dims` dimensions. */
export function ballVolume(dims: number, r: number): number {
  return dims === 1 ? 2 * r : dims === 2 ? Math.PI * r * r : (4 / 3) * Math.PI * r ** 3;
}

/** The cells of a ball (periodic) with their weights, visited by index. */
class Ball {
  private readonly grid: Grid;
  private readonly axes: (0 | 1 | 2)[];
  readonly h: number;

  constructor(grid: Grid) {
    this.grid = grid;
    this.axes = ([0, 1, 2] as const).filter((ax) => grid.shape[ax]! > 1);
    this.h = Math.max(...this.axes.map((ax) => grid.spacing[ax]!));
  }

  /** Call visit(p, w, dx, dy, dz) for every cell with weight w > 0 in the ball of radius r about `centre` (internal 3D coordinates; d the cell's offset from it). */
  each(centre: readonly number[], r: number, visit: (p: number, w: number, dx: number, dy: number, dz: number) => void): void {
    const { shape, spacing } = this.grid;
    const span = [0, 1, 2].map((ax) => (shape[ax]! === 1 ? 0 : Math.min(Math.ceil((r + this.h) / spacing[ax]!), Math.floor((shape[ax]! - 1) / 2))));
    const base = [0, 1, 2].map((ax) => (shape[ax]! === 1 ? 0 : Math.round(centre[ax]! / spacing[ax]!)));
    for (let i = -span[0]!; i <= span[0]!; i++) {
      const a = base[0]! + i;
      const dx = a * spacing[0]! - centre[0]!;
      for (let j = -span[1]!; j <= span[1]!; j++) {
        const b = base[1]! + j;
        const dy = b * spacing[1]! - centre[1]!;
        for (let k = -span[2]!; k <= span[2]!; k++) {
          const c = base[2]! + k;
          const dz = c * spacing[2]! - centre[2]!;
          const w = Math.min(1, Math.max(0, (r - Math.hypot(dx, dy, dz)) / this.h + 0.5));
          if (w > 0) visit(this.index(a, b, c), w, dx, dy, dz);
        }
      }
    }
  }

  private index(a: number, b: number, c: number): number {
    const [n0, n1, n2] = this.grid.shape;
    const wrap = (i: number, n: number) => ((i % n) + n) % n;
    return (wrap(a, n0) * n1 + wrap(b, n1)) * n2 + wrap(c, n2);
  }
}

/** Internal 3D coordinates of a point given per simulated axis (0 along the absent ones). */
export function internalPoint(grid: Grid, point: readonly number[]): number[] {
  const internal = [0, 0, 0];
  ([0, 1, 2] as const).filter((ax) => grid.shape[ax]! > 1).forEach((ax, k) => (internal[ax] = point[k]!));
  return internal;
}

/**
 * Visit every cell of the soft-edged ball of radius r about `centre` (one coordinate per simulated axis,
 * periodic): visit(p, w, d) with the cell's index, weight w = clamp((r − |d|)/Δx + ½, 0, 1) and offset d
 * (internal 3D) from the centre.
 */
export function forEachInBall(grid: Grid, centre: readonly number[], r: number, visit: (p: number, w: number, d: readonly [number, number, number]) => void): void {
  new Ball(grid).each(internalPoint(grid, centre), r, (p, w, dx, dy, dz) => visit(p, w, [dx, dy, dz]));
}

/** The mass ∫ρ of ψ (interleaved re, im) in the soft-edged ball of radius r about `centre` (one coordinate per simulated axis). */
export function ballMass(grid: Grid, psi: Float64Array, centre: readonly number[], r: number): number {
  let m = 0;
  forEachInBall(grid, centre, r, (p, w) => (m += w * (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2)));
  return m * grid.cellVolume;
}

/** The edge width of the soft ball: the largest simulated cell spacing. */
export function ballEdge(grid: Grid): number {
  return new Ball(grid).h;
}

/** Peaks above `threshold`: cells at least as dense as both neighbours along every simulated axis, densest first. */
function peaks(grid: Grid, rho: Float64Array, threshold: number): number[] {
  const [n0, n1, n2] = grid.shape;
  const counts = [n0, n1, n2];
  const strides = [n1 * n2, n2, 1];
  const out: number[] = [];
  for (let p = 0; p < grid.size; p++) {
    if (rho[p]! < threshold) continue;
    const idx = [Math.floor(p / (n1 * n2)), Math.floor(p / n2) % n1, p % n2];
    let peak = true;
    for (let ax = 0; ax < 3 && peak; ax++) {
      const m = counts[ax]!;
      if (m === 1) continue;
      const up = idx[ax] === m - 1 ? p - (m - 1) * strides[ax]! : p + strides[ax]!;
      const down = idx[ax] === 0 ? p + (m - 1) * strides[ax]! : p - strides[ax]!;
      if (rho[up]! > rho[p]! || rho[down]! > rho[p]!) peak = false;
    }
    if (peak) out.push(p);
  }
  return out.sort((x, y) => rho[y]! - rho[x]!);
}

/** The sub-cell centre of peak cell p (internal 3D coordinates): a parabola through three cells per simulated axis. */
function subCellCentre(grid: Grid, rho: Float64Array, p: number): number[] {
  const [n0, n1, n2] = grid.shape;
  const counts = [n0, n1, n2];
  const strides = [n1 * n2, n2, 1];
  const idx = [Math.floor(p / (n1 * n2)), Math.floor(p / n2) % n1, p % n2];
  return [0, 1, 2].map((ax) => {
    const m = counts[ax]!;
    if (m === 1) return 0;
    const up = rho[idx[ax] === m - 1 ? p - (m - 1) * strides[ax]! : p + strides[ax]!]!;
    const down = rho[idx[ax] === 0 ? p + (m - 1) * strides[ax]! : p - strides[ax]!]!;
    const curve = down - 2 * rho[p]! + up;
    const shift = curve < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (down - up)) / curve)) : 0;
    return (idx[ax]! + shift) * grid.spacing[ax]!;
  });
}

/** The radius where the mean enclosed density falls to the threshold (bisection), or undefined if the halo fills half the box. */
function overdensityRadius(grid: Grid, ball: Ball, rho: Float64Array, centre: readonly number[], threshold: number): number | undefined {
  const enclosed = (r: number): number => {
    let m = 0;
    ball.each(centre, r, (p, w) => (m += w * rho[p]!));
    return (m * grid.cellVolume) / ballVolume(grid.dims, r);
  };
  const limit = 0.5 * Math.min(...grid.lengths);
  let lo = 0.5 * ball.h;
  let hi = lo;
  while (enclosed(hi) >= threshold) {
    lo = hi;
    hi *= 1.25;
    if (hi > limit) return undefined;
  }
  while (hi - lo > 1e-10 * ball.h) {
    const mid = 0.5 * (lo + hi);
    if (enclosed(mid) >= threshold) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** ∂ψ/∂x_ax at cell p (fourth-order central differences, periodic), as [re, im]. */
function derivative(grid: Grid, psi: Float64Array, p: number, ax: number): [number, number] {
  const [n0, n1, n2] = grid.shape;
  const counts = [n0, n1, n2];
  const strides = [n1 * n2, n2, 1];
  const m = counts[ax]!;
  const i = ax === 0 ? Math.floor(p / (n1 * n2)) : ax === 1 ? Math.floor(p / n2) % n1 : p % n2;
  const at = (s: number) => p + ((((i + s) % m) + m) % m - i) * strides[ax]!;
  const [q1, q2, r1, r2] = [at(1), at(2), at(-1), at(-2)];
  const h = grid.spacing[ax]!;
  const d = (o: number) => (8 * (psi[2 * q1 + o]! - psi[2 * r1 + o]!) - (psi[2 * q2 + o]! - psi[2 * r2 + o]!)) / (12 * h);
  return [d(0), d(1)];
}

/** Bulk velocity and 1D dispersion inside the ball. */
function haloKinematics(grid: Grid, ball: Ball, psi: Float64Array, centre: readonly number[], radius: number, a: number): { velocity: number[]; dispersion: number } {
  const axes = ([0, 1, 2] as const).filter((ax) => grid.shape[ax]! > 1);
  const current = axes.map(() => 0);
  let gradient2 = 0;
  let mass = 0;
  ball.each(centre, radius, (p, w) => {
    const re = psi[2 * p]!;
    const im = psi[2 * p + 1]!;
    mass += w * (re * re + im * im);
    axes.forEach((ax, n) => {
      const [dr, di] = derivative(grid, psi, p, ax);
      current[n]! += w * (re * di - im * dr);
      gradient2 += w * (dr * dr + di * di);
    });
  });
  const velocity = current.map((j) => j / mass / a);
  const bulk2 = velocity.reduce((s, v) => s + v * v, 0);
  const dispersion = Math.sqrt(Math.max(0, gradient2 / mass / (a * a) - bulk2) / axes.length);
  return { velocity, dispersion };
}

/** The spherical-overdensity halos of ψ (interleaved re, im), most massive peaks first as found (densest first); `scratch` as for `densestPoints`. */
export function findHalos(grid: Grid, psi: Float64Array, search: HaloSearch, scratch?: Float64Array): Halo[] {
  const rho = densityGrid(psi, grid.size, scratch);
  const ball = new Ball(grid);
  const axes = ([0, 1, 2] as const).filter((ax) => grid.shape[ax]! > 1);
  const halos: (Halo & { internal: number[] })[] = [];
  for (const p of peaks(grid, rho, search.threshold)) {
    const internal = subCellCentre(grid, rho, p);
    if (halos.some((h) => minimumImageDistance(grid, h.internal, internal) < h.radius)) continue;
    const radius = overdensityRadius(grid, ball, rho, internal, search.threshold);
    if (radius === undefined) continue;
    const mass = search.threshold * ballVolume(grid.dims, radius);
    if (mass < search.minMass) continue;
    const kin = haloKinematics(grid, ball, psi, internal, radius, search.a);
    const centre = axes.map((ax) => (((internal[ax]! % grid.extent[ax]!) + grid.extent[ax]!) % grid.extent[ax]!));
    halos.push({ centre, radius, mass, peakDensity: rho[p]!, ...kin, internal });
  }
  return halos.map(({ internal: _i, ...h }) => h);
}

/** The distance between two points (internal 3D coordinates) by the nearest periodic image. */
export function minimumImageDistance(grid: Grid, x: readonly number[], y: readonly number[]): number {
  let d2 = 0;
  for (let ax = 0; ax < 3; ax++) {
    if (grid.shape[ax]! === 1) continue;
    const L = grid.extent[ax]!;
    let d = Math.abs(x[ax]! - y[ax]!) % L;
    d = Math.min(d, L - d);
    d2 += d * d;
  }
  return Math.sqrt(d2);
}
