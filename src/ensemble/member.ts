/**
 * One member of an ensemble, advanced by psibox's own solver: the run's
 * grid, background, gravity, contact interaction and split-step stepper (on
 * one thread: the ensemble's parallelism is over members), the run loop of
 * simulation/evolve.ts with the run's time-step rules, landing exactly on
 * the sample times, where the field is copied out.
 *
 * Members follow the equations of the Weyl symbol of the Hamiltonian, not
 * the classical ones (ordering.ts): the isolated potential's source loses
 * the noise's half quantum per cell, and the uniform phase of the
 * self-interaction terms is applied at each sample time, exactly.
 */
import { Grid } from "../grid/grid.js";
import { makePoissonSolver } from "../fields/poisson.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { SplitStepper } from "../integrators/split-step.js";
import { evolve } from "../simulation/evolve.js";
import type { ResolvedRun } from "../config/resolve.js";
import { NumericsError } from "../core/errors.js";
import { addVacuumNoise } from "./noise.js";
import { orderingCorrection, type OrderingCorrection } from "./ordering.js";
import { contactCode } from "../physics/contact.js";
import { CodeUnits } from "../physics/units.js";

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

/**
 * A stepper for members, built once per worker and reused for each, with
 * the member's buffers: a member allocates nothing (fresh typed arrays of a
 * field's size cost more than a small grid's steps).
 */
export class MemberSolver {
  private readonly stepper: SplitStepper;
  private readonly setup: MemberSetup;
  private readonly correction: OrderingCorrection;
  /** The member's start, and its samples in the file layout [time][cell][re, im]. */
  private readonly psi: Float64Array;
  private readonly all: Float64Array;

  constructor(setup: MemberSetup) {
    const { run } = setup;
    const grid = new Grid(run.grid.cells, run.grid.lengths);
    const background = makeBackground(run.background);
    const gravity = makePoissonSolver(grid, run.grid.gravity, run.grid.poisson);
    const contact = run.contact ? contactCode(run.contact.scatteringLengthM, new CodeUnits(run.particleMassKg, run.lengthUnitM)) : 0;
    this.stepper = new SplitStepper(grid, background, gravity, run.integrator.fft, 1, [], contact);
    this.correction = orderingCorrection(gravity, contact, setup.particleMass, grid.cellVolume, grid.size);
    this.setup = setup;
    this.psi = new Float64Array(setup.start.length);
    this.all = new Float64Array(setup.times.length * setup.start.length);
  }

  /** The cell volume ΔV in code units. */
  get cellVolume(): number {
    return this.stepper.grid.cellVolume;
  }

  /**
   * Member `index` (its noise drawn from the ensemble seed), or the classical
   * reference (index undefined: no noise), at every sample time, in code
   * units, laid out [time][cell][re, im] (the member file's layout; the
   * array is reused by the next call). `onProgress` receives the fraction of the span done.
   */
  evolveMember(index: number | undefined, onProgress?: (fraction: number) => void): Float64Array {
    const { run, times, start } = this.setup;
    const [psi, all, n] = [this.psi, this.all, start.length];
    psi.set(start);
    if (index !== undefined) addVacuumNoise(psi, this.setup.particleMass, this.cellVolume, this.setup.seed, index);
    const s = this.stepper;
    s.sourceShift = index === undefined ? 0 : this.correction.sourceShift;
    s.setState(psi, times[0] as number);
    all.set(psi, 0);
    let taken = 1;
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
          if (info.landed && wanted.has(stepper.time) && taken < times.length) all.set(stepper.psi, n * taken++);
          if (info.step % 64 === 0) onProgress?.((stepper.time - (times[0] as number)) / span);
        },
      },
    );
    if (result.status !== "completed" || taken !== times.length) {
      const who = index === undefined ? "the classical reference" : `member ${index}`;
      throw new NumericsError(`${who} stopped: ${result.reason ?? "it missed a sample time"}`);
    }
    if (index !== undefined && this.correction.phaseRate !== 0) {
      times.forEach((t, i) => rotate(all.subarray(i * n, (i + 1) * n), this.correction.phaseRate * s.background.kickFactor(times[0] as number, t)));
    }
    return all;
  }

  /** The potential φ (code units) of member `index`'s start, from the source its steps use. */
  startPotential(index: number): Float64Array {
    const { start, particleMass, seed, times } = this.setup;
    this.psi.set(start);
    addVacuumNoise(this.psi, particleMass, this.cellVolume, seed, index);
    this.stepper.sourceShift = this.correction.sourceShift;
    this.stepper.setState(this.psi, times[0] as number);
    return this.stepper.phi.slice();
  }

  close(): void {
    this.stepper.close();
  }
}

/** ψ ← e^{iθ} ψ (interleaved re, im). */
function rotate(psi: Float64Array, theta: number): void {
  const [c, sn] = [Math.cos(theta), Math.sin(theta)];
  for (let i = 0; i < psi.length; i += 2) {
    const [re, im] = [psi[i] as number, psi[i + 1] as number];
    psi[i] = re * c - im * sn;
    psi[i + 1] = re * sn + im * c;
  }
}
