/**
 * An HDF5 file's root group read without h5wasm, from the file format's own
 * structures: its attributes (in the object header, or in dense storage) and
 * its links to datasets (in the object header, or in dense storage), and each
 * such dataset's shape, value type and the pieces of the file its rows lie in
 * (h5-layout.ts). Groups of the earliest format (symbol tables), shared
 * messages and every other unusual structure throw; callers then read through h5wasm.
 */
import { AttributeReader } from "./h5-attrs.js";
import { FractalHeap, btreeRecords } from "./h5-dense.js";
import { MSG, address, headerMessages, isUndefined, superblock, type Message } from "./h5-file.js";
import { layoutPieces, type Piece } from "./h5-layout.js";
import { attributeMessage, dataspaceDims, datatypeOf, linkMessage, type HeapCache } from "./h5-values.js";

/** The heap objects of a dense storage (its fractal heap at `heapAt`, its index B-tree at `indexAt`); `idAt`: the heap ID's place in a record. */
function denseObjects(fd: number, base: number, heapAt: number, indexAt: number, idAt: number): Buffer[] {
  const heap = new FractalHeap(fd, base, heapAt);
  return btreeRecords(fd, base + indexAt, base).map((r) => heap.object(r.subarray(idAt, idAt + heap.idLength)));
}

/** A node's attributes decoded from its object header's messages, each value once, on demand. */
export class NativeAttributes extends AttributeReader {
  private readonly messages = new Map<string, ReturnType<typeof attributeMessage>>();
  private readonly values = new Map<string, unknown>();
  private readonly heap: HeapCache = new Map();

  constructor(
    private readonly fd: number,
    private readonly base: number,
    header: readonly Message[],
  ) {
    super();
    const raw = header.filter((m) => m.type === MSG.attribute).map((m) => m.data);
    const info = header.find((m) => m.type === MSG.attributeInfo)?.data;
    if (info && info[0] !== 0) throw new RangeError("unknown attribute info version");
    const at = info && info[1]! & 0x01 ? 4 : 2;
    if (info && !isUndefined(info, at)) {
      // creation order index when there is one (the order h5wasm lists), else the name index; records begin with the heap ID
      const index = info[1]! & 0x02 ? info.readBigUInt64LE(at + 16) : info.readBigUInt64LE(at + 8);
      raw.push(...denseObjects(fd, base, address(info, at), Number(index), 0));
    }
    for (const b of raw) {
      const m = attributeMessage(b);
      this.messages.set(m.name, m);
    }
  }

  list(): string[] {
    return [...this.messages.keys()];
  }

  has(name: string): boolean {
    return this.messages.has(name);
  }

  value(name: string): unknown {
    const m = this.messages.get(name);
    if (!m) return undefined;
    if (!this.values.has(name)) this.values.set(name, m.decode(this.fd, this.base, this.heap));
    return this.values.get(name);
  }
}

/** A dataset placed in the file: its path, shape, bytes per value and the pieces of its rows (a little-endian float type). */
export interface PlacedDataset {
  readonly path: string;
  readonly shape: readonly number[];
  readonly size: number;
  readonly pieces: readonly Piece[];
}

/** An HDF5 file's root group, read without h5wasm. */
export class NativeRoot {
  readonly attributes: NativeAttributes;
  private readonly base: number;
  private readonly links = new Map<string, number>();

  constructor(private readonly fd: number) {
    const { base, root } = superblock(fd);
    this.base = base;
    const header = headerMessages(fd, base, root);
    if (header.some((m) => m.type === MSG.symbolTable)) throw new RangeError("a group of the earliest format");
    this.attributes = new NativeAttributes(fd, base, header);
    const raw = header.filter((m) => m.type === MSG.link).map((m) => m.data);
    const info = header.find((m) => m.type === MSG.linkInfo)?.data;
    if (info && info[0] !== 0) throw new RangeError("unknown link info version");
    const at = info && info[1]! & 0x01 ? 10 : 2;
    // a dense link's name index records hold the name's hash (4 bytes), then the heap ID
    if (info && !isUndefined(info, at)) raw.push(...denseObjects(fd, base, address(info, at), address(info, at + 8), 4));
    for (const b of raw) {
      const link = linkMessage(b);
      if (link.address !== undefined) this.links.set(link.name, link.address);
    }
  }

  /** The dataset `name` placed (a float dataset whose rows lie as pieces of the file); an error for anything else. */
  dataset(name: string): PlacedDataset {
    const at = this.links.get(name);
    if (at === undefined) throw new RangeError(`no dataset ${name}`);
    const header = headerMessages(this.fd, this.base, at);
    const one = (type: number): Buffer => {
      const found = header.filter((m) => m.type === type);
      if (found.length !== 1) throw new RangeError(`${name}: not one message of type ${type}`);
      return found[0]!.data;
    };
    if (header.some((m) => m.type === MSG.filters || m.type === MSG.external)) throw new RangeError(`${name}: filtered or external`);
    const type = datatypeOf(one(MSG.datatype));
    const shape = dataspaceDims(one(MSG.dataspace));
    if (type.cls !== 1 || type.bits & 0x01 || (type.size !== 4 && type.size !== 8)) throw new RangeError(`${name}: not little-endian floats`);
    if (shape.length === 0 || shape.some((n) => n === 0)) throw new RangeError(`${name}: empty or scalar`);
    return { path: `/${name}`, shape, size: type.size, pieces: layoutPieces(this.fd, this.base, one(MSG.layout), shape, type.size) };
  }
}
