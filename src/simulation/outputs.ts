/**
 * What a run writes besides its time series: snapshots, checkpoints and the
 * run log, all in the run folder:
 *   config.toml             the resolved config
 *   snapshots/snap_NNNNN.h5 snapshots (NNNNN counts from 0, the initial state)
 *   checkpoint.h5           the latest checkpoint (a snapshot plus the exact code-unit state)
 *   run.log                 one line per event
 *   clocks.json             the quantum sidecar's clocks (when enabled)
 *   initial-power.csv       the linear spectrum of a cosmological initial field
 */
import fs from "node:fs";
import path from "node:path";
import type { ResolvedRun } from "../config/resolve.js";
import type { SplitStepper } from "../integrators/split-step.js";
import { writeSnapshot, type CheckpointState, type SnapshotMeta } from "../io/snapshot.js";
import { KG_PER_EV, MPC_M } from "../physics/constants.js";
import { VERSION } from "../version.js";
import type { OutputScales } from "./scales.js";
import { recordOwned } from "./run-manifest.js";

/** The mass of each species in code units: ψ's, then the later species' (the stepper's extra fields 1 … count). */
export function speciesMasses(stepper: SplitStepper, count: number): number[] {
  return [stepper.mass, ...Array.from({ length: count }, (_, i) => stepper.fieldMass(i + 1))];
}

/** Paths of a run folder. */
export function runPaths(dir: string) {
  return {
    config: path.join(dir, "config.toml"),
    timeseries: path.join(dir, "timeseries.csv"),
    summary: path.join(dir, "summary.json"),
    log: path.join(dir, "run.log"),
    clocks: path.join(dir, "clocks.json"),
    power: path.join(dir, "initial-power.csv"),
    checkpoint: path.join(dir, "checkpoint.h5"),
    snapshots: path.join(dir, "snapshots"),
    snapshot: (index: number) => path.join(dir, "snapshots", `snap_${String(index).padStart(5, "0")}.h5`),
  };
}

/** Writes a run's snapshots, checkpoints and log lines. */
export class RunWriter {
  private readonly run: ResolvedRun;
  private readonly scales: OutputScales;
  /** The resolved config's text, as config.toml holds it. */
  readonly configText: string;
  private readonly configHash: string;
  readonly paths: ReturnType<typeof runPaths>;

  constructor(run: ResolvedRun, scales: OutputScales, configText: string, configHash: string) {
    this.run = run;
    this.scales = scales;
    this.configText = configText;
    this.configHash = configHash;
    this.paths = runPaths(run.outputDir);
    fs.mkdirSync(this.paths.snapshots, { recursive: true });
  }

  /** Append a line to run.log. */
  log(text: string): void {
    fs.appendFileSync(this.paths.log, `${new Date().toISOString()} ${text}\n`);
  }

  private meta(stepper: SplitStepper, step: number, kind: "snapshot" | "checkpoint"): SnapshotMeta {
    const run = this.run;
    const a = stepper.background.scaleFactor(stepper.time);
    const kpc = this.run.lengthUnitM / (MPC_M / 1e3);
    const bg = run.background;
    return {
      kind,
      software: `psibox ${VERSION}`,
      step,
      time: this.scales.time(stepper.time),
      timeUnit: this.scales.timeUnit,
      scaleFactor: a,
      redshift: bg.kind === "lcdm" ? 1 / a - 1 : null,
      cells: run.grid.cells,
      boxSizeKpc: run.grid.lengths.map((l) => l * kpc),
      particleMassEv: run.particleMassKg / KG_PER_EV,
      gravity: run.grid.gravity,
      background:
        bg.kind === "lcdm"
          ? { kind: "lcdm", hubbleKmSMpc: bg.littleH * 100, omegaMatter: bg.omegaMatter, omegaRadiation: bg.omegaRadiation }
          : { kind: "static" },
      massMsun: this.scales.massMsun(speciesMasses(stepper, run.species.length).reduce((a, b) => a + b, 0)),
      config: this.configText,
      configSha256: this.configHash,
      scatteringLengthM: run.contact?.scatteringLengthM ?? 0,
      ...this.speciesMeta(stepper),
    };
  }

  /** Several species: their names, particle masses, masses and scattering lengths (the first is the reference field). */
  private speciesMeta(stepper: SplitStepper): Pick<SnapshotMeta, "species"> {
    const run = this.run;
    if (run.species.length === 0) return {};
    const masses = speciesMasses(stepper, run.species.length);
    const eV = [run.particleMassKg, ...run.species.map((sp) => sp.particleMassKg)].map((m) => m / KG_PER_EV);
    const names = [run.firstSpecies, ...run.species.map((sp) => sp.name)];
    const lengths = [run.contact, ...run.species.map((sp) => sp.contact)].map((c) => c?.scatteringLengthM ?? 0);
    return { species: names.map((name, i) => ({ name, particleMassEv: eV[i]!, massMsun: this.scales.massMsun(masses[i]!), scatteringLengthM: lengths[i]! })) };
  }

  /** The factor from code ψ to physical ψ (√ of the density unit), applied as snapshots are written. */
  private get psiScale(): number {
    return Math.sqrt(this.scales.density(1));
  }

  /** Write snapshot number `index` of the current state. */
  writeSnapshot(stepper: SplitStepper, step: number, index: number): string {
    const file = this.paths.snapshot(index);
    recordOwned(this.run.outputDir, [`snapshots/${path.basename(file)}`]);
    const speciesPsi = this.run.species.map((_, i) => stepper.field(i + 1));
    writeSnapshot(file, { meta: this.meta(stepper, step, "snapshot"), psi: stepper.psi, psiScale: this.psiScale, ...(speciesPsi.length ? { speciesPsi } : {}) }, this.run.output.snapshotPrecision);
    this.log(`snapshot ${path.basename(file)} at step ${step}, t = ${this.scales.formatTime(stepper.time)}`);
    return file;
  }

  /**
   * Write the checkpoint (replacing the previous one atomically) without
   * touching the trajectory: the exact state is ψ as stored with the kick it
   * still owes, and the stepper is put back exactly as it was after the
   * kicked field is written for readers. So where checkpoints fall never
   * changes a run, and a run resumed or extended from any checkpoint repeats
   * the uninterrupted one bit for bit.
   */
  writeCheckpoint(stepper: SplitStepper, state: Omit<CheckpointState, "psiCode" | "phiCode" | "timeCode" | "massCode" | "owedKickCode" | "fieldsCode" | "fieldsOwedKickCode">): void {
    const fields = Array.from({ length: stepper.extraFields }, (_, i) => Float64Array.from(stepper.rawField(i + 1)));
    const owed = fields.map((_, i) => stepper.fieldOwedKick(i + 1)); // each field's own (a tangent's is ψ's)
    const { time, mass, owedKickFactor } = stepper;
    // ψ as stored is copied only when it owes a kick (the kick changes it in place); the kick leaves φ as it is
    const raw = owedKickFactor !== 0 ? Float64Array.from(stepper.rawPsi) : stepper.rawPsi;
    const phi = stepper.phi;
    try {
      const speciesPsi = this.run.species.map((_, i) => stepper.field(i + 1));
      writeSnapshot(this.paths.checkpoint, {
        meta: this.meta(stepper, state.steps, "checkpoint"),
        psi: stepper.psi,
        psiScale: this.psiScale,
        ...(speciesPsi.length ? { speciesPsi } : {}),
        state: {
          ...state,
          psiCode: raw,
          phiCode: phi,
          timeCode: time,
          massCode: mass,
          ...(owedKickFactor !== 0 ? { owedKickCode: owedKickFactor } : {}),
          ...(fields.length ? { fieldsCode: fields, fieldsOwedKickCode: owed } : {}),
        },
      });
    } finally {
      stepper.restoreState(raw, phi, time, mass, owedKickFactor);
      fields.forEach((f, i) => stepper.setField(i + 1, f, owed[i]));
    }
    this.log(`checkpoint at step ${state.steps}, t = ${this.scales.formatTime(time)}`);
  }
}
