/**
 * The HDF5 file format's lowest structures, read straight from a file
 * descriptor (the HDF5 File Format Specification, version 3): the superblock
 * (versions 0–3, 8-byte offsets and lengths only) and the messages of an
 * object header (versions 1 and 2, with their continuation blocks). Anything
 * this reader does not place throws; its callers then read through h5wasm.
 */
import fs from "node:fs";

/** Object header message types this reader uses. */
export const MSG = {
  dataspace: 0x01,
  linkInfo: 0x02,
  datatype: 0x03,
  link: 0x06,
  external: 0x07,
  layout: 0x08,
  filters: 0x0b,
  attribute: 0x0c,
  continuation: 0x10,
  symbolTable: 0x11,
  attributeInfo: 0x15,
} as const;

/** The undefined address (all bits set). */
const UNDEFINED = 0xffffffffffffffffn;

export interface Message {
  readonly type: number;
  readonly data: Buffer;
}

/** `length` bytes from byte `at` of the file (an error when the file is shorter); small ones from the cached blocks of withBlocks. */
export function bytesAt(fd: number, at: number, length: number): Buffer {
  if (cache?.fd === fd && length <= BLOCK_BYTES && Math.floor(at / BLOCK_BYTES) === Math.floor((at + length - 1) / BLOCK_BYTES)) {
    const start = at % BLOCK_BYTES;
    const block = cachedBlock(fd, at - start);
    if (block.length < start + length) throw new RangeError(`short read at ${at}`);
    return block.subarray(start, start + length);
  }
  const b = Buffer.alloc(length);
  if (fs.readSync(fd, b, 0, length, at) !== length) throw new RangeError(`short read at ${at}`);
  if (cache?.fd === fd) cache.direct.push({ at, length, data: b });
  return b;
}

/**
 * Small reads of a file's structures go through blocks of this size, each read once while withBlocks runs: a
 * snapshot's metadata takes dozens of small reads (a fractal heap's root entries again and again) from a few blocks.
 */
const BLOCK_BYTES = 4096;
let cache: { readonly fd: number; readonly blocks: Map<number, Buffer>; readonly direct: ReadRange[] } | undefined;

/** A read of a file's structures: `length` bytes asked for at byte `at`, and the bytes it gave. */
export interface ReadRange {
  readonly at: number;
  readonly length: number;
  readonly data: Buffer;
}

/** The block of the file at `at` (a multiple of BLOCK_BYTES), shorter at the file's end. */
function cachedBlock(fd: number, at: number): Buffer {
  let block = cache!.blocks.get(at);
  if (!block) {
    const b = Buffer.alloc(BLOCK_BYTES);
    block = b.subarray(0, fs.readSync(fd, b, 0, BLOCK_BYTES, at));
    cache!.blocks.set(at, block);
  }
  return block;
}

/** `read()` with small reads of `fd` served from blocks read once (the file must not change meanwhile). */
export function withBlocks<T>(fd: number, read: () => T): T {
  return withReads(fd, read).value;
}

/** What `read()` gives (as withBlocks) and every read of the file it made: what it depends on of the file. */
export function withReads<T>(fd: number, read: () => T): { value: T; reads: ReadRange[] } {
  const outer = cache;
  const mine = { fd, blocks: new Map<number, Buffer>(), direct: [] as ReadRange[] };
  cache = mine;
  try {
    const value = read();
    return { value, reads: [...[...mine.blocks].map(([at, data]) => ({ at, length: BLOCK_BYTES, data })), ...mine.direct] };
  } finally {
    cache = outer;
  }
}

/** The 8-byte address at `at` of `b` (an error for the undefined address). */
export const address = (b: Buffer, at: number): number => {
  const a = b.readBigUInt64LE(at);
  if (a === UNDEFINED || a > BigInt(Number.MAX_SAFE_INTEGER)) throw new RangeError("undefined address");
  return Number(a);
};

/** Whether the 8-byte address at `at` of `b` is the undefined one. */
export const isUndefined = (b: Buffer, at: number): boolean => b.readBigUInt64LE(at) === UNDEFINED;

/** An unsigned little-endian integer of `size` bytes (1–8) at `at`. */
export function uintAt(b: Buffer, at: number, size: number): number {
  let v = 0;
  for (let i = size - 1; i >= 0; i--) v = v * 256 + b[at + i]!;
  if (v > Number.MAX_SAFE_INTEGER) throw new RangeError("integer beyond 2^53");
  return v;
}

/** The base address and the root group's object header address of a file whose superblock is at byte 0 with 8-byte offsets and lengths. */
export function superblock(fd: number): { base: number; root: number } {
  const b = bytesAt(fd, 0, 96);
  if (b.toString("latin1", 0, 8) !== "\x89HDF\r\n\x1a\n") throw new RangeError("no superblock at byte 0");
  const version = b[8]!;
  if (version >= 2) {
    if (b[9] !== 8 || b[10] !== 8) throw new RangeError("offsets or lengths not of 8 bytes");
    return { base: address(b, 12), root: address(b, 36) };
  }
  if (b[13] !== 8 || b[14] !== 8) throw new RangeError("offsets or lengths not of 8 bytes");
  const at = version === 0 ? 24 : 28;
  // the root group's symbol table entry follows four addresses: its object header address is its second field
  return { base: address(b, at), root: address(b, at + 32 + 8) };
}

/** The blocks (file position, length) of an object header's first chunk, and whether it is of version 2. */
function firstChunk(fd: number, at: number): { v2: boolean; flags: number; block: [number, number] } {
  const head = bytesAt(fd, at, 24);
  if (head.toString("latin1", 0, 4) === "OHDR") {
    if (head[4] !== 2) throw new RangeError("unknown object header version");
    const flags = head[5]!;
    const start = 6 + (flags & 0x20 ? 16 : 0) + (flags & 0x10 ? 4 : 0);
    const sizeBytes = 1 << (flags & 3);
    return { v2: true, flags, block: [at + start + sizeBytes, uintAt(head, start, sizeBytes)] };
  }
  if (head[0] !== 1) throw new RangeError("unknown object header version");
  return { v2: false, flags: 0, block: [at + 16, head.readUInt32LE(8)] };
}

/** The messages (type, data) of the object header at file position `at` (base added) and of its continuation blocks. */
export function headerMessages(fd: number, base: number, at: number): Message[] {
  const out: Message[] = [];
  const { v2, flags, block } = firstChunk(fd, base + at);
  const blocks: [number, number][] = [block];
  const headerSize = v2 ? 4 + (flags & 0x04 ? 2 : 0) : 8;
  for (let i = 0; i < blocks.length; i++) {
    const [from, length] = blocks[i]!;
    const data = bytesAt(fd, from, length);
    // a version-2 continuation block starts with "OCHK" and ends with a checksum; version 1 has neither
    if (v2 && i > 0 && data.toString("latin1", 0, 4) !== "OCHK") throw new RangeError("not a continuation block");
    let p = v2 && i > 0 ? 4 : 0;
    const end = v2 && i > 0 ? length - 4 : length;
    while (p + headerSize <= end) {
      const type = v2 ? data[p]! : data.readUInt16LE(p);
      const size = v2 ? data.readUInt16LE(p + 1) : data.readUInt16LE(p + 2);
      const messageFlags = v2 ? data[p + 3]! : data[p + 4]!;
      const body = data.subarray(p + headerSize, p + headerSize + size);
      if (messageFlags & 0x02 && type !== 0) throw new RangeError("shared message");
      if (type === MSG.continuation) blocks.push([base + address(body, 0), Number(body.readBigUInt64LE(8))]);
      else if (type !== 0) out.push({ type, data: body });
      p += headerSize + size;
    }
  }
  return out;
}
