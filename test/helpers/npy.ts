/** NumPy files for tests that feed psibox fields from elsewhere. */
import fs from "node:fs";

/** A .npy file built byte by byte from the format's specification (NumPy NEP 1), complex128, C order. */
export function writeNpy(file: string, shape: number[], data: Float64Array): void {
  let header = `{'descr': '<c16', 'fortran_order': False, 'shape': (${shape.join(", ")}${shape.length === 1 ? "," : ""}), }`;
  const total = 10 + header.length + 1;
  header += " ".repeat((64 - (total % 64)) % 64) + "\n";
  const head = Buffer.alloc(10);
  head.write("\x93NUMPY", 0, "latin1");
  head[6] = 1;
  head[7] = 0;
  head.writeUInt16LE(header.length, 8);
  fs.writeFileSync(file, Buffer.concat([head, Buffer.from(header, "latin1"), Buffer.from(data.buffer)]));
}
