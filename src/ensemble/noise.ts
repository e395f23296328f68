/**
 * Vacuum noise of the truncated Wigner method: each member of an ensemble
 * starts from the classical field plus half a quantum of noise per grid
 * mode. In number units per cell, a = ψ √(ΔV / m), the noise is
 * (ξ₁ + iξ₂)/2 with independent standard normals ξ, so ⟨|δa|²⟩ = 1/2 per
 * cell (Steel et al. 1998, PRA 58, 4824; Polkovnikov 2010, Ann. Phys. 325,
 * 1790). White noise per cell is white noise per Fourier mode: half a
 * quantum in every one of the grid's modes.
 *
 * Each member's numbers come from its own generator, seeded by a hash of
 * (ensemble seed, member index): the noise of member j is the same on any
 * machine, in any worker and for any number of workers.
 */
import { SeededRandom } from "../math/random.js";

/** A 32-bit avalanche mix (the finaliser of MurmurHash3, Appleby 2008). */
function mix32(x: number): number {
  x = Math.imul(x ^ (x >>> 16), 0x85ebca6b) >>> 0;
  x = Math.imul(x ^ (x >>> 13), 0xc2b2ae35) >>> 0;
  return (x ^ (x >>> 16)) >>> 0;
}

/** The seed of member `index` (0, 1, …) of an ensemble seeded with `seed` (a whole number below 2³²). */
export function memberSeed(seed: number, index: number): number {
  return mix32((mix32((seed >>> 0) ^ 0x2545f491) + Math.imul(index + 1, 0x9e3779b9)) >>> 0);
}

/**
 * Add the vacuum noise of member `index` to `psi` (interleaved re, im; code
 * units, mass per volume: the amplitude is √(m/ΔV)/2 per component).
 * @param particleMass the particle mass m in code units (the field's mass over N)
 * @param cellVolume ΔV in code units
 */
export function addVacuumNoise(psi: Float64Array, particleMass: number, cellVolume: number, seed: number, index: number): void {
  const rng = new SeededRandom(memberSeed(seed, index));
  const amplitude = 0.5 * Math.sqrt(particleMass / cellVolume);
  for (let i = 0; i < psi.length; i++) psi[i] = (psi[i] as number) + amplitude * rng.normal();
}

/** ψ (code units) → a = ψ √(ΔV/m), the field in particles per cell amplitude (a new array). */
export function toNumberUnits(psi: Float64Array, particleMass: number, cellVolume: number): Float64Array {
  const s = Math.sqrt(cellVolume / particleMass);
  const out = new Float64Array(psi.length);
  for (let i = 0; i < psi.length; i++) out[i] = (psi[i] as number) * s;
  return out;
}
