/** Resolution of [background] and [span]: the background in code units and the run's start and end times. */
import { ConfigError } from "../core/errors.js";
import type { CodeUnits, UnitContext } from "../physics/units.js";
import { MPC_M } from "../physics/constants.js";
import { makeBackground, type BackgroundSpec } from "../physics/cosmology/background.js";
import type { CheckedConfig } from "./schema.js";
import { positive, read } from "./values.js";

const KM_S_MPC = 1e3 / MPC_M;

/** H0 [1/s] of an expanding run (0 for a static one) and h, which the unit context needs before anything else is read. */
export function resolveHubble(config: CheckedConfig): { hubbleSI: number; littleH: number | undefined } {
  const bgc = config.background;
  if (bgc.kind !== "lcdm") return { hubbleSI: 0, littleH: undefined };
  const hubbleSI = positive("background.hubble", read("background.hubble", bgc.hubble, "rate", {}));
  return { hubbleSI, littleH: hubbleSI / (100 * KM_S_MPC) };
}

/** The background in code units and the span [startTime, endTime] in code time. */
export function resolveBackgroundAndSpan(
  config: CheckedConfig,
  units: CodeUnits,
  ctx: UnitContext,
  hubbleSI: number,
): { background: BackgroundSpec; startTime: number; endTime: number } {
  const span = config.span;
  if (config.background.kind !== "lcdm") {
    if (span.start_redshift !== undefined || span.end_redshift !== undefined) {
      const key = span.start_redshift !== undefined ? "span.start_redshift" : "span.end_redshift";
      throw new ConfigError(key, 'needs background.kind = "lcdm"; static runs use span.duration');
    }
    if (span.duration === undefined) throw new ConfigError("span.duration", 'missing; static runs need a duration, e.g. "1 Gyr"');
    // a field read from a snapshot starts at its own time
    const ic = config.initial;
    const startTime = ic.kind === "snapshot" && ic.time !== undefined ? read("initial.time", ic.time, "time", ctx) / units.timeS : 0;
    return { background: { kind: "static" }, startTime, endTime: startTime + positive("span.duration", read("span.duration", span.duration, "time", ctx)) / units.timeS };
  }
  const om = config.background.omega_matter;
  const or = config.background.omega_radiation;
  if (!(om > 0 && om <= 1)) throw new ConfigError("background.omega_matter", `must be in (0, 1], got ${om}`);
  if (!(or >= 0 && om + or <= 1)) {
    throw new ConfigError("background.omega_radiation", `must be ≥ 0 with omega_matter + omega_radiation ≤ 1 (flat, Ω_Λ ≥ 0), got ${or}`);
  }
  if (config.grid.gravity === "isolated") {
    throw new ConfigError("grid.gravity", 'isolated gravity needs background.kind = "static"; use "periodic" for expanding boxes');
  }
  const { zStart, zEnd } = redshiftSpan(config);
  if (config.initial.kind === "snapshot" && config.initial.time !== undefined) {
    throw new ConfigError("initial.time", "is for static runs; an expanding run starts at span.start_redshift (by default the snapshot's redshift)");
  }
  const background: BackgroundSpec = { kind: "lcdm", hubble0: hubbleSI * units.timeS, omegaMatter: om, omegaRadiation: or, littleH: ctx.littleH as number };
  const bg = makeBackground(background);
  return { background, startTime: bg.time(1 / (1 + zStart)), endTime: bg.time(1 / (1 + zEnd)) };
}

/** The start and end redshifts of an expanding run, checked. */
function redshiftSpan(config: CheckedConfig): { zStart: number; zEnd: number } {
  const span = config.span;
  if (span.duration !== undefined) throw new ConfigError("span.duration", "is for static runs; expanding runs use span.start_redshift and span.end_redshift");
  if (span.start_redshift === undefined) throw new ConfigError("span.start_redshift", "missing; expanding runs start at a redshift, e.g. 100");
  const zEnd = span.end_redshift ?? 0;
  if (!(span.start_redshift < 1e6)) throw new ConfigError("span.start_redshift", `must be below 1e6, got ${span.start_redshift}`);
  if (!(zEnd > -1)) throw new ConfigError("span.end_redshift", `must be above −1, got ${zEnd}`);
  if (!(span.start_redshift > zEnd)) {
    throw new ConfigError("span.start_redshift", `must be larger than span.end_redshift (${zEnd}), got ${span.start_redshift}`);
  }
  return { zStart: span.start_redshift, zEnd };
}
