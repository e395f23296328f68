/**
 * Order-of-magnitude clocks from physical inputs alone (no simulation), for
 * a virialised object or an exact soliton:
 *   N = M_mode / m
 *   N|χ| = 2|W|/(Nħ) = 2 m ⟨v²⟩/ħ        (virial: |W| = 2K = M⟨v²⟩), χ < 0
 *   ⟨v²⟩ = (3/5) G M / R                  (uniform sphere, if no velocity is given)
 *   ⟨v²⟩ = 2|E|/M = 0.1085128 G²M²m²/ħ²   (soliton of mass M: E = −0.0542564 G²M³m²/ħ²,
 *                                          Membrado, Pacheco & Sañudo 1989)
 *   χ_ad = dμ/dN/ħ = (3/2) χ               (stationary self-gravitating state: μ ∝ N² by the
 *                                          scaling symmetry, N dμ/dN = 2μ = 3W/N against Nħχ = 2W/N)
 *   squeezing onset       t = 1/(N|χ|)
 *   squeezing level       the first t at which the exact variance reaches the level
 *   phase diffusion       |⟨b⟩|² down by 1/e, with χ (frozen mode) and with χ_ad (adiabatic)
 *   classical breakdown   t = ln N / √(4πG ρ),  ρ = 3M/(4πR³) or given
 * The start may be squeezed or thermal, and the mode may lose quanta (γ)
 * and dephase (κ) at constant rates. A contact interaction of scattering
 * length a_s adds its Kerr part, ħχ_SI = g∫|φ|⁴ = g ρ_eff/M with
 * g = 4πħ²a_s/m and the mode's mass-weighted density ρ_eff = ∫ρ²/∫ρ: the
 * given density, 3M/(4πR³) of a uniform sphere, or 0.00135492 G³M⁴m⁶/ħ⁶
 * of the soliton of self-gravity alone (computed independently by
 * shooting; a weak interaction). On the soliton branch (radius ∝ 1/N) the
 * interaction energy grows as N⁵, so to first order in g its stationary
 * dμ/dN part is 10χ_SI: χ_ad = (3/2)χ_grav + 10χ_SI (adiabatic.ts,
 * solitonBranchAdiabaticChi). All inputs and outputs in SI.
 */
import { G_SI, HBAR_J_S } from "../physics/constants.js";
import { formatNumber } from "../core/format.js";
import { contactCouplingSI, criticalMassKg } from "../physics/contact.js";
import { solitonBranchAdiabaticChi } from "./adiabatic.js";
import { xForSqueezing } from "./kerr.js";
import { COHERENT, isCoherent, numberSpread, validateStart, type GaussianStart } from "./gaussian-start.js";
import { meanFieldCollapseX, xForSqueezingOf } from "./state-clocks.js";
import { closedIntegrals } from "./open-kerr.js";
import { meanFieldCollapsed, projectCrossing, squeezingReached, type ConstantRates } from "./open-clocks.js";

/** |E| M^{-3} G^{-2} m^{-2} ħ² of the ground state (Membrado, Pacheco & Sañudo 1989, PRA 39, 4207). */
export const SOLITON_ENERGY = 0.0542564;

/** ∫ρ² dV/M of the soliton of self-gravity alone in G³M⁴m⁶/ħ⁶ (computed independently by shooting the radial equations). */
export const SOLITON_MEAN_DENSITY = 0.00135492;

/** What the estimate starts from (SI). */
export interface EstimateInputs {
  readonly particleMassKg: number;
  /** Mass in the mode [kg]. */
  readonly modeMassKg: number;
  /** ⟨v²⟩^{1/2} [m/s], or undefined to take it from mass and radius. */
  readonly velocity?: number | undefined;
  /** Object mass [kg] and radius [m] for the virial velocity and the density. */
  readonly haloMassKg?: number | undefined;
  readonly radiusM?: number | undefined;
  /** An exact soliton of this mass [kg] (its own ⟨v²⟩). */
  readonly solitonMassKg?: number | undefined;
  /** Density [kg/m³] for the breakdown rate. */
  readonly densityKgM3?: number | undefined;
  readonly squeezingDb: number;
  /** The mode's initial state (default coherent). */
  readonly start?: GaussianStart | undefined;
  /** Loss rate γ and dephasing rate κ [1/s] (default 0). */
  readonly lossRatePerS?: number | undefined;
  readonly dephasingRatePerS?: number | undefined;
  /** A contact interaction's scattering length a_s [m] (negative: attractive). */
  readonly scatteringLengthM?: number | undefined;
}

/** One estimated clock. */
export interface EstimatedClock {
  readonly name: string;
  readonly timeS: number | undefined;
  readonly formula: string;
  readonly note?: string;
}

/** The estimate: N, the rates and the clocks. */
export interface Estimate {
  readonly particles: number;
  readonly numberSpread: number;
  readonly velocityMS: number;
  /** N|χ| [1/s] (positive). */
  readonly rateNChiPerS: number;
  /** χ [1/s]: self-gravity (negative) plus the contact part. */
  readonly chiPerS: number;
  /** The gravitational part χ_grav [1/s] and the contact part χ_SI [1/s] (0 without an interaction) of χ. */
  readonly chiGravityPerS: number;
  readonly chiContactPerS: number;
  /** The largest stable soliton M_max = 1.0125 ħ/√(G m |a_s|) [kg] of an attractive interaction. */
  readonly criticalMassKg: number | undefined;
  /** χ_ad = (1/ħ) dμ/dN [1/s] (negative). */
  readonly chiAdiabaticPerS: number;
  readonly lossRatePerS: number;
  readonly dephasingRatePerS: number;
  readonly lambdaPerS: number | undefined;
  readonly clocks: readonly EstimatedClock[];
}

function velocitySquared(inp: EstimateInputs): { v2: number; note?: string } {
  if (inp.velocity !== undefined) return { v2: inp.velocity * inp.velocity };
  if (inp.solitonMassKg !== undefined) {
    const g = (G_SI * inp.solitonMassKg * inp.particleMassKg) / HBAR_J_S;
    return { v2: 2 * SOLITON_ENERGY * g * g, note: "⟨v²⟩ = 2|E|/M of the exact soliton (Membrado et al. 1989)" };
  }
  if (inp.haloMassKg !== undefined && inp.radiusM !== undefined) {
    return { v2: (0.6 * G_SI * inp.haloMassKg) / inp.radiusM, note: "⟨v²⟩ = (3/5) G M / R (virialised uniform sphere)" };
  }
  throw new RangeError("give a velocity dispersion, a soliton mass, or a halo mass and radius");
}

/** χ_SI = g ρ_eff/(ħM) [1/s] of the mode (0 without an interaction); ρ_eff from the density, the sphere or the soliton. */
function contactChi(inp: EstimateInputs, rho: number | undefined): number {
  const a = inp.scatteringLengthM;
  if (a === undefined || a === 0) return 0;
  const m = inp.particleMassKg;
  let rhoEff = rho;
  // (G M m²/ħ²)³ M: the inverse length cubed first, as m⁶ alone underflows
  if (rhoEff === undefined && inp.solitonMassKg !== undefined) rhoEff = SOLITON_MEAN_DENSITY * ((G_SI * inp.solitonMassKg * m * m) / HBAR_J_S ** 2) ** 3 * inp.solitonMassKg;
  if (rhoEff === undefined) throw new RangeError("an interaction's Kerr part needs the mode's density: give a density, a halo mass and radius, or a soliton mass");
  return (contactCouplingSI(a, m) * rhoEff) / (HBAR_J_S * inp.modeMassKg);
}

/** Compute the estimate; throws RangeError naming the missing or bad input. */
export function estimateClocks(inp: EstimateInputs): Estimate {
  const m = inp.particleMassKg;
  const N = inp.modeMassKg / m;
  if (!(N >= 1)) throw new RangeError(`the mode holds N = ${formatNumber(N)} particles (< 1): give a larger mode mass`);
  const start = inp.start ?? COHERENT;
  validateStart(N, start);
  const gamma = inp.lossRatePerS ?? 0;
  const kappa = inp.dephasingRatePerS ?? 0;
  const { v2, note: vNote } = velocitySquared(inp);
  let rho = inp.densityKgM3;
  if (rho === undefined && inp.haloMassKg !== undefined && inp.radiusM !== undefined) rho = (3 * inp.haloMassKg) / (4 * Math.PI * inp.radiusM ** 3);
  const chiGravity = -(2 * m * v2) / HBAR_J_S / N;
  const chiContact = contactChi(inp, rho);
  const chi = chiGravity + chiContact;
  const rate = N * Math.abs(chi);
  const chiAd = solitonBranchAdiabaticChi(chiGravity, chiContact);
  const lambda = rho === undefined ? undefined : Math.sqrt(4 * Math.PI * G_SI * rho);
  const open = gamma > 0 || kappa > 0;
  const stateNote = `${isCoherent(start) ? "coherent start" : "the chosen start"}${open ? `, loss γ = ${formatNumber(gamma)} /s and dephasing κ = ${formatNumber(kappa)} /s` : ""}`;
  // the squeezing level
  const xClosed = isCoherent(start) ? xForSqueezing(N, inp.squeezingDb) : xForSqueezingOf(N, start, inp.squeezingDb, -1);
  let tLevel = xClosed === undefined ? undefined : xClosed / Math.abs(chi);
  if (open) {
    const guess = (xClosed ?? 1 / N) / Math.abs(chi);
    tLevel = tLevel === 0 ? 0 : projectCrossing(closedIntegrals(0), { omega: 0, chi, gamma, kappa }, squeezingReached(N, start, inp.squeezingDb), guess, (2 * Math.PI) / Math.abs(chi));
  }
  const diffusion = (c: number): number | undefined => {
    const xc = meanFieldCollapseX(N, start, -1);
    if (!open) return xc / Math.abs(c);
    const r: ConstantRates = { omega: 0, chi: c, gamma, kappa };
    const horizon = Math.max((2 * Math.PI) / Math.abs(c), gamma > 0 ? 60 / gamma : 0, kappa > 0 ? 60 / kappa : 0);
    return projectCrossing(closedIntegrals(0), r, meanFieldCollapsed(N, start), xc / Math.abs(c), horizon);
  };
  const dN = numberSpread(N, start);
  return {
    particles: N,
    numberSpread: dN,
    velocityMS: Math.sqrt(v2),
    rateNChiPerS: rate,
    chiPerS: chi,
    chiGravityPerS: chiGravity,
    chiContactPerS: chiContact,
    criticalMassKg: inp.scatteringLengthM !== undefined && inp.scatteringLengthM < 0 ? criticalMassKg(inp.scatteringLengthM, m) : undefined,
    chiAdiabaticPerS: chiAd,
    lossRatePerS: gamma,
    dephasingRatePerS: kappa,
    lambdaPerS: lambda,
    clocks: [
      { name: "squeezing onset", timeS: 1 / rate, formula: chiContact !== 0 ? "1/(N|χ|), χ = −2m⟨v²⟩/(Nħ) + χ_SI" : "1/(N|χ|) = ħ/(2 m ⟨v²⟩)", ...(vNote ? { note: vNote } : {}) },
      {
        name: `squeezing to ${formatNumber(inp.squeezingDb)} dB`,
        timeS: tLevel,
        formula: `first time the exact variance reaches the level (${stateNote})`,
        ...(tLevel === undefined ? { note: `the squeezing of this state never reaches ${formatNumber(inp.squeezingDb)} dB` } : tLevel === 0 ? { note: "the start is already squeezed to this level" } : {}),
      },
      { name: "phase diffusion, frozen mode", timeS: diffusion(chi), formula: `|⟨b⟩|² down by 1/e with χ: X_c ≈ 1/ΔN, ΔN = ${formatNumber(dN, 4)} (${stateNote})` },
      { name: "phase diffusion, adiabatic", timeS: diffusion(chiAd), formula: chiContact !== 0 ? "the same with χ_ad = (3/2) χ_grav + 10 χ_SI (stationary soliton, first order in the interaction)" : "the same with χ_ad = (1/ħ) dμ/dN = (3/2) χ (stationary state)" },
      {
        name: "classical breakdown",
        timeS: lambda === undefined ? undefined : Math.log(N) / lambda,
        formula: "ln N / √(4πG ρ)",
        ...(lambda === undefined ? { note: "needs a density, or a halo mass and radius" } : {}),
      },
    ],
  };
}
