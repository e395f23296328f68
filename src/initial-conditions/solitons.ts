/**
 * Sets of solitons. Each soliton is either relaxed on the grid by imaginary
 * time with isolated gravity at the box centre (once per distinct mass) and
 * moved to its centre by a Fourier shift (exact for a band-limited field), or
 * drawn from the published core profile ρ_c/(1 + 0.091 (r/r_c)²)⁸ (Schive,
 * Chiueh & Broadhurst 2014, Nature Physics 10, 496; 3D) with r_c from the
 * exact ground state's M r_c = 2.67941 ħ²/(G m²). Each is boosted by
 * e^{i a v·(x − c)} (minimum-image distances), given its phase, and the copies
 * are added; the sum is rescaled so that the grid mass is exactly the sum of
 * the masses (overlapping copies interfere).
 */
import type { Grid } from "../grid/grid.js";
import type { ResolvedInitial } from "../config/resolve.js";
import { IsolatedPoisson } from "../fields/poisson.js";
import { ComplexFft } from "../fields/fft.js";
import { relaxGroundState } from "../ground-state/imaginary-time.js";
import { fieldMass } from "../diagnostics/energies.js";
import { SOLITON_MASS_CORE } from "../config/resolve-initial.js";
import { forEachCell, gaussian, minimumImage } from "./shapes.js";
import type { InitialField } from "./build.js";

type Solitons = Extract<ResolvedInitial, { kind: "solitons" }>;

/** The published core profile centred on c, normalised to grid mass M (3D). */
function coreFit(grid: Grid, mass: number, center: readonly number[]): Float64Array {
  const rc = SOLITON_MASS_CORE / mass;
  const psi = new Float64Array(2 * grid.size);
  forEachCell(grid, (p, x) => {
    let r2 = 0;
    for (let i = 0; i < grid.dims; i++) r2 += minimumImage(x[i] as number, center[i] as number, grid.lengths[i] as number) ** 2;
    psi[2 * p] = Math.pow(1 + (0.091 * r2) / (rc * rc), -4);
  });
  const scale = Math.sqrt(mass / fieldMass(grid, psi));
  for (let i = 0; i < psi.length; i++) psi[i] = psi[i]! * scale;
  return psi;
}

/** Build the solitons' field at scale factor a. */
export function buildSolitons(
  ic: Solitons,
  grid: Grid,
  a: number,
  onRelaxProgress?: (info: { iteration: number; energy: number }) => void,
  contact = 0,
): InitialField {
  const psi = new Float64Array(2 * grid.size);
  const profiles = new Map<number, Float64Array>();
  let relaxation: InitialField["relaxation"];
  const isolated = ic.profile === "relaxed" ? new IsolatedPoisson(grid) : undefined;
  const boxCentre = grid.lengths.map((_, i) => grid.coordinate((3 - grid.dims + i) as 0 | 1 | 2, (grid.cells[i] as number) >> 1));
  for (const s of ic.solitons) {
    let moved: Float64Array;
    if (isolated) {
      let profile = profiles.get(s.mass);
      if (!profile) {
        const width = grid.dims === 3 ? SOLITON_MASS_CORE / s.mass : Math.min(...grid.lengths) / 10;
        const guess = gaussian(grid, s.mass, width, boxCentre, boxCentre.map(() => 0));
        const gs = relaxGroundState(grid, isolated, guess, { contact, ...(onRelaxProgress ? { onProgress: onRelaxProgress } : {}) });
        relaxation = {
          iterations: (relaxation?.iterations ?? 0) + gs.iterations,
          converged: (relaxation?.converged ?? true) && gs.converged,
          eigenvalue: gs.eigenvalue,
        };
        profile = gs.psi;
        profiles.set(s.mass, profile);
      }
      moved = Float64Array.from(profile);
      shiftField(grid, moved, s.center.map((c, i) => c - (boxCentre[i] as number)));
    } else moved = coreFit(grid, s.mass, s.center);
    forEachCell(grid, (p, x) => {
      let arg = s.phase;
      for (let i = 0; i < grid.dims; i++) arg += a * (s.velocity[i] as number) * minimumImage(x[i] as number, s.center[i] as number, grid.lengths[i] as number);
      const c = Math.cos(arg);
      const sn = Math.sin(arg);
      const re = moved[2 * p] as number;
      const im = moved[2 * p + 1] as number;
      psi[2 * p] = (psi[2 * p] as number) + re * c - im * sn;
      psi[2 * p + 1] = (psi[2 * p + 1] as number) + re * sn + im * c;
    });
  }
  // overlapping solitons interfere; keep the total mass the sum of their masses
  const total = ic.solitons.reduce((sum, s) => sum + s.mass, 0);
  const scale = Math.sqrt(total / fieldMass(grid, psi));
  for (let i = 0; i < psi.length; i++) psi[i] = psi[i]! * scale;
  return relaxation ? { psi, relaxation } : { psi };
}

/** Move a periodic field by a displacement d (one length per simulated axis): ψ(x) → ψ(x − d), spectrally. */
export function shiftField(grid: Grid, psi: Float64Array, displacement: readonly number[]): void {
  if (displacement.every((d) => d === 0)) return;
  const fft = new ComplexFft(grid.shape);
  fft.forward(psi);
  const pad = 3 - grid.dims;
  const d3 = [0, 0, 0];
  displacement.forEach((d, i) => (d3[pad + i] = d));
  const [n0, n1, n2] = grid.shape;
  // the Nyquist mode has no sign: it is left unshifted
  const nyq = (n: number, j: number) => n > 1 && j === n / 2;
  grid.forEachMode((p, kx, ky, kz, a, b, c) => {
    const ang = -((nyq(n0, a) ? 0 : kx * d3[0]!) + (nyq(n1, b) ? 0 : ky * d3[1]!) + (nyq(n2, c) ? 0 : kz * d3[2]!));
    const cs = Math.cos(ang);
    const sn = Math.sin(ang);
    const re = psi[p]!;
    const im = psi[p + 1]!;
    psi[p] = re * cs - im * sn;
    psi[p + 1] = re * sn + im * cs;
  });
  fft.inverse(psi);
}
