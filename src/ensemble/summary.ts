/**
 * summary.json of an ensemble: its settings, N and the modes, the members
 * reduced, the last sample's observables with their errors, the
 * departure clock and, with a companion, the comparison's clocks, in
 * physical units.
 */
import type { ResolvedRun } from "../config/resolve.js";
import type { ResolvedEnsemble } from "../config/resolve-ensemble.js";
import type { OutputScales } from "../simulation/scales.js";
import type { EnsembleReduction } from "./reduce.js";
import type { Estimate } from "./observables.js";

const pair = (e: Estimate) => ({ value: e.value, error: e.error });

/** The summary of an ensemble (its reduction may not exist yet: fewer than 2 members). */
export function summaryOf(
  run: ResolvedRun,
  settings: ResolvedEnsemble,
  particles: number,
  modes: number,
  reduction: EnsembleReduction | undefined,
  scales: OutputScales,
  status: string,
  reason: string | undefined,
  warnings: readonly string[],
  comparison?: Record<string, unknown>,
): Record<string, unknown> {
  const last = reduction?.samples[reduction.samples.length - 1];
  const departure = reduction?.departureTime;
  return {
    name: run.name,
    status,
    ...(reason ? { reason } : {}),
    members_requested: settings.members,
    members_reduced: reduction?.members.length ?? 0,
    particles_N: particles,
    modes,
    noise_seed: settings.seed,
    time_unit: scales.timeUnit,
    ...(last && reduction
      ? {
          at_end: {
            time: scales.time(reduction.times[reduction.times.length - 1] as number),
            condensate_N0: pair(last.condensate),
            condensate_fraction: pair(last.fraction),
            depletion_N: pair(last.depletion),
            b: { re: pair(last.bRe), im: pair(last.bIm) },
            coherence: pair(last.coherence),
            vmin: pair(last.vMin),
            departure: pair(last.departure),
          },
          departure_clock: {
            level: settings.departure,
            verdict: departure ? "rung" : "not within the span",
            time: departure ? scales.time(departure.value) : null,
            time_error: departure ? scales.time(departure.error) : null,
          },
        }
      : {}),
    ...(comparison ? { comparison } : {}),
    ...(warnings.length ? { warnings } : {}),
  };
}
