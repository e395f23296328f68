/** Resolvers of the initial conditions that are fields rather than objects: plane wave, white noise, packet, cosmological. */
import { shorten } from "../core/sanitize.js";
import { ConfigError } from "../core/errors.js";
import { parseUnit } from "../physics/units.js";
import { KG_PER_EV } from "../physics/constants.js";
import { positive } from "./values.js";
import { resolveSpectrumTable } from "./resolve-spectrum-table.js";
import type { InitialScope, InitialSection, ResolvedInitial } from "./resolve-initial.js";

export function resolvePlaneWave(ic: InitialSection<"plane-wave">, scope: InitialScope): ResolvedInitial {
  const dims = scope.dims;
  const mode = ic.mode ?? [1, ...Array<number>(dims - 1).fill(0)];
  if (mode.length !== dims) throw new ConfigError("initial.mode", `give ${dims} integers (one per axis), got ${mode.length}`);
  if (mode.every((v) => v === 0)) throw new ConfigError("initial.mode", "must not be all zeros");
  if (!(Math.abs(ic.contrast) < 1)) throw new ConfigError("initial.contrast", `must be in (−1, 1), got ${ic.contrast}`);
  return { kind: "plane-wave", meanDensity: scope.meanDensity(ic.mean_density), contrast: ic.contrast, mode };
}

export function resolveWhiteNoise(ic: InitialSection<"white-noise">, scope: InitialScope): ResolvedInitial {
  if (!(ic.amplitude >= 0 && ic.amplitude < 1)) throw new ConfigError("initial.amplitude", `must be in [0, 1), got ${ic.amplitude}`);
  return { kind: "white-noise", meanDensity: scope.meanDensity(ic.mean_density), amplitude: ic.amplitude, seed: ic.seed };
}

export function resolvePacket(ic: InitialSection<"gaussian-packet">, scope: InitialScope): ResolvedInitial {
  return {
    kind: "gaussian-packet",
    mass: scope.mass("initial.mass", ic.mass),
    width: positive("initial.width", scope.length("initial.width", ic.width)),
    center: scope.centre("initial.center", ic.center),
    velocity: scope.velocity("initial.velocity", ic.velocity),
  };
}

export function resolveCosmological(ic: InitialSection<"cosmological">, scope: InitialScope): ResolvedInitial {
  const background = scope.background;
  if (background.kind !== "lcdm") throw new ConfigError("initial.kind", '"cosmological" needs background.kind = "lcdm"');
  if (!(ic.sigma_8 > 0)) throw new ConfigError("initial.sigma_8", `must be positive, got ${ic.sigma_8}`);
  if (!(ic.omega_baryon >= 0 && ic.omega_baryon < background.omegaMatter)) {
    throw new ConfigError("initial.omega_baryon", `must be in [0, omega_matter), got ${ic.omega_baryon}`);
  }
  if (!(Math.abs(ic.spectral_index - 1) < 0.5)) throw new ConfigError("initial.spectral_index", `must be within 0.5 of 1, got ${ic.spectral_index}`);
  const t = /^\s*([-+]?\d*\.?\d+(?:[eE][-+]?\d+)?)\s*K\s*$/.exec(ic.cmb_temperature);
  if (!t || !(Number(t[1]) > 0)) throw new ConfigError("initial.cmb_temperature", `"${shorten(ic.cmb_temperature)}" is not a temperature in kelvin, e.g. "2.7255 K"`);
  if (ic.seed < 0) throw new ConfigError("initial.seed", `must be a whole number ≥ 0, got ${ic.seed}`);
  const units = scope.units;
  return {
    kind: "cosmological",
    meanDensity: scope.meanDensity(undefined),
    seed: ic.seed,
    power: {
      littleH: background.littleH,
      omegaMatter: background.omegaMatter,
      omegaBaryon: ic.omega_baryon,
      cmbTemperature: Number(t[1]),
      spectralIndex: ic.spectral_index,
      sigma8: ic.sigma_8,
      transfer: ic.transfer,
      ...resolveSpectrumTable(ic, scope, background.littleH),
      m22: ic.wave_suppression ? units.particleMassKg / KG_PER_EV / 1e-22 : undefined,
    },
    fixedAmplitude: ic.fixed_amplitude,
    paired: ic.paired,
    lengthUnitMpc: units.lengthM / parseUnit("Mpc").si,
  };
}
