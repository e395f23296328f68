/** Cell iteration, minimum-image distances and Gaussian packets on a grid (code units). */
import type { Grid } from "../grid/grid.js";
import { fieldMass } from "../diagnostics/energies.js";

/** Offset of coordinate x from c along a periodic axis of length L, in [−L/2, L/2). */
export function minimumImage(x: number, c: number, length: number): number {
  let d = x - c;
  d -= length * Math.round(d / length);
  return d;
}

/** Visit every cell with its coordinates along the simulated axes. */
export function forEachCell(grid: Grid, visit: (index: number, coords: readonly number[]) => void): void {
  const [n0, n1, n2] = grid.shape;
  const pad = 3 - grid.dims;
  const coords = new Array<number>(grid.dims).fill(0);
  let p = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++)
      for (let c = 0; c < n2; c++, p++) {
        const all = [grid.coordinate(0, a), grid.coordinate(1, b), grid.coordinate(2, c)];
        for (let i = 0; i < grid.dims; i++) coords[i] = all[pad + i] as number;
        visit(p, coords);
      }
}

/** A Gaussian packet of mass M (grid mass exact), width σ of |ψ|², centre c and wave vector k. */
export function gaussian(grid: Grid, mass: number, width: number, center: readonly number[], wavevector: readonly number[]): Float64Array {
  const psi = new Float64Array(2 * grid.size);
  const amp = Math.sqrt(mass / Math.pow(2 * Math.PI * width * width, grid.dims / 2));
  forEachCell(grid, (p, x) => {
    let r2 = 0;
    let phase = 0;
    for (let i = 0; i < grid.dims; i++) {
      const d = minimumImage(x[i] as number, center[i] as number, grid.lengths[i] as number);
      r2 += d * d;
      phase += (wavevector[i] as number) * d;
    }
    const m = amp * Math.exp(-r2 / (4 * width * width));
    psi[2 * p] = m * Math.cos(phase);
    psi[2 * p + 1] = m * Math.sin(phase);
  });
  // normalise the grid's mass (not the continuum integral) to exactly M
  const scale = Math.sqrt(mass / fieldMass(grid, psi));
  for (let i = 0; i < psi.length; i++) psi[i] = (psi[i] as number) * scale;
  return psi;
}

