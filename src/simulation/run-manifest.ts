/**
 * A run folder's manifest, `psibox-files.txt`: one path per line, relative to
 * the folder, of every file (or, with a trailing "/", every folder) psibox
 * wrote or is about to write there. A path is listed before its file is
 * created, so a killed run's files are listed too. `--force` deletes exactly
 * the listed paths (checked to stay inside the folder, and never through a
 * symbolic link) and nothing else.
 */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";

/** The manifest's file name inside a run folder. */
export const MANIFEST_NAME = "psibox-files.txt";

const HEADER = "# files written by psibox in this folder (psibox run --force deletes exactly these)";

/** Does `dir` hold a psibox manifest? */
export function hasManifest(dir: string): boolean {
  return fs.existsSync(path.join(dir, MANIFEST_NAME));
}

/** A manifest entry is a plain relative path inside the folder: no "..", no absolute path, no control characters. */
function isPlainEntry(entry: string): boolean {
  // eslint-disable-next-line no-control-regex
  if (entry === "" || path.isAbsolute(entry) || /[\u0000-\u001f\u007f\\]/.test(entry)) return false;
  return entry.replace(/\/$/, "").split("/").every((part) => part !== "" && part !== "." && part !== "..");
}

/** The entries of a folder's manifest (empty when it has none). */
export function readManifest(dir: string): string[] {
  const file = path.join(dir, MANIFEST_NAME);
  if (!fs.existsSync(file)) return [];
  const lines = fs.readFileSync(file, "utf8").split("\n").filter((l) => l !== "" && !l.startsWith("#"));
  return [...new Set(lines.filter(isPlainEntry))];
}

/** List `entries` (relative paths; a folder ends in "/") as written by psibox in `dir`, creating the manifest if needed. */
export function recordOwned(dir: string, entries: readonly string[]): void {
  const file = path.join(dir, MANIFEST_NAME);
  const known = new Set(readManifest(dir));
  const added = entries.filter((e) => !known.has(e));
  for (const e of added) if (!isPlainEntry(e)) throw new Error(`not a plain manifest entry: ${JSON.stringify(e)}`);
  if (added.length === 0 && fs.existsSync(file)) return;
  const head = fs.existsSync(file) ? "" : `${HEADER}\n`;
  fs.appendFileSync(file, head + added.map((e) => `${e}\n`).join(""));
}

/** Record `target` in the manifest of the run folder `runDir` when it lies inside it and the folder has one. */
export function recordIfInside(runDir: string, target: string, folder = false): void {
  if (!hasManifest(runDir)) return;
  const rel = path.relative(path.resolve(runDir), path.resolve(target));
  if (rel === "" || rel.startsWith("..") || path.isAbsolute(rel)) return;
  recordOwned(runDir, [rel.split(path.sep).join("/") + (folder ? "/" : "")]);
}

/**
 * Delete what the manifest of `dir` lists: regular files, and listed folders
 * with their contents; a listed path that is a symbolic link is removed as a
 * link, never followed. Returns the entries removed.
 */
export function deleteOwned(dir: string): string[] {
  const removed: string[] = [];
  for (const entry of readManifest(dir)) {
    const target = path.join(dir, entry);
    let st: fs.Stats;
    try {
      st = fs.lstatSync(target);
    } catch {
      continue;
    }
    // every parent of the entry inside the folder must be a real folder, not a link out of it
    const parents = entry.replace(/\/$/, "").split("/").slice(0, -1);
    let parent = dir;
    let inside = true;
    for (const part of parents) {
      parent = path.join(parent, part);
      if (!fs.lstatSync(parent).isDirectory()) inside = false;
    }
    if (!inside) continue;
    if (entry.endsWith("/") && st.isDirectory()) fs.rmSync(target, { recursive: true, force: true });
    else if (st.isFile() || st.isSymbolicLink()) fs.rmSync(target, { force: true });
    else continue;
    removed.push(entry);
  }
  return removed;
}

/** Refuse when a path the run is about to write exists but is not in the manifest (it is someone else's file). */
export function checkNotForeign(dir: string, candidates: readonly string[]): void {
  const owned = new Set(readManifest(dir));
  for (const c of candidates) {
    if (owned.has(c)) continue;
    if (fs.existsSync(path.join(dir, c))) {
      throw new InputError(
        `${fileName(path.join(dir, c))} was not written by psibox in this folder (it is not listed in ${MANIFEST_NAME}); move it away or choose another output.dir`,
      );
    }
  }
}
