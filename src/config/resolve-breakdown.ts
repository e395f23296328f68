/**
 * The [breakdown] section in code units: whether the tangent-linear
 * companion measures the Lyapunov rate, its renormalisation interval and
 * the seed of its start.
 */
import { ConfigError } from "../core/errors.js";
import type { CodeUnits, UnitContext } from "../physics/units.js";
import type { CheckedConfig } from "./schema.js";
import { positive, read } from "./values.js";
import { formatNumber } from "../core/format.js";
import { parseRegion, type Region } from "./region.js";

/** A Julian megayear in seconds. */
const MYR_S = 3.15576e13;

export interface ResolvedBreakdown {
  /** Advance a tangent-linear field and measure the Lyapunov rate. */
  readonly tangent: boolean;
  /** Renormalisation interval (code time); undefined: one dynamical time at the start. */
  readonly interval: number | undefined;
  readonly seed: number;
  /** Depletion probes (2 tangent fields each; 0: none). */
  readonly probes: number;
  /** The depletion clock's fraction of N. */
  readonly depletionFraction: number;
  /** Where the Lyapunov rate is measured (code lengths). */
  readonly region: Region;
  /** The twin nonlinear run's relative offset e (0: no twin). */
  readonly twinOffset: number;
}

/** Most probes a run takes: with the Lyapunov tangent and its twin, 2p + 2 fields stay within a plug-in set's 64. */
export const MAX_PROBES = 31;


/** Resolve the [breakdown] section. */
export function resolveBreakdown(config: CheckedConfig, units: CodeUnits, ctx: UnitContext, span: number, lengths: readonly number[]): ResolvedBreakdown {
  const b = config.breakdown;
  const probes = b.probes;
  if (!(Number.isInteger(probes) && probes >= 0)) throw new ConfigError("breakdown.probes", `must be a whole number ≥ 1 to measure the depletion (0, the default: none), got ${probes}`);
  if (probes > MAX_PROBES) throw new ConfigError("breakdown.probes", `at most ${MAX_PROBES} probes (${2 * MAX_PROBES} tangent fields) in one run, got ${probes}`);
  const fraction = b.depletion_fraction;
  if (!(fraction > 0 && fraction <= 1)) throw new ConfigError("breakdown.depletion_fraction", `must be a fraction of N in (0, 1], got ${fraction}`);
  const e = b.twin_offset;
  if (!(e === 0 || (e >= 1e-12 && e <= 1e-3))) throw new ConfigError("breakdown.twin_offset", `must be 0 (no twin) or from 1e-12 to 1e-3, got ${e}`);
  if (e > 0 && !b.tangent) throw new ConfigError("breakdown.twin_offset", "the twin run cross-checks the Lyapunov rate: set breakdown.tangent = true with it");
  const names = { kind: "breakdown.region", center: "breakdown.region_center", radius: "breakdown.region_radius" };
  const region = parseRegion({ kind: b.region, center: b.region_center, radius: b.region_radius, names }, { lengths, lengthM: units.lengthM }, (key, message) => new ConfigError(key, message));
  if (region.kind !== "box" && !b.tangent) throw new ConfigError("breakdown.region", "restricts the Lyapunov rate: set breakdown.tangent = true with it");
  if (!(Number.isInteger(b.seed) && b.seed >= 0 && b.seed < 2 ** 32)) throw new ConfigError("breakdown.seed", `must be a whole number from 0 to 4294967295, got ${b.seed}`);
  let interval: number | undefined;
  if (b.interval !== undefined) {
    interval = positive("breakdown.interval", read("breakdown.interval", b.interval, "time", ctx), 'a positive time, e.g. "50 Myr"') / units.timeS;
    if (interval > span) throw new ConfigError("breakdown.interval", `must be at most the run's span (${formatNumber((span * units.timeS) / MYR_S)} Myr), got ${b.interval}`);
  }
  return { tangent: b.tangent, interval, seed: b.seed, probes, depletionFraction: fraction, region, twinOffset: e };
}
