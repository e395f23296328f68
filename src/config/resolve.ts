/**
 * Resolution: a checked config (physical units as text) → a ResolvedRun
 * (complete, in code units, with an absolute output folder). Every value is
 * range-checked here, with errors that name the key.
 */
import path from "node:path";
import { ConfigError } from "../core/errors.js";
import { CodeUnits, type UnitContext } from "../physics/units.js";
import { Grid, checkIsolatedGrid } from "../grid/grid.js";
import type { GravityKind, PoissonKernel } from "../fields/poisson.js";
import type { CheckedConfig } from "./schema.js";

export type { ResolvedInitial } from "./resolve-initial.js";
import { resolveInitial, type ResolvedInitial } from "./resolve-initial.js";
import { perAxis, positive, read } from "./values.js";
import { resolveBackgroundAndSpan, resolveHubble } from "./resolve-span.js";
import { resolveIntegrator, resolveOutput } from "./resolve-output.js";
import { resolveSidecar, type ResolvedSidecar } from "./resolve-sidecar.js";
import { resolveBreakdown, type ResolvedBreakdown } from "./resolve-breakdown.js";
import { resolveContact, type ResolvedContact } from "./resolve-contact.js";
import { checkExpandingRelaxation, checkRelaxedMasses } from "./contact-limits.js";
import { firstSpeciesName, resolveSpecies, type ResolvedSpecies } from "./resolve-species.js";
export type { ResolvedSpecies } from "./resolve-species.js";

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
  /** The particle's contact interaction (particle.scattering_length or particle.decay_constant), if any. */
  readonly contact: ResolvedContact | undefined;
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
  readonly sidecar: ResolvedSidecar;
  readonly breakdown: ResolvedBreakdown;
  /** The first species' name (the reference field's; [particle] name). */
  readonly firstSpecies: string;
  /** The species after the first ([[species]]), advanced beside ψ in this order; empty for one species. */
  readonly species: readonly ResolvedSpecies[];
}

/**
 * Resolve a checked config, section by section (resolve-span.ts, resolve-initial.ts, resolve-output.ts).
 * @param config the validated config
 * @param name run name (the config file's base name)
 * @param cwd folder that relative output paths are taken from
 */
export function resolveRun(config: CheckedConfig, name: string, cwd: string): ResolvedRun {
  config = withTablePath(config, cwd);
  const cells = typeof config.grid.cells === "number" ? [config.grid.cells] : [...config.grid.cells];
  const dims = cells.length;
  const { hubbleSI, littleH } = resolveHubble(config);
  const ctx: UnitContext = { littleH };
  const m = positive("particle.mass", read("particle.mass", config.particle.mass, "mass", ctx));
  const boxSI = perAxis("grid.box", config.grid.box, dims).map((t) => positive("grid.box", read("grid.box", t, "length", ctx)));
  const contact = resolveContact(config.particle, "particle", m);
  const units = new CodeUnits(m, boxSI[0] as number);
  const lengths = boxSI.map((l) => l / units.lengthM);
  new Grid(cells, lengths); // validates the cell counts (powers of two) with errors naming grid.cells
  if (config.grid.gravity === "isolated") checkIsolatedGrid(cells);
  const { background, startTime, endTime } = resolveBackgroundAndSpan(config, units, ctx, hubbleSI);
  const initial = resolveInitial(config, dims, lengths, units, ctx, background);
  checkRelaxedMasses(initial, dims, units, contact, m);
  checkExpandingRelaxation(initial, background.kind, contact);
  const integrator = resolveIntegrator(config, cells, units, ctx);
  const { outputDir, output } = resolveOutput(config, name, cwd, background, { startTime, endTime }, units, ctx);
  if (!(config.sidecar.squeezing_db < 0)) {
    throw new ConfigError("sidecar.squeezing_db", `must be negative (a variance below the coherent state's), got ${config.sidecar.squeezing_db}`);
  }
  const sidecar = resolveSidecar(config, units.timeS, ctx, { lengths, lengthM: units.lengthM });
  const breakdown = resolveBreakdown(config, units, ctx, endTime - startTime, lengths);
  const species = resolveSpecies(config, dims, lengths, units, ctx, hubbleSI);
  return {
    firstSpecies: firstSpeciesName(config),
    species,
    name,
    outputDir,
    config,
    sidecar,
    breakdown,
    particleMassKg: m,
    contact,
    lengthUnitM: units.lengthM,
    grid: { cells, lengths, gravity: config.grid.gravity, poisson: config.grid.poisson },
    background,
    span: { startTime, endTime },
    initial,
    integrator,
    output,
  };
}

/** Spectrum tables' and the species' snapshot paths taken from cwd and recorded in full, so that the resolved config reads the same files from anywhere. */
function withTablePath(config: CheckedConfig, cwd: string): CheckedConfig {
  const full = (file: string) => path.resolve(cwd, file).split(path.sep).join("/");
  const fix = <T extends CheckedConfig["initial"]>(ic: T): T => {
    if (ic.kind === "cosmological" && ic.spectrum_table !== undefined) return { ...ic, spectrum_table: full(ic.spectrum_table) };
    if (ic.kind === "snapshot") return { ...ic, file: full(ic.file) };
    return ic;
  };
  const species = config.species?.map((sp) => (sp.initial ? { ...sp, initial: fix(sp.initial) } : sp));
  return { ...config, initial: fix(config.initial), ...(species ? { species } : {}) };
}
