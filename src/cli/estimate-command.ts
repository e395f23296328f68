/** `psibox estimate`: the sidecar's clocks from a few physical numbers, no simulation. */
import { shorten } from "../core/sanitize.js";
import { InputError } from "../core/errors.js";
import { parseAs, UnitSyntaxError, type QuantityKind } from "../physics/units.js";
import { estimateClocks } from "../quantum/estimate.js";
import { formatDuration } from "../quantum/clocks.js";
import { PLANCK_AGE_S } from "../quantum/sidecar-report.js";
import { formatNumber } from "../core/format.js";
import { C_M_PER_S, M_SUN_KG } from "../physics/constants.js";
import { scatteringLengthFromDecayConstant } from "../physics/contact.js";
import { readModeState, type ModeStateFlags } from "./mode-state-options.js";
import { describeStart } from "../quantum/gaussian-start.js";

export interface EstimateFlags extends ModeStateFlags {
  particleMass: string;
  solitonMass?: string;
  velocity?: string;
  haloMass?: string;
  radius?: string;
  density?: string;
  modeMass?: string;
  scatteringLength?: string;
  decayConstant?: string;
  squeezingDb: string;
  json: boolean;
}

function read(flag: string, text: string | undefined, kind: QuantityKind): number | undefined {
  if (text === undefined) return undefined;
  try {
    const v = parseAs(text, kind);
    if (!(v > 0)) throw new InputError(`--${flag}: must be positive, got "${shorten(text)}"`);
    return v;
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new InputError(`--${flag}: ${e.message}`);
    throw e;
  }
}

/** The scattering length [m] of --scattering-length or --decay-constant (undefined without either). */
function scatteringLength(flags: EstimateFlags, m: number): number | undefined {
  if (flags.scatteringLength !== undefined && flags.decayConstant !== undefined) {
    throw new InputError("--decay-constant: give either --scattering-length or --decay-constant, not both (a decay constant fixes the scattering length)");
  }
  if (flags.decayConstant !== undefined) return scatteringLengthFromDecayConstant(read("decay-constant", flags.decayConstant, "energy") as number, m);
  if (flags.scatteringLength === undefined) return undefined;
  try {
    return parseAs(flags.scatteringLength, "length");
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new InputError(`--scattering-length: ${e.message}`);
    throw e;
  }
}

/** A number for people with four significant digits (formatNumber: plain decimals, else × 10ⁿ, a true minus). */
const f4 = (x: number) => formatNumber(x, 4);

/** The interaction's lines of the printed estimate. */
function contactLines(est: ReturnType<typeof estimateClocks>, a: number | undefined, solitonMass: number | undefined): string[] {
  if (a === undefined || a === 0) return [];
  const lines = [`contact interaction     a_s = ${f4(a)} m: χ_SI = ${f4(est.chiContactPerS)} /s (ħχ_SI = g∫|φ|⁴, g = 4πħ²a_s/m), χ_grav = ${f4(est.chiGravityPerS)} /s`];
  if (est.criticalMassKg !== undefined) {
    const over = solitonMass !== undefined && solitonMass > est.criticalMassKg ? "; the soliton is above it and collapses" : "";
    lines.push(`largest stable soliton  M_max = 1.0125 ħ/√(G m |a_s|) = ${f4(est.criticalMassKg / M_SUN_KG)} Msun${over}`);
  }
  return lines;
}

/** Print the estimate; returns the exit code. */
export function estimateCommand(flags: EstimateFlags): number {
  const m = read("particle-mass", flags.particleMass, "mass") as number;
  // velocities may also be given as a fraction of c, e.g. "1e-3 c"
  let velocity: number | undefined;
  if (flags.velocity !== undefined && /^\s*[-+\d.eE]+\s*c\s*$/.test(flags.velocity)) velocity = Number(flags.velocity.replace(/c\s*$/, "")) * C_M_PER_S;
  else velocity = read("velocity", flags.velocity, "velocity");
  const haloMass = read("halo-mass", flags.haloMass, "mass");
  const radius = read("radius", flags.radius, "length");
  const density = read("density", flags.density, "density");
  const solitonMass = read("soliton-mass", flags.solitonMass, "mass");
  const modeMass = read("mode-mass", flags.modeMass, "mass") ?? solitonMass ?? haloMass;
  if (modeMass === undefined) throw new InputError("--mode-mass: give the mass in the mode (or --halo-mass or --soliton-mass, which it defaults to)");
  if (velocity === undefined && solitonMass === undefined && (haloMass === undefined || radius === undefined)) {
    throw new InputError("--velocity: give a velocity dispersion (e.g. \"200 km/s\" or \"1e-3 c\"), a --soliton-mass, or both --halo-mass and --radius");
  }
  const state = readModeState(flags, modeMass / m);
  const a = scatteringLength(flags, m);
  const db = Number(flags.squeezingDb);
  if (!(db < 0)) throw new InputError(`--squeezing-db: must be a negative number of dB, got ${flags.squeezingDb}`);
  let est;
  try {
    est = estimateClocks({
      particleMassKg: m,
      modeMassKg: modeMass,
      velocity,
      haloMassKg: haloMass,
      radiusM: radius,
      solitonMassKg: solitonMass,
      densityKgM3: density,
      squeezingDb: db,
      start: state.start,
      lossRatePerS: state.lossRatePerS,
      dephasingRatePerS: state.dephasingRatePerS,
      scatteringLengthM: a,
    });
  } catch (e) {
    if (e instanceof RangeError) throw new InputError(e.message);
    throw e;
  }
  if (flags.json) {
    // every number, times in seconds (null when a clock never rings); χ and χ_ad negative like everywhere else
    const json = { ...est, start: state.start, squeezingDb: db, clocks: est.clocks.map((c) => ({ ...c, timeS: c.timeS ?? null, ageRatio: c.timeS === undefined ? null : c.timeS / PLANCK_AGE_S })) };
    process.stdout.write(JSON.stringify(json, null, 2) + "\n");
    return 0;
  }
  const lines = [
    `particles in the mode   N = ${f4(est.particles)}   (ln N = ${Math.log(est.particles).toFixed(1)})`,
    `initial state           ${describeStart(state.start)}, ΔN = ${f4(est.numberSpread)}${state.lossRatePerS > 0 || state.dephasingRatePerS > 0 ? `; loss γ = ${formatNumber(state.lossRatePerS)} /s, dephasing κ = ${formatNumber(state.dephasingRatePerS)} /s` : ""}`,
    `velocity dispersion     ${f4(est.velocityMS / 1e3)} km/s = ${formatNumber(est.velocityMS / C_M_PER_S)} c`,
    `${a ? "Kerr rate               N|χ| = N|χ_grav + χ_SI|" : "self-gravity rate       N|χ| = 2 m⟨v²⟩/ħ"} = ${f4(est.rateNChiPerS)} /s   (χ = ${f4(est.chiPerS)} /s frozen mode, χ_ad = ${f4(est.chiAdiabaticPerS)} /s adiabatic)`,
    ...contactLines(est, a, solitonMass),
    ...(est.lambdaPerS !== undefined ? [`dynamical rate          λ = √(4πGρ) = ${f4(est.lambdaPerS)} /s`] : []),
    "",
  ];
  const width = Math.max(...est.clocks.map((c) => c.name.length));
  const whens = est.clocks.map((c) => (c.timeS === undefined ? "—" : formatDuration(c.timeS)));
  const whenWidth = Math.max(12, ...whens.map((w) => w.length));
  est.clocks.forEach((c, i) => {
    const age = c.timeS === undefined ? "" : `  (${formatNumber(c.timeS / PLANCK_AGE_S)} × the age of the universe)`;
    lines.push(`${c.name.padEnd(width)}  ${whens[i]!.padEnd(whenWidth)} ${c.formula}${age}${c.note ? `\n${" ".repeat(width + 2)}note: ${c.note}` : ""}`);
  });
  process.stdout.write(lines.join("\n") + "\n");
  return 0;
}
