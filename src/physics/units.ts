/**
 * Physical quantities written as text ("2 Mpc/h", "1e-22 eV", "250 km/s",
 * "0.5 Gyr", "1e7 Msun/kpc^3", "67.36 km/s/Mpc") and the code units of a run.
 *
 * A unit expression is a product of symbols with optional integer powers
 * (`kpc^3`, `s^-1`), joined by spaces or `*`; each `/` divides by the single
 * symbol that follows it, so `km/s/Mpc` is km s⁻¹ Mpc⁻¹. The particle-physics
 * mass units (eV, meV, ...) mean eV/c², except where an energy is asked for
 * (a decay constant, "1e17 GeV"): there they are energies, as are J and erg.
 * The symbol `h` is the dimensionless Hubble parameter H0 / (100 km/s/Mpc)
 * and needs a cosmology.
 */
import { shorten } from "../core/sanitize.js";
import { AU_M, J_PER_EV, KG_PER_EV, M_SUN_KG, MPC_M, PC_M, YEAR_S, G_SI, HBAR_J_S } from "./constants.js";

/** Powers of length, mass and time. */
export interface Dimension {
  readonly L: number;
  readonly M: number;
  readonly T: number;
}

/** A value in SI units with its dimension. */
export interface Quantity {
  readonly si: number;
  readonly dim: Dimension;
}

interface UnitDef {
  readonly si: number;
  readonly dim: Dimension;
}

const LEN: Dimension = { L: 1, M: 0, T: 0 };
const MASS: Dimension = { L: 0, M: 1, T: 0 };
const TIME: Dimension = { L: 0, M: 0, T: 1 };
const NONE: Dimension = { L: 0, M: 0, T: 0 };
const ENERGY: Dimension = { L: 2, M: 1, T: -2 };

/** The electronvolt family: masses (eV/c²) by default, energies where an energy is asked for. */
const EV_FAMILY: Readonly<Record<string, number>> = {
  ueV: 1e-6,
  "µeV": 1e-6,
  meV: 1e-3,
  eV: 1,
  keV: 1e3,
  MeV: 1e6,
  GeV: 1e9,
  TeV: 1e12,
};

const UNITS: Readonly<Record<string, UnitDef>> = {
  fm: { si: 1e-15, dim: LEN },
  pm: { si: 1e-12, dim: LEN },
  nm: { si: 1e-9, dim: LEN },
  um: { si: 1e-6, dim: LEN },
  "µm": { si: 1e-6, dim: LEN },
  mm: { si: 1e-3, dim: LEN },
  m: { si: 1, dim: LEN },
  cm: { si: 0.01, dim: LEN },
  km: { si: 1e3, dim: LEN },
  au: { si: AU_M, dim: LEN },
  pc: { si: PC_M, dim: LEN },
  kpc: { si: 1e3 * PC_M, dim: LEN },
  Mpc: { si: MPC_M, dim: LEN },
  Gpc: { si: 1e3 * MPC_M, dim: LEN },
  kg: { si: 1, dim: MASS },
  g: { si: 1e-3, dim: MASS },
  Msun: { si: M_SUN_KG, dim: MASS },
  ...Object.fromEntries(Object.entries(EV_FAMILY).map(([k, f]) => [k, { si: f * KG_PER_EV, dim: MASS }])),
  J: { si: 1, dim: ENERGY },
  erg: { si: 1e-7, dim: ENERGY },
  s: { si: 1, dim: TIME },
  ms: { si: 1e-3, dim: TIME },
  us: { si: 1e-6, dim: TIME },
  "µs": { si: 1e-6, dim: TIME },
  ns: { si: 1e-9, dim: TIME },
  day: { si: 86_400, dim: TIME },
  yr: { si: YEAR_S, dim: TIME },
  kyr: { si: 1e3 * YEAR_S, dim: TIME },
  Myr: { si: 1e6 * YEAR_S, dim: TIME },
  Gyr: { si: 1e9 * YEAR_S, dim: TIME },
};

/** The kinds of quantity a config key can ask for, with the units offered in messages. */
export const QUANTITY_KINDS = {
  length: { dim: LEN, examples: "m, km, au, pc, kpc, Mpc, Gpc (optionally /h), e.g. \"2 Mpc/h\"" },
  mass: { dim: MASS, examples: "kg, g, Msun (optionally /h), eV, meV, µeV (as eV/c²), e.g. \"1e9 Msun\"" },
  time: { dim: TIME, examples: "s, ms, µs, day, yr, kyr, Myr, Gyr, e.g. \"0.5 Gyr\"" },
  velocity: { dim: { L: 1, M: 0, T: -1 }, examples: "km/s, m/s, kpc/Gyr, e.g. \"250 km/s\"" },
  density: { dim: { L: -3, M: 1, T: 0 }, examples: "Msun/kpc^3, Msun/Mpc^3, kg/m^3, e.g. \"1e7 Msun/kpc^3\"" },
  rate: { dim: { L: 0, M: 0, T: -1 }, examples: "km/s/Mpc, 1/Gyr, s^-1, e.g. \"67.36 km/s/Mpc\"" },
  energy: { dim: ENERGY, examples: "eV, keV, MeV, GeV, TeV, J, erg, e.g. \"1e17 GeV\"" },
} as const;

/** A named kind of quantity. */
export type QuantityKind = keyof typeof QUANTITY_KINDS;

/** Context for parsing: the value of little h when a cosmology defines it. */
export interface UnitContext {
  readonly littleH?: number | undefined;
  /** Read eV, GeV, … as energies rather than as masses eV/c² (set by parseAs for kind "energy"). */
  readonly electronvoltEnergy?: boolean;
}

function sameDim(a: Dimension, b: Dimension): boolean {
  return a.L === b.L && a.M === b.M && a.T === b.T;
}

/** Why a unit expression could not be read; the caller adds the key. */
export class UnitSyntaxError extends Error {}

/**
 * Parse a unit expression ("km/s/Mpc", "Msun/kpc^3", "Mpc/h") into its SI
 * factor and dimension.
 */
export function parseUnit(expr: string, ctx: UnitContext = {}): Quantity {
  const text = expr.trim();
  if (text === "") return { si: 1, dim: NONE };
  const tokens = text.replace(/\*/g, " ").replace(/\//g, " / ").split(/\s+/).filter((t) => t.length > 0);
  let si = 1;
  let L = 0;
  let M = 0;
  let T = 0;
  let divide = false;
  for (const token of tokens) {
    if (token === "/") {
      if (divide) throw new UnitSyntaxError(`"${shorten(expr)}" has two '/' in a row`);
      divide = true;
      continue;
    }
    const m = /^([A-Za-zµ]+|1)(?:\^(-?\d+))?$/.exec(token);
    if (!m) throw new UnitSyntaxError(`cannot read unit "${shorten(token)}" in "${shorten(expr)}"`);
    const symbol = m[1] as string;
    const power = (m[2] === undefined ? 1 : Number(m[2])) * (divide ? -1 : 1);
    divide = false;
    if (symbol === "1") continue;
    if (symbol === "h") {
      if (ctx.littleH === undefined) {
        throw new UnitSyntaxError(`unit "h" in "${shorten(expr)}" needs a cosmology (background.kind = "lcdm")`);
      }
      si *= Math.pow(ctx.littleH, power);
      continue;
    }
    const ev = ctx.electronvoltEnergy ? EV_FAMILY[symbol] : undefined;
    const def = ev !== undefined ? { si: ev * J_PER_EV, dim: ENERGY } : UNITS[symbol];
    if (!def) throw new UnitSyntaxError(`unknown unit "${shorten(symbol)}" in "${shorten(expr)}"`);
    si *= Math.pow(def.si, power);
    L += def.dim.L * power;
    M += def.dim.M * power;
    T += def.dim.T * power;
  }
  if (divide) throw new UnitSyntaxError(`"${shorten(expr)}" ends with '/'`);
  return { si, dim: { L, M, T } };
}

/** Parse "number unit" text into a quantity (the unit may be empty only for a dimensionless number). */
export function parseQuantity(text: string, ctx: UnitContext = {}): Quantity {
  const m = /^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*)$/s.exec(text);
  if (!m) throw new UnitSyntaxError(`"${shorten(text)}" does not start with a number`);
  const value = Number(m[1]);
  if (!Number.isFinite(value)) throw new UnitSyntaxError(`"${shorten(text)}" is not a finite number`);
  const unit = parseUnit(m[2] ?? "", ctx);
  return { si: value * unit.si, dim: unit.dim };
}

/**
 * Parse text as a quantity of the given kind and return its SI value.
 * Throws UnitSyntaxError with a message listing the accepted units.
 */
export function parseAs(text: string, kind: QuantityKind, ctx: UnitContext = {}): number {
  const spec = QUANTITY_KINDS[kind];
  let q: Quantity;
  try {
    q = parseQuantity(text, kind === "energy" ? { ...ctx, electronvoltEnergy: true } : ctx);
  } catch (e) {
    throw new UnitSyntaxError(`${(e as Error).message}; expected ${withArticle(kind)} such as ${spec.examples}`);
  }
  if (!sameDim(q.dim, spec.dim)) {
    throw new UnitSyntaxError(`"${shorten(text)}" is not ${withArticle(kind)}; use ${spec.examples}`);
  }
  return q.si;
}

/** "a length", "an energy". */
function withArticle(kind: QuantityKind): string {
  return `${/^[aeiou]/.test(kind) ? "an" : "a"} ${kind}`;
}

/** SI value of one unit expression, for converting outputs ("Myr", "Msun/kpc^3"). */
export function unitInSI(expr: string, ctx: UnitContext = {}): number {
  return parseUnit(expr, ctx).si;
}

/**
 * The code units of a run: ħ/m = 1 and 4πG = 1, with the length unit ℓ
 * chosen by the run (psibox uses the box length along the first axis).
 * Then τ = m ℓ²/ħ and μ = ℓ³ / (4πG τ²), and the comoving equations read
 *   i ∂ψ/∂t = −∇²ψ / (2a²) + (φ/a) ψ,   ∇²φ = ρ − ρ̄,
 * with ρ = |ψ|² a mass density in μ/ℓ³ and t in τ.
 */
export class CodeUnits {
  /** Length unit ℓ [m]. */
  readonly lengthM: number;
  /** Time unit τ = m ℓ² / ħ [s]. */
  readonly timeS: number;
  /** Mass unit μ = ℓ³ / (4πG τ²) [kg]. */
  readonly massKg: number;
  /** Particle mass m [kg]. */
  readonly particleMassKg: number;

  /**
   * @param particleMassKg particle mass m [kg]
   * @param lengthM length unit ℓ [m]
   */
  constructor(particleMassKg: number, lengthM: number) {
    this.particleMassKg = particleMassKg;
    this.lengthM = lengthM;
    this.timeS = (particleMassKg * lengthM * lengthM) / HBAR_J_S;
    this.massKg = (lengthM ** 3) / (4 * Math.PI * G_SI * this.timeS * this.timeS);
  }

  /** SI size of the code unit of a dimension. */
  unitSI(dim: Dimension): number {
    return Math.pow(this.lengthM, dim.L) * Math.pow(this.massKg, dim.M) * Math.pow(this.timeS, dim.T);
  }

  /** Convert an SI value of a given kind to code units. */
  toCode(si: number, kind: QuantityKind): number {
    return si / this.unitSI(QUANTITY_KINDS[kind].dim);
  }

  /** Convert a code value of a given kind to SI. */
  toSI(code: number, kind: QuantityKind): number {
    return code * this.unitSI(QUANTITY_KINDS[kind].dim);
  }

  /** SI size of the code unit of energy (μ ℓ² / τ²) [J]. */
  get energyJ(): number {
    return (this.massKg * this.lengthM * this.lengthM) / (this.timeS * this.timeS);
  }
}
