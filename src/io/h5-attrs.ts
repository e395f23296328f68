/**
 * Typed HDF5 attributes: numbers always with an explicit dtype (h5wasm would
 * store an integral JavaScript number as int32), text as fixed-length ASCII
 * where it can be (netCDF reads it as a plain text attribute) and as
 * variable-length UTF-8 otherwise; and checked readers whose errors name the
 * file and the attribute.
 */
import { InputError } from "../core/errors.js";
import type { Dataset, Group, H5File } from "./h5.js";

export type AttrNode = Group | H5File | Dataset;

export function numberAttr(node: AttrNode, name: string, value: number): void {
  node.create_attribute(name, value, [], "<d");
}

export function intAttr(node: AttrNode, name: string, value: number): void {
  node.create_attribute(name, new BigInt64Array([BigInt(value)]), [], "<q");
}

export function numbersAttr(node: AttrNode, name: string, values: readonly number[]): void {
  node.create_attribute(name, Float64Array.from(values), [values.length], "<d");
}

export function intsAttr(node: AttrNode, name: string, values: readonly number[]): void {
  node.create_attribute(name, new BigInt64Array(values.map((n) => BigInt(n))), [values.length], "<q");
}

export function textAttr(node: AttrNode, name: string, value: string): void {
  const ascii = /^[\x20-\x7e]+$/.test(value);
  if (ascii) node.create_attribute(name, value, null, `S${value.length}`);
  else node.create_attribute(name, value);
}

/** Attributes as readers see them: by name, each value as h5wasm gives it (undefined when there is no such attribute). */
export abstract class AttributeReader {
  /** The attributes' names. */
  abstract list(): string[];
  abstract has(name: string): boolean;
  abstract value(name: string): unknown;
}

/**
 * A node's attributes as a reader sees them: the names listed once and each
 * value read once, on demand (h5wasm's `attrs` lists every name again on
 * each access, which made reading a snapshot's metadata cost tens of ms).
 * For reading only: attributes created after it was made are not seen.
 */
export class Attributes extends AttributeReader {
  private names: Set<string> | undefined;
  private readonly values = new Map<string, unknown>();

  constructor(private readonly node: AttrNode) {
    super();
  }

  /** The attributes' names, in the file's order. */
  list(): string[] {
    this.names ??= new Set(Object.keys(this.node.attrs));
    return [...this.names];
  }

  has(name: string): boolean {
    this.names ??= new Set(Object.keys(this.node.attrs));
    return this.names.has(name);
  }

  /** The value as h5wasm reads it (undefined when there is no such attribute). */
  value(name: string): unknown {
    if (!this.has(name)) return undefined;
    if (!this.values.has(name)) this.values.set(name, this.node.get_attribute(name, false));
    return this.values.get(name);
  }
}

/** Where attributes are read from: a node, or its attributes read once. */
export type AttrSource = AttrNode | AttributeReader;

const attributes = (source: AttrSource): AttributeReader => (source instanceof AttributeReader ? source : new Attributes(source));

function attr(source: AttrSource, name: string, file: string): unknown {
  const a = attributes(source);
  if (!a.has(name)) throw new InputError(`${file}: not a psibox snapshot (attribute "${name}" is missing)`);
  const v = a.value(name);
  return typeof v === "bigint" ? Number(v) : v;
}

export function hasAttr(source: AttrSource, name: string): boolean {
  return attributes(source).has(name);
}

export function numberOf(source: AttrSource, name: string, file: string): number {
  const v = attr(source, name, file);
  const n = typeof v === "number" ? v : ArrayBuffer.isView(v) ? Number((v as unknown as ArrayLike<number | bigint>)[0]) : NaN;
  if (!Number.isFinite(n)) throw new InputError(`${file}: attribute "${name}" is not a number`);
  return n;
}

export function stringOf(source: AttrSource, name: string, file: string): string {
  const v = attr(source, name, file);
  if (typeof v !== "string") throw new InputError(`${file}: attribute "${name}" is not text`);
  return v;
}

export function numbersOf(source: AttrSource, name: string, file: string): number[] {
  const v = attr(source, name, file);
  if (typeof v === "number") return [v];
  if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number | bigint>, (x) => Number(x));
  throw new InputError(`${file}: attribute "${name}" is not a list of numbers`);
}
