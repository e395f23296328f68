/**
 * A run's outputs as it goes: time-series rows (the run's own columns, then
 * each plug-in's), snapshots and checkpoints (with the plug-ins' states),
 * with the plug-ins called at each of them.
 */
import { CsvWriter } from "../io/csv-writer.js";
import { InputError } from "../core/errors.js";
import type { RunSession, RunStart } from "./session.js";
import { maxSummedDensity, speciesContacts, speciesEnergies, type SpeciesEnergy } from "./species-energies.js";

const ENERGY_UNIT = "Msun_km2_s2";

/**
 * The run's own time-series columns (before the plug-ins'); `contact` (any species with a contact term) adds
 * the interaction energy before the total. With several species (`species`: every species' name, the first's
 * first) mass, kinetic, potential, contact and max density are totals over them, followed by each species'
 * mass, kinetic and potential energy, and its own contact energy when `contact`.
 */
export function coreColumns(timeUnit: string, expanding: boolean, contact = false, species: readonly string[] = []): string[] {
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
    ...species.flatMap((name) => [`mass_${name}_Msun`, `kinetic_${name}_${ENERGY_UNIT}`, `potential_${name}_${ENERGY_UNIT}`, ...(contact ? [`contact_${name}_${ENERGY_UNIT}`] : [])]),
  ];
}

/** Every species' name of a run of several (the first's first), or none for a run of one. */
export function speciesNames(session: RunSession): string[] {
  const { run } = session;
  return run.species.length ? [run.firstSpecies, ...run.species.map((sp) => sp.name)] : [];
}

/** Writes a run's time series, snapshots and checkpoints. */
export class RunRecorder {
  private readonly session: RunSession;
  private readonly start: RunStart;
  private readonly series: CsvWriter;
  /** Each species' contact coefficient (code units), the first's first. */
  private readonly contacts: readonly number[];
  /** Snapshots written so far (the next snapshot's number). */
  snapshotsWritten: number;

  constructor(session: RunSession, start: RunStart) {
    this.session = session;
    this.start = start;
    this.snapshotsWritten = start.snapshotsWritten;
    this.contacts = speciesContacts(session.run, session.scales.units);
    const columns = [...coreColumns(session.scales.timeUnit, session.expanding, this.contacts.some((g) => g !== 0), speciesNames(session)), ...session.plugins.columns];
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
    const { stepper, background, scales, expanding, plugins, run } = this.session;
    const t = stepper.time;
    const a = background.scaleFactor(t);
    // K = ½∫|∇ψ|²/a² (spectral, on the step's own transforms), W = ½∫ρφ/a, U = ½g∫ρ²/a³, per species and summed
    const each = speciesEnergies(stepper, run.species.map((sp) => sp.massRatio), a, this.contacts);
    const sum = (f: (e: SpeciesEnergy) => number) => each.reduce((s, e) => s + f(e), 0);
    const [M, K, W, U] = [sum((e) => e.mass), sum((e) => e.kinetic), sum((e) => e.potential), sum((e) => e.contact)];
    const withContact = this.contacts.some((g) => g !== 0);
    const energies = [K, W, ...(withContact ? [U] : []), K + W + U].map((e) => scales.energy(e));
    const maxRho = run.species.length ? maxSummedDensity(stepper, run.species.length) : stepper.moments().maxRho;
    const perSpecies = run.species.length ? each.flatMap((e) => [scales.massMsun(e.mass), scales.energy(e.kinetic), scales.energy(e.potential), ...(withContact ? [scales.energy(e.contact)] : [])]) : [];
    const own = [scales.time(dt), limiter, scales.massMsun(M), ...energies, scales.density(maxRho), ...perSpecies];
    this.series.row([step, scales.time(t), ...(expanding ? [a, 1 / a - 1] : []), ...own, ...plugins.row({ step, t, a }, () => stepper.rawPsi, () => [stepper.psi, ...run.species.map((_, i) => stepper.field(i + 1))])]);
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
      ...(this.start.speciesMass0.length ? { speciesMass0Code: this.start.speciesMass0 } : {}),
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
