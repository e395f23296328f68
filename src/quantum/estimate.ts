/**
 * Order-of-magnitude clocks from physical inputs alone (no simulation), for
 * a virialised, roughly uniform object:
 *   N = M_mode / m
 *   N|χ| = 2|W|/(Nħ) = 2 m ⟨v²⟩/ħ        (virial: |W| = 2K = M⟨v²⟩)
 *   ⟨v²⟩ = (3/5) G M / R                  (uniform sphere, if no velocity is given)
 *   squeezing onset     t = 1/(N|χ|) = ħ / (2 m ⟨v²⟩)
 *   squeezing level     t = X_level / |χ|, X_level from the exact Kerr variance
 *   phase diffusion     t = 2 asin(1/(2√N)) / |χ| ≈ √N / (N|χ|)
 *   classical breakdown t = ln N / √(4πG ρ),  ρ = 3M/(4πR³) or given
 * All inputs and outputs in SI.
 */
import { G_SI, HBAR_J_S } from "../physics/constants.js";
import { xForPhaseDiffusion, xForSqueezing } from "./kerr.js";

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
  /** Density [kg/m³] for the breakdown rate. */
  readonly densityKgM3?: number | undefined;
  readonly squeezingDb: number;
}

/** One estimated clock. */
export interface EstimatedClock {
  readonly name: string;
  readonly timeS: number | undefined;
  readonly formula: string;
  readonly note?: string;
}

/** The estimate: N, the rates and the four clocks. */
export interface Estimate {
  readonly particles: number;
  readonly velocityMS: number;
  readonly rateNChiPerS: number;
  readonly chiPerS: number;
  readonly lambdaPerS: number | undefined;
  readonly clocks: readonly EstimatedClock[];
}

/** Compute the estimate; throws RangeError naming the missing input. */
export function estimateClocks(inp: EstimateInputs): Estimate {
  const m = inp.particleMassKg;
  const N = inp.modeMassKg / m;
  if (!(N >= 1)) throw new RangeError(`the mode holds N = ${N.toPrecision(3)} particles (< 1): give a larger mode mass`);
  let v2: number;
  let vNote: string | undefined;
  if (inp.velocity !== undefined) v2 = inp.velocity * inp.velocity;
  else if (inp.haloMassKg !== undefined && inp.radiusM !== undefined) {
    v2 = (0.6 * G_SI * inp.haloMassKg) / inp.radiusM;
    vNote = "⟨v²⟩ = (3/5) G M / R (virialised uniform sphere)";
  } else throw new RangeError("give a velocity dispersion, or a halo mass and radius");
  const rate = (2 * m * v2) / HBAR_J_S;
  const chi = rate / N;
  let rho = inp.densityKgM3;
  if (rho === undefined && inp.haloMassKg !== undefined && inp.radiusM !== undefined) rho = (3 * inp.haloMassKg) / (4 * Math.PI * inp.radiusM ** 3);
  const lambda = rho === undefined ? undefined : Math.sqrt(4 * Math.PI * G_SI * rho);
  const xLevel = xForSqueezing(N, inp.squeezingDb);
  return {
    particles: N,
    velocityMS: Math.sqrt(v2),
    rateNChiPerS: rate,
    chiPerS: chi,
    lambdaPerS: lambda,
    clocks: [
      { name: "squeezing onset", timeS: 1 / rate, formula: "1/(N|χ|) = ħ/(2 m ⟨v²⟩)", ...(vNote ? { note: vNote } : {}) },
      {
        name: `squeezing to ${inp.squeezingDb} dB`,
        timeS: xLevel === undefined ? undefined : xLevel / chi,
        formula: "X_level/|χ|, X_level from the exact Kerr variance",
        ...(xLevel === undefined ? { note: `the best single-mode squeezing for this N does not reach ${inp.squeezingDb} dB` } : {}),
      },
      { name: "phase diffusion (1/e)", timeS: xForPhaseDiffusion(N) / chi, formula: "2 asin(1/(2√N))/|χ| ≈ √N/(N|χ|)" },
      {
        name: "classical breakdown",
        timeS: lambda === undefined ? undefined : Math.log(N) / lambda,
        formula: "ln N / √(4πG ρ)",
        ...(lambda === undefined ? { note: "needs a density, or a halo mass and radius" } : {}),
      },
    ],
  };
}
