/**
 * Poisson solvers for ∇²φ = s on a grid (code units: 4πG = 1).
 *
 * Periodic: φ_k = −s_k / k² with φ_{k=0} = 0, so φ has zero mean and the
 * source's mean is ignored (the comoving equation's −ρ̄). k² is the exact
 * continuous one ("spectral") or that of the second-order finite-difference
 * Laplacian, Σ (2 sin(k dx/2)/dx)² ("finite-difference").
 *
 * Isolated: the free-space convolution φ = G ∗ s by zero padding to twice
 * the grid along every simulated axis (Hockney & Eastwood 1988, "Computer
 * Simulation Using Particles", §6-5-4), with the Green's function sampled at
 * cell separations and the self-cell weight of green.ts.
 */
import type { Grid } from "../grid/grid.js";
import { Grid as GridClass } from "../grid/grid.js";
import { RealFft } from "./fft.js";
import { freeGreen, selfCellWeight } from "./green.js";
import { poissonRows } from "./step-kernels.js";

/** The gravity boundary conditions psibox offers. */
export type GravityKind = "periodic" | "isolated" | "none";
/** The Laplacian's Fourier symbol for periodic gravity. */
export type PoissonKernel = "spectral" | "finite-difference";

/** Solves ∇²φ = s in place: `field` holds s on entry and φ on return. */
export interface PoissonSolver {
  readonly kind: GravityKind;
  solveInPlace(field: Float64Array): void;
}

/** No gravity: φ = 0. */
export class NoGravity implements PoissonSolver {
  readonly kind = "none" as const;
  solveInPlace(field: Float64Array): void {
    field.fill(0);
  }
}

function kSquaredTable(k: Float64Array, dx: number, kernel: PoissonKernel): Float64Array {
  const out = new Float64Array(k.length);
  for (let i = 0; i < k.length; i++) {
    const ki = k[i] as number;
    out[i] = kernel === "spectral" ? ki * ki : (2 * Math.sin((ki * dx) / 2) / dx) ** 2;
  }
  return out;
}

/** Periodic Poisson solver by real FFT. */
export class PeriodicPoisson implements PoissonSolver {
  readonly kind = "periodic" as const;
  private readonly fft: RealFft;
  /** Allocated on first use (a threaded stepper brings its own shared one). */
  private spectrum: Float64Array | undefined;
  private readonly k2: readonly [Float64Array, Float64Array, Float64Array];

  constructor(grid: Grid, kernel: PoissonKernel = "spectral") {
    this.fft = new RealFft(grid.shape);
    this.k2 = [
      kSquaredTable(grid.wavenumbers(0), grid.spacing[0], kernel),
      kSquaredTable(grid.wavenumbers(1), grid.spacing[1], kernel),
      // the half spectrum along the last axis holds j = 0 … n2/2 (k² is even in k)
      kSquaredTable(grid.wavenumbers(2).subarray(0, grid.shape[2] / 2 + 1), grid.spacing[2], kernel),
    ];
  }

  solveInPlace(field: Float64Array): void {
    this.spectrum ??= new Float64Array(this.fft.halfLength);
    const spec = this.spectrum;
    this.fft.forward(field, spec);
    const [h0, h1] = this.fft.halfShape;
    const [k0, k1, k2] = this.k2;
    poissonRows(spec, this.fft.halfShape, k0, k1, k2, 0, h0 * h1);
    this.fft.inverse(spec, field);
  }

  /** The k² tables per axis (the last one for the half spectrum). */
  get kSquared(): readonly [Float64Array, Float64Array, Float64Array] {
    return this.k2;
  }
}

/** Isolated (free-space) Poisson solver by zero-padded convolution on a doubled grid. */
export class IsolatedPoisson implements PoissonSolver {
  readonly kind = "isolated" as const;
  private readonly grid: Grid;
  private readonly padded: Grid;
  private readonly fft: RealFft;
  /** The Green's function's transform on the padded half spectrum (real: the kernel is even). */
  readonly kernelHat: Float64Array;
  /** Work arrays of solveInPlace, allocated on first use (a stepper brings its own). */
  private work: Float64Array | undefined;
  private spectrum: Float64Array | undefined;

  constructor(grid: Grid) {
    this.grid = grid;
    this.padded = new GridClass(
      grid.cells.map((n) => 2 * n),
      grid.lengths.map((l) => 2 * l),
    );
    this.fft = new RealFft(this.padded.shape);
    this.kernelHat = this.buildKernel();
  }

  /** Shape of the zero-padded grid. */
  get paddedShape(): readonly [number, number, number] {
    return this.padded.shape;
  }

  private buildKernel(): Float64Array {
    const g = this.grid;
    const [m0, m1, m2] = this.padded.shape;
    const [d0, d1, d2] = g.spacing;
    const simulated = [0, 1, 2].filter((ax) => (g.shape[ax] as number) > 1).map((ax) => g.spacing[ax] as number);
    const selfWeight = selfCellWeight(simulated);
    const k = new Float64Array(this.padded.size);
    const spectrum = new Float64Array(this.fft.halfLength);
    const wrap = (j: number, m: number): number => (j <= m / 2 ? j : j - m);
    let p = 0;
    for (let a = 0; a < m0; a++) {
      const x = m0 > 1 ? wrap(a, m0) * d0 : 0;
      for (let b = 0; b < m1; b++) {
        const y = m1 > 1 ? wrap(b, m1) * d1 : 0;
        for (let c = 0; c < m2; c++, p++) {
          const z = wrap(c, m2) * d2;
          const r = Math.sqrt(x * x + y * y + z * z);
          k[p] = g.cellVolume * (r === 0 ? selfWeight : freeGreen(g.dims, r));
        }
      }
    }
    this.fft.forward(k, spectrum);
    // The kernel is real and even, so its transform is real: keep the real part.
    const hat = new Float64Array(this.fft.halfLength / 2);
    for (let i = 0; i < hat.length; i++) hat[i] = spectrum[2 * i] as number;
    return hat;
  }

  solveInPlace(field: Float64Array): void {
    const [n0, n1, n2] = this.grid.shape;
    const [, m1, m2] = this.padded.shape;
    this.work ??= new Float64Array(this.padded.size);
    this.spectrum ??= new Float64Array(this.fft.halfLength);
    const w = this.work;
    w.fill(0);
    for (let a = 0; a < n0; a++) {
      for (let b = 0; b < n1; b++) {
        const src = (a * n1 + b) * n2;
        const dst = (a * m1 + b) * m2;
        for (let c = 0; c < n2; c++) w[dst + c] = field[src + c] as number;
      }
    }
    const spec = this.spectrum;
    this.fft.forward(w, spec);
    const hat = this.kernelHat;
    for (let i = 0; i < hat.length; i++) {
      const h = hat[i] as number;
      spec[2 * i] = (spec[2 * i] as number) * h;
      spec[2 * i + 1] = (spec[2 * i + 1] as number) * h;
    }
    this.fft.inverse(spec, w);
    for (let a = 0; a < n0; a++) {
      for (let b = 0; b < n1; b++) {
        const src = (a * m1 + b) * m2;
        const dst = (a * n1 + b) * n2;
        for (let c = 0; c < n2; c++) field[dst + c] = w[src + c] as number;
      }
    }
  }
}

/** Build the Poisson solver for a gravity kind. */
export function makePoissonSolver(grid: Grid, kind: GravityKind, kernel: PoissonKernel = "spectral"): PoissonSolver {
  if (kind === "periodic") return new PeriodicPoisson(grid, kernel);
  if (kind === "isolated") return new IsolatedPoisson(grid);
  return new NoGravity();
}
