/**
 * Atomic file writes: write a temporary file in the same folder, fsync it,
 * rename it over the target and fsync the folder, so a killed process leaves
 * either the old file or the new one, never a torn one.
 */
import fs from "node:fs";
import path from "node:path";
import { writeFailure } from "./write-failure.js";

/** fsync a file or folder by path. */
export function fsyncPath(p: string): void {
  const fd = fs.openSync(p, "r");
  try {
    fs.fsyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
}

/** The hidden temporary name an atomic write of `file` uses (same folder, so rename is atomic). */
export function temporaryPathFor(file: string): string {
  const dir = path.dirname(path.resolve(file));
  return path.join(dir, `.${path.basename(file)}.tmp-${process.pid}-${Date.now()}`);
}

/** Remove leftover temporary files of interrupted atomic writes in a folder; returns their names. */
export function cleanStaleTemporaries(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  const removed: string[] = [];
  for (const name of fs.readdirSync(dir)) {
    if (/^\..+\.tmp-\d+-\d+$/.test(name)) {
      fs.unlinkSync(path.join(dir, name));
      removed.push(name);
    }
  }
  return removed;
}

/** fsync a folder, where the filesystem allows it (makes a rename durable). */
export function fsyncFolder(dir: string): void {
  try {
    fsyncPath(dir);
  } catch {
    /* some filesystems cannot fsync a folder; the rename itself is done */
  }
}

/** Write `data` to `file` atomically. */
export function writeFileAtomic(file: string, data: string | Uint8Array): void {
  const dir = path.dirname(path.resolve(file));
  const tmp = temporaryPathFor(file);
  try {
    fs.writeFileSync(tmp, data);
    fsyncPath(tmp);
    fs.renameSync(tmp, file);
  } catch (e) {
    try {
      fs.unlinkSync(tmp);
    } catch {
      /* nothing left to clean */
    }
    throw writeFailure(file, e);
  }
  fsyncFolder(dir);
}
