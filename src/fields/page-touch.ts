/**
 * First touch of fresh shared memory, meant for a thread other than the one
 * that will use it. The first write to each page of new memory is a page
 * fault, which on some machines costs more than the arithmetic that follows
 * (about 3 ms per MiB measured on a 2-core virtual machine: 0.1 s for a
 * 32 MiB grid), so a worker thread that touches the pages while the owner
 * does something else (reads a file) takes the faults off the owner's
 * critical path.
 *
 * The write is `Atomics.add(…, 0)`: an atomic read-modify-write that leaves
 * the value as it is, so the owner may write the same memory meanwhile
 * without any value being lost (a plain store of zero could overwrite a
 * value just written).
 */

/** One range of shared memory to touch: its buffer, byte offset and length, and whether to go from its end down (to meet a writer that starts at its beginning). */
export interface TouchRange {
  readonly buffer: SharedArrayBuffer;
  readonly byteOffset: number;
  readonly byteLength: number;
  readonly downward: boolean;
}

/** The range of a view on shared memory, or undefined when it is not on a SharedArrayBuffer (then only its owner can touch it). */
export function touchRangeOf(view: ArrayBufferView, downward = false): TouchRange | undefined {
  if (!(view.buffer instanceof SharedArrayBuffer) || view.byteOffset % 4 !== 0) return undefined;
  return { buffer: view.buffer, byteOffset: view.byteOffset, byteLength: view.byteLength, downward };
}

/** Bytes of a memory page (the common 4 KiB; touching more often than that costs little). */
const PAGE_BYTES = 4096;

/** Write every page of the range once, without changing a value. */
export function touchPages(range: TouchRange): void {
  const words = new Int32Array(range.buffer, range.byteOffset, range.byteLength >> 2);
  const step = PAGE_BYTES >> 2;
  if (range.downward) for (let i = words.length - 1; i >= 0; i -= step) Atomics.add(words, i, 0);
  else for (let i = 0; i < words.length; i += step) Atomics.add(words, i, 0);
}
