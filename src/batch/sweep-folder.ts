/**
 * A sweep folder made ready for a sweep (run locally or emitted for Slurm):
 * never a run's own folder, and never with entries whose kept results came
 * from another config. Without that check a changed base config or `--set`
 * would leave the old results standing as the new ones (completed entries
 * are skipped, interrupted ones resumed from checkpoints of the old config).
 * With `force`, such entries' run files are removed so that they start
 * afresh.
 */
import fs from "node:fs";
import path from "node:path";
import { parse, stringify } from "smol-toml";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { MANIFEST_NAME, deleteOwned } from "../simulation/run-manifest.js";
import type { SweepPlan } from "./plan.js";
import { entryStatus } from "./summary.js";

/** Files whose presence says a folder holds (part of) a run. */
const RUN_MARKS = ["summary.json", "timeseries.csv", "checkpoint.h5", "config.toml"];

type Toml = Record<string, unknown>;

const holdsRun = (dir: string): boolean => RUN_MARKS.some((f) => fs.existsSync(path.join(dir, f)));

/** The entry config a folder's entry.toml holds, or undefined (none, or unreadable: nothing to compare). */
function earlierEntry(dir: string): Toml | undefined {
  try {
    return parse(fs.readFileSync(path.join(dir, "entry.toml"), "utf8")) as Toml;
  } catch {
    return undefined;
  }
}

/** The first dotted key at which two parsed configs differ (output.dir aside: it is the folder itself), or undefined. */
function firstDifference(a: unknown, b: unknown, at = ""): string | undefined {
  if (at === "output.dir") return undefined;
  const isTable = (v: unknown): v is Toml => typeof v === "object" && v !== null && !Array.isArray(v);
  if (isTable(a) && isTable(b)) {
    for (const k of [...new Set([...Object.keys(a), ...Object.keys(b)])].sort()) {
      const d = firstDifference(a[k], b[k], at ? `${at}.${k}` : k);
      if (d !== undefined) return d;
    }
    return undefined;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) return at;
    for (let i = 0; i < a.length; i++) if (firstDifference(a[i], b[i], at) !== undefined) return at;
    return undefined;
  }
  return Object.is(a, b) ? undefined : at;
}

/**
 * Check `plan`'s folder before anything is written; with `force`, clear the entries run with another config.
 * Returns notes for the user (one per entry cleared).
 */
export function prepareSweepFolder(plan: SweepPlan, force: boolean): string[] {
  if (holdsRun(plan.dir)) {
    throw new InputError(`output folder ${fileName(plan.dir)} holds a run; a sweep needs a folder of its own: set output.dir (e.g. --set 'output.dir="output/${plan.name}-sweep"') or move the run away`);
  }
  const notes: string[] = [];
  for (const e of plan.entries) {
    const dir = path.join(plan.dir, e.name);
    const earlier = earlierEntry(dir);
    // what a sweep keeps of an entry: a completed run (skipped) or a checkpoint (resumed); the rest runs afresh anyway
    if (!earlier || !(entryStatus(dir).status === "completed" || fs.existsSync(path.join(dir, "checkpoint.h5")))) continue;
    // the new config as its entry.toml will read back (TOML's own types)
    const changed = firstDifference(earlier, parse(stringify(e.config)));
    if (changed === undefined) continue;
    if (!force) {
      throw new InputError(`sweep entry ${e.name} in ${fileName(plan.dir)} was run with another config (${changed} differs); pass --force to start the changed entries afresh, or set output.dir for a new sweep`);
    }
    deleteOwned(dir);
    for (const f of [MANIFEST_NAME, "sweep-status.json"]) fs.rmSync(path.join(dir, f), { force: true });
    notes.push(`--force: entry ${e.name} starts afresh (${changed} changed)`);
  }
  return notes;
}
