// The benchmarks' shared start: the field every step benchmark times, and a .npy writer to hand it to Python.
import fs from "node:fs";

/** √(100·d) with d = 1 ± 5% from a fixed linear congruential sequence: a near-uniform real field, interleaved (re, im). */
export function benchField(grid) {
  const psi = new Float64Array(2 * grid.size);
  let s = 12345;
  for (let i = 0; i < grid.size; i++) {
    s = (s * 1103515245 + 12345) % 2147483648;
    const d = 1 + 0.1 * (s / 2147483648 - 0.5);
    psi[2 * i] = Math.sqrt(100 * d);
  }
  return psi;
}

/** A complex128 array of `shape` as a NumPy .npy file (format 1.0). */
export function writeNpy(file, shape, data) {
  let header = `{'descr': '<c16', 'fortran_order': False, 'shape': (${shape.join(", ")}${shape.length === 1 ? "," : ""}), }`;
  header += " ".repeat((64 - ((10 + header.length + 1) % 64)) % 64) + "\n";
  const head = Buffer.alloc(10);
  head.write("\x93NUMPY", 0, "latin1");
  head[6] = 1;
  head.writeUInt16LE(header.length, 8);
  fs.writeFileSync(file, Buffer.concat([head, Buffer.from(header, "latin1"), Buffer.from(data.buffer, data.byteOffset, data.byteLength)]));
}

/** The step size the benchmarks use: one the phase rule would allow (the highest mode turns by at most 2 rad). */
export function benchDt(shape) {
  const kMax = Math.PI * Math.max(...shape);
  return Math.min(1e-5, 4 / (kMax * kMax));
}
