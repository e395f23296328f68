/**
 * Resolution of the [initial] section to code units (ħ/m = 1, 4πG = 1,
 * ℓ = first box side), with range checks whose errors name the key: one
 * resolver per initial-condition kind (resolve-initial-fields.ts and
 * resolve-initial-solitons.ts), sharing the readers of an InitialScope.
 */
import { ConfigError } from "../core/errors.js";
import type { CodeUnits, UnitContext } from "../physics/units.js";
import type { BackgroundSpec } from "../physics/cosmology/background.js";
import type { PowerParameters } from "../physics/cosmology/power.js";
import type { CheckedConfig } from "./schema.js";
import { perAxis, positive, read } from "./values.js";
import { resolveCosmological, resolvePacket, resolvePlaneWave, resolveWhiteNoise } from "./resolve-initial-fields.js";
import { resolveGroundState, resolveRandomSolitons, resolveSolitons } from "./resolve-initial-solitons.js";

export { SOLITON_MASS_CORE, SOLITON_R99_OVER_RC } from "./resolve-initial-solitons.js";

/** One soliton in code units. */
export interface ResolvedSoliton {
  readonly mass: number;
  readonly center: readonly number[];
  readonly velocity: readonly number[];
  readonly phase: number;
}

/** Initial condition in code units. */
export type ResolvedInitial =
  | { readonly kind: "plane-wave"; readonly meanDensity: number; readonly contrast: number; readonly mode: readonly number[] }
  | {
      readonly kind: "gaussian-packet";
      readonly mass: number;
      readonly width: number;
      readonly center: readonly number[];
      readonly velocity: readonly number[];
    }
  | { readonly kind: "ground-state"; readonly mass: number; readonly guessWidth: number; readonly center: readonly number[] }
  | { readonly kind: "solitons"; readonly profile: "relaxed" | "core-fit"; readonly solitons: readonly ResolvedSoliton[] }
  | {
      readonly kind: "cosmological";
      readonly meanDensity: number;
      readonly seed: number;
      readonly power: PowerParameters;
      readonly fixedAmplitude: boolean;
      readonly paired: boolean;
      /** The code length unit in Mpc. */
      readonly lengthUnitMpc: number;
    }
  | { readonly kind: "white-noise"; readonly meanDensity: number; readonly amplitude: number; readonly seed: number }
  /** A field read from a file (loaded and resampled by the run, which may read files). */
  | { readonly kind: "snapshot"; readonly file: string };

/** The [initial] section of one kind, as checked. */
export type InitialSection<K extends CheckedConfig["initial"]["kind"]> = Extract<CheckedConfig["initial"], { kind: K }>;

/** What every kind's resolver reads with: the run's geometry and units, and readers whose errors name the key. */
export class InitialScope {
  constructor(
    readonly config: CheckedConfig,
    readonly dims: number,
    readonly lengths: readonly number[],
    readonly units: CodeUnits,
    readonly ctx: UnitContext,
    readonly background: BackgroundSpec,
  ) {}

  length(key: string, text: string): number {
    return read(key, text, "length", this.ctx) / this.units.lengthM;
  }

  mass(key: string, text: string): number {
    return positive(key, read(key, text, "mass", this.ctx)) / this.units.massKg;
  }

  speed(key: string, text: string): number {
    return read(key, text, "velocity", this.ctx) / (this.units.lengthM / this.units.timeS);
  }

  /** One velocity per axis (at rest when absent). */
  velocity(key: string, list: string | readonly string[] | undefined): number[] {
    return list === undefined ? Array<number>(this.dims).fill(0) : perAxis(key, list, this.dims).map((t) => this.speed(key, t));
  }

  /** A point inside the box, one length per axis (the box centre when absent). */
  centre(key: string, list: readonly string[] | undefined): number[] {
    if (list === undefined) return this.lengths.map((l) => l / 2);
    const c = perAxis(key, list, this.dims).map((t) => this.length(key, t));
    c.forEach((v, i) => {
      if (!(v >= 0 && v <= (this.lengths[i] as number))) throw new ConfigError(key, `lies outside the box (axis ${i + 1})`);
    });
    return c;
  }

  /** initial.mean_density, or the cosmic mean of an expanding run. */
  meanDensity(text: string | undefined): number {
    const bg = this.background;
    if (text !== undefined) return positive("initial.mean_density", read("initial.mean_density", text, "density", this.ctx)) / (this.units.massKg / this.units.lengthM ** 3);
    if (bg.kind === "lcdm") return 1.5 * bg.omegaMatter * bg.hubble0 ** 2; // 4πGρ̄ = (3/2) Ω_m H0²
    throw new ConfigError("initial.mean_density", 'missing; static runs need a mean density, e.g. "1e7 Msun/kpc^3"');
  }

  /** Refuse a self-gravitating initial condition in a run without gravity. */
  needGravity(kind: string): void {
    if (this.config.grid.gravity === "none") throw new ConfigError("initial.kind", `"${kind}" needs gravity: set grid.gravity to "isolated" or "periodic"`);
  }
}

/** Resolve the [initial] section. */
export function resolveInitial(
  config: CheckedConfig,
  dims: number,
  lengths: readonly number[],
  units: CodeUnits,
  ctx: UnitContext,
  background: BackgroundSpec,
): ResolvedInitial {
  const scope = new InitialScope(config, dims, lengths, units, ctx, background);
  const ic = config.initial;
  switch (ic.kind) {
    case "snapshot":
      return { kind: "snapshot", file: ic.file };
    case "plane-wave":
      return resolvePlaneWave(ic, scope);
    case "white-noise":
      return resolveWhiteNoise(ic, scope);
    case "gaussian-packet":
      return resolvePacket(ic, scope);
    case "solitons":
      return resolveSolitons(ic, scope);
    case "random-solitons":
      return resolveRandomSolitons(ic, scope);
    case "cosmological":
      return resolveCosmological(ic, scope);
    case "ground-state":
      return resolveGroundState(ic, scope);
  }
}
