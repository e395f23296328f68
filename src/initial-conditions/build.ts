/**
 * Initial fields in code units (ħ/m = 1, 4πG = 1), from a resolved initial
 * condition:
 * - plane-wave: ψ = √(ρ̄ (1 + ε cos k·x)) e^{iS}. In an expanding background
 *   S = (a² H f / k²) ε cos k·x, the linear growing-mode flow of cold matter
 *   (v = ∇S/a, continuity δ̇ = −∇²S/a²); static runs start at rest.
 * - gaussian-packet: ψ = A exp(−|x − c|²/(4σ²) + i a v·(x − c)), so that
 *   |ψ|² ∝ exp(−r²/2σ²) moves at peculiar velocity v; A makes the grid mass
 *   exactly M; distances are minimum-image in the periodic box.
 * - ground-state: the same Gaussian relaxed by imaginary time to the soliton.
 * - solitons: for each distinct mass, the soliton relaxed by imaginary time
 *   with isolated gravity at the box centre; each copy is moved to its centre
 *   by a Fourier shift (exact for a band-limited field), boosted by
 *   e^{i a v·(x − c)}, given its phase, and the copies are added.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import type { PoissonSolver } from "../fields/poisson.js";
import type { ResolvedInitial } from "../config/resolve.js";
import { relaxGroundState, type GroundState } from "../ground-state/imaginary-time.js";
import { fieldMass } from "../diagnostics/energies.js";
import { IsolatedPoisson } from "../fields/poisson.js";
import { ComplexFft } from "../fields/fft.js";

/** A built initial field and, for relaxed states, how the relaxation went. */
export interface InitialField {
  readonly psi: Float64Array;
  readonly relaxation?: Pick<GroundState, "iterations" | "converged" | "eigenvalue">;
}

/** Offset of coordinate x from c along a periodic axis of length L, in [−L/2, L/2). */
function minimumImage(x: number, c: number, length: number): number {
  let d = x - c;
  d -= length * Math.round(d / length);
  return d;
}

function forEachCell(grid: Grid, visit: (index: number, coords: readonly number[]) => void): void {
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

function gaussian(grid: Grid, mass: number, width: number, center: readonly number[], wavevector: readonly number[]): Float64Array {
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

/**
 * Build the initial field.
 * @param startTime code time of the start (sets a, H and f in expanding runs)
 * @param gravity the run's Poisson solver (used by the ground-state relaxation)
 */
export function buildInitialField(
  ic: ResolvedInitial,
  grid: Grid,
  background: Background,
  startTime: number,
  gravity: PoissonSolver,
  onRelaxProgress?: (info: { iteration: number; energy: number }) => void,
): InitialField {
  const a = background.scaleFactor(startTime);
  switch (ic.kind) {
    case "plane-wave": {
      const k = ic.mode.map((m, i) => (2 * Math.PI * m) / (grid.lengths[i] as number));
      const k2 = k.reduce((s, v) => s + v * v, 0);
      const flow = background.kind === "static" ? 0 : (a * a * background.hubble(a) * background.growthRate(a)) / k2;
      const psi = new Float64Array(2 * grid.size);
      forEachCell(grid, (p, x) => {
        let arg = 0;
        for (let i = 0; i < grid.dims; i++) arg += (k[i] as number) * (x[i] as number);
        const delta = ic.contrast * Math.cos(arg);
        const amp = Math.sqrt(ic.meanDensity * (1 + delta));
        const s = flow * delta;
        psi[2 * p] = amp * Math.cos(s);
        psi[2 * p + 1] = amp * Math.sin(s);
      });
      return { psi };
    }
    case "gaussian-packet":
      return { psi: gaussian(grid, ic.mass, ic.width, ic.center, ic.velocity.map((v) => a * v)) };
    case "solitons": {
      const psi = new Float64Array(2 * grid.size);
      const profiles = new Map<number, Float64Array>();
      let relaxation: InitialField["relaxation"];
      const isolated = new IsolatedPoisson(grid);
      const boxCentre = grid.lengths.map((_, i) => grid.coordinate((3 - grid.dims + i) as 0 | 1 | 2, (grid.cells[i] as number) >> 1));
      for (const s of ic.solitons) {
        let profile = profiles.get(s.mass);
        if (!profile) {
          // 3D core radius of the exact ground state: M r_c = 2.67941 ħ²/(G m²) (code units: G = 1/4π)
          const width = grid.dims === 3 ? (2.67941 * 4 * Math.PI) / s.mass : Math.min(...grid.lengths) / 10;
          const guess = gaussian(grid, s.mass, width, boxCentre, boxCentre.map(() => 0));
          const gs = relaxGroundState(grid, isolated, guess, onRelaxProgress ? { onProgress: onRelaxProgress } : {});
          relaxation = { iterations: (relaxation?.iterations ?? 0) + gs.iterations, converged: (relaxation?.converged ?? true) && gs.converged, eigenvalue: gs.eigenvalue };
          profile = gs.psi;
          profiles.set(s.mass, profile);
        }
        const moved = Float64Array.from(profile);
        shiftField(grid, moved, s.center.map((c, i) => c - (boxCentre[i] as number)));
        forEachCell(grid, (p, x) => {
          let arg = s.phase;
          for (let i = 0; i < grid.dims; i++) {
            arg += a * (s.velocity[i] as number) * minimumImage(x[i] as number, s.center[i] as number, grid.lengths[i] as number);
          }
          const c = Math.cos(arg);
          const sn = Math.sin(arg);
          const re = moved[2 * p] as number;
          const im = moved[2 * p + 1] as number;
          psi[2 * p] = (psi[2 * p] as number) + re * c - im * sn;
          psi[2 * p + 1] = (psi[2 * p + 1] as number) + re * sn + im * c;
        });
      }
      return relaxation ? { psi, relaxation } : { psi };
    }
    case "ground-state": {
      const guess = gaussian(grid, ic.mass, ic.guessWidth, ic.center, ic.center.map(() => 0));
      const gs = relaxGroundState(grid, gravity, guess, onRelaxProgress ? { onProgress: onRelaxProgress } : {});
      return { psi: gs.psi, relaxation: { iterations: gs.iterations, converged: gs.converged, eigenvalue: gs.eigenvalue } };
    }
  }
}

/** Move a periodic field by a displacement d (one length per simulated axis): ψ(x) → ψ(x − d), spectrally. */
export function shiftField(grid: Grid, psi: Float64Array, displacement: readonly number[]): void {
  if (displacement.every((d) => d === 0)) return;
  const fft = new ComplexFft(grid.shape);
  fft.forward(psi);
  const pad = 3 - grid.dims;
  const d3 = [0, 0, 0];
  displacement.forEach((d, i) => (d3[pad + i] = d));
  const [k0, k1, k2] = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
  const [n0, n1, n2] = grid.shape;
  let p = 0;
  for (let a = 0; a < n0; a++)
    for (let b = 0; b < n1; b++)
      for (let c = 0; c < n2; c++, p += 2) {
        // the Nyquist mode has no sign: shift it by the real part of its phase only
        const nyq = (n: number, j: number) => n > 1 && j === n / 2;
        const ang = -((nyq(n0, a) ? 0 : k0[a]! * d3[0]!) + (nyq(n1, b) ? 0 : k1[b]! * d3[1]!) + (nyq(n2, c) ? 0 : k2[c]! * d3[2]!));
        const cs = Math.cos(ang);
        const sn = Math.sin(ang);
        const re = psi[p]!;
        const im = psi[p + 1]!;
        psi[p] = re * cs - im * sn;
        psi[p + 1] = re * sn + im * cs;
      }
  fft.inverse(psi);
}
