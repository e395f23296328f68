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

/** A Julian megayear in seconds. */
const MYR_S = 3.15576e13;

export interface ResolvedBreakdown {
  /** Advance a tangent-linear field and measure the Lyapunov rate. */
  readonly tangent: boolean;
  /** Renormalisation interval (code time); undefined: one dynamical time at the start. */
  readonly interval: number | undefined;
  readonly seed: number;
}

/** Resolve the [breakdown] section. */
export function resolveBreakdown(config: CheckedConfig, units: CodeUnits, ctx: UnitContext, span: number): ResolvedBreakdown {
  const b = config.breakdown;
  if (!(Number.isInteger(b.seed) && b.seed >= 0 && b.seed < 2 ** 32)) throw new ConfigError("breakdown.seed", `must be a whole number from 0 to 4294967295, got ${b.seed}`);
  let interval: number | undefined;
  if (b.interval !== undefined) {
    interval = positive("breakdown.interval", read("breakdown.interval", b.interval, "time", ctx), 'a positive time, e.g. "50 Myr"') / units.timeS;
    if (interval > span) throw new ConfigError("breakdown.interval", `must be at most the run's span (${formatNumber((span * units.timeS) / MYR_S)} Myr), got ${b.interval}`);
  }
  return { tangent: b.tangent, interval, seed: b.seed };
}
