/** Resolvers of the self-gravitating objects: soliton lists, random soliton sets (drawn here, from their seed), the ground state. */
import { ConfigError } from "../core/errors.js";
import { SeededRandom } from "../math/random.js";
import { PC_M } from "../physics/constants.js";
import { positive } from "./values.js";
import type { InitialScope, InitialSection, ResolvedInitial, ResolvedSoliton } from "./resolve-initial.js";

/**
 * M r_c = 2.67941 ħ²/(G m²) for the exact 3D ground state, r_c the radius where the density falls to half its
 * centre value (computed independently by integrating the ground-state equation); in code units ħ²/(Gm²) = 4π.
 */
export const SOLITON_MASS_CORE = 2.67941 * 4 * Math.PI;
/** r₉₉ / r_c of the exact 3D ground state, r₉₉ enclosing 99% of the mass: M r₉₉ = 9.94583 ħ²/(G m²) (computed independently; 9.9 in Membrado, Pacheco & Sañudo 1989, Phys. Rev. A 39, 4207, quoted from memory). */
export const SOLITON_R99_OVER_RC = 9.94583 / 2.67941;

/** In 3D: the soliton of mass m must fit in the box and, with isolated gravity, keep its core inside. */
function checkFits(scope: InitialScope, key: string, m: number, center: readonly number[]): void {
  if (scope.dims !== 3) return;
  const r99 = (SOLITON_R99_OVER_RC * SOLITON_MASS_CORE) / m;
  const lengths = scope.lengths;
  if (2 * r99 > Math.min(...lengths)) {
    const kpc = ((r99 * scope.units.lengthM) / (1e3 * PC_M)).toPrecision(3);
    throw new ConfigError(key, `the soliton (r₉₉ = ${kpc} kpc) does not fit in the box; give it more mass or a bigger box`);
  }
  if (scope.config.grid.gravity === "isolated" && center.some((c, i) => c < r99 / 2 || c > (lengths[i] as number) - r99 / 2)) {
    throw new ConfigError(key, "the soliton sits too close to the edge of an isolated box (its core would be cut)");
  }
}

export function resolveSolitons(ic: InitialSection<"solitons">, scope: InitialScope): ResolvedInitial {
  scope.needGravity("solitons");
  const dims = scope.dims;
  if (ic.profile === "core-fit" && dims !== 3) throw new ConfigError("initial.profile", '"core-fit" is the 3D core profile; use "relaxed" in 1D and 2D');
  const solitons = ic.soliton.map((s, i): ResolvedSoliton => {
    const key = `initial.soliton[${i}]`;
    if ((s.mass === undefined) === (s.core_radius === undefined)) throw new ConfigError(`${key}.mass`, "give either mass or core_radius");
    let m: number;
    if (s.core_radius !== undefined) {
      if (dims !== 3) throw new ConfigError(`${key}.core_radius`, "core radii set the mass only in 3D; give mass in 1D and 2D");
      m = SOLITON_MASS_CORE / positive(`${key}.core_radius`, scope.length(`${key}.core_radius`, s.core_radius));
    } else m = scope.mass(`${key}.mass`, s.mass as string);
    const center = scope.centre(`${key}.center`, s.center);
    checkFits(scope, key, m, center);
    return { mass: m, center, velocity: scope.velocity(`${key}.velocity`, s.velocity), phase: s.phase };
  });
  return { kind: "solitons", profile: ic.profile, solitons };
}

export function resolveRandomSolitons(ic: InitialSection<"random-solitons">, scope: InitialScope): ResolvedInitial {
  scope.needGravity("random-solitons");
  if (!(ic.count >= 1 && ic.count <= 1000)) throw new ConfigError("initial.count", `must be from 1 to 1000, got ${ic.count}`);
  const { dims, lengths } = scope;
  const m = scope.mass("initial.mass", ic.mass);
  const dispersion = ic.velocity_dispersion;
  const sigma = dispersion === undefined ? 0 : positive("initial.velocity_dispersion", scope.speed("initial.velocity_dispersion", dispersion));
  const margin = dims === 3 ? (SOLITON_R99_OVER_RC * SOLITON_MASS_CORE) / m / 2 : Math.min(...lengths) / 10;
  checkFits(scope, "initial.mass", m, lengths.map((l) => l / 2));
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

export function resolveGroundState(ic: InitialSection<"ground-state">, scope: InitialScope): ResolvedInitial {
  scope.needGravity("ground-state");
  const guessWidth =
    ic.guess_width === undefined ? Math.min(...scope.lengths) / 10 : positive("initial.guess_width", scope.length("initial.guess_width", ic.guess_width));
  return { kind: "ground-state", mass: scope.mass("initial.mass", ic.mass), guessWidth, center: scope.centre("initial.center", ic.center) };
}
