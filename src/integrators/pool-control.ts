/**
 * The shared words through which the main thread and the step's worker
 * threads talk while the main thread is blocked in Atomics.wait (events and
 * messages are not delivered then): a countdown of unfinished ranges, the
 * number of the task in flight, and per worker slot its state, the last task
 * it took, and room for the message of its failure.
 *
 * Int32 words: 0 the countdown, 1 the task number, then two words per slot s
 * (1 … size − 1): 2s its state, 2s + 1 the task it took last.
 */

/** Word of the countdown of unfinished ranges (the main thread waits on it). */
export const PENDING = 0;
/** Word of the number of the task in flight. */
export const TASK = 1;

/** Values of a worker's state word. */
export const WorkerState = { Starting: 0, Ready: 1, Failed: 2, Exited: 3 } as const;

/** Bytes of UTF-8 kept of a worker's failure message. */
export const MESSAGE_BYTES = 1024;

/** Index of a slot's state word. */
export function stateWord(slot: number): number {
  return 2 * slot;
}

/** Index of the word holding the task a slot took last. */
export function takenWord(slot: number): number {
  return 2 * slot + 1;
}

/** Int32 words of the control block for `size` threads. */
export function controlWords(size: number): number {
  return 2 * Math.max(size, 1);
}

/** A slot's failure message bytes in the shared message buffer. */
export function messageView(messages: SharedArrayBuffer, slot: number): Uint8Array {
  return new Uint8Array(messages, MESSAGE_BYTES * slot, MESSAGE_BYTES);
}

/** Write a failure message (truncated to fit, zero-terminated) into a slot's bytes. */
export function writeMessage(view: Uint8Array, text: string): void {
  view.fill(0);
  const bytes = new TextEncoder().encode(text);
  view.set(bytes.subarray(0, view.length - 1));
}

/** Read a slot's failure message. */
export function readMessage(view: Uint8Array): string {
  const copy = view.slice();
  const end = copy.indexOf(0);
  return new TextDecoder().decode(end < 0 ? copy : copy.subarray(0, end));
}

/** Mark a slot failed with a message and wake the main thread. */
export function reportFailure(control: Int32Array, messages: SharedArrayBuffer, slot: number, text: string): void {
  writeMessage(messageView(messages, slot), text);
  Atomics.store(control, stateWord(slot), WorkerState.Failed);
  Atomics.notify(control, PENDING);
}
