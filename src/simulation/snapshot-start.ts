/**
 * Runs that start from a file (initial.kind = "snapshot"): a psibox snapshot
 * or checkpoint, or a field brought in by psibox import. The keys a config
 * leaves out are taken from the file (grid, particle mass, background, the
 * start redshift of expanding runs or the start time of static ones), and the
 * field is converted to the run's code units and resampled to the run's cell
 * counts by Fourier interpolation.
 */
import path from "node:path";
import { ConfigError } from "../core/errors.js";
import type { Grid } from "../grid/grid.js";
import type { ResolvedRun } from "../config/resolve.js";
import type { InitialField } from "../initial-conditions/build.js";
import { resampleField } from "../initial-conditions/resample.js";
import { readSnapshot, readSnapshotMeta, type SnapshotMeta } from "../io/snapshot.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import { CodeUnits } from "../physics/units.js";

type Table = Record<string, unknown>;
const KPC_M = 1e3 * PC_M;

function section(raw: Table, name: string): Table | undefined {
  const v = raw[name];
  if (v === undefined) return {};
  return typeof v === "object" && v !== null && !Array.isArray(v) ? { ...(v as Table) } : undefined;
}

/** Keys of the file's own description, for the sections the config leaves them out of. */
function fieldDims(file: string, meta: Pick<SnapshotMeta, "cells">): string {
  const m = meta.cells;
  return `${file} holds a ${m.length}D field (${m.join("×")} cells); give ${m.length} cell counts (powers of two) to resample it`;
}

function fillSections(raw: Table, meta: SnapshotMeta, file: string): Table {
  const out: Table = { ...raw };
  const grid = section(raw, "grid");
  if (grid) {
    const given = grid["cells"];
    const dims = typeof given === "number" ? 1 : Array.isArray(given) ? given.length : meta.cells.length;
    if (dims !== meta.cells.length) throw new ConfigError("grid.cells", fieldDims(file, meta));
    grid["cells"] ??= meta.cells.length === 1 ? meta.cells[0] : [...meta.cells];
    grid["box"] ??= meta.boxSizeKpc.map((b) => `${b} kpc`);
    if (["periodic", "isolated", "none"].includes(meta.gravity)) grid["gravity"] ??= meta.gravity;
    out["grid"] = grid;
  }
  const particle = section(raw, "particle");
  if (particle) out["particle"] = { ...particle, mass: particle["mass"] ?? `${meta.particleMassEv} eV` };
  const bg = meta.background;
  out["background"] ??=
    bg.kind === "lcdm"
      ? { kind: "lcdm", hubble: `${bg.hubbleKmSMpc} km/s/Mpc`, omega_matter: bg.omegaMatter, omega_radiation: bg.omegaRadiation }
      : { kind: "static" };
  const expanding = (out["background"] as Table)["kind"] === "lcdm";
  const span = section(raw, "span");
  if (span && expanding && meta.redshift !== null) span["start_redshift"] ??= meta.redshift;
  if (span) out["span"] = span;
  const initial = section(raw, "initial") as Table;
  if (!expanding && initial["time"] === undefined) initial["time"] = `${meta.time} ${meta.timeUnit}`;
  out["initial"] = initial;
  return out;
}

/**
 * For a config whose initial field is a snapshot: the file as a full path (so the run's config.toml
 * names it wherever it is run from) and the keys the config leaves out, from the file. Call loadHdf5() first.
 */
export function fillFromSnapshot(raw: Table): Table {
  const initial = section(raw, "initial");
  if (!initial || initial["kind"] !== "snapshot" || typeof initial["file"] !== "string" || initial["file"] === "") return raw;
  const file = path.resolve(initial["file"]).split(path.sep).join("/");
  const meta = readSnapshotMeta(initial["file"]);
  return fillSections({ ...raw, initial: { ...initial, file } }, meta, file);
}

/** The snapshot's field in the run's code units on the run's grid (resampled when the cell counts differ). */
export function snapshotInitialField(run: ResolvedRun, grid: Grid, into: Float64Array): InitialField {
  if (run.initial.kind !== "snapshot") throw new TypeError("not a snapshot initial condition");
  return fileField(run, grid, into, run.initial.file);
}

/**
 * A file's field in the run's code units on the run's grid: its first field, or with `species` the field of
 * the species of that name when the file holds several species and one of that name (its first field otherwise).
 */
export function fileField(run: ResolvedRun, grid: Grid, into: Float64Array, file: string, species?: string): InitialField {
  const snap = readSnapshot(file);
  const m = snap.meta;
  if (m.cells.length !== grid.dims) {
    throw new ConfigError("grid.cells", fieldDims(file, m));
  }
  const runBoxKpc = run.grid.lengths.map((l) => (l * run.lengthUnitM) / KPC_M);
  if (runBoxKpc.some((b, i) => Math.abs(b / (m.boxSizeKpc[i] as number) - 1) > 1e-9)) {
    throw new ConfigError("grid.box", `must be the box of ${file} (${m.boxSizeKpc.map((b) => `${b.toPrecision(9)} kpc`).join(", ")}), or left out to take it from the file`);
  }
  const units = new CodeUnits(run.particleMassKg, run.lengthUnitM);
  const toCode = Math.sqrt(M_SUN_KG / KPC_M ** 3 / (units.massKg / units.lengthM ** 3));
  const at = species === undefined ? 0 : Math.max(0, (m.species ?? []).findIndex((s) => s.name === species));
  const psi = (at === 0 ? snap.psi : snap.speciesPsi![at - 1]!).map((v) => v * toCode);
  const same = m.cells.every((n, i) => n === run.grid.cells[i]);
  const warnings: string[] = [];
  if (same) {
    into.set(psi);
  } else {
    const r = resampleField(psi, m.cells, run.grid.cells);
    into.set(r.psi);
    if (r.droppedMassFraction > 1e-6) {
      warnings.push(
        `resampling ${file} from ${m.cells.join("×")} to ${run.grid.cells.join("×")} cells dropped modes that held ` +
          `${(100 * r.droppedMassFraction).toPrecision(3)}% of the mass; the field was scaled to keep the mass`,
      );
    }
  }
  return { psi: into, ...(warnings.length ? { warnings } : {}) };
}
