/**
 * Resolution: a checked config (physical units as text) → a ResolvedRun
 * (complete, in code units, with an absolute output folder). Every value is
 * range-checked here, with errors that name the key.
 */
import os from "node:os";
import path from "node:path";
import { ConfigError } from "../core/errors.js";
import { CodeUnits, parseUnit, UnitSyntaxError, type UnitContext } from "../physics/units.js";
import { MPC_M } from "../physics/constants.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { Grid } from "../grid/grid.js";
import type { GravityKind, PoissonKernel } from "../fields/poisson.js";
import type { CheckedConfig } from "./schema.js";

export type { ResolvedInitial } from "./resolve-initial.js";
import { resolveInitial, type ResolvedInitial } from "./resolve-initial.js";
import { perAxis, positive, read } from "./values.js";

/** Background in code units. */
export type { BackgroundSpec as ResolvedBackground } from "../physics/cosmology/background.js";
import type { BackgroundSpec as ResolvedBackground } from "../physics/cosmology/background.js";

/** A complete run description in code units. */
export interface ResolvedRun {
  readonly name: string;
  /** Absolute output folder. */
  readonly outputDir: string;
  /** The config with every default filled in (physical units, as text). */
  readonly config: CheckedConfig;
  readonly particleMassKg: number;
  /** The code length unit ℓ: the first axis's box length [m]. */
  readonly lengthUnitM: number;
  readonly grid: {
    readonly cells: readonly number[];
    readonly lengths: readonly number[];
    readonly gravity: GravityKind;
    readonly poisson: PoissonKernel;
  };
  readonly background: ResolvedBackground;
  readonly span: { readonly startTime: number; readonly endTime: number };
  readonly initial: ResolvedInitial;
  readonly integrator: {
    readonly safety: number;
    readonly fixedStep: number | undefined;
    readonly maxDlnA: number;
    readonly massTolerance: number;
    readonly maxSteps: number;
    /** Worker threads (1: the step runs on the main thread). */
    readonly threads: number;
    /** FFT implementation of the step. */
    readonly fft: "auto" | "wasm" | "js";
  };
  readonly output: {
    readonly timeseriesEvery: number;
    /** Vortex counts (2D) or line length (3D) in the time series. */
    readonly vortexCensus: boolean;
    readonly timeUnit: string;
    readonly timeUnitS: number;
    /** Steps between snapshots (undefined: none by count). */
    readonly snapshotEvery: number | undefined;
    /** Code times of snapshots by time interval or redshift, sorted, inside the span. */
    readonly snapshotTimes: readonly number[];
    readonly snapshotPrecision: "float64" | "float32";
    readonly checkpointEvery: number;
  };
  readonly sidecar: { readonly enabled: boolean; readonly squeezingDb: number };
}

const KM_S_MPC = 1e3 / MPC_M;

/**
 * Resolve a checked config.
 * @param config the validated config
 * @param name run name (the config file's base name)
 * @param cwd folder that relative output paths are taken from
 */
export function resolveRun(config: CheckedConfig, name: string, cwd: string): ResolvedRun {
  const cells = typeof config.grid.cells === "number" ? [config.grid.cells] : [...config.grid.cells];
  const dims = cells.length;
  const bgc = config.background;
  let littleH: number | undefined;
  let hubbleSI = 0;
  if (bgc.kind === "lcdm") {
    hubbleSI = positive("background.hubble", read("background.hubble", bgc.hubble, "rate", {}));
    littleH = hubbleSI / (100 * KM_S_MPC);
  }
  const ctx: UnitContext = { littleH };
  const m = positive("particle.mass", read("particle.mass", config.particle.mass, "mass", ctx));
  const boxSI = perAxis("grid.box", config.grid.box, dims).map((t) => positive("grid.box", read("grid.box", t, "length", ctx)));
  const units = new CodeUnits(m, boxSI[0] as number);
  const lengths = boxSI.map((l) => l / units.lengthM);
  const gravity = config.grid.gravity;
  new Grid(cells, lengths); // validates the cell counts (powers of two) with errors naming grid.cells

  let background: ResolvedBackground = { kind: "static" };
  let startTime = 0;
  let endTime: number;
  const span = config.span;
  if (bgc.kind === "lcdm") {
    const om = bgc.omega_matter;
    const or = bgc.omega_radiation;
    if (!(om > 0 && om <= 1)) throw new ConfigError("background.omega_matter", `must be in (0, 1], got ${om}`);
    if (!(or >= 0 && om + or <= 1)) {
      throw new ConfigError("background.omega_radiation", `must be ≥ 0 with omega_matter + omega_radiation ≤ 1 (flat, Ω_Λ ≥ 0), got ${or}`);
    }
    if (gravity === "isolated") {
      throw new ConfigError("grid.gravity", 'isolated gravity needs background.kind = "static"; use "periodic" for expanding boxes');
    }
    if (span.duration !== undefined) throw new ConfigError("span.duration", 'is for static runs; expanding runs use span.start_redshift and span.end_redshift');
    if (span.start_redshift === undefined) throw new ConfigError("span.start_redshift", "missing; expanding runs start at a redshift, e.g. 100");
    const zEnd = span.end_redshift ?? 0;
    if (!(span.start_redshift < 1e6)) throw new ConfigError("span.start_redshift", `must be below 1e6, got ${span.start_redshift}`);
    if (!(zEnd > -1)) throw new ConfigError("span.end_redshift", `must be above −1, got ${zEnd}`);
    if (!(span.start_redshift > zEnd)) {
      throw new ConfigError("span.start_redshift", `must be larger than span.end_redshift (${zEnd}), got ${span.start_redshift}`);
    }
    if (config.initial.kind === "snapshot" && config.initial.time !== undefined) {
      throw new ConfigError("initial.time", "is for static runs; an expanding run starts at span.start_redshift (by default the snapshot's redshift)");
    }
    background = { kind: "lcdm", hubble0: hubbleSI * units.timeS, omegaMatter: om, omegaRadiation: or, littleH: littleH as number };
    const bg = makeBackground(background);
    startTime = bg.time(1 / (1 + span.start_redshift));
    endTime = bg.time(1 / (1 + zEnd));
  } else {
    if (span.start_redshift !== undefined || span.end_redshift !== undefined) {
      const key = span.start_redshift !== undefined ? "span.start_redshift" : "span.end_redshift";
      throw new ConfigError(key, 'needs background.kind = "lcdm"; static runs use span.duration');
    }
    if (span.duration === undefined) throw new ConfigError("span.duration", 'missing; static runs need a duration, e.g. "1 Gyr"');
    // a field read from a snapshot starts at its own time
    const ic = config.initial;
    if (ic.kind === "snapshot" && ic.time !== undefined) startTime = read("initial.time", ic.time, "time", ctx) / units.timeS;
    endTime = startTime + positive("span.duration", read("span.duration", span.duration, "time", ctx)) / units.timeS;
  }

  const initial = resolveInitial(config, dims, lengths, units, ctx, background);
  const integ = config.integrator;
  if (!(integ.safety > 0 && integ.safety <= 1)) throw new ConfigError("integrator.safety", `must be in (0, 1], got ${integ.safety}`);
  positive("integrator.max_dln_a", integ.max_dln_a);
  positive("integrator.mass_tolerance", integ.mass_tolerance);
  positive("integrator.max_steps", integ.max_steps);
  const fixedStep =
    integ.fixed_step === undefined
      ? undefined
      : positive("integrator.fixed_step", read("integrator.fixed_step", integ.fixed_step, "time", ctx)) / units.timeS;

  const out = config.output;
  positive("output.timeseries_every", out.timeseries_every);
  const timeUnit = out.time_unit ?? (span.duration !== undefined ? unitText(span.duration) : "Gyr");
  let timeUnitS: number;
  try {
    const u = parseUnit(timeUnit, ctx);
    if (u.dim.L !== 0 || u.dim.M !== 0 || u.dim.T !== 1) throw new UnitSyntaxError("");
    timeUnitS = u.si;
  } catch {
    throw new ConfigError("output.time_unit", `"${timeUnit}" is not a time unit; use s, yr, kyr, Myr or Gyr`);
  }
  const outputDir = path.resolve(cwd, out.dir ?? path.join("output", name));
  const snapshotTimes = resolveSnapshotTimes(config, background, startTime, endTime, units, ctx);
  if (out.snapshot_every !== undefined) positive("output.snapshot_every", out.snapshot_every);
  positive("output.checkpoint_every", out.checkpoint_every);

  if (!(config.sidecar.squeezing_db < 0)) {
    throw new ConfigError("sidecar.squeezing_db", `must be negative (a variance below the coherent state's), got ${config.sidecar.squeezing_db}`);
  }
  return {
    name,
    outputDir,
    config,
    sidecar: { enabled: config.sidecar.enabled, squeezingDb: config.sidecar.squeezing_db },
    particleMassKg: m,
    lengthUnitM: units.lengthM,
    grid: { cells, lengths, gravity, poisson: config.grid.poisson },
    background,
    span: { startTime, endTime },
    initial,
    integrator: {
      safety: integ.safety,
      fixedStep,
      maxDlnA: integ.max_dln_a,
      massTolerance: integ.mass_tolerance,
      maxSteps: integ.max_steps,
      threads: resolveThreads(integ.threads, cells.reduce((p, n) => p * n, 1)),
      fft: integ.fft,
    },
    output: {
      timeseriesEvery: out.timeseries_every,
      timeUnit,
      timeUnitS,
      snapshotEvery: out.snapshot_every,
      snapshotTimes,
      snapshotPrecision: out.snapshot_precision,
      checkpointEvery: out.checkpoint_every,
      vortexCensus: resolveVortexCensus(out.vortex_census, dims),
    },
  };
}

/** Threads: as configured, else PSIBOX_THREADS, else the cores (one thread below 32³ cells, where threads do not pay). */
function resolveThreads(configured: number | undefined, cells: number): number {
  if (configured !== undefined) {
    if (!(configured >= 1 && configured <= 64)) throw new ConfigError("integrator.threads", `must be from 1 to 64, got ${configured}`);
    return configured;
  }
  const env = Number(process.env["PSIBOX_THREADS"] ?? NaN);
  if (Number.isInteger(env) && env >= 1) return Math.min(env, 64);
  return cells < 32 ** 3 ? 1 : os.availableParallelism();
}

function resolveSnapshotTimes(
  config: CheckedConfig,
  background: ResolvedBackground,
  startTime: number,
  endTime: number,
  units: CodeUnits,
  ctx: UnitContext,
): number[] {
  const out = config.output;
  const times: number[] = [];
  if (out.snapshot_interval !== undefined) {
    const dt = positive("output.snapshot_interval", read("output.snapshot_interval", out.snapshot_interval, "time", ctx)) / units.timeS;
    const count = Math.floor((endTime - startTime) / dt + 1e-9);
    if (count > 100_000) throw new ConfigError("output.snapshot_interval", `would write ${count} snapshots; choose a longer interval`);
    for (let k = 1; k <= count; k++) times.push(startTime + k * dt);
  }
  if (out.snapshot_redshifts !== undefined) {
    if (background.kind !== "lcdm") throw new ConfigError("output.snapshot_redshifts", 'needs background.kind = "lcdm"; static runs use output.snapshot_interval');
    const bg = makeBackground(background);
    const zStart = config.span.start_redshift as number;
    const zEnd = config.span.end_redshift ?? 0;
    for (const z of out.snapshot_redshifts) {
      if (!(z < zStart && z >= zEnd)) {
        throw new ConfigError("output.snapshot_redshifts", `${z} is outside the run's redshift range (${zStart} → ${zEnd})`);
      }
      times.push(bg.time(1 / (1 + z)));
    }
  }
  return [...new Set(times)].filter((t) => t > startTime && t <= endTime).sort((a, b) => a - b);
}

function unitText(quantity: string): string {
  return quantity.trim().replace(/^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*/, "");
}

/** output.vortex_census: only for 2D and 3D grids. */
function resolveVortexCensus(on: boolean, dims: number): boolean {
  if (on && dims < 2) throw new ConfigError("output.vortex_census", "vortices need a 2D or 3D grid; this grid is 1D (set it to false)");
  return on;
}
