/** Small helpers shared by the numerical tests. */
import { Grid } from "../../src/grid/grid.js";

/** Deterministic pseudo-random numbers in [−1, 1) (mulberry32). */
export function seededRandom(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) / 4294967296) * 2 - 1;
  };
}

/** Fill a complex field from a function of the internal coordinates (x0, x1, x2). */
export function fillComplex(grid: Grid, f: (x: number, y: number, z: number) => [number, number]): Float64Array {
  const out = new Float64Array(2 * grid.size);
  const [n0, n1, n2] = grid.shape;
  let p = 0;
  for (let a = 0; a < n0; a++) {
    for (let b = 0; b < n1; b++) {
      for (let c = 0; c < n2; c++, p += 2) {
        const [re, im] = f(grid.coordinate(0, a), grid.coordinate(1, b), grid.coordinate(2, c));
        out[p] = re;
        out[p + 1] = im;
      }
    }
  }
  return out;
}

/** Fill a real field from a function of the internal coordinates. */
export function fillReal(grid: Grid, f: (x: number, y: number, z: number) => number): Float64Array {
  const out = new Float64Array(grid.size);
  const [n0, n1, n2] = grid.shape;
  let p = 0;
  for (let a = 0; a < n0; a++) {
    for (let b = 0; b < n1; b++) {
      for (let c = 0; c < n2; c++, p++) out[p] = f(grid.coordinate(0, a), grid.coordinate(1, b), grid.coordinate(2, c));
    }
  }
  return out;
}

/** Largest |a − b| over two arrays. */
export function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs((a[i] as number) - (b[i] as number)));
  return m;
}

/** Largest |a|. */
export function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] as number));
  return m;
}

/** A lumpy self-gravitating field in 1D, 2D or 3D (density contrast up to 0.6, a small phase): nonlinear within a few steps. */
export function lumpy(grid: Grid): Float64Array {
  return fillComplex(grid, (x, y, z) => {
    const d = 0.4 * Math.cos(2 * Math.PI * (x + 2 * y)) * Math.sin(2 * Math.PI * z) + 0.2 * Math.cos(6 * Math.PI * z + 1);
    const s = 0.02 * Math.sin(2 * Math.PI * (y - z));
    const amp = Math.sqrt(300 * (1 + d));
    return [amp * Math.cos(s), amp * Math.sin(s)];
  });
}

/** The largest difference relative to the largest magnitude of the reference `b`. */
export function maxRelative(a: Float64Array, b: Float64Array): number {
  let num = 0;
  let den = 0;
  for (let i = 0; i < a.length; i++) {
    num = Math.max(num, Math.abs(a[i]! - b[i]!));
    den = Math.max(den, Math.abs(b[i]!));
  }
  return num / den;
}

/** Amplitude of cos(2π·mode·z) in δ = ρ/ρ̄ − 1 of a 1D field. */
export function modeAmplitude(grid: Grid, psi: Float64Array, mode: number): number {
  const n = grid.size;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  mean /= n;
  let c = 0;
  for (let i = 0; i < n; i++) c += ((psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2) / mean - 1) * Math.cos((2 * Math.PI * mode * i) / n);
  return (2 * c) / n;
}

/**
 * A nonlinear 2D start in an expanding unit box: two density modes (contrasts 0.3 and 0.2) of mean rhoBar at
 * aStart with the growing mode's flow, phase S_k = a²H f δ_k/k² (linear theory).
 */
export function expandingTwoModeStart(grid: Grid, rhoBar: number, aStart: number, hubble: number, growthRate: number): Float64Array {
  const flow = aStart * aStart * hubble * growthRate;
  return fillComplex(grid, (_x, y, z) => {
    const c1 = 0.3 * Math.cos(2 * Math.PI * y) * Math.cos(2 * Math.PI * z);
    const c2 = 0.2 * Math.sin(4 * Math.PI * z + 1);
    const phase = flow * (c1 / (8 * Math.PI * Math.PI) + c2 / (16 * Math.PI * Math.PI));
    const amp = Math.sqrt(rhoBar * (1 + c1 + c2));
    return [amp * Math.cos(phase), amp * Math.sin(phase)];
  });
}
