#!/usr/bin/env node
// The soliton's adiabatic-to-frozen ratio N dμ/dN / (Nħχ), exactly 3/2 for the continuum ground state (computed
// independently: μ ∝ N² by the scaling symmetry of Schrödinger–Poisson and the virial theorem; Lewenstein & You 1996
// for the principle), measured on n³ grids by finite differences of relaxed ground states at M(1 ± 1%), with the
// stationary-state formula χ_ad/χ = 2 + K/W beside it. Shows how the error falls with resolution.
// Usage: npm run build && node scripts/adiabatic-ratio.mjs [--tolerance T] [cells-per-axis ...]
//   (default 16 32 64; 64³ takes minutes; T is the relaxation's energy tolerance per iteration, default 1e-11 as in runs)
import { Grid } from "../dist/grid/grid.js";
import { IsolatedPoisson } from "../dist/fields/poisson.js";
import { relaxGroundState } from "../dist/ground-state/imaginary-time.js";

const args = process.argv.slice(2);
const at = args.indexOf("--tolerance");
const options = at >= 0 ? { energyTolerance: Number(args.splice(at, 2)[1]), maxIterations: 200000 } : {};
const sizes = args.length > 0 ? args.map(Number) : [16, 32, 64];
// the ground state with r₉₉ = 0.3 box sides (M r₉₉ = 9.94583 ħ²/(Gm²), Chavanis 2011) in an isolated unit box, code units
const mass = (9.94583 * 4 * Math.PI) / 0.3;
const s = 0.08;

function guess(grid, n) {
  const psi = new Float64Array(2 * n ** 3);
  const amp = Math.sqrt(mass / Math.pow(2 * Math.PI * s * s, 1.5));
  for (let a = 0, p = 0; a < n; a++)
    for (let b = 0; b < n; b++)
      for (let c = 0; c < n; c++, p++) {
        const [x, y, z] = [grid.coordinate(0, a), grid.coordinate(1, b), grid.coordinate(2, c)];
        psi[2 * p] = amp * Math.exp(-((x - 0.5) ** 2 + (y - 0.5) ** 2 + (z - 0.5) ** 2) / (4 * s * s));
      }
  return psi;
}

console.log(`relaxation energy tolerance ${options.energyTolerance ?? 1e-11} per iteration`);
console.log("cells  N dμ/dN / (Nħχ)  error vs 3/2   (2 + K/W)  error vs 3/2   seconds  converged");
for (const n of sizes) {
  const t0 = performance.now();
  const grid = new Grid([n, n, n], [1, 1, 1]);
  const gravity = new IsolatedPoisson(grid);
  const gs = relaxGroundState(grid, gravity, guess(grid, n), options);
  const eps = 0.01;
  const up = relaxGroundState(grid, gravity, gs.psi.map((v) => v * Math.sqrt(1 + eps)), options);
  const down = relaxGroundState(grid, gravity, gs.psi.map((v) => v * Math.sqrt(1 - eps)), options);
  // the eigenvalue is μ/m; N dμ/dN = M² d(eigenvalue)/dM · m/M and Nħχ = 2W m/M (code units, ħ/m = 1)
  const ratio = (gs.mass * gs.mass * (up.eigenvalue - down.eigenvalue)) / (up.mass - down.mass) / (2 * gs.potential);
  const stationary = 2 + gs.kinetic / gs.potential;
  const sec = (performance.now() - t0) / 1000;
  console.log(`${String(n).padStart(3)}³   ${ratio.toFixed(6)}        ${(ratio / 1.5 - 1).toExponential(2).padStart(9)}     ${stationary.toFixed(6)}   ${(stationary / 1.5 - 1).toExponential(2).padStart(9)}    ${sec.toFixed(0).padStart(7)}  ${gs.converged && up.converged && down.converged}`);
}
