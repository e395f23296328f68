/** Resolution of [output] and [integrator]: cadences, the output time unit, snapshot times, step rules, threads. */
import os from "node:os";
import path from "node:path";
import { shorten } from "../core/sanitize.js";
import { ConfigError } from "../core/errors.js";
import { parseUnit, UnitSyntaxError, type CodeUnits, type UnitContext } from "../physics/units.js";
import { makeBackground, type BackgroundSpec } from "../physics/cosmology/background.js";
import type { CheckedConfig } from "./schema.js";
import { positive, read } from "./values.js";
import type { ResolvedRun } from "./resolve.js";

/** The [integrator] section in code units. */
export function resolveIntegrator(config: CheckedConfig, shape: readonly number[], units: CodeUnits, ctx: UnitContext): ResolvedRun["integrator"] {
  const integ = config.integrator;
  if (!(integ.safety > 0 && integ.safety <= 1)) throw new ConfigError("integrator.safety", `must be in (0, 1], got ${integ.safety}`);
  positive("integrator.max_dln_a", integ.max_dln_a);
  positive("integrator.mass_tolerance", integ.mass_tolerance);
  positive("integrator.max_steps", integ.max_steps);
  const fixed = integ.fixed_step;
  return {
    safety: integ.safety,
    fixedStep: fixed === undefined ? undefined : positive("integrator.fixed_step", read("integrator.fixed_step", fixed, "time", ctx)) / units.timeS,
    maxDlnA: integ.max_dln_a,
    massTolerance: integ.mass_tolerance,
    maxSteps: integ.max_steps,
    threads: resolveThreads(integ.threads, shape),
    fft: integ.fft,
  };
}

/** Threads: as configured, else the default (see defaultThreads). */
function resolveThreads(configured: number | undefined, shape: readonly number[]): number {
  if (configured !== undefined) {
    if (!(configured >= 1 && configured <= 64)) throw new ConfigError("integrator.threads", `must be from 1 to 64, got ${configured}`);
    return configured;
  }
  return defaultThreads(shape);
}

/**
 * Threads when none are configured: PSIBOX_THREADS, else the cores from 2^17 cells on in 1D and 2D
 * (2^17, 256×512) and from 2^18 in 3D (64³), one thread below, where a second thread costs more than it
 * saves. Measured on an idle 2-core machine with the four-step 1D transform and the 3D plane passes,
 * 2 threads against 1 (scripts/bench-threads.mjs, one run): 1D 2^14 1.76×, 2^16 0.84×, 2^17 0.75×,
 * 2^18 0.65×; 128² 1.75×, 256² 0.83×, 512² 0.68×; 32³ 1.59×, 64³ 0.74×, 128³ 0.56×. The thresholds sit
 * one step above the first gain, since that gain (16–17%) was not there in earlier measurements.
 */
export function defaultThreads(shape: readonly number[]): number {
  const env = Number(process.env["PSIBOX_THREADS"] ?? NaN);
  if (Number.isInteger(env) && env >= 1) return Math.min(env, 64);
  const cells = shape.reduce((p, n) => p * n, 1);
  return cells < (shape.length === 3 ? 2 ** 18 : 2 ** 17) ? 1 : os.availableParallelism();
}

/** The [output] section; `span` in code time. */
export function resolveOutput(
  config: CheckedConfig,
  name: string,
  cwd: string,
  background: BackgroundSpec,
  span: { startTime: number; endTime: number },
  units: CodeUnits,
  ctx: UnitContext,
): { outputDir: string; output: ResolvedRun["output"] } {
  const out = config.output;
  if (out.timeseries_every !== undefined) positive("output.timeseries_every", out.timeseries_every);
  const timeUnit = out.time_unit ?? (config.span.duration !== undefined ? unitText(config.span.duration) : "Gyr");
  const timeUnitS = timeUnitSeconds(timeUnit, ctx);
  if (out.dir !== undefined && out.dir.trim() === "") throw new ConfigError("output.dir", 'is empty; give a folder of its own, e.g. "output/run1", or leave the key out for output/<config name>');
  const outputDir = path.resolve(cwd, out.dir ?? path.join("output", name));
  const snapshotTimes = resolveSnapshotTimes(config, background, span.startTime, span.endTime, units, ctx);
  if (out.snapshot_every !== undefined) positive("output.snapshot_every", out.snapshot_every);
  positive("output.checkpoint_every", out.checkpoint_every);
  const output = {
    timeseriesEvery: out.timeseries_every ?? defaultTimeseriesEvery(config.grid.cells),
    timeUnit,
    timeUnitS,
    snapshotEvery: out.snapshot_every,
    snapshotTimes,
    snapshotPrecision: out.snapshot_precision,
    checkpointEvery: out.checkpoint_every,
    vortexCensus: resolveVortexCensus(out.vortex_census, config.grid.cells),
  };
  return { outputDir, output };
}

/** Grids from this many cells on record a time-series row every `ROW_EVERY_LARGE` steps by default. */
export const LARGE_GRID_CELLS = 2 ** 18;
const ROW_EVERY_LARGE = 16;

/**
 * The default cadence of time-series rows. A row measures K on a transform of its own (about half a
 * step's work) and one pass over the grid, so every step would cost about 1.5 bare steps; every 8th
 * step measured 1.16–1.17 bare steps with the sidecar on (128³, 256³), every 16th keeps it within 1.15. Below 2^18 cells (64³, 512², 2^18 in 1D)
 * a run is quick anyway and every step is recorded.
 */
export function defaultTimeseriesEvery(cells: number | readonly number[]): number {
  const total = typeof cells === "number" ? cells : cells.reduce((p, n) => p * n, 1);
  return total < LARGE_GRID_CELLS ? 1 : ROW_EVERY_LARGE;
}

function timeUnitSeconds(timeUnit: string, ctx: UnitContext): number {
  try {
    const u = parseUnit(timeUnit, ctx);
    if (u.dim.L !== 0 || u.dim.M !== 0 || u.dim.T !== 1) throw new UnitSyntaxError("");
    return u.si;
  } catch {
    throw new ConfigError("output.time_unit", `"${shorten(timeUnit)}" is not a time unit; use s, yr, kyr, Myr or Gyr`);
  }
}

function resolveSnapshotTimes(
  config: CheckedConfig,
  background: BackgroundSpec,
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
function resolveVortexCensus(on: boolean, cells: number | readonly number[]): boolean {
  const dims = typeof cells === "number" ? 1 : cells.length;
  if (on && dims < 2) throw new ConfigError("output.vortex_census", "vortices need a 2D or 3D grid; this grid is 1D (set it to false)");
  return on;
}
