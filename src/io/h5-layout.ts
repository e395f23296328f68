/**
 * Where a dataset's values lie in an HDF5 file, read from the file format's
 * own structures (the HDF5 File Format Specification, version 3: superblock,
 * object header messages, the layout message (version 3, and version 4's
 * contiguous form), version 1 B-trees of raw data chunks), so that they can be read straight into a
 * buffer with one system call per piece instead of through h5wasm. Only the
 * simple case is placed: little-endian floating point, a contiguous dataset
 * or one chunked by whole rows along its first axis, with no filters, no
 * external storage and every chunk written; anything else is `undefined` and the caller reads through h5wasm.
 */
import { MSG, address, bytesAt, headerMessages, superblock } from "./h5-file.js";

/** Rows [row, row + rows) of the dataset start at byte `at` of the file, one after another. */
export interface Piece {
  readonly row: number;
  readonly rows: number;
  readonly at: number;
}

/** The chunks' addresses of a version-1 B-tree of raw data chunks, by their first-axis offset. */
function btreeChunks(fd: number, base: number, at: number, dims: number, chunkBytes: number, found: Map<number, number>): void {
  const keyBytes = 8 + 8 * dims;
  const head = bytesAt(fd, base + at, 24);
  if (head.toString("latin1", 0, 4) !== "TREE" || head[4] !== 1) throw new RangeError("not a chunk B-tree node");
  const level = head[5]!;
  const entries = head.readUInt16LE(6);
  const body = bytesAt(fd, base + at + 24, entries * (keyBytes + 8) + keyBytes);
  for (let i = 0; i < entries; i++) {
    const key = i * (keyBytes + 8);
    const child = address(body, key + keyBytes);
    if (level > 0) {
      btreeChunks(fd, base, child, dims, chunkBytes, found);
      continue;
    }
    if (body.readUInt32LE(key) !== chunkBytes || body.readUInt32LE(key + 4) !== 0) throw new RangeError("filtered or odd chunk");
    for (let d = 1; d < dims; d++) if (body.readBigUInt64LE(key + 8 + 8 * d) !== 0n) throw new RangeError("chunk not of whole rows");
    found.set(Number(body.readBigUInt64LE(key + 8)), base + child);
  }
}

/** The pieces of a dataset chunked by `chunkRows` whole rows, from its chunk B-tree; every chunk must be there. */
function chunkedPieces(fd: number, base: number, btree: number, shape: readonly number[], chunkRows: number, chunkBytes: number): Piece[] {
  const found = new Map<number, number>();
  btreeChunks(fd, base, btree, shape.length + 1, chunkBytes, found);
  const pieces: Piece[] = [];
  const rows = shape[0]!;
  for (let row = 0; row < rows; row += chunkRows) {
    const at = found.get(row);
    if (at === undefined) throw new RangeError("a chunk was never written");
    pieces.push({ row, rows: Math.min(chunkRows, rows - row), at });
  }
  if (found.size !== pieces.length) throw new RangeError("chunks beyond the rows");
  return pieces;
}

/** The pieces a layout message describes, for a dataset of `shape` and values of `valueBytes`. */
export function layoutPieces(fd: number, base: number, data: Buffer, shape: readonly number[], valueBytes: number): Piece[] {
  const version = data[0]!;
  const kind = data[1]!;
  if ((version !== 3 && version !== 4) || kind === 0 || kind > 2) throw new RangeError("layout not placed");
  if (kind === 1) {
    if (Number(data.readBigUInt64LE(10)) !== shape.reduce((p, n) => p * n, valueBytes)) throw new RangeError("contiguous size");
    return [{ row: 0, rows: shape[0]!, at: base + address(data, 2) }];
  }
  // version 4 indexes chunks by other structures (fixed and extensible arrays, version-2 B-trees): read through h5wasm
  if (version !== 3 || data[2] !== shape.length + 1) throw new RangeError("chunk index not placed");
  const chunk = Array.from({ length: shape.length + 1 }, (_, d) => data.readUInt32LE(11 + 4 * d));
  if (chunk[shape.length] !== valueBytes || chunk.slice(1, -1).some((n, d) => n !== shape[d + 1])) throw new RangeError("chunks not of whole rows");
  return chunkedPieces(fd, base, address(data, 3), shape, chunk[0]!, chunk.reduce((p, n) => p * n, 1));
}

/**
 * The pieces of the dataset whose object header is at `header` (its object
 * reference), of `shape` and values of `valueBytes`, in row order; undefined
 * when its layout is not a simple one.
 */
export function placeRows(fd: number, header: number, shape: readonly number[], valueBytes: number): Piece[] | undefined {
  if (shape.length === 0 || shape.some((n) => n === 0)) return undefined;
  try {
    const { base } = superblock(fd);
    const messages = headerMessages(fd, base, header);
    if (messages.some((m) => m.type === MSG.filters || m.type === MSG.external)) return undefined;
    const layout = messages.filter((m) => m.type === MSG.layout);
    const type = messages.find((m) => m.type === MSG.datatype)?.data;
    // a floating-point type (class 1) of little-endian byte order (bit 0 of its bit field clear) and of valueBytes
    if (!type || (type[0]! & 0x0f) !== 1 || type[1]! & 0x01 || type.readUInt32LE(4) !== valueBytes) return undefined;
    return layout.length === 1 ? layoutPieces(fd, base, layout[0]!.data, shape, valueBytes) : undefined;
  } catch {
    return undefined;
  }
}
