/** `psibox estimate`: the sidecar's clocks from a few physical numbers, no simulation. */
import { shorten } from "../core/sanitize.js";
import { InputError } from "../core/errors.js";
import { parseAs, UnitSyntaxError, type QuantityKind } from "../physics/units.js";
import { estimateClocks } from "../quantum/estimate.js";
import { formatDuration } from "../quantum/clocks.js";
import { PLANCK_AGE_S } from "../quantum/sidecar-report.js";
import { C_M_PER_S } from "../physics/constants.js";
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
    `particles in the mode   N = ${est.particles.toPrecision(4)}   (ln N = ${Math.log(est.particles).toFixed(1)})`,
    `initial state           ${describeStart(state.start)}, ΔN = ${est.numberSpread.toPrecision(4)}${state.lossRatePerS > 0 || state.dephasingRatePerS > 0 ? `; loss γ = ${state.lossRatePerS.toPrecision(3)} /s, dephasing κ = ${state.dephasingRatePerS.toPrecision(3)} /s` : ""}`,
    `velocity dispersion     ${(est.velocityMS / 1e3).toPrecision(4)} km/s = ${(est.velocityMS / C_M_PER_S).toPrecision(3)} c`,
    `self-gravity rate       N|χ| = 2 m⟨v²⟩/ħ = ${est.rateNChiPerS.toPrecision(4)} /s   (χ = ${est.chiPerS.toPrecision(4)} /s frozen mode, χ_ad = ${est.chiAdiabaticPerS.toPrecision(4)} /s adiabatic)`,
    ...(est.lambdaPerS !== undefined ? [`dynamical rate          λ = √(4πGρ) = ${est.lambdaPerS.toPrecision(4)} /s`] : []),
    "",
  ];
  const width = Math.max(...est.clocks.map((c) => c.name.length));
  for (const c of est.clocks) {
    const when = c.timeS === undefined ? "—" : formatDuration(c.timeS);
    const age = c.timeS === undefined ? "" : `  (${(c.timeS / PLANCK_AGE_S).toPrecision(3)} × the age of the universe)`;
    lines.push(`${c.name.padEnd(width)}  ${when.padEnd(12)} ${c.formula}${age}${c.note ? `\n${" ".repeat(width + 2)}note: ${c.note}` : ""}`);
  }
  process.stdout.write(lines.join("\n") + "\n");
  return 0;
}
