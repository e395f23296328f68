/**
 * The statistics of an ensemble at one sample time, in number units per
 * cell (a = ψ √(ΔV/m)), with the symmetric-ordering shifts removed:
 * ⟨â†â⟩ = ⟨|a|²⟩ − 1/2 per mode, ⟨b̂⟩ = ⟨b⟩, ⟨b̂†b̂⟩ = ⟨|b|²⟩ − 1/2 and
 * ⟨b̂²⟩ = ⟨b²⟩ for b = ⟨φ|a⟩ the amplitude in the classical mode φ (the
 * classical field normalised to one). The smallest quadrature variance of
 * that mode is V_min = ⟨|δb|²⟩ − |⟨δb²⟩|, δb = b − ⟨b⟩ (coherent state:
 * 1/2), which is 1/2 + (⟨b̂†b̂⟩ − |⟨b̂⟩|²) − |⟨b̂²⟩ − ⟨b̂⟩²|. Errors: the
 * standard error of a mean for ⟨b⟩ and the particle number, and the spread
 * of bootstrap resamples of the members (Efron 1979, Ann. Stat. 7, 1) for
 * the condensate number, its fraction, the depletion, V_min and the
 * departure of the mean field from the classical one.
 */
import { leadingMode, overlap } from "./density-matrix.js";
import { gramLeadingEigenvalue, gramMatrix } from "./gram.js";
import { SeededRandom } from "../math/random.js";

/** A value with its error (one standard deviation). */
export interface Estimate {
  readonly value: number;
  readonly error: number;
}

/** What the ensemble says at one time. */
export interface SampleStatistics {
  /** Members that entered. */
  readonly members: number;
  /** N = Σ⟨â†â⟩ over the cells. */
  readonly particles: Estimate;
  /** N₀ = λ_max(ρ₁), the condensate number. */
  readonly condensate: Estimate;
  readonly fraction: Estimate;
  readonly depletion: Estimate;
  readonly bRe: Estimate;
  readonly bIm: Estimate;
  /** |⟨b̂⟩|²/N: the mean field's share of the particles. */
  readonly coherence: Estimate;
  readonly vMin: Estimate;
  /** ‖⟨a⟩ − a_cl‖ / ‖a_cl‖, the sampling noise of the mean removed. */
  readonly departure: Estimate;
  /** The departure in each bootstrap resample (for the error of the time it crosses a level). */
  readonly departureResamples: Float64Array;
  /** ⟨a⟩ per cell (interleaved). */
  readonly meanField: Float64Array;
  /** ⟨â†â⟩ per cell: particles per cell, shift removed. */
  readonly density: Float64Array;
}

/** Bootstrap resamples: `count` arrays of how often each of `members` members is drawn (seeded, the same for every sample time). */
export function bootstrapWeights(members: number, count: number, seed: number): Uint32Array[] {
  const rng = new SeededRandom((seed ^ 0x5bd1e995) >>> 0);
  return Array.from({ length: count }, () => {
    const w = new Uint32Array(members);
    for (let i = 0; i < members; i++) w[Math.min(members - 1, Math.floor(rng.uniform() * members))]! += 1;
    return w;
  });
}

function spread(values: ArrayLike<number>): number {
  const n = values.length;
  if (n < 2) return Number.NaN;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += values[i] as number;
  mean /= n;
  let s = 0;
  for (let i = 0; i < n; i++) s += ((values[i] as number) - mean) ** 2;
  return Math.sqrt(s / (n - 1));
}

/** Projections bⱼ = ⟨φ|aⱼ⟩ and totals Σ|aⱼ|² of each member. */
function perMember(members: readonly Float64Array[], mode: Float64Array): { bRe: Float64Array; bIm: Float64Array; total: Float64Array } {
  const m = members.length;
  const bRe = new Float64Array(m);
  const bIm = new Float64Array(m);
  const total = new Float64Array(m);
  members.forEach((a, j) => {
    const b = overlap(mode, a);
    bRe[j] = b.re;
    bIm[j] = b.im;
    total[j] = overlap(a, a).re;
  });
  return { bRe, bIm, total };
}

/** Weighted moments of the mode amplitudes: ⟨b⟩, ⟨|b|²⟩ − 1/2 is not taken here; V_min and the totals. */
function modeMoments(p: ReturnType<typeof perMember>, weights: ArrayLike<number> | undefined): { bRe: number; bIm: number; vMin: number; particles: number } {
  let sw = 0;
  let br = 0;
  let bi = 0;
  let total = 0;
  for (let j = 0; j < p.bRe.length; j++) {
    const w = weights ? (weights[j] as number) : 1;
    sw += w;
    br += w * (p.bRe[j] as number);
    bi += w * (p.bIm[j] as number);
    total += w * (p.total[j] as number);
  }
  br /= sw;
  bi /= sw;
  let absVar = 0;
  let sqRe = 0;
  let sqIm = 0;
  for (let j = 0; j < p.bRe.length; j++) {
    const w = weights ? (weights[j] as number) : 1;
    const dr = (p.bRe[j] as number) - br;
    const di = (p.bIm[j] as number) - bi;
    absVar += w * (dr * dr + di * di);
    sqRe += w * (dr * dr - di * di);
    sqIm += w * 2 * dr * di;
  }
  const vMin = (absVar - Math.hypot(sqRe, sqIm)) / sw;
  return { bRe: br, bIm: bi, vMin, particles: total / sw };
}

/**
 * ‖⟨a⟩_w − a_cl‖ / ‖a_cl‖ for weights w, with the sampling noise of the mean
 * removed from the squared distance: E‖ā − ⟨a⟩‖² = tr(C)/M for members of
 * covariance C, estimated by Σⱼ wⱼ‖aⱼ − ā‖² / (Σw − 1), so that a finite
 * ensemble of a field that has not departed reads 0 rather than its noise.
 */
function departureOf(members: readonly Float64Array[], reference: Float64Array, totals: Float64Array, weights: ArrayLike<number> | undefined, scratch: Float64Array): number {
  scratch.fill(0);
  let sw = 0;
  let sumTotals = 0;
  members.forEach((a, j) => {
    const w = weights ? (weights[j] as number) : 1;
    sw += w;
    sumTotals += w * (totals[j] as number);
    if (w !== 0) for (let x = 0; x < a.length; x++) scratch[x] = (scratch[x] as number) + w * (a[x] as number);
  });
  let d = 0;
  let r = 0;
  let meanNorm = 0;
  for (let x = 0; x < reference.length; x++) {
    const mean = (scratch[x] as number) / sw;
    d += (mean - (reference[x] as number)) ** 2;
    r += (reference[x] as number) ** 2;
    meanNorm += mean * mean;
  }
  const spread = (sumTotals - sw * meanNorm) / (sw - 1);
  return Math.sqrt(Math.max(0, d - spread / sw) / r);
}

/** ⟨a⟩ and ⟨|a|²⟩ − 1/2 per cell. */
function meanFields(members: readonly Float64Array[]): { meanField: Float64Array; density: Float64Array } {
  const n = (members[0] as Float64Array).length;
  const meanField = new Float64Array(n);
  const density = new Float64Array(n / 2);
  for (const a of members) {
    for (let x = 0; x < n; x += 2) {
      meanField[x] = (meanField[x] as number) + (a[x] as number);
      meanField[x + 1] = (meanField[x + 1] as number) + (a[x + 1] as number);
      density[x / 2] = (density[x / 2] as number) + (a[x] as number) ** 2 + (a[x + 1] as number) ** 2;
    }
  }
  const m = members.length;
  for (let x = 0; x < n; x++) meanField[x] = (meanField[x] as number) / m;
  for (let c = 0; c < n / 2; c++) density[c] = (density[c] as number) / m - 0.5;
  return { meanField, density };
}

/** The largest eigenvalue of W for a weighting of the members (undefined: all 1). */
type EigenSolver = (weights: ArrayLike<number> | undefined) => number;

/**
 * The eigenvalue solver for `resamples` weightings plus the full ensemble:
 * the power method on the fields (2·M·cells products an iteration, about
 * 16 iterations with its warm start), or on the Gram matrix (M²/2 field
 * products once, then M² an iteration), whichever costs fewer products.
 */
function eigenSolver(members: readonly Float64Array[], mode: Float64Array, p: ReturnType<typeof perMember>, resamples: number): EigenSolver {
  const m = members.length;
  if (m > 32 * (resamples + 1)) return (weights) => leadingMode(members, mode, weights, 1e-13).eigenvalue;
  const g = gramMatrix(members);
  const start = new Float64Array(2 * m);
  for (let j = 0; j < m; j++) (start[2 * j] = p.bRe[j] as number), (start[2 * j + 1] = -(p.bIm[j] as number));
  const ones = new Float64Array(m).fill(1);
  return (weights) => gramLeadingEigenvalue(g, weights ?? ones, start);
}

/** One replica's scalar results (the full ensemble: weights undefined). */
function replica(members: readonly Float64Array[], reference: Float64Array, p: ReturnType<typeof perMember>, weights: ArrayLike<number> | undefined, eigen: EigenSolver, scratch: Float64Array) {
  const cells = reference.length / 2;
  const mm = modeMoments(p, weights);
  const particles = mm.particles - cells / 2;
  const condensate = eigen(weights) - 0.5;
  return {
    particles,
    condensate,
    fraction: condensate / particles,
    depletion: particles - condensate,
    coherence: (mm.bRe ** 2 + mm.bIm ** 2) / particles,
    vMin: mm.vMin,
    departure: departureOf(members, reference, p.total, weights, scratch),
    bRe: mm.bRe,
    bIm: mm.bIm,
  };
}

/**
 * The statistics of `members` (number units, interleaved, at least 2) at one
 * time, with `reference` the classical field there and `resamples` the
 * bootstrap weights (bootstrapWeights).
 */
export function sampleStatistics(members: readonly Float64Array[], reference: Float64Array, resamples: readonly ArrayLike<number>[]): SampleStatistics {
  const m = members.length;
  if (m < 2) throw new RangeError("an ensemble's statistics need at least 2 members");
  let r2 = 0;
  for (let x = 0; x < reference.length; x++) r2 += (reference[x] as number) ** 2;
  const mode = reference.map((v) => v / Math.sqrt(r2));
  const p = perMember(members, mode);
  const scratch = new Float64Array(reference.length);
  const eigen = eigenSolver(members, mode, p, resamples.length);
  const full = replica(members, reference, p, undefined, eigen, scratch);
  const reps = resamples.map((w) => replica(members, reference, p, w, eigen, scratch));
  const err = (key: "condensate" | "fraction" | "depletion" | "coherence" | "vMin" | "departure"): Estimate => ({ value: full[key], error: spread(reps.map((r) => r[key])) });
  const sem = (values: Float64Array): number => spread(values) / Math.sqrt(m);
  return {
    members: m,
    particles: { value: full.particles, error: sem(p.total) },
    condensate: err("condensate"),
    fraction: err("fraction"),
    depletion: err("depletion"),
    bRe: { value: full.bRe, error: sem(p.bRe) },
    bIm: { value: full.bIm, error: sem(p.bIm) },
    coherence: err("coherence"),
    vMin: err("vMin"),
    departure: err("departure"),
    departureResamples: Float64Array.from(reps.map((r) => r.departure)),
    ...meanFields(members),
  };
}
