/**
 * Values stored in an HDF5 file, decoded from the file format's own messages
 * (the HDF5 File Format Specification, version 3: dataspace, datatype,
 * attribute and link messages, global heap collections) into what h5wasm
 * gives for the same value: a number or bigint (a scalar), a typed array, a
 * string or strings. Only the types psibox writes are decoded (little-endian
 * integers and floats, fixed and variable-length strings); anything else throws.
 */
import { address, bytesAt, isUndefined, uintAt } from "./h5-file.js";

/** The dimensions of a dataspace message ([] for a scalar; a null dataspace throws). */
export function dataspaceDims(b: Buffer): number[] {
  const version = b[0]!;
  const rank = b[1]!;
  if (version === 2 && b[3] === 2) throw new RangeError("null dataspace");
  if (version !== 1 && version !== 2) throw new RangeError("unknown dataspace version");
  const at = version === 1 ? 8 : 4;
  return Array.from({ length: rank }, (_, i) => uintAt(b, at + 8 * i, 8));
}

export interface Datatype {
  /** Class: 0 integer, 1 float, 3 string, 9 variable length. */
  readonly cls: number;
  /** The class's bit field (24 bits). */
  readonly bits: number;
  readonly size: number;
}

export function datatypeOf(b: Buffer): Datatype {
  if (b[0]! >> 4 < 1 || b[0]! >> 4 > 3) throw new RangeError("unknown datatype version");
  return { cls: b[0]! & 0x0f, bits: b[1]! | (b[2]! << 8) | (b[3]! << 16), size: b.readUInt32LE(4) };
}

/** A stored string up to its first null byte, decoded as h5wasm does (UTF-8, or ASCII for character set 0). */
function text(bytes: Buffer, utf8: boolean, fixed: boolean): string {
  const zero = bytes.indexOf(0);
  const b = zero < 0 ? bytes : bytes.subarray(0, zero);
  // h5wasm decodes fixed strings with a TextDecoder and variable-length ones of set 0 byte by byte
  if (utf8) return new TextDecoder("utf-8").decode(b);
  return fixed ? new TextDecoder("ascii").decode(b) : String.fromCharCode(...b);
}

/** Global heap collections read once per file (by address). */
export type HeapCache = Map<number, Buffer>;

/** Object `index` of the global heap collection at `at` (base added). */
function globalObject(fd: number, at: number, index: number, cache: HeapCache): Buffer {
  let c = cache.get(at);
  if (!c) {
    const head = bytesAt(fd, at, 16);
    if (head.toString("latin1", 0, 4) !== "GCOL" || head[4] !== 1) throw new RangeError("not a global heap collection");
    c = bytesAt(fd, at, uintAt(head, 8, 8));
    cache.set(at, c);
  }
  for (let p = 16; p + 16 <= c.length; ) {
    const i = c.readUInt16LE(p);
    const size = uintAt(c, p + 8, 8);
    if (i === index) return c.subarray(p + 16, p + 16 + size);
    if (i === 0) break;
    p += 16 + Math.ceil(size / 8) * 8;
  }
  throw new RangeError("global heap object not found");
}

type Accessor = new (b: ArrayBuffer) => ArrayLike<number | bigint>;
const INTEGERS: Record<number, [Accessor, Accessor]> = { 1: [Uint8Array, Int8Array], 2: [Uint16Array, Int16Array], 4: [Uint32Array, Int32Array], 8: [BigUint64Array, BigInt64Array] };

/** The values of `count` elements of `type` in `data` (strings as a list, numbers as a typed array). */
function elements(fd: number, base: number, type: Datatype, data: Buffer, count: number, heap: HeapCache): string[] | ArrayLike<number | bigint> {
  if ((type.cls === 0 || type.cls === 1) && type.bits & 0x01) throw new RangeError("big-endian values");
  const raw = (): ArrayBuffer => Uint8Array.from(data.subarray(0, count * type.size)).buffer;
  if (type.cls === 0 && INTEGERS[type.size]) return new INTEGERS[type.size]![type.bits & 0x08 ? 1 : 0](raw());
  if (type.cls === 1 && (type.size === 4 || type.size === 8)) return type.size === 4 ? new Float32Array(raw()) : new Float64Array(raw());
  if (type.cls === 3) return Array.from({ length: count }, (_, i) => text(data.subarray(i * type.size, (i + 1) * type.size), (type.bits >> 4 & 0x0f) === 1, true));
  if (type.cls === 9 && (type.bits & 0x0f) === 1 && type.size === 16) {
    return Array.from({ length: count }, (_, i) => {
      const at = i * 16;
      if (data.readUInt32LE(at) === 0 || isUndefined(data, at + 4) || data.readBigUInt64LE(at + 4) === 0n) return "";
      return text(globalObject(fd, base + address(data, at + 4), data.readUInt32LE(at + 12), heap), (type.bits >> 8 & 0x0f) === 1, false);
    });
  }
  throw new RangeError(`values of datatype class ${type.cls} not decoded`);
}

/** An attribute message's name and a decoder of its value (as h5wasm's get_attribute gives it). */
export function attributeMessage(b: Buffer): { name: string; decode: (fd: number, base: number, heap: HeapCache) => unknown } {
  const version = b[0]!;
  if (version < 1 || version > 3 || (version > 1 && b[1]! & 0x03)) throw new RangeError("shared or unknown attribute message");
  const [nameSize, typeSize, spaceSize] = [b.readUInt16LE(2), b.readUInt16LE(4), b.readUInt16LE(6)];
  const pad = (n: number): number => (version === 1 ? Math.ceil(n / 8) * 8 : n);
  const nameAt = version === 3 ? 9 : 8;
  const typeAt = nameAt + pad(nameSize);
  const spaceAt = typeAt + pad(typeSize);
  const dataAt = spaceAt + pad(spaceSize);
  const name = text(b.subarray(nameAt, nameAt + nameSize), true, true);
  return {
    name,
    decode: (fd, base, heap) => {
      const type = datatypeOf(b.subarray(typeAt, typeAt + typeSize));
      const dims = dataspaceDims(b.subarray(spaceAt, spaceAt + spaceSize));
      const count = dims.reduce((p, n) => p * n, 1);
      const values = elements(fd, base, type, b.subarray(dataAt), count, heap);
      // h5wasm gives a scalar's one element, an array's elements as a list or typed array
      return dims.length === 0 ? values[0] : values;
    },
  };
}

/** A link message's name and, for a hard link, the object header address it points to. */
export function linkMessage(b: Buffer): { name: string; address?: number } {
  if (b[0] !== 1) throw new RangeError("unknown link message version");
  const flags = b[1]!;
  let p = 2;
  const type = flags & 0x08 ? b[p++]! : 0;
  if (flags & 0x04) p += 8;
  if (flags & 0x10) p++;
  const lengthSize = 1 << (flags & 0x03);
  const length = uintAt(b, p, lengthSize);
  p += lengthSize;
  const name = b.toString("utf8", p, p + length);
  return type === 0 ? { name, address: address(b, p + length) } : { name };
}
