/**
 * The occupation of each wavenumber shell of an ensemble: the members'
 * fields (number units per cell) in plane waves, ã_k = Σₓ a(x) e^{−ik·x}/√cells
 * (so Σ_k |ã_k|² = Σₓ |a|² and the vacuum noise is 1/2 in every mode),
 * summed over the modes of one |k| (the ±k pair in 1D, a ring or shell in
 * 2D and 3D), the symmetric-ordering shift removed: n_shell = ⟨Σ_k |ã_k|²⟩ −
 * modes/2, with the standard error of the mean over the members. For a
 * uniform condensate the shells of k ≠ 0 hold the depletion pair by pair
 * (Bogoliubov theory); in general they are the field's occupation spectrum.
 */
import { ComplexFft } from "../fields/fft.js";
import type { Grid } from "../grid/grid.js";
import type { Estimate } from "./observables.js";

/** The shells of a grid: |k| of each (code units, increasing), how many modes each holds, and each mode's shell. */
export interface Shells {
  readonly k: Float64Array;
  readonly modes: Uint32Array;
  /** The shell of each Fourier mode, in storage order. */
  readonly of: Uint32Array;
}

/** Group the grid's Fourier modes by |k|² (equal to 1e-9 relative: the same |k| on another axis or sign). */
export function wavenumberShells(grid: Grid): Shells {
  const k2 = new Float64Array(grid.size);
  grid.forEachMode((p, kx, ky, kz) => (k2[p / 2] = kx * kx + ky * ky + kz * kz));
  const distinct = [...new Set(Array.from(k2, (v) => Number(v.toPrecision(10))))].sort((a, b) => a - b);
  const index = new Map(distinct.map((v, i) => [v, i]));
  const of = Uint32Array.from(k2, (v) => index.get(Number(v.toPrecision(10))) as number);
  const modes = new Uint32Array(distinct.length);
  for (const s of of) modes[s]! += 1;
  return { k: Float64Array.from(distinct, Math.sqrt), modes, of };
}

/** One member's Σ|ã_k|² per shell (its field is left unchanged). */
function memberShells(a: Float64Array, fft: ComplexFft, shells: Shells, work: Float64Array): Float64Array {
  work.set(a);
  fft.forward(work);
  const sums = new Float64Array(shells.k.length);
  const norm = 2 / work.length; // 1/cells
  for (let m = 0; m < shells.of.length; m++) sums[shells.of[m] as number]! += norm * ((work[2 * m] as number) ** 2 + (work[2 * m + 1] as number) ** 2);
  return sums;
}

/** The occupation of every shell at one time, with its standard error, from `members` (number units, at least 2). */
export function shellOccupations(members: readonly Float64Array[], grid: Grid, shells: Shells): Estimate[] {
  const fft = new ComplexFft(grid.shape);
  const work = new Float64Array(2 * grid.size);
  const perMember = members.map((a) => memberShells(a, fft, shells, work));
  const m = members.length;
  return Array.from(shells.modes, (modes, i) => {
    let mean = 0;
    for (const s of perMember) mean += s[i] as number;
    mean /= m;
    let variance = 0;
    for (const s of perMember) variance += ((s[i] as number) - mean) ** 2;
    variance /= m - 1;
    return { value: mean - modes / 2, error: Math.sqrt(variance / m) };
  });
}
