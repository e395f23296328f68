/**
 * Coefficients of the condensate (Hartree) mode of a field, in code units
 * (ħ/m = 1, 4πG = 1). The field is ψ = √N φ with ∫|φ|² = 1 (N = M/m), and
 * the mode operator obeys H = ħω b†b + (ħχ/2) b†b†bb with
 *   ħω = (ħ²/(2m a²)) ∫|∇φ|²            ⇒ ω = K/M        (kinetic coefficient)
 *   ħχ = m ∫|φ|² Φ₁,  ∇²Φ₁ = (4πG m/a)(|φ|² − 1/V)  ⇒ ħχ = 2W/N²  (self-gravity; χ < 0)
 * where K and W are the field's kinetic and potential energies. ω here is the
 * kinetic part only; the potential and phase terms of the mode's frequency
 * drop out of every squeezing quantity. The rate N|χ| = 2|W|/(Nħ) does not
 * depend on N. The breakdown rate is λ = √(4πG ρ_eff) with the mass-weighted
 * physical density ρ_eff = ∫ρ² dV / ∫ρ dV / a³.
 *
 * A region (sphere, cube, or a sphere around the densest cell) restricts the
 * mode: ψ is multiplied by a window that falls smoothly (a raised cosine) from
 * 1 to 0 over two cells across the boundary and is exactly 0 beyond (a sharp
 * cut would add spurious gradient energy), and the
 * mode's own potential is the free-space (isolated) one: a halo's mode feels
 * its own gravity, not that of its periodic images or of the rest of the box.
 */
import type { Grid } from "../grid/grid.js";
import type { Region } from "../config/region.js";
import { ComplexFft } from "../fields/fft.js";
import { IsolatedPoisson, type PoissonSolver } from "../fields/poisson.js";
import { contactEnergy as contactEnergyOf, kineticEnergy, potentialEnergy } from "../diagnostics/energies.js";

/** Where the mode lives (config/region.ts parses it). Lengths in code units, one centre coordinate per simulated axis. */
export type ModeRegion = Region;

/** Mode coefficients in code units. */
export interface ModeCoefficients {
  /** Mass in the mode [code mass]. */
  readonly mass: number;
  /** Particles in the mode, N = M/m. */
  readonly particles: number;
  /** Kinetic energy K and potential energy W of the (windowed) field [code energy]. */
  readonly kinetic: number;
  readonly potential: number;
  /** ω = K/M [1/code time]. */
  readonly omega: number;
  /** χ = 2 (W + U) m / M² [1/code time]: self-gravity (negative) plus the contact part χ_SI. */
  readonly chi: number;
  /** The contact part χ_SI = 2 U m / M², i.e. ħχ_SI = g∫|φ|⁴ [1/code time] (0 without a contact term). */
  readonly chiContact: number;
  /** N|χ| [1/code time]. */
  readonly rate: number;
  /** 2K/|W| (1 for a virialised object). */
  readonly virialRatio: number;
  /** λ = √(ρ_eff / a³) [1/code time]. */
  readonly lambda: number;
  /** The centre used for a "densest" region (code lengths), else undefined. */
  readonly center?: readonly number[];
}

/** Internal coordinates of a cell along the simulated axes. */
function coords(grid: Grid, p: number): number[] {
  const [, n1, n2] = grid.shape;
  const c = p % n2;
  const b = Math.floor(p / n2) % n1;
  const a = Math.floor(p / (n1 * n2));
  return [grid.coordinate(0, a), grid.coordinate(1, b), grid.coordinate(2, c)].slice(3 - grid.dims);
}

/** Raised-cosine edge: 1 for d ≤ −h, 0 for d ≥ h, smooth in between (d = distance past the boundary). */
function edge(d: number, h: number): number {
  if (d <= -h) return 1;
  if (d >= h) return 0;
  return 0.5 * (1 + Math.cos((Math.PI * (d + h)) / (2 * h)));
}

/** The region's window w (1 inside, a raised-cosine edge two cells wide, 0 beyond) on every cell. */
export function regionWindow(grid: Grid, region: Exclude<ModeRegion, { kind: "box" } | { kind: "densest" }>): Float64Array {
  const w = new Float64Array(grid.size);
  const h = Math.max(...grid.spacing.slice(3 - grid.dims));
  for (let p = 0; p < grid.size; p++) {
    const x = coords(grid, p);
    if (region.kind === "sphere") {
      let r2 = 0;
      x.forEach((v, i) => {
        let d = v - (region.center[i] as number);
        d -= (grid.lengths[i] as number) * Math.round(d / (grid.lengths[i] as number));
        r2 += d * d;
      });
      w[p] = edge(Math.sqrt(r2) - region.radius, h);
    } else {
      let f = 1;
      x.forEach((v, i) => {
        let d = v - (region.center[i] as number);
        d -= (grid.lengths[i] as number) * Math.round(d / (grid.lengths[i] as number));
        f *= edge(Math.abs(d) - region.halfWidth, h);
      });
      w[p] = f;
    }
  }
  return w;
}

/** Cell of largest density → its coordinates. */
export function densestPoint(grid: Grid, psi: Float64Array): number[] {
  let best = 0;
  let where = 0;
  for (let p = 0; p < grid.size; p++) {
    const rho = psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2;
    if (rho > best) {
      best = rho;
      where = p;
    }
  }
  return coords(grid, where);
}

/**
 * The amplitude window of a region other than the whole box (the field in it is w·ψ): smooth edges one
 * cell wide; a "densest" region is the sphere around ψ's densest cell, whose centre is returned.
 */
export function regionWeights(grid: Grid, region: Exclude<ModeRegion, { kind: "box" }>, psi: Float64Array): { w: Float64Array; center?: number[] } {
  if (region.kind !== "densest") return { w: regionWindow(grid, region) };
  const center = densestPoint(grid, psi);
  return { w: regionWindow(grid, { kind: "sphere", center, radius: region.radius }), center };
}

/** Inputs of a coefficient evaluation. */
export interface ModeInputs {
  readonly grid: Grid;
  /** ψ in code units. */
  readonly psi: Float64Array;
  readonly scaleFactor: number;
  /** Particle mass in code mass units. */
  readonly particleMass: number;
  /** The solver's own gravity (used for the whole-box mode). */
  readonly gravity: PoissonSolver;
  readonly region?: ModeRegion;
  /** The contact coefficient g (code units; its energy takes the physical density ρ/a³). @default 0 */
  readonly contact?: number;
}

/**
 * Mode coefficients from the mode's own potential: the (windowed) density is
 * given its own Poisson solve. Allocates scratch; use for files and checks.
 */
export function modeCoefficients(input: ModeInputs): ModeCoefficients {
  const { grid, scaleFactor: a, particleMass } = input;
  const region = input.region ?? { kind: "box" };
  let psi = input.psi;
  let gravity = input.gravity;
  let center: number[] | undefined;
  if (region.kind !== "box") {
    const weights = regionWeights(grid, region, input.psi);
    const w = weights.w;
    center = weights.center;
    psi = new Float64Array(input.psi.length);
    for (let p = 0; p < grid.size; p++) {
      psi[2 * p] = input.psi[2 * p]! * w[p]!;
      psi[2 * p + 1] = input.psi[2 * p + 1]! * w[p]!;
    }
    gravity = new IsolatedPoisson(grid);
  }
  const phi = new Float64Array(grid.size);
  let mass = 0;
  let rho2 = 0;
  for (let p = 0; p < grid.size; p++) {
    const rho = psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2;
    phi[p] = rho;
    mass += rho;
    rho2 += rho * rho;
  }
  const rhoEff = rho2 / mass; // ∫ρ² dV / ∫ρ dV
  mass *= grid.cellVolume;
  gravity.solveInPlace(phi);
  const fft = new ComplexFft(grid.shape);
  const K = kineticEnergy(grid, psi, a, fft, new Float64Array(psi.length));
  const W = potentialEnergy(grid, psi, phi, a);
  const U = contactEnergyOf(grid, input.contact ?? 0, rho2, a);
  return coefficientsFrom(mass, K, W, rhoEff, a, particleMass, center, U);
}

/** Assemble the coefficients from a field's mass, energies and effective density. */
export function coefficientsFrom(
  mass: number,
  kinetic: number,
  potential: number,
  rhoEff: number,
  a: number,
  particleMass: number,
  center?: readonly number[],
  contactEnergy = 0,
): ModeCoefficients {
  const N = mass / particleMass;
  const chiContact = (2 * contactEnergy * particleMass) / (mass * mass);
  const chi = (2 * potential * particleMass) / (mass * mass) + chiContact;
  return {
    mass,
    particles: N,
    kinetic,
    potential,
    omega: kinetic / mass,
    chi,
    chiContact,
    rate: N * Math.abs(chi),
    virialRatio: potential !== 0 ? (2 * kinetic) / Math.abs(potential) : Number.POSITIVE_INFINITY,
    lambda: Math.sqrt(Math.max(rhoEff, 0) / (a * a * a)),
    ...(center ? { center } : {}),
  };
}
