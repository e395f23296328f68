/**
 * The [sidecar] section in code units: whether it runs, the squeezing level,
 * the mode's start (squeeze, squeeze_angle, thermal_quanta), its loss and
 * dephasing rates (per code time) and the region whose mass outflow it
 * measures. That the start fits the mode's N is checked when the run starts
 * and N is known.
 */
import { ConfigError } from "../core/errors.js";
import type { UnitContext } from "../physics/units.js";
import type { CheckedConfig } from "./schema.js";
import { perAxis, read } from "./values.js";
import { parseRegion, type Region } from "./region.js";

/** A region of the box in code lengths (the shape the quantum sidecar's modes take): any region but the whole box. */
export type OutflowRegion = Exclude<Region, { readonly kind: "box" }>;

/** The box the regions lie in: code lengths per axis, and the code length unit in metres. */
export interface SidecarSpace {
  readonly lengths: readonly number[];
  readonly lengthM: number;
}

export interface ResolvedSidecar {
  readonly enabled: boolean;
  readonly squeezingDb: number;
  /** The Gaussian start: squeeze parameter, its angle [rad], thermal quanta. */
  readonly start: { readonly squeeze: number; readonly squeezeAngle: number; readonly thermal: number };
  /** Loss rate γ and dephasing rate κ [1/code time]. */
  readonly lossRate: number;
  readonly dephasingRate: number;
  /** The twin field's e (ψ₂(0) = (1 + e/2)ψ(0)); 0: no twin. */
  readonly twinExcess: number;
  /** The region whose mass outflow is measured at every time-series row (sidecar.outflow_region), if any. */
  readonly outflow?: OutflowRegion;
}

function nonNegative(key: string, v: number, what: string): number {
  if (!(Number.isFinite(v) && v >= 0)) throw new ConfigError(key, `must be ${what}, got ${v}`);
  return v;
}

function rate(key: string, text: string, timeS: number, ctx: UnitContext): number {
  const v = /^\s*0(\.0*)?\s*(\/\s*[a-zA-Z]+)?\s*$/.test(text) ? 0 : read(key, text, "rate", ctx);
  return nonNegative(key, v, 'a rate ≥ 0 with its unit, e.g. "1/Gyr"') * timeS;
}

/** Resolve the [sidecar] section; `timeS` is the code time unit in seconds. */
export function resolveSidecar(config: CheckedConfig, timeS: number, ctx: UnitContext, space?: SidecarSpace): ResolvedSidecar {
  const s = config.sidecar;
  if (!Number.isFinite(s.squeeze_angle)) throw new ConfigError("sidecar.squeeze_angle", `must be a finite angle in radians, got ${s.squeeze_angle}`);
  return {
    enabled: s.enabled,
    squeezingDb: s.squeezing_db,
    start: {
      squeeze: nonNegative("sidecar.squeeze", s.squeeze, "a finite squeeze parameter r ≥ 0"),
      squeezeAngle: s.squeeze_angle,
      thermal: nonNegative("sidecar.thermal_quanta", s.thermal_quanta, "a finite number of thermal quanta ≥ 0"),
    },
    lossRate: rate("sidecar.loss_rate", s.loss_rate, timeS, ctx),
    dephasingRate: rate("sidecar.dephasing_rate", s.dephasing_rate, timeS, ctx),
    twinExcess: twinExcess(s.twin_excess, s.enabled),
    ...outflowOf(config, ctx, space),
  };
}

/** sidecar.outflow_region with its centre and radius in code lengths (nothing for "none"), read by the shared region parser. */
function outflowOf(config: CheckedConfig, ctx: UnitContext, space: SidecarSpace | undefined): { outflow?: OutflowRegion } {
  const s = config.sidecar;
  if (s.outflow_region === "none" || !space) {
    for (const key of ["outflow_center", "outflow_radius"] as const) {
      if (s[key] !== undefined && s.outflow_region === "none") throw new ConfigError(`sidecar.${key}`, 'needs sidecar.outflow_region = "sphere", "cube" or "densest"');
    }
    return {};
  }
  if (!s.enabled) throw new ConfigError("sidecar.outflow_region", "needs sidecar.enabled = true (the sidecar measures the outflow)");
  if (s.outflow_radius === undefined) throw new ConfigError("sidecar.outflow_radius", `missing: the ${s.outflow_region === "cube" ? "cube's half-width" : "sphere's radius"}, e.g. "3 kpc"`);
  if (s.outflow_region === "densest" && s.outflow_center !== undefined) {
    throw new ConfigError("sidecar.outflow_center", 'not used with outflow_region = "densest" (the sphere follows the densest cell)');
  }
  const dims = space.lengths.length;
  const center = s.outflow_center === undefined ? undefined : perAxis("sidecar.outflow_center", s.outflow_center, dims);
  const names = { kind: "sidecar.outflow_region", center: "sidecar.outflow_center", radius: "sidecar.outflow_radius" };
  const text = { kind: s.outflow_region, center, radius: s.outflow_radius, middleByDefault: true, names };
  const region = parseRegion(text, { ...space, units: ctx }, (key, message) => new ConfigError(key, message));
  if (region.kind === "box") throw new ConfigError("sidecar.outflow_region", 'must be "none", "sphere", "cube" or "densest"');
  return { outflow: region };
}

/** sidecar.twin_excess: 0 (no twin), or e from 1e-6 to 0.1 with the sidecar on. */
function twinExcess(e: number, enabled: boolean): number {
  if (e === 0) return 0;
  if (!(Number.isFinite(e) && e >= 1e-6 && e <= 0.1)) {
    throw new ConfigError("sidecar.twin_excess", `must be 0 (no twin) or from 1e-6 to 0.1 (the bias of the one-sided difference is about e/2; 1e-3 is a good choice), got ${e}`);
  }
  if (!enabled) throw new ConfigError("sidecar.twin_excess", "needs sidecar.enabled = true (the twin measures the sidecar's adiabatic coefficient)");
  return e;
}
