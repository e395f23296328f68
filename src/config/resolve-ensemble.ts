/**
 * The [ensemble] section (psibox ensemble): the members, the particle
 * number that sets the vacuum noise, the noise seed, the sample times and
 * the departure level, checked with errors naming the key.
 */
import { ConfigError } from "../core/errors.js";
import { ensembleSchema, type CheckedConfig } from "./schema.js";

/** The ensemble's settings. */
export interface ResolvedEnsemble {
  readonly members: number;
  /** N, or "physical": the field's mass over the particle mass. */
  readonly particles: number | "physical";
  readonly seed: number;
  /** Equal intervals of the span between sample times. */
  readonly samples: number;
  readonly departure: number;
  readonly resamples: number;
}

/** Most members of one ensemble. */
export const MAX_MEMBERS = 1_000_000;

const whole = (v: number, lo: number, hi: number): boolean => Number.isInteger(v) && v >= lo && v <= hi;

/** Resolve the [ensemble] section (its defaults when the config has none). */
export function resolveEnsemble(config: CheckedConfig): ResolvedEnsemble {
  const e = config.ensemble ?? ensembleSchema.parse({});
  if (!whole(e.members, 2, MAX_MEMBERS)) throw new ConfigError("ensemble.members", `must be a whole number from 2 to ${MAX_MEMBERS} (an ensemble's spread needs at least 2 members), got ${e.members}`);
  if (e.particles !== "physical" && !(e.particles >= 1 && Number.isFinite(e.particles))) {
    throw new ConfigError("ensemble.particles", `must be "physical" (the field's mass over particle.mass) or a number of particles ≥ 1, got ${e.particles}`);
  }
  if (!whole(e.noise_seed, 0, 2 ** 32 - 1)) throw new ConfigError("ensemble.noise_seed", `must be a whole number from 0 to 4294967295, got ${e.noise_seed}`);
  if (!whole(e.samples, 1, 10_000)) throw new ConfigError("ensemble.samples", `must be a whole number of intervals from 1 to 10000, got ${e.samples}`);
  if (!(e.departure > 0 && e.departure <= 2)) throw new ConfigError("ensemble.departure", `must be a relative distance in (0, 2], got ${e.departure}`);
  if (!whole(e.resamples, 8, 1000)) throw new ConfigError("ensemble.resamples", `must be a whole number from 8 to 1000, got ${e.resamples}`);
  return { members: e.members, particles: e.particles, seed: e.noise_seed, samples: e.samples, departure: e.departure, resamples: e.resamples };
}
