/**
 * The run-folder lock: `.psibox-lock`, created atomically (written aside,
 * then hard-linked into place, which fails if a lock exists) and held for a
 * whole run. It records the process id, the host, the process's start time
 * and when it was taken. A lock left by a killed run on this host (its
 * process is gone, or the id now belongs to a process started later) is
 * stale: it is removed, under a short second lock so that two runs cleaning
 * the same stale lock cannot remove each other's fresh one, and the caller is
 * told. A lock of another host cannot be checked and is reported.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";

/** The lock file's name inside a run folder. */
export const LOCK_NAME = ".psibox-lock";

interface LockInfo {
  readonly pid: number;
  readonly host: string;
  /** Start time of the process, in clock ticks since boot (Linux), or null where unknown. */
  readonly started: number | null;
  readonly since: string;
}

/** A lock held by this process. */
export interface RunLock {
  readonly file: string;
  /** What was cleaned on the way (a stale lock), for the user. */
  readonly notes: readonly string[];
  release(): void;
}

/** Start time of process `pid` in clock ticks since boot, from /proc (null where not available). */
function processStart(pid: number): number | null {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    const v = Number(fields[19]);
    return Number.isFinite(v) ? v : null;
  } catch {
    return null;
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM";
  }
}

function parse(text: string): LockInfo | undefined {
  try {
    const v = JSON.parse(text) as Partial<LockInfo>;
    if (typeof v.pid === "number" && typeof v.host === "string") return { pid: v.pid, host: v.host, started: typeof v.started === "number" ? v.started : null, since: String(v.since ?? "") };
  } catch {
    /* unreadable */
  }
  return undefined;
}

/** Is a lock's owner gone? Only decidable on its own host. */
function isStale(info: LockInfo): boolean {
  if (info.host !== os.hostname()) return false;
  if (info.pid === process.pid) return false;
  if (!alive(info.pid)) return true;
  const now = processStart(info.pid);
  return info.started !== null && now !== null && now !== info.started;
}

function tryCreate(file: string, text: string): boolean {
  const tmp = `${file}.${process.pid}.${Date.now()}.new`;
  fs.writeFileSync(tmp, text);
  try {
    fs.linkSync(tmp, file);
    return true;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === "EEXIST") return false;
    throw e;
  } finally {
    fs.rmSync(tmp, { force: true });
  }
}

/** Remove `file` if it still holds exactly `text`, under a short cleaning lock; true if removed. */
function removeIfUnchanged(file: string, text: string): boolean {
  const cleaning = `${file}.cleaning`;
  if (!tryCreate(cleaning, JSON.stringify({ pid: process.pid, host: os.hostname(), started: processStart(process.pid), since: new Date().toISOString() }))) {
    const holder = parse(readOrEmpty(cleaning));
    if (holder && isStale(holder)) fs.rmSync(cleaning, { force: true });
    return false;
  }
  try {
    if (readOrEmpty(file) !== text) return false;
    fs.rmSync(file, { force: true });
    return true;
  } finally {
    fs.rmSync(cleaning, { force: true });
  }
}

function readOrEmpty(file: string): string {
  try {
    return fs.readFileSync(file, "utf8");
  } catch {
    return "";
  }
}

function sleep(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/** Take the lock of run folder `dir` (which must exist); throws an InputError naming the holder when it is in use. */
export function lockRunFolder(dir: string): RunLock {
  const file = path.join(dir, LOCK_NAME);
  const mine: LockInfo = { pid: process.pid, host: os.hostname(), started: processStart(process.pid), since: new Date().toISOString() };
  const text = JSON.stringify(mine) + "\n";
  const notes: string[] = [];
  for (let attempt = 0; attempt < 200; attempt++) {
    if (tryCreate(file, text)) {
      let held = true;
      return {
        file,
        notes,
        release() {
          if (held && readOrEmpty(file) === text) fs.rmSync(file, { force: true });
          held = false;
        },
      };
    }
    const found = readOrEmpty(file);
    const info = parse(found);
    if (info && !isStale(info)) {
      const where = info.host === os.hostname() ? `process ${info.pid}` : `process ${info.pid} on host ${fileName(info.host)}`;
      const hint = info.host === os.hostname() ? "wait for it to end or choose another output.dir" : `if that run is gone, delete ${fileName(file)}`;
      throw new InputError(`run folder ${fileName(dir)} is in use by psibox ${where} (since ${fileName(info.since)}); ${hint}`);
    }
    if (info && removeIfUnchanged(file, found)) {
      notes.push(`removed a stale lock of process ${info.pid} on this host (started ${fileName(info.since)}; that process is gone)`);
      continue;
    }
    if (!info && found === "" && !fs.existsSync(file)) continue;
    if (!info && attempt > 50) {
      if (removeIfUnchanged(file, found)) notes.push(`removed an unreadable lock file ${fileName(file)}`);
      continue;
    }
    sleep(20);
  }
  throw new InputError(`run folder ${fileName(dir)}: could not take its lock ${fileName(file)}; remove it if no psibox run uses the folder`);
}

/** Who holds run folder `dir`'s lock, when a live process does (or one on another host, which cannot be checked). */
export function lockHolder(dir: string): { readonly pid: number; readonly host: string; readonly since: string } | undefined {
  const info = parse(readOrEmpty(path.join(dir, LOCK_NAME)));
  return info && !isStale(info) ? { pid: info.pid, host: info.host, since: info.since } : undefined;
}
