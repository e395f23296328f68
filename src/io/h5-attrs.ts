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

function attr(node: AttrNode, name: string, file: string): unknown {
  const a = node.attrs[name];
  if (!a) throw new InputError(`${file}: not a psibox snapshot (attribute "${name}" is missing)`);
  const v = a.value;
  return typeof v === "bigint" ? Number(v) : v;
}

export function hasAttr(node: AttrNode, name: string): boolean {
  return node.attrs[name] !== undefined;
}

export function numberOf(node: AttrNode, name: string, file: string): number {
  const v = attr(node, name, file);
  const n = typeof v === "number" ? v : ArrayBuffer.isView(v) ? Number((v as unknown as ArrayLike<number | bigint>)[0]) : NaN;
  if (!Number.isFinite(n)) throw new InputError(`${file}: attribute "${name}" is not a number`);
  return n;
}

export function stringOf(node: AttrNode, name: string, file: string): string {
  const v = attr(node, name, file);
  if (typeof v !== "string") throw new InputError(`${file}: attribute "${name}" is not text`);
  return v;
}

export function numbersOf(node: AttrNode, name: string, file: string): number[] {
  const v = attr(node, name, file);
  if (typeof v === "number") return [v];
  if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number | bigint>, (x) => Number(x));
  throw new InputError(`${file}: attribute "${name}" is not a list of numbers`);
}
