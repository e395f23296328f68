/**
 * Atomic file writes: write a temporary file in the same folder, fsync it,
 * rename it over the target and fsync the folder, so a killed process leaves
 * either the old file or the new one, never a torn one.
 */
import fs from "node:fs";
import path from "node:path";

function fsyncPath(p: string): void {
  const fd = fs.openSync(p, "r");
  try {
    fs.fsyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
}

/** Write `data` to `file` atomically. */
export function writeFileAtomic(file: string, data: string | Uint8Array): void {
  const dir = path.dirname(path.resolve(file));
  const tmp = path.join(dir, `.${path.basename(file)}.tmp-${process.pid}-${Date.now()}`);
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
    throw e;
  }
  try {
    fsyncPath(dir);
  } catch {
    /* some filesystems cannot fsync a folder; the rename itself is done */
  }
}
