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
 * - solitons: see solitons.ts; cosmological: see cosmological.ts.
 * - white-noise: ψ = √(ρ̄ (1 + δ)) with independent Gaussian δ per cell.
 */
import type { Grid } from "../grid/grid.js";
import type { Background } from "../physics/cosmology/background.js";
import type { PoissonSolver } from "../fields/poisson.js";
import type { ResolvedInitial } from "../config/resolve.js";
import { relaxGroundState, type GroundState } from "../ground-state/imaginary-time.js";
import { SeededRandom } from "../math/random.js";
import { buildSolitons } from "./solitons.js";
import { buildCosmological } from "./cosmological-field.js";
import { forEachCell, gaussian } from "./shapes.js";

/** A built initial field and, for relaxed states, how the relaxation went. */
export interface InitialField {
  readonly psi: Float64Array;
  readonly relaxation?: Pick<GroundState, "iterations" | "converged" | "eigenvalue">;
  /** Things the user should know (e.g. a field already nonlinear at the start). */
  readonly warnings?: readonly string[];
  /** CSV table of the linear spectrum used (cosmological fields). */
  readonly powerTable?: string;
}

/**
 * Build the initial field.
 * @param startTime code time of the start (sets a, H and f in expanding runs)
 * @param gravity the run's Poisson solver (used by the ground-state relaxation)
 * @param into where to build grid-filling fields (plane wave, white noise, cosmological), e.g. the stepper's own ψ, to save a copy
 * @param contact the field's contact coefficient g (code units), which relaxed ground states include
 */
export function buildInitialField(
  ic: Exclude<ResolvedInitial, { kind: "snapshot" }>,
  grid: Grid,
  background: Background,
  startTime: number,
  gravity: PoissonSolver,
  onRelaxProgress?: (info: { iteration: number; energy: number }) => void,
  into?: Float64Array,
  contact = 0,
): InitialField {
  const a = background.scaleFactor(startTime);
  const fresh = (): Float64Array => (into ? into.fill(0) : new Float64Array(2 * grid.size));
  switch (ic.kind) {
    case "plane-wave": {
      const k = ic.mode.map((m, i) => (2 * Math.PI * m) / (grid.lengths[i] as number));
      const k2 = k.reduce((s, v) => s + v * v, 0);
      const flow = background.kind === "static" ? 0 : (a * a * background.hubble(a) * background.growthRate(a)) / k2;
      const psi = fresh();
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
    case "solitons":
      return buildSolitons(ic, grid, a, onRelaxProgress, contact);
    case "white-noise": {
      const rng = new SeededRandom(ic.seed);
      const psi = fresh();
      let clipped = 0;
      for (let p = 0; p < grid.size; p++) {
        const d = ic.amplitude * rng.normal();
        if (d < -1) clipped++;
        psi[2 * p] = Math.sqrt(ic.meanDensity * Math.max(0, 1 + d));
      }
      return clipped > 0 ? { psi, warnings: [`${clipped} cells drew δ < −1 and were set to zero density; lower initial.amplitude`] } : { psi };
    }
    case "cosmological":
      return buildCosmological(ic, grid, background, a, into);
    case "ground-state": {
      const guess = gaussian(grid, ic.mass, ic.guessWidth, ic.center, ic.center.map(() => 0));
      const gs = relaxGroundState(grid, gravity, guess, { contact, ...(onRelaxProgress ? { onProgress: onRelaxProgress } : {}) });
      return { psi: gs.psi, relaxation: { iterations: gs.iterations, converged: gs.converged, eigenvalue: gs.eigenvalue } };
    }
  }
}
