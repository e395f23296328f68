/**
 * Failed writes told in words: which file, why (the operating system's
 * reason, or HDF5's), and how much space is left on its device, so that a
 * full disk reads as "the disk is full" rather than as an HDF5 error stack.
 */
import fs from "node:fs";
import path from "node:path";
import { WriteError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { errnoMeaning, systemErrorMessage } from "../core/system-errors.js";

/** Free space on the device of `dir` in bytes, or undefined where it cannot be read. */
export function freeBytes(dir: string): number | undefined {
  try {
    const s = fs.statfsSync(dir);
    return s.bavail * s.bsize;
  } catch {
    return undefined;
  }
}

/** "; 0.2 MB free on its device" when space is short (below 64 MB), else "". */
export function spaceNote(file: string): string {
  const free = freeBytes(path.dirname(path.resolve(file)));
  if (free === undefined || free >= 64 * 2 ** 20) return "";
  return `; only ${(free / 2 ** 20).toPrecision(2)} MB free on its device: the disk is probably full`;
}

/** Turn any failure of writing `file` into a WriteError naming it; `detail` is the library's own short reason. */
export function writeFailure(file: string, e: unknown, detail?: string): WriteError {
  if (e instanceof WriteError) return e;
  const code = (e as NodeJS.ErrnoException)?.code;
  const why = typeof code === "string" && /^E[A-Z]+$/.test(code) ? errnoMeaning(code) : (detail ?? ((e as Error)?.message ?? String(e)).split("\n")[0] ?? "unknown reason");
  const note = spaceNote(file) || (why === "Write failed" ? "; the disk may be full or a file size limit reached" : "");
  return new WriteError(file, `${fileName(file)}: could not be written (${why})${note}`);
}

/** Why a run's write failed, in one line, or undefined when `e` is not a write failure. */
export function writeFailureReason(e: unknown): string | undefined {
  if (e instanceof WriteError) return e.message;
  const system = systemErrorMessage(e);
  const code = (e as NodeJS.ErrnoException)?.code;
  if (system && ["ENOSPC", "EDQUOT", "EFBIG", "EROFS", "EIO", "EACCES", "EPERM"].includes(code ?? "")) return `writing the run's files failed: ${system}`;
  return undefined;
}
