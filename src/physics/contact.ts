/**
 * The contact (self-)interaction of the Gross–Pitaevskii part of the
 * equations: a term g|ψₙ|²ψₙ in iħ ∂ψₙ/∂t (ψₙ in number units), with
 *   g = 4πħ² a_s / m
 * for an s-wave scattering length a_s (a_s > 0 repulsive, a_s < 0 attractive).
 * For an axion-like field of decay constant f the quartic term of the cosine
 * potential gives the attractive
 *   a_s = −(ħc)(mc²) / (32π f²)
 * (Chavanis 2011, PRD 84, 043531). In psibox's mass normalisation
 * (|ψ|² = ρ) the term adds g ρ / m² to the potential per unit mass Φ.
 */
import { C_M_PER_S, G_SI, HBAR_J_S } from "./constants.js";
import type { CodeUnits } from "./units.js";

/**
 * M_max·√(G m |a_s|)/ħ of the largest stable attractive soliton: 1.0125,
 * computed independently by shooting on the stationary Gross–Pitaevskii–Poisson
 * equations (Chavanis & Delfini 2011, PRD 84, 043532, quote 1.012).
 */
export const CRITICAL_MASS_COEFFICIENT = 1.0125;

/** The attractive scattering length [m] (negative) of an axion-like field of decay constant f [J] and particle mass m [kg]. */
export function scatteringLengthFromDecayConstant(decayConstantJ: number, particleMassKg: number): number {
  const hbarC = HBAR_J_S * C_M_PER_S;
  const restEnergy = particleMassKg * C_M_PER_S * C_M_PER_S;
  return -(hbarC * restEnergy) / (32 * Math.PI * decayConstantJ * decayConstantJ);
}

/** g = 4πħ² a_s / m [J m³]. */
export function contactCouplingSI(scatteringLengthM: number, particleMassKg: number): number {
  return (4 * Math.PI * HBAR_J_S * HBAR_J_S * scatteringLengthM) / particleMassKg;
}

/**
 * The contact coefficient in code units: the term g|ψ|² a field of particle
 * mass μm adds to the potential φ its kicks multiply in a static box, so that
 * a kick is e^{−iμK(φ + g|ψ|²)}: g = 4π a_s / (μ³ m) with a_s in code lengths
 * and m in code masses (ħ/m = 1, 4πG = 1; from g_SI ρ / m_i² per unit mass).
 * In an expanding box the term is g|ψ|²/a³ beside φ/a (|ψ|² is the comoving
 * density, a³ times the physical one), see integrators/split-step.ts.
 * @param massRatio μ = m_i/m of a species (1: the run's particle)
 */
export function contactCode(scatteringLengthM: number, units: CodeUnits, massRatio = 1): number {
  const aCode = scatteringLengthM / units.lengthM;
  const mCode = units.particleMassKg / units.massKg;
  return (4 * Math.PI * aCode) / (massRatio ** 3 * mCode);
}

/** The largest stable mass [kg] of an attractive soliton, 1.0125 ħ/√(G m |a_s|) (see CRITICAL_MASS_COEFFICIENT). */
export function criticalMassKg(scatteringLengthM: number, particleMassKg: number): number {
  return (CRITICAL_MASS_COEFFICIENT * HBAR_J_S) / Math.sqrt(G_SI * particleMassKg * Math.abs(scatteringLengthM));
}

/** Radius [m] of the Thomas–Fermi soliton of a strong repulsive interaction, π√(a_s ħ²/(G m³)) (Böhmer & Harko 2007, JCAP 06, 025). */
export function thomasFermiRadiusM(scatteringLengthM: number, particleMassKg: number): number {
  return Math.PI * Math.sqrt((scatteringLengthM * HBAR_J_S * HBAR_J_S) / (G_SI * particleMassKg ** 3));
}

/** The |a_s| [m] at which a soliton of mass M [kg] is the largest stable one: (1.0125 ħ/M)²/(G m). */
export function criticalScatteringLengthM(massKg: number, particleMassKg: number): number {
  return (CRITICAL_MASS_COEFFICIENT * HBAR_J_S / massKg) ** 2 / (G_SI * particleMassKg);
}

/** The decay constant f [J] of an axion-like field whose scattering length is −|a_s|: √((ħc)(mc²)/(32π|a_s|)). */
export function decayConstantOf(scatteringLengthM: number, particleMassKg: number): number {
  const hbarC = HBAR_J_S * C_M_PER_S;
  const restEnergy = particleMassKg * C_M_PER_S * C_M_PER_S;
  return Math.sqrt((hbarC * restEnergy) / (32 * Math.PI * Math.abs(scatteringLengthM)));
}

/**
 * ∫R² r dr of the Townes profile, the ground state of ΔR − R + R³ = 0 in 2D: 1.8623, so that
 * ∫R² d²x = 2π × 1.8623 = 11.70 (Weinstein 1983, Commun. Math. Phys. 87, 567). In the form
 * i ψ_t = −½Δψ − |ψ|²ψ the ground state is R(√2 r), whose norm, the collapse threshold, is half of it.
 */
export const TOWNES_MOMENT = 1.8623;

/**
 * The mass per unit depth [kg/m] above which the attractive contact term alone collapses a 2D field
 * (a field uniform along the third axis): iħψ_t = −ħ²/(2m)Δψ − |g||ψ|²ψ becomes i χ_t = −½Δχ − |χ|²χ
 * with χ = ψ√(m|g|)/ħ, which collapses above ∫|χ|² = π × 1.8623; per unit depth that is
 * m π 1.8623 ħ²/(m|g|) = 1.8623 m/(4|a_s|) with g = 4πħ²a_s/m. Self-gravity lowers the threshold.
 */
export function townesLineMassKgPerM(scatteringLengthM: number, particleMassKg: number): number {
  return (TOWNES_MOMENT * particleMassKg) / (4 * Math.abs(scatteringLengthM));
}

/**
 * The width w [m] of the 1D bright soliton ρ₀ sech²(x/w) of an attractive contact term alone for a
 * peak number density n₀ [1/m³]: w = ħ/√(m|g|n₀) (from −ħ²/(2m)ψ'' − |g|ψ³ = μψ). Its mass per unit area
 * is Σ = 2ρ₀w, so w = m/(2π|a_s|Σ): stable at every mass, it narrows as Σ grows.
 */
export function brightSolitonWidthM(scatteringLengthM: number, particleMassKg: number, peakNumberDensity: number): number {
  const g = Math.abs(contactCouplingSI(scatteringLengthM, particleMassKg));
  return HBAR_J_S / Math.sqrt(particleMassKg * g * peakNumberDensity);
}
