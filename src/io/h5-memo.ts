/**
 * What a file's structures parse to (a snapshot's metadata, where its
 * datasets lie), kept for the file's path and given again only while every
 * byte the parse read is still the same at the same place: those bytes are
 * read again and compared, a few small reads instead of decoding them anew
 * (the root's attributes and the chunk index of a 128³ snapshot: 6 reads). A
 * file changed in any byte the parse depends on, or replaced, is parsed anew.
 */
import fs from "node:fs";
import { withReads, type ReadRange } from "./h5-file.js";

/** Files whose parse is kept (the latest used). */
const KEEP = 8;
const kept = new Map<string, { readonly reads: readonly ReadRange[]; readonly value: unknown }>();
let scratch = Buffer.alloc(0);

/** Whether every read of `reads` gives the same bytes from `fd` again. */
function unchanged(fd: number, reads: readonly ReadRange[]): boolean {
  for (const r of reads) {
    if (scratch.length < r.length) scratch = Buffer.alloc(Math.max(r.length, 2 * scratch.length));
    const n = fs.readSync(fd, scratch, 0, r.length, r.at);
    if (n !== r.data.length || !scratch.subarray(0, n).equals(r.data)) return false;
  }
  return true;
}

/**
 * `parse()` of the open file `fd` (its structures read through bytesAt, as withBlocks), or what it gave for `key`
 * before when the bytes it read are unchanged; a parse that throws is not kept. The value is shared between calls:
 * callers copy what they hand on for changing.
 */
export function parsedOnce<T>(fd: number, key: string, parse: () => T): T {
  const known = kept.get(key);
  kept.delete(key);
  if (known && unchanged(fd, known.reads)) {
    kept.set(key, known);
    return known.value as T;
  }
  const { value, reads } = withReads(fd, parse);
  kept.set(key, { reads, value });
  if (kept.size > KEEP) kept.delete(kept.keys().next().value!);
  return value;
}

/** Forget every kept parse (tests). */
export function forgetParses(): void {
  kept.clear();
}
