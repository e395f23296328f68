/**
 * A run's outputs as it goes: time-series rows (the run's own columns, then
 * each plug-in's), snapshots and checkpoints (with the plug-ins' states),
 * with the plug-ins called at each of them.
 */
import { CsvWriter } from "../io/csv-writer.js";
import { InputError } from "../core/errors.js";
import type { RunSession, RunStart } from "./session.js";

const ENERGY_UNIT = "Msun_km2_s2";

/** The run's own time-series columns (before the plug-ins'); `contact` adds the interaction energy before the total. */
export function coreColumns(timeUnit: string, expanding: boolean, contact = false): string[] {
  return [
    "step",
    `t_${timeUnit}`,
    ...(expanding ? ["a", "z"] : []),
    `dt_${timeUnit}`,
    "limiter",
    "mass_Msun",
    `kinetic_${ENERGY_UNIT}`,
    `potential_${ENERGY_UNIT}`,
    ...(contact ? [`contact_${ENERGY_UNIT}`] : []),
    `total_${ENERGY_UNIT}`,
    "max_density_Msun_kpc3",
  ];
}

/** Writes a run's time series, snapshots and checkpoints. */
export class RunRecorder {
  private readonly session: RunSession;
  private readonly start: RunStart;
  private readonly series: CsvWriter;
  /** Snapshots written so far (the next snapshot's number). */
  snapshotsWritten: number;

  constructor(session: RunSession, start: RunStart) {
    this.session = session;
    this.start = start;
    this.snapshotsWritten = start.snapshotsWritten;
    const columns = [...coreColumns(session.scales.timeUnit, session.expanding, session.stepper.contact !== 0), ...session.plugins.columns];
    const twice = columns.find((c, i) => columns.indexOf(c) !== i);
    if (twice !== undefined) throw new InputError(`time-series column "${twice}" is declared twice (a plug-in's columns must be new)`);
    const limiter = columns.indexOf("limiter");
    const steps = start.steps;
    this.series = start.resumed
      ? CsvWriter.resume(session.paths.timeseries, columns, (cells) => Number(cells[0]) < steps || (Number(cells[0]) === steps && cells[limiter] !== "stop"))
      : new CsvWriter(session.paths.timeseries, columns);
  }

  /** A time-series row of the current state. */
  row(step: number, dt: number, limiter: string): void {
    const { stepper, background, grid, scales, expanding, plugins } = this.session;
    const t = stepper.time;
    const a = background.scaleFactor(t);
    // K = ½∫|∇ψ|²/a² (spectral, on the step's own transforms), W = ½∫ρφ/a, U = ½g∫ρ² (static runs only)
    const K = stepper.kineticTilde() / (a * a);
    const moments = stepper.moments();
    const W = (0.5 / a) * moments.rhoPhi * grid.cellVolume;
    const contact = stepper.contact !== 0 ? [0.5 * stepper.contact * moments.rho2 * grid.cellVolume] : [];
    const total = K + W + (contact[0] ?? 0);
    const energies = [K, W, ...contact, total].map((e) => scales.energy(e));
    const own = [scales.time(dt), limiter, scales.massMsun(stepper.mass), ...energies, scales.density(moments.maxRho)];
    this.series.row([step, scales.time(t), ...(expanding ? [a, 1 / a - 1] : []), ...own, ...plugins.row({ step, t, a }, () => stepper.rawPsi)]);
  }

  /** Write the next snapshot of the current state. */
  snapshot(step: number): void {
    const { stepper, background, writer, plugins } = this.session;
    const file = writer.writeSnapshot(stepper, step, this.snapshotsWritten++);
    plugins.snapshot({ step, t: stepper.time, a: background.scaleFactor(stepper.time), file }, () => stepper.rawPsi);
  }

  /** Flush the time series and write the checkpoint of the current state. */
  checkpoint(steps: number): void {
    const { stepper, writer, plugins, wallStart } = this.session;
    this.series.flush();
    const states = plugins.save();
    writer.writeCheckpoint(stepper, {
      mass0Code: this.start.mass0,
      steps,
      wallTimeS: this.start.wallBefore + (performance.now() - wallStart) / 1000,
      snapshotsWritten: this.snapshotsWritten,
      ...(Object.keys(states).length ? { plugins: states } : {}),
    });
  }

  close(): void {
    this.series.close();
  }
}
