/**
 * Atomic file writes: write a temporary file in the same folder, fsync it,
 * rename it over the target and fsync the folder, so a killed process leaves
 * either the old file or the new one, never a torn one. Writes made inside
 * `writeTogether` are made durable together at its end: their fsyncs run at
 * once on the thread pool instead of one after another on the main thread.
 */
import { AsyncLocalStorage } from "node:async_hooks";
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

let sequence = 0;

/** The hidden temporary name an atomic write of `file` uses (same folder, so rename is atomic; unique within the process). */
export function temporaryPathFor(file: string): string {
  const dir = path.dirname(path.resolve(file));
  sequence = (sequence + 1) % 1000;
  return path.join(dir, `.${path.basename(file)}.tmp-${process.pid}-${Date.now()}${String(sequence).padStart(3, "0")}`);
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

/** A finished temporary file and the name it takes once durable. */
interface Pending {
  readonly tmp: string;
  readonly file: string;
}

/** The writes of one writeTogether, while it is open. */
interface Group {
  readonly pending: Pending[];
  open: boolean;
}

const groups = new AsyncLocalStorage<Group>();

/**
 * Give the finished temporary file `tmp` its final name `file` durably: fsync
 * it, rename it, fsync the folder; inside writeTogether, at its end. Errors
 * name `file` (the temporary is removed).
 */
export function commitAtomic(tmp: string, file: string): void {
  const group = groups.getStore();
  if (group?.open) {
    group.pending.push({ tmp, file });
    return;
  }
  try {
    fsyncPath(tmp);
    fs.renameSync(tmp, file);
  } catch (e) {
    discard([{ tmp, file }]);
    throw writeFailure(file, e);
  }
  fsyncFolder(path.dirname(path.resolve(file)));
}

/** Remove the temporaries of writes that will not be committed. */
function discard(pending: readonly Pending[]): void {
  for (const p of pending) {
    try {
      fs.unlinkSync(p.tmp);
    } catch {
      /* nothing left to clean */
    }
  }
}

/** fsync a file on the thread pool. */
async function fsyncLater(file: string): Promise<void> {
  const handle = await fs.promises.open(file, "r");
  try {
    await handle.sync();
  } finally {
    await handle.close();
  }
}

/** Make a group's writes durable: every fsync at once, then the renames in order, then each folder once. */
async function commitGroup(pending: readonly Pending[]): Promise<void> {
  const synced = await Promise.allSettled(pending.map((p) => fsyncLater(p.tmp)));
  const failed = synced.findIndex((r) => r.status === "rejected");
  if (failed >= 0) {
    discard(pending);
    throw writeFailure(pending[failed]!.file, (synced[failed] as PromiseRejectedResult).reason);
  }
  pending.forEach((p, i) => {
    try {
      fs.renameSync(p.tmp, p.file);
    } catch (e) {
      discard(pending.slice(i));
      throw writeFailure(p.file, e);
    }
  });
  for (const dir of new Set(pending.map((p) => path.dirname(path.resolve(p.file))))) fsyncFolder(dir);
}

/**
 * Run `body` with its atomic writes made durable together: each writes its
 * temporary file at once, and when `body` is done all are fsynced at once on
 * the thread pool, renamed to their names in the order written, and each
 * folder fsynced once. Until then no file appears under its final name; if
 * `body` fails, the temporaries are removed (a killed process leaves hidden
 * ones that cleanStaleTemporaries removes). Nested, the outermost commits.
 */
export async function writeTogether<T>(body: () => Promise<T>): Promise<T> {
  if (groups.getStore()?.open) return body();
  const group: Group = { pending: [], open: true };
  let value: T;
  try {
    value = await groups.run(group, body);
  } catch (e) {
    group.open = false;
    discard(group.pending);
    throw e;
  }
  group.open = false;
  await commitGroup(group.pending);
  return value;
}

/** Write `data` to `file` atomically (durable now, or at the end of the writeTogether it is part of). */
export function writeFileAtomic(file: string, data: string | Uint8Array): void {
  const tmp = temporaryPathFor(file);
  try {
    fs.writeFileSync(tmp, data);
  } catch (e) {
    discard([{ tmp, file }]);
    throw writeFailure(file, e);
  }
  commitAtomic(tmp, file);
}
