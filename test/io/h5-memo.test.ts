// A snapshot's parsed structures are kept per path (h5-memo.ts) and given again only while the bytes they were read
// from are unchanged. Each read here is checked against h5wasm's read of the same file (the HDF5 library itself,
// computed independently of psibox's own parser): after the file is rewritten in place with other values of the same
// size and its modification time set back, after it is replaced by another file, and after a caller changed the
// metadata it was given.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { isDeepStrictEqual } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { forgetParses } from "../../src/io/h5-memo.js";
import { readSnapshot, readSnapshotMeta, writeSnapshot, type SnapshotMeta } from "../../src/io/snapshot.js";
import { readThroughHdf5 } from "../../src/io/snapshot-read.js";
import { readNative } from "../../src/io/snapshot-native.js";
import { seededRandom } from "../helpers/fields.js";

let dir: string;
beforeAll(async () => {
  await loadHdf5();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-memo-"));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const META: SnapshotMeta = {
  kind: "snapshot", software: "psibox test", step: 3, time: 1.5, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: [6, 5, 4],
  boxSizeKpc: [1, 2, 3], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 2e8, config: "a = 1", configSha256: "0",
};
const field = (seed: number): Float64Array => {
  const rnd = seededRandom(seed);
  return Float64Array.from({ length: 2 * 120 }, () => rnd() - 0.5);
};
const sameBits = (a: Float64Array, b: Float64Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

/** The file read natively (it must be placed) equals h5wasm's read of it: metadata and ψ. */
function expectAsHdf5(file: string): SnapshotMeta {
  const native = readNative(file, true);
  expect(native).toBeDefined();
  const hdf5 = readThroughHdf5(file);
  expect(isDeepStrictEqual(native!.meta, hdf5.meta)).toBe(true);
  expect(isDeepStrictEqual(readSnapshotMeta(file), hdf5.meta)).toBe(true);
  expect(sameBits(native!.psi, hdf5.psi)).toBe(true);
  return hdf5.meta;
}

describe("a snapshot's parse kept while its bytes are unchanged", () => {
  it("a file rewritten in place (same size, its modification time set back) or replaced is read anew", () => {
    forgetParses();
    const file = path.join(dir, "s.h5");
    const other = path.join(dir, "other.h5");
    writeSnapshot(file, { meta: META, psi: field(1) });
    expect(expectAsHdf5(file).time).toBe(1.5);
    expect(expectAsHdf5(file).time).toBe(1.5); // kept
    writeSnapshot(other, { meta: { ...META, time: 2.5, step: 4, boxSizeKpc: [3, 2, 1] }, psi: field(2) });
    expect(fs.statSync(other).size).toBe(fs.statSync(file).size);
    const { atime, mtime } = fs.statSync(file);
    fs.writeFileSync(file, fs.readFileSync(other)); // the same inode, other bytes
    fs.utimesSync(file, atime, mtime);
    const meta = expectAsHdf5(file);
    expect([meta.time, meta.step, meta.boxSizeKpc]).toEqual([2.5, 4, [3, 2, 1]]);
    // replaced by a file of other cells
    writeSnapshot(other, { meta: { ...META, cells: [4, 5, 6], time: 3.5 }, psi: field(3) });
    fs.renameSync(other, file);
    expect(expectAsHdf5(file).cells).toEqual([4, 5, 6]);
    expect(readSnapshot(file).psi.length).toBe(240);
  });

  it("metadata a caller changes is its own: the next read gives the file's", () => {
    const file = path.join(dir, "own.h5");
    writeSnapshot(file, { meta: META, psi: field(4) });
    const first = readSnapshot(file).meta;
    (first.cells as number[])[0] = 99;
    (first as { time: number }).time = -1;
    expect(isDeepStrictEqual(readSnapshot(file).meta, readThroughHdf5(file).meta)).toBe(true);
  });
});
