/**
 * Dense storage of an object's attributes and links, read from the HDF5 file
 * format's own structures (the HDF5 File Format Specification, version 3):
 * the records of a version-2 B-tree (a leaf, or a root over leaves) and the
 * objects of a fractal heap they point to (managed objects in the root
 * direct block or in the direct blocks of the root indirect block, and huge
 * objects). Anything deeper or filtered throws; callers then read through h5wasm.
 */
import { address, bytesAt, uintAt } from "./h5-file.js";

/** Bytes needed to encode the number `n` (HDF5's H5VM_limit_enc_size). */
const encodedSize = (n: number): number => Math.floor(Math.log2(n) / 8) + 1;

/** The records of the version-2 B-tree at `at` (base added), in order. */
export function btreeRecords(fd: number, at: number, base: number): Buffer[] {
  const h = bytesAt(fd, at, 38);
  if (h.toString("latin1", 0, 4) !== "BTHD" || h[4] !== 0) throw new RangeError("not a version-2 B-tree");
  const [nodeSize, recordSize, depth] = [h.readUInt32LE(6), h.readUInt16LE(10), h.readUInt16LE(12)];
  const rootCount = h.readUInt16LE(24);
  if (depth > 1) throw new RangeError("a B-tree deeper than one level");
  if (rootCount === 0) return [];
  const node = (where: number, count: number, leaf: boolean): Buffer[] => {
    const b = bytesAt(fd, base + where, nodeSize);
    if (b.toString("latin1", 0, 4) !== (leaf ? "BTLF" : "BTIN")) throw new RangeError("not a B-tree node");
    return Array.from({ length: count }, (_, i) => b.subarray(6 + i * recordSize, 6 + (i + 1) * recordSize));
  };
  const root = address(h, 16);
  if (depth === 0) return node(root, rootCount, true);
  const b = bytesAt(fd, base + root, nodeSize);
  if (b.toString("latin1", 0, 4) !== "BTIN") throw new RangeError("not a B-tree node");
  const countSize = encodedSize(Math.floor((nodeSize - 10) / recordSize));
  const out: Buffer[] = [];
  for (let i = 0; i <= rootCount; i++) {
    const child = 6 + rootCount * recordSize + i * (8 + countSize);
    out.push(...node(address(b, child), uintAt(b, child + 8, countSize), true));
    if (i < rootCount) out.push(b.subarray(6 + i * recordSize, 6 + (i + 1) * recordSize));
  }
  return out;
}

/** A fractal heap: its objects by heap ID. */
export class FractalHeap {
  private readonly h: Buffer;
  private readonly blocks = new Map<number, Buffer>();
  private readonly offsetSize: number;
  private readonly lengthSize: number;

  constructor(
    private readonly fd: number,
    private readonly base: number,
    at: number,
  ) {
    this.h = bytesAt(fd, base + at, 146);
    if (this.h.toString("latin1", 0, 4) !== "FRHP" || this.h[4] !== 0) throw new RangeError("not a fractal heap");
    if (this.h.readUInt16LE(7) !== 0) throw new RangeError("a filtered fractal heap");
    this.offsetSize = Math.ceil(this.h.readUInt16LE(128) / 8);
    const maxDirect = uintAt(this.h, 120, 8);
    this.lengthSize = Math.min(Math.ceil(Math.log2(maxDirect) / 8), encodedSize(this.h.readUInt32LE(10)));
  }

  /** The heap ID's length in bytes. */
  get idLength(): number {
    return this.h.readUInt16LE(5);
  }

  /** The object of heap ID `id`. */
  object(id: Buffer): Buffer {
    if (id[0]! >> 6 !== 0) throw new RangeError("unknown heap ID version");
    const kind = (id[0]! >> 4) & 0x03;
    // a huge object's ID holds its address and length when it has room for them, else a key of the huge objects' B-tree
    if (kind === 1 && this.idLength >= 17) return bytesAt(this.fd, this.base + address(id, 1), uintAt(id, 9, 8));
    if (kind === 1) return this.huge(uintAt(id, 1, Math.min(this.idLength - 1, 8)));
    if (kind !== 0) throw new RangeError("tiny heap objects not read");
    const offset = uintAt(id, 1, this.offsetSize);
    const length = uintAt(id, 1 + this.offsetSize, this.lengthSize);
    const { at, start, size } = this.directBlock(offset);
    let block = this.blocks.get(at);
    if (!block) this.blocks.set(at, (block = bytesAt(this.fd, this.base + at, size)));
    if (block.toString("latin1", 0, 4) !== "FHDB") throw new RangeError("not a direct block");
    return block.subarray(offset - start, offset - start + length);
  }

  /** The direct block holding heap offset `offset`: its address, its first offset and its size. */
  private directBlock(offset: number): { at: number; start: number; size: number } {
    const [width, startSize, maxDirect] = [this.h.readUInt16LE(110), uintAt(this.h, 112, 8), uintAt(this.h, 120, 8)];
    const rootAt = address(this.h, 132);
    const rows = this.h.readUInt16LE(140);
    if (rows === 0) return { at: rootAt, start: 0, size: startSize };
    const blockSize = (row: number): number => startSize * 2 ** Math.max(0, row - 1);
    let start = 0;
    for (let row = 0; row < rows; row++) {
      const size = blockSize(row);
      if (offset < start + width * size) {
        if (size > maxDirect) throw new RangeError("an object beyond the root's direct blocks");
        const col = Math.floor((offset - start) / size);
        const entry = bytesAt(this.fd, this.base + rootAt + 5 + 8 + this.offsetSize + 8 * (row * width + col), 8);
        return { at: address(entry, 0), start: start + col * size, size };
      }
      start += width * size;
    }
    throw new RangeError("a heap offset beyond the root indirect block");
  }

  /** A huge object, found by its ID in the heap's B-tree of huge objects (records: address, length, ID). */
  private huge(id: number): Buffer {
    for (const r of btreeRecords(this.fd, this.base + address(this.h, 22), this.base)) {
      if (r.length === 24 && uintAt(r, 16, 8) === id) return bytesAt(this.fd, this.base + address(r, 0), uintAt(r, 8, 8));
    }
    throw new RangeError("huge heap object not found");
  }
}
