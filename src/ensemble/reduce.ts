/**
 * The reduction of an ensemble folder: the members completed so far (in
 * increasing index, so the numbers do not depend on the order they were
 * finished in), sample time by sample time, into the statistics of
 * observables.ts and the occupation of every wavenumber shell
 * (occupations.ts), and the time at which the ensemble mean departs from the
 * classical field by a stated amount.
 */
import { bootstrapWeights, sampleStatistics, type Estimate, type SampleStatistics } from "./observables.js";
import { toNumberUnits } from "./noise.js";
import type { EnsembleStore } from "./store.js";
import { shellOccupations, wavenumberShells, type Shells } from "./occupations.js";
import type { Grid } from "../grid/grid.js";

/** The reduced ensemble. */
export interface EnsembleReduction {
  /** The member indices that entered. */
  readonly members: readonly number[];
  /** Sample times (code units). */
  readonly times: readonly number[];
  readonly samples: readonly SampleStatistics[];
  /** The mean field of the classical reference at each time, number units. */
  readonly reference: readonly Float64Array[];
  /** The grid's wavenumber shells, and the occupation of each at each sample time (particles, shift removed). */
  readonly shells: Shells;
  readonly occupations: readonly (readonly Estimate[])[];
  /** When ‖⟨a⟩ − a_cl‖/‖a_cl‖ first reaches the level (code time, linear between samples), or null; error from the bootstrap resamples. */
  readonly departureTime: Estimate | null;
}

/** How to reduce. */
export interface ReductionSettings {
  readonly particleMass: number;
  readonly cellVolume: number;
  readonly resamples: number;
  readonly seed: number;
  /** The departure level. */
  readonly level: number;
  readonly grid: Grid;
}

/** The first time `values` reaches `level`, linear between samples; null if it never does. */
export function crossingTime(times: readonly number[], values: ArrayLike<number>, level: number): number | null {
  for (let i = 0; i < times.length; i++) {
    const v = values[i] as number;
    if (!(v >= level)) continue;
    if (i === 0) return times[0] as number;
    const u = values[i - 1] as number;
    const t0 = times[i - 1] as number;
    return t0 + ((level - u) / (v - u)) * ((times[i] as number) - t0);
  }
  return null;
}

/** Reduce the completed members of `store` (at least 2) at every sample time. */
export function reduceEnsemble(store: EnsembleStore, settings: ReductionSettings, members = store.completed()): EnsembleReduction {
  const times = store.identity.times_code;
  const weights = bootstrapWeights(members.length, settings.resamples, settings.seed);
  const number = (psi: Float64Array) => toNumberUnits(psi, settings.particleMass, settings.cellVolume);
  const samples: SampleStatistics[] = [];
  const reference: Float64Array[] = [];
  const shells = wavenumberShells(settings.grid);
  const occupations: Estimate[][] = [];
  times.forEach((_, s) => {
    const ref = number(store.readSample(undefined, s));
    reference.push(ref);
    const fields = members.map((j) => number(store.readSample(j, s)));
    samples.push(sampleStatistics(fields, ref, weights));
    occupations.push(shellOccupations(fields, settings.grid, shells));
  });
  const central = crossingTime(times, samples.map((x) => x.departure.value), settings.level);
  let departureTime: Estimate | null = null;
  if (central !== null) {
    // resamples that never reach the level within the span leave the error as the spread of those that do
    const crossings = weights.map((_, r) => crossingTime(times, samples.map((x) => x.departureResamples[r] as number), settings.level)).filter((t): t is number => t !== null);
    const mean = crossings.reduce((s, t) => s + t, 0) / crossings.length;
    const error = crossings.length > 1 ? Math.sqrt(crossings.reduce((s, t) => s + (t - mean) ** 2, 0) / (crossings.length - 1)) : Number.NaN;
    departureTime = { value: central, error };
  }
  return { members, times, samples, reference, shells, occupations, departureTime };
}
