/**
 * The [breakdown] section in code units: whether the tangent-linear
 * companion measures the Lyapunov rate, its renormalisation interval and
 * the seed of its start.
 */
import os from "node:os";
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
  /** Depletion probes (2 tangent fields each; 0: none). */
  readonly probes: number;
}

/** Bytes per cell of one tangent field: its complex grid and undo copy, and a share of the real grid of dφ (counted once per field, an upper bound). */
export const TANGENT_BYTES_PER_CELL = 16 + 16 + 8;

/** Resolve the [breakdown] section. */
export function resolveBreakdown(config: CheckedConfig, units: CodeUnits, ctx: UnitContext, span: number, cells: number): ResolvedBreakdown {
  const b = config.breakdown;
  const probes = b.probes;
  if (!(Number.isInteger(probes) && probes >= 0)) throw new ConfigError("breakdown.probes", `must be a whole number ≥ 0 (0: no depletion), got ${probes}`);
  const perField = TANGENT_BYTES_PER_CELL * cells;
  const budget = os.totalmem() / 2;
  if (2 * probes * perField > budget) {
    const fit = Math.floor(budget / (2 * perField));
    throw new ConfigError("breakdown.probes", `${probes} probes need ${formatNumber((2 * probes * perField) / 1e9)} GB (2 fields of ${formatNumber(perField / 1e6)} MB each), more than half this machine's memory; at most ${fit} fit`);
  }
  if (!(Number.isInteger(b.seed) && b.seed >= 0 && b.seed < 2 ** 32)) throw new ConfigError("breakdown.seed", `must be a whole number from 0 to 4294967295, got ${b.seed}`);
  let interval: number | undefined;
  if (b.interval !== undefined) {
    interval = positive("breakdown.interval", read("breakdown.interval", b.interval, "time", ctx), 'a positive time, e.g. "50 Myr"') / units.timeS;
    if (interval > span) throw new ConfigError("breakdown.interval", `must be at most the run's span (${formatNumber((span * units.timeS) / MYR_S)} Myr), got ${b.interval}`);
  }
  return { tangent: b.tangent, interval, seed: b.seed, probes };
}
