/**
 * Reading NumPy .npy files (format versions 1–3, little-endian, C order):
 * complex128/complex64 arrays, or float64/float32 arrays whose last axis
 * holds (re, im). The format is NumPy's NEP 1: magic "\x93NUMPY", version,
 * header length, a Python-literal header dict, then the raw data.
 */
import fs from "node:fs";
import { InputError } from "../core/errors.js";

/** A complex field read from a file: interleaved (re, im) values and the array shape without the (re, im) axis. */
export interface ComplexArray {
  readonly shape: readonly number[];
  readonly data: Float64Array;
}

/** Read a complex array from a .npy file. */
export function readNpyComplex(file: string): ComplexArray {
  let bytes: Buffer;
  try {
    bytes = fs.readFileSync(file);
  } catch {
    throw new InputError(`${file}: cannot read the file`);
  }
  const magic = bytes.subarray(0, 6).toString("latin1");
  if (magic !== "\x93NUMPY") throw new InputError(`${file}: not a NumPy .npy file`);
  const major = bytes[6] as number;
  const headerLength = major === 1 ? bytes.readUInt16LE(8) : bytes.readUInt32LE(8);
  const offset = major === 1 ? 10 : 12;
  const header = bytes.subarray(offset, offset + headerLength).toString(major === 3 ? "utf8" : "latin1");
  const descr = /'descr':\s*'([^']+)'/.exec(header)?.[1];
  const fortran = /'fortran_order':\s*(True|False)/.exec(header)?.[1];
  const shapeText = /'shape':\s*\(([^)]*)\)/.exec(header)?.[1];
  if (!descr || !fortran || shapeText === undefined) throw new InputError(`${file}: unreadable .npy header`);
  if (fortran === "True") throw new InputError(`${file}: Fortran-ordered arrays are not supported; save with np.ascontiguousarray`);
  const shape = shapeText.split(",").map((s) => s.trim()).filter((s) => s !== "").map(Number);
  const start = offset + headerLength;
  const count = shape.reduce((p, n) => p * n, 1);
  const body = bytes.subarray(start);
  const copy = (n: number, size: number): ArrayBuffer => {
    if (body.byteLength < n * size) throw new InputError(`${file}: the file is truncated (${body.byteLength} of ${n * size} data bytes)`);
    const out = new ArrayBuffer(n * size);
    new Uint8Array(out).set(body.subarray(0, n * size));
    return out;
  };
  switch (descr) {
    case "<c16":
      return { shape, data: new Float64Array(copy(2 * count, 8)) };
    case "<c8":
      return { shape, data: Float64Array.from(new Float32Array(copy(2 * count, 4))) };
    case "<f8":
    case "<f4": {
      if (shape.at(-1) !== 2) throw new InputError(`${file}: a real array must have a last axis of length 2 (re, im); shape is (${shape.join(", ")})`);
      const data = descr === "<f8" ? new Float64Array(copy(count, 8)) : Float64Array.from(new Float32Array(copy(count, 4)));
      return { shape: shape.slice(0, -1), data };
    }
    default:
      throw new InputError(`${file}: data type ${descr} is not supported; use complex128, complex64, or float64/float32 with a last axis (re, im)`);
  }
}
