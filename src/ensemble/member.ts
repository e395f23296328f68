/**
 * One member of an ensemble, advanced by psibox's own solver: the run's
 * grid, background, gravity and split-step stepper (on one thread: the
 * ensemble's parallelism is over members), the run loop of
 * simulation/evolve.ts with the run's time-step rules, landing exactly on
 * the sample times, where the field is copied out.
 */
import { Grid } from "../grid/grid.js";
import { makePoissonSolver } from "../fields/poisson.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { SplitStepper } from "../integrators/split-step.js";
import { evolve } from "../simulation/evolve.js";
import type { ResolvedRun } from "../config/resolve.js";
import { NumericsError } from "../core/errors.js";
import { addVacuumNoise } from "./noise.js";

/** What every member shares: the run, its classical start and the sample times (code units). */
export interface MemberSetup {
  readonly run: ResolvedRun;
  /** The classical initial field (code units, interleaved). */
  readonly start: Float64Array;
  /** Sample times, increasing, the first the run's start. */
  readonly times: readonly number[];
  /** The particle mass in code units (the field's mass over N). */
  readonly particleMass: number;
  readonly seed: number;
}

/** A stepper for members, built once per worker and reused for each. */
export class MemberSolver {
  private readonly stepper: SplitStepper;
  private readonly setup: MemberSetup;

  constructor(setup: MemberSetup) {
    const { run } = setup;
    const grid = new Grid(run.grid.cells, run.grid.lengths);
    const background = makeBackground(run.background);
    const gravity = makePoissonSolver(grid, run.grid.gravity, run.grid.poisson);
    this.stepper = new SplitStepper(grid, background, gravity, run.integrator.fft);
    this.setup = setup;
  }

  /** The cell volume ΔV in code units. */
  get cellVolume(): number {
    return this.stepper.grid.cellVolume;
  }

  /**
   * Member `index` (its noise drawn from the ensemble seed), or the classical
   * reference (index undefined: no noise), at every sample time: one field
   * per time, in code units. `onProgress` receives the fraction of the span done.
   */
  evolveMember(index: number | undefined, onProgress?: (fraction: number) => void): Float64Array[] {
    const { run, times, start } = this.setup;
    const psi = Float64Array.from(start);
    if (index !== undefined) addVacuumNoise(psi, this.setup.particleMass, this.cellVolume, this.setup.seed, index);
    const s = this.stepper;
    s.setState(psi, times[0] as number);
    const samples: Float64Array[] = [Float64Array.from(psi)];
    const wanted = new Set(times.slice(1));
    const endTime = times[times.length - 1] as number;
    const span = endTime - (times[0] as number);
    const { integrator } = run;
    const result = evolve(
      s,
      { safety: integrator.safety, maxDlnA: integrator.maxDlnA, fixedStep: integrator.fixedStep },
      { endTime, stops: times.slice(1), massTolerance: integrator.massTolerance, maxSteps: integrator.maxSteps },
      {
        onStep: (stepper, info) => {
          if (info.landed && wanted.has(stepper.time)) samples.push(Float64Array.from(stepper.psi));
          if (info.step % 64 === 0) onProgress?.((stepper.time - (times[0] as number)) / span);
        },
      },
    );
    if (result.status !== "completed" || samples.length !== times.length) {
      const who = index === undefined ? "the classical reference" : `member ${index}`;
      throw new NumericsError(`${who} stopped: ${result.reason ?? "it missed a sample time"}`);
    }
    return samples;
  }

  close(): void {
    this.stepper.close();
  }
}
