/**
 * Blocks of a grid's rows for the diagnostics' passes that run on the step's
 * thread pool (block-tasks.ts): a fixed number of blocks whatever the thread
 * count, each summing into its own slots of a shared array, the blocks' sums
 * then added in block order, so that a result is the same bit for bit on
 * any number of threads.
 */

/** Rows of the last axis and how many blocks they fall into (the same on any number of threads). */
export interface RowBlocks {
  readonly rows: number;
  readonly blocks: number;
  /** Cells in a row (the length of the last axis). */
  readonly n2: number;
}

/** The most blocks a pass has: few enough for the sums to stay small, enough for two threads to share the work evenly. */
export const MAX_BLOCKS = 64;

/** The blocks of a shape's rows (MAX_BLOCKS, or one a row when there are fewer rows). */
export function rowBlocks(shape: readonly [number, number, number]): RowBlocks {
  const rows = shape[0] * shape[1];
  return { rows, blocks: Math.min(rows, MAX_BLOCKS), n2: shape[2] };
}

/** The rows [first, end) of block u. */
export function blockRows(at: RowBlocks, u: number): [number, number] {
  return [Math.floor((u * at.rows) / at.blocks), Math.floor(((u + 1) * at.rows) / at.blocks)];
}

/** Add the blocks' sums (`length` entries each) into `total`, block by block in order; `sums` is zeroed for the next pass. */
export function addBlockSums(sums: Float64Array, blocks: number, length: number, total: Float64Array): void {
  for (let u = 0; u < blocks; u++) for (let i = 0; i < length; i++) total[i] = total[i]! + sums[u * length + i]!;
  sums.fill(0);
}

/** A zeroed Float64Array on shared memory (other threads can write it). */
export function sharedFloats(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(8 * length));
}
