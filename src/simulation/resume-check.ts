/**
 * What a resume loads is checked before anything is written: the checkpoint
 * must belong to the run folder's config (its config_sha256), match its grid,
 * hold finite values of the right length, a whole non-negative step count, a
 * time within the run's span and a positive mass (the plug-ins check their
 * own saved states: plugin-set.ts). A mismatch is a one-line InputError naming the
 * file and the field.
 */
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { parse as parseToml } from "smol-toml";
import { sha256 } from "../config/serialize.js";
import type { CheckpointState, SnapshotMeta } from "../io/snapshot.js";
import type { OutputScales } from "./scales.js";

/** What the checkpoint must agree with. */
export interface ResumeExpectations {
  readonly configText: string;
  readonly cells: readonly number[];
  readonly startTime: number;
  readonly endTime: number;
  readonly scales: OutputScales;
}

function firstNonFinite(a: Float64Array): number {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i]!)) return i;
  return -1;
}

/**
 * Are two resolved configs the same run but for their [span] (as psibox extend rewrites it)?
 * An output.time_unit that only one of them states is left out: configs of earlier versions
 * left it implicit, and psibox extend pins it to the unit the run was written in.
 */
function sameRunButSpan(a: string, b: string): boolean {
  try {
    const [ta, tb] = [a, b].map((text) => parseToml(text) as Record<string, Record<string, unknown> | undefined>);
    const implicit = [ta, tb].some((t) => t?.["output"]?.["time_unit"] === undefined);
    const strip = (t: Record<string, Record<string, unknown> | undefined> | undefined) => {
      if (!t) return "";
      delete t["span"];
      if (implicit) delete t["output"]?.["time_unit"];
      // sections and keys in one order, so the comparison is of values only
      return JSON.stringify(Object.keys(t).sort().map((k) => [k, Object.entries(t[k] ?? {}).sort(([x], [y]) => (x < y ? -1 : 1))]));
    };
    return strip(ta) === strip(tb);
  } catch {
    return false;
  }
}

/** Check a loaded checkpoint against its run; throws an InputError naming `file` and the field. */
export function verifyCheckpoint(file: string, meta: SnapshotMeta, state: CheckpointState, expect: ResumeExpectations): void {
  const where = (field: string) => `${fileName(file)}: ${field}`;
  if (meta.kind !== "checkpoint") throw new InputError(`${where("kind")} is "${meta.kind}", not a checkpoint`);
  if (meta.configSha256 !== sha256(expect.configText) && !sameRunButSpan(meta.config, expect.configText)) {
    throw new InputError(`${where("config_sha256")} does not match the folder's config.toml (beyond its [span]): the checkpoint belongs to another run, or config.toml was edited since`);
  }
  if (meta.cells.join("×") !== expect.cells.join("×")) {
    throw new InputError(`${where("/grid cells")} are ${meta.cells.join("×")}, config.toml has ${expect.cells.join("×")}`);
  }
  const size = expect.cells.reduce((a, b) => a * b, 1);
  const arrays: [string, Float64Array, number][] = [
    ["state/psi_code", state.psiCode, 2 * size],
    ["state/phi_code", state.phiCode, size],
  ];
  for (const [name, data, n] of arrays) {
    if (data.length !== n) throw new InputError(`${where(name)} holds ${data.length} values, the ${expect.cells.join("×")} grid needs ${n}`);
    const bad = firstNonFinite(data);
    if (bad >= 0) throw new InputError(`${where(name)} holds a non-finite value (${data[bad]} at index ${bad}); the checkpoint cannot be resumed`);
  }
  if (!(Number.isInteger(state.steps) && state.steps >= 0)) throw new InputError(`${where("state steps")} must be a whole number ≥ 0, got ${state.steps}`);
  if (!(Number.isInteger(state.snapshotsWritten) && state.snapshotsWritten >= 1)) {
    throw new InputError(`${where("state snapshots_written")} must be a whole number ≥ 1, got ${state.snapshotsWritten}`);
  }
  const { startTime, endTime, scales } = expect;
  const slack = 1e-9 * Math.max(1, Math.abs(endTime));
  if (!(Number.isFinite(state.timeCode) && state.timeCode >= startTime - slack && state.timeCode <= endTime + slack)) {
    const t = Number.isFinite(state.timeCode) ? scales.formatTime(state.timeCode) : String(state.timeCode);
    throw new InputError(`${where("state time_code")} is t = ${t}, outside the run's span ${scales.formatTime(startTime)} to ${scales.formatTime(endTime)}`);
  }
  for (const [name, v] of [["state mass_code", state.massCode], ["state mass0_code", state.mass0Code]] as const) {
    if (!(Number.isFinite(v) && v > 0)) throw new InputError(`${where(name)} must be a positive mass, got ${Number.isFinite(v) ? `${scales.massMsun(v).toPrecision(6)} Msun` : v}`);
  }
  if (!(Number.isFinite(state.wallTimeS) && state.wallTimeS >= 0)) throw new InputError(`${where("state wall_time_s")} must be a time ≥ 0 s, got ${state.wallTimeS}`);
}
