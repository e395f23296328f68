/**
 * `psibox extend DIR --to END`: give a completed run a later end (a duration
 * for static runs, a redshift for expanding ones) and continue it from its
 * last checkpoint. A completed run's last checkpoint is the state before the
 * steps its end time shortened, and checkpoints never change a trajectory,
 * so the extended run is bit for bit the run that had the later end from the
 * start.
 */
import fs from "node:fs";
import path from "node:path";
import { ConfigError, InputError } from "../core/errors.js";
import { checkConfig, readTomlFile } from "../config/load.js";
import { resolveRun, type ResolvedRun } from "../config/resolve.js";
import { resolvedConfigToml } from "../config/serialize.js";
import { runPaths } from "../simulation/outputs.js";
import { takeRunFolder, type OwnedFolder } from "../simulation/run-folder.js";
import { fileName, quoteValue, shorten } from "../core/sanitize.js";

type Table = Record<string, unknown>;

function resolveIn(table: Table, dir: string): ResolvedRun {
  const run = resolveRun(checkConfig(table), path.basename(dir), process.cwd());
  return { ...run, outputDir: dir };
}

/** An extension ready to run: the locked folder, the run with its later end, and its config.toml text (not yet written). */
export interface Extension {
  readonly run: ResolvedRun;
  readonly configText: string;
  readonly owned: OwnedFolder;
}

/**
 * Take DIR's lock and plan its later end; nothing is written here. The new
 * config.toml is written by the run itself, under this lock, once the
 * checkpoint is verified against it (session.ts), so a refused or failed
 * extension leaves the folder as it was. The caller releases the lock.
 */
export function extendRun(dirText: string, to: string): Extension {
  if (!fs.existsSync(runPaths(path.resolve(dirText)).config)) throw new InputError(`${fileName(dirText)}: not a psibox run folder (no config.toml)`);
  const owned = takeRunFolder(dirText, { force: false, resume: true });
  try {
    const run = planExtension(dirText, owned.dir, to);
    return { run, configText: resolvedConfigToml(run), owned };
  } catch (e) {
    owned.lock.release();
    throw e;
  }
}

/** The run of folder `dir` with the later end `to`, checked: a completed run with a checkpoint, and an end of the right kind that is later. */
function planExtension(dirText: string, dir: string, to: string): ResolvedRun {
  const p = runPaths(dir);
  const status = fs.existsSync(p.summary) ? (JSON.parse(fs.readFileSync(p.summary, "utf8")) as { status?: string }).status : undefined;
  if (status !== "completed") throw new InputError(`${fileName(dirText)}: the run has not completed; finish it first with psibox run --resume ${fileName(dirText)}`);
  if (!fs.existsSync(p.checkpoint)) {
    throw new InputError(`${fileName(dirText)}: has no checkpoint.h5 to continue from (an earlier psibox kept none for short runs); run its config.toml again with the later end`);
  }
  const table = readTomlFile(p.config) as Table;
  const old = resolveIn(table, dir);
  const span = { ...(table["span"] as Table) };
  let what: string;
  if (old.background.kind === "static") {
    span["duration"] = to;
    what = "a duration of the whole run, e.g. \"2 Gyr\"";
  } else {
    const z = Number(to);
    if (to.trim() === "" || !Number.isFinite(z)) throw new InputError(`--to: an expanding run ends at a redshift: give a number, e.g. --to 0, got ${quoteValue(to)}`);
    span["end_redshift"] = z;
    what = "a redshift, e.g. 0";
  }
  // the time unit of the outputs stays that of the run, whatever unit the new end is written in
  const output = { ...(table["output"] as Table), time_unit: old.output.timeUnit };
  let run: ResolvedRun;
  try {
    run = resolveIn({ ...table, span, output }, dir);
  } catch (e) {
    if (e instanceof ConfigError) throw new InputError(`--to: ${quoteValue(to)} is not ${what} (${e.message})`);
    throw e;
  }
  if (!(run.span.endTime > old.span.endTime * (1 + 1e-12))) {
    throw new InputError(`--to: ${shorten(to)} is not later than the run's end; give a later ${old.background.kind === "static" ? "duration" : "(smaller) redshift"}`);
  }
  return run;
}
