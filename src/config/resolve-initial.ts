/**
 * Resolution of the [initial] section to code units (ħ/m = 1, 4πG = 1,
 * ℓ = first box side), with range checks whose errors name the key.
 * Random soliton sets are drawn here, from their seed, so the resolved run
 * lists every soliton.
 */
import { ConfigError } from "../core/errors.js";
import { CodeUnits, parseUnit, type UnitContext } from "../physics/units.js";
import type { BackgroundSpec } from "../physics/cosmology/background.js";
import type { PowerParameters } from "../physics/cosmology/power.js";
import { SeededRandom } from "../math/random.js";
import { KG_PER_EV, PC_M } from "../physics/constants.js";
import type { CheckedConfig } from "./schema.js";
import { perAxis, positive, read } from "./values.js";

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

/** M r_c = 2.67941 ħ²/(G m²) for the exact 3D ground state (PHYSICS §5.1); in code units ħ²/(Gm²) = 4π. */
export const SOLITON_MASS_CORE = 2.67941 * 4 * Math.PI;
/** r₉₉ / r_c of the exact 3D ground state (9.94583 / 2.67941). */
export const SOLITON_R99_OVER_RC = 9.94583 / 2.67941;

/** Resolve the [initial] section. */
export function resolveInitial(
  config: CheckedConfig,
  dims: number,
  lengths: readonly number[],
  units: CodeUnits,
  ctx: UnitContext,
  background: BackgroundSpec,
): ResolvedInitial {
  const ic = config.initial;
  const len = (key: string, t: string) => read(key, t, "length", ctx) / units.lengthM;
  const mass = (key: string, t: string) => positive(key, read(key, t, "mass", ctx)) / units.massKg;
  const speed = (key: string, t: string) => read(key, t, "velocity", ctx) / (units.lengthM / units.timeS);
  const centre = (list: readonly string[] | undefined, key: string): number[] => {
    if (list === undefined) return lengths.map((l) => l / 2);
    const c = perAxis(key, list, dims).map((t) => len(key, t));
    c.forEach((v, i) => {
      if (!(v >= 0 && v <= (lengths[i] as number))) throw new ConfigError(key, `lies outside the box (axis ${i + 1})`);
    });
    return c;
  };
  const meanDensity = (text: string | undefined): number => {
    if (text !== undefined) return positive("initial.mean_density", read("initial.mean_density", text, "density", ctx)) / (units.massKg / units.lengthM ** 3);
    if (background.kind === "lcdm") return 1.5 * background.omegaMatter * background.hubble0 ** 2; // 4πGρ̄ = (3/2) Ω_m H0²
    throw new ConfigError("initial.mean_density", 'missing; static runs need a mean density, e.g. "1e7 Msun/kpc^3"');
  };
  const needGravity = (kind: string) => {
    if (config.grid.gravity === "none") throw new ConfigError("initial.kind", `"${kind}" needs gravity: set grid.gravity to "isolated" or "periodic"`);
  };
  const checkFits = (key: string, m: number, center: readonly number[]) => {
    if (dims !== 3) return;
    const r99 = (SOLITON_R99_OVER_RC * SOLITON_MASS_CORE) / m;
    if (2 * r99 > Math.min(...lengths)) {
      throw new ConfigError(key, `the soliton (r₉₉ = ${((r99 * units.lengthM) / (1e3 * PC_M)).toPrecision(3)} kpc) does not fit in the box; give it more mass or a bigger box`);
    }
    if (config.grid.gravity === "isolated" && center.some((c, i) => c < r99 / 2 || c > (lengths[i] as number) - r99 / 2)) {
      throw new ConfigError(key, "the soliton sits too close to the edge of an isolated box (its core would be cut)");
    }
  };
  switch (ic.kind) {
    case "snapshot":
      return { kind: "snapshot", file: ic.file };
    case "plane-wave": {
      const mode = ic.mode ?? [1, ...Array<number>(dims - 1).fill(0)];
      if (mode.length !== dims) throw new ConfigError("initial.mode", `give ${dims} integers (one per axis), got ${mode.length}`);
      if (mode.every((v) => v === 0)) throw new ConfigError("initial.mode", "must not be all zeros");
      if (!(Math.abs(ic.contrast) < 1)) throw new ConfigError("initial.contrast", `must be in (−1, 1), got ${ic.contrast}`);
      return { kind: "plane-wave", meanDensity: meanDensity(ic.mean_density), contrast: ic.contrast, mode };
    }
    case "white-noise": {
      if (!(ic.amplitude >= 0 && ic.amplitude < 1)) throw new ConfigError("initial.amplitude", `must be in [0, 1), got ${ic.amplitude}`);
      return { kind: "white-noise", meanDensity: meanDensity(ic.mean_density), amplitude: ic.amplitude, seed: ic.seed };
    }
    case "gaussian-packet": {
      const velocity = ic.velocity === undefined ? Array<number>(dims).fill(0) : perAxis("initial.velocity", ic.velocity, dims).map((t) => speed("initial.velocity", t));
      return {
        kind: "gaussian-packet",
        mass: mass("initial.mass", ic.mass),
        width: positive("initial.width", len("initial.width", ic.width)),
        center: centre(ic.center, "initial.center"),
        velocity,
      };
    }
    case "solitons": {
      needGravity("solitons");
      if (ic.profile === "core-fit" && dims !== 3) throw new ConfigError("initial.profile", '"core-fit" is the 3D core profile; use "relaxed" in 1D and 2D');
      const solitons = ic.soliton.map((s, i) => {
        const key = `initial.soliton[${i}]`;
        if ((s.mass === undefined) === (s.core_radius === undefined)) throw new ConfigError(`${key}.mass`, "give either mass or core_radius");
        let m: number;
        if (s.core_radius !== undefined) {
          if (dims !== 3) throw new ConfigError(`${key}.core_radius`, "core radii set the mass only in 3D; give mass in 1D and 2D");
          m = SOLITON_MASS_CORE / positive(`${key}.core_radius`, len(`${key}.core_radius`, s.core_radius));
        } else m = mass(`${key}.mass`, s.mass as string);
        const center = centre(s.center, `${key}.center`);
        checkFits(key, m, center);
        return {
          mass: m,
          center,
          velocity: s.velocity === undefined ? Array<number>(dims).fill(0) : perAxis(`${key}.velocity`, s.velocity, dims).map((t) => speed(`${key}.velocity`, t)),
          phase: s.phase,
        };
      });
      return { kind: "solitons", profile: ic.profile, solitons };
    }
    case "random-solitons": {
      needGravity("random-solitons");
      if (!(ic.count >= 1 && ic.count <= 1000)) throw new ConfigError("initial.count", `must be from 1 to 1000, got ${ic.count}`);
      const m = mass("initial.mass", ic.mass);
      const sigma = ic.velocity_dispersion === undefined ? 0 : positive("initial.velocity_dispersion", speed("initial.velocity_dispersion", ic.velocity_dispersion));
      const margin = dims === 3 ? (SOLITON_R99_OVER_RC * SOLITON_MASS_CORE) / m / 2 : Math.min(...lengths) / 10;
      checkFits("initial.mass", m, lengths.map((l) => l / 2));
      const rng = new SeededRandom(ic.seed);
      const solitons: ResolvedSoliton[] = [];
      for (let i = 0; i < ic.count; i++) {
        solitons.push({
          mass: m,
          center: lengths.map((l) => margin + (l - 2 * margin) * rng.uniform()),
          velocity: lengths.map(() => sigma * rng.normal()),
          phase: 2 * Math.PI * rng.uniform(),
        });
      }
      return { kind: "solitons", profile: "relaxed", solitons };
    }
    case "cosmological": {
      if (background.kind !== "lcdm") throw new ConfigError("initial.kind", '"cosmological" needs background.kind = "lcdm"');
      if (!(ic.sigma_8 > 0)) throw new ConfigError("initial.sigma_8", `must be positive, got ${ic.sigma_8}`);
      if (!(ic.omega_baryon >= 0 && ic.omega_baryon < background.omegaMatter)) {
        throw new ConfigError("initial.omega_baryon", `must be in [0, omega_matter), got ${ic.omega_baryon}`);
      }
      if (!(Math.abs(ic.spectral_index - 1) < 0.5)) throw new ConfigError("initial.spectral_index", `must be within 0.5 of 1, got ${ic.spectral_index}`);
      const t = /^\s*([-+]?\d*\.?\d+(?:[eE][-+]?\d+)?)\s*K\s*$/.exec(ic.cmb_temperature);
      if (!t || !(Number(t[1]) > 0)) throw new ConfigError("initial.cmb_temperature", `"${ic.cmb_temperature}" is not a temperature in kelvin, e.g. "2.7255 K"`);
      if (ic.seed < 0) throw new ConfigError("initial.seed", `must be a whole number ≥ 0, got ${ic.seed}`);
      const mpc = parseUnit("Mpc").si;
      return {
        kind: "cosmological",
        meanDensity: meanDensity(undefined),
        seed: ic.seed,
        power: {
          littleH: background.littleH,
          omegaMatter: background.omegaMatter,
          omegaBaryon: ic.omega_baryon,
          cmbTemperature: Number(t[1]),
          spectralIndex: ic.spectral_index,
          sigma8: ic.sigma_8,
          transfer: ic.transfer,
          m22: ic.wave_suppression ? units.particleMassKg / KG_PER_EV / 1e-22 : undefined,
        },
        fixedAmplitude: ic.fixed_amplitude,
        paired: ic.paired,
        lengthUnitMpc: units.lengthM / mpc,
      };
    }
    case "ground-state": {
      needGravity("ground-state");
      const guessWidth =
        ic.guess_width === undefined ? Math.min(...lengths) / 10 : positive("initial.guess_width", len("initial.guess_width", ic.guess_width));
      return { kind: "ground-state", mass: mass("initial.mass", ic.mass), guessWidth, center: centre(ic.center, "initial.center") };
    }
  }
}
