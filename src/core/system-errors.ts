/**
 * File-system errors as one-line messages: an operating-system error that
 * reaches the CLI (a full disk, a missing folder, no permission) is told in
 * words with the file it concerns, never as a stack trace.
 */
import { fileName } from "./sanitize.js";

const MEANING: Record<string, string> = {
  ENOSPC: "no space left on the device (the disk is full)",
  EDQUOT: "the disk quota is exhausted",
  EFBIG: "the file is larger than the system allows (ulimit -f)",
  EROFS: "the file system is read-only",
  EACCES: "permission denied",
  EPERM: "operation not permitted",
  ENOENT: "no such file or folder",
  ENOTDIR: "a part of the path is not a folder",
  EISDIR: "it is a folder, not a file",
  EEXIST: "it already exists",
  ENAMETOOLONG: "the name is too long",
  EMFILE: "too many open files",
  ENOMEM: "out of memory",
  EIO: "input/output error of the device",
};

/** The meaning of an errno code in words (the code itself when unknown). */
export function errnoMeaning(code: string): string {
  return MEANING[code] ?? code;
}

/** A one-line message for a Node.js system error with a code (and usually a path); undefined for other errors. */
export function systemErrorMessage(e: unknown): string | undefined {
  const err = e as NodeJS.ErrnoException | undefined;
  if (!err || typeof err !== "object" || typeof err.code !== "string" || !/^E[A-Z]+$/.test(err.code)) return undefined;
  const target = typeof err.path === "string" ? `${fileName(err.path)}: ` : "";
  const what = typeof err.syscall === "string" ? ` (${err.syscall})` : "";
  return `${target}${errnoMeaning(err.code)}${what}`;
}
