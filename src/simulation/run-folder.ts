/**
 * Owning a run folder: refuse folders a run must never write into (the
 * filesystem root, system folders, a home folder itself), resolve symbolic
 * links so the run says where it really writes, take the folder's lock for
 * the whole run, and on --force delete exactly what psibox's own manifest
 * lists. A folder holding run files that psibox did not list is never
 * written into.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { lockRunFolder, type RunLock } from "./run-lock.js";
import { MANIFEST_NAME, checkNotForeign, deleteOwned, hasManifest, recordOwned } from "./run-manifest.js";

/** Files of a run folder that psibox writes (snapshots are listed one by one as they are written). */
export const RUN_FILES = ["config.toml", "timeseries.csv", "summary.json", "run.log", "clocks.json", "initial-power.csv", "checkpoint.h5"] as const;
/** Files other psibox commands write into a run folder. */
const OTHER_FILES = ["report.html", "snapshot-clocks.csv", "snapshot-clocks.json"] as const;

/** Folders (and everything inside them) that are never a run folder. */
const SYSTEM_TREES = ["/etc", "/usr", "/bin", "/sbin", "/lib", "/lib32", "/lib64", "/libx32", "/boot", "/dev", "/proc", "/sys", "/run"];
/** Folders that are never a run folder themselves (their subfolders may be). */
const SYSTEM_FOLDERS = ["/", "/var", "/opt", "/srv", "/home", "/root", "/mnt", "/media", "/tmp"];

/** The real path of `p`: symbolic links of its existing part resolved, the rest appended. */
export function realTarget(p: string): string {
  const abs = path.resolve(p);
  let existing = abs;
  const rest: string[] = [];
  while (!fs.existsSync(existing)) {
    const parent = path.dirname(existing);
    if (parent === existing) break;
    rest.unshift(path.basename(existing));
    existing = parent;
  }
  return path.join(fs.realpathSync(existing), ...rest);
}

/** Refuse an output folder that is the root, a system folder or a home folder itself; returns its real path. */
export function checkOutputFolder(dir: string): string {
  const real = realTarget(dir);
  const system =
    SYSTEM_FOLDERS.includes(real) ||
    SYSTEM_TREES.some((t) => real === t || real.startsWith(`${t}/`)) ||
    real === path.resolve(os.homedir()) ||
    real === path.parse(real).root;
  if (system) {
    const via = real === path.resolve(dir) ? "" : ` (${fileName(dir)} leads there)`;
    throw new InputError(`output.dir: ${fileName(real)}${via} is the filesystem root, a system folder or a home folder; set output.dir to a folder of its own, e.g. "output/run1"`);
  }
  return real;
}

/** What taking a folder for a run gives: its real path, its lock, and notes for the user. */
export interface OwnedFolder {
  readonly dir: string;
  readonly lock: RunLock;
  readonly notes: readonly string[];
}

/**
 * Take `dir` for a new run (or, with `resume`, for continuing the run in it):
 * check it, create it, lock it, and with `force` delete what the manifest
 * lists. Refuses a folder holding a run unless `force`, and one holding run
 * files psibox did not list.
 */
export function takeRunFolder(dir: string, options: { force: boolean; resume?: boolean }): OwnedFolder {
  const real = checkOutputFolder(dir);
  const notes: string[] = [];
  if (real !== path.resolve(dir)) notes.push(`${fileName(dir)} is a link; the run writes to ${fileName(real)}`);
  if (fs.existsSync(real) && !fs.statSync(real).isDirectory()) throw new InputError(`output.dir: ${fileName(real)} exists and is not a folder`);
  fs.mkdirSync(real, { recursive: true });
  const lock = lockRunFolder(real);
  try {
    notes.push(...lock.notes);
    if (!options.resume) prepareForNewRun(real, options.force, notes);
    recordOwned(real, [...RUN_FILES]);
    return { dir: real, lock, notes };
  } catch (e) {
    lock.release();
    throw e;
  }
}

function prepareForNewRun(dir: string, force: boolean, notes: string[]): void {
  if (fs.existsSync(path.join(dir, "sweep.json"))) {
    throw new InputError(`output folder ${fileName(dir)} holds a sweep (sweep.json); a run needs a folder of its own: set output.dir`);
  }
  const held = ["summary.json", "timeseries.csv", "config.toml", "checkpoint.h5"].some((f) => fs.existsSync(path.join(dir, f)));
  if (held && !force) {
    throw new InputError(`output folder ${fileName(dir)} already holds a run; pass --force to replace the files psibox wrote there, or set output.dir`);
  }
  if (held && !hasManifest(dir)) {
    throw new InputError(`output folder ${fileName(dir)} holds run files that psibox did not list as its own (no ${MANIFEST_NAME}); move them away or choose another output.dir`);
  }
  if (force) {
    const removed = deleteOwned(dir);
    fs.rmSync(path.join(dir, MANIFEST_NAME), { force: true });
    if (removed.length > 0) notes.push(`--force: removed ${removed.length} files and folders of the earlier run listed in ${MANIFEST_NAME}`);
  }
  const snapshots = path.join(dir, "snapshots");
  const snapshotNames = fs.existsSync(snapshots) && fs.statSync(snapshots).isDirectory() ? fs.readdirSync(snapshots).map((n) => `snapshots/${n}`) : [];
  checkNotForeign(dir, [...RUN_FILES, ...OTHER_FILES, "analysis/", ...snapshotNames.filter((n) => /\/snap_\d{5}\.h5$/.test(n))]);
}

/**
 * The error for a folder that is not the run a command wants (`lacking` names what is missing); a sweep's folder
 * is told apart, with one of its entries to give instead.
 */
export function notRunFolder(dir: string, lacking: string): InputError {
  const manifest = path.join(dir, "sweep.json");
  if (fs.existsSync(manifest)) {
    let first: string | undefined;
    try {
      first = (JSON.parse(fs.readFileSync(manifest, "utf8")) as { entries?: { name?: string }[] }).entries?.[0]?.name;
    } catch {
      first = undefined;
    }
    return new InputError(`${fileName(dir)}: a sweep's folder, not a run: give one of its entries${first ? `, e.g. ${fileName(path.join(dir, first))}` : ""}; the sweep's table is sweep-summary.csv`);
  }
  return new InputError(`${fileName(dir)}: not a ${lacking === "summary.json" ? "finished " : ""}psibox run folder (no ${lacking})`);
}
