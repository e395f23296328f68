// Datasets read straight from the file (their places found from the HDF5 file format's own structures, h5-layout.ts)
// must equal what the HDF5 library itself reads, bit for bit: h5wasm's one-call read of the same dataset, and, for
// files written by h5py (an independent writer: other layouts, other B-trees), NumPy's values dumped by h5py.
// Layouts the direct path does not place (filters, chunks not of whole rows, version-4 chunk indexes) are read
// through h5wasm instead, with the same values.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { Dataset, loadHdf5, openHdf5, writeHdf5Atomic } from "../../src/io/h5.js";
import { placeRows } from "../../src/io/h5-layout.js";
import { setSlabBytes } from "../../src/io/row-read.js";
import { readFloat64 } from "../../src/io/slabs.js";
import { readSnapshot, writeSnapshot } from "../../src/io/snapshot.js";
import { seededRandom } from "../helpers/fields.js";
import { pythonWith } from "../helpers/python.js";

let dir: string;
beforeAll(async () => {
  await loadHdf5();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-direct-"));
});
afterEach(() => setSlabBytes());
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

/** Values of every exponent and sign. */
function values(n: number, seed: number): Float64Array {
  const rnd = seededRandom(seed);
  return Float64Array.from({ length: n }, () => (rnd() - 0.5) * 10 ** Math.floor(40 * rnd() - 20));
}

/** The pieces the direct path finds for dataset `name`, or undefined; and h5wasm's own one-call read of it. */
function look(file: string, name: string): { pieces: ReturnType<typeof placeRows>; value: Float64Array | Float32Array } {
  const f = openHdf5(file);
  const fd = fs.openSync(file, "r");
  try {
    const ds = f.get(name) as Dataset;
    const ref = Buffer.from(Array.from(ds.create_reference().ref_data as ArrayLike<number>));
    return { pieces: placeRows(fd, Number(ref.readBigUInt64LE(0)), ds.shape!, ds.metadata.size), value: ds.value as Float64Array | Float32Array };
  } finally {
    fs.closeSync(fd);
    f.close();
  }
}

/** A dataset read by psibox's slab reader (direct or through h5wasm). */
function psiboxRead(file: string, name: string): Float64Array {
  const f = openHdf5(file);
  try {
    return readFloat64(f.get(name) as Dataset, file);
  } finally {
    f.close();
  }
}

const sameBits = (a: Float64Array, b: Float64Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

describe("datasets read straight from the file", () => {
  for (const precision of ["float64", "float32"] as const) {
    it(`a ${precision} snapshot in 200 chunks (a B-tree of more than one node): every chunk placed, ψ equal to h5wasm's read bit for bit`, () => {
      setSlabBytes(24); // one float64 row of 3 a chunk (two float32 rows)
      const cells = [200, 3];
      const psi = values(1200, 7);
      const file = path.join(dir, `many-${precision}.h5`);
      writeSnapshot(file, { meta: { kind: "snapshot", software: "test", step: 0, time: 0, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells, boxSizeKpc: [1, 1], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 1, config: "", configSha256: "" }, psi }, precision);
      const re = look(file, "psi_re");
      const im = look(file, "psi_im");
      expect(re.pieces?.length).toBe(precision === "float64" ? 200 : 100);
      expect(re.pieces?.map((p) => p.row)).toEqual(Array.from({ length: re.pieces!.length }, (_, i) => i * (precision === "float64" ? 1 : 2)));
      const expected = new Float64Array(1200);
      re.value.forEach((v, i) => (expected[2 * i] = v));
      im.value.forEach((v, i) => (expected[2 * i + 1] = v));
      for (const slab of [24, 40, undefined]) {
        setSlabBytes(slab); // slabs across chunk boundaries, and the default
        expect(sameBits(readSnapshot(file).psi, expected)).toBe(true);
      }
    });
  }

  it("a contiguous dataset is one piece; a gzip-compressed one is not placed and is read through h5wasm; both equal h5wasm's read", () => {
    const data = values(6 * 5 * 4, 11);
    const file = path.join(dir, "layouts.h5");
    writeHdf5Atomic(file, (f) => {
      f.create_dataset({ name: "flat", data, shape: [6, 5, 4], dtype: "<d" });
      f.create_dataset({ name: "packed", data, shape: [6, 5, 4], dtype: "<d", chunks: [2, 5, 4], compression: "gzip", compression_opts: 4 });
      f.create_dataset({ name: "narrow", data: Float32Array.from(data), shape: [6, 5, 4], dtype: "<f", chunks: [3, 2, 4] });
    });
    expect(look(file, "flat").pieces).toEqual([{ row: 0, rows: 6, at: expect.any(Number) }]);
    expect(look(file, "packed").pieces).toBeUndefined();
    expect(look(file, "narrow").pieces).toBeUndefined(); // chunks not of whole rows
    for (const name of ["flat", "packed", "narrow"]) expect(sameBits(psiboxRead(file, name), Float64Array.from(look(file, name).value))).toBe(true);
  });
});

// h5py writes the files (HDF5's own library, another version); NumPy dumps the values it reads.
const SCRIPT = `
import sys, numpy as np, h5py
rng = np.random.default_rng(5)
a = rng.standard_normal((9, 7, 5)) * 10.0 ** rng.integers(-20, 20, (9, 7, 5))
with h5py.File(sys.argv[1], "w") as f:
  f.create_dataset("rows", data=a, chunks=(2, 7, 5))
  f.create_dataset("flat", data=a)
  f.create_dataset("blocks", data=a, chunks=(4, 3, 5))
  f.create_dataset("single", data=a.astype("<f4"), chunks=(2, 7, 5))
  f.create_dataset("big_endian", data=a.astype(">f8"), chunks=(3, 7, 5))
with h5py.File(sys.argv[2], "w", libver="latest") as f:
  f.create_dataset("rows", data=a, chunks=(2, 7, 5))
  f.create_dataset("flat", data=a)
for name in ["rows", "flat", "blocks", "single", "big_endian"]:
  with h5py.File(sys.argv[1], "r") as f: f[name][...].astype("<f8").tofile(sys.argv[3] + name)
`;

const python = pythonWith(["h5py", "numpy"]);
const noPython = process.env["PSIBOX_NO_XARRAY"];
describe.skipIf(python === undefined && noPython !== undefined)(`files written by h5py${noPython ? `: not run, ${noPython}` : ""}`, () => {
  it("chunked by rows and contiguous (placed), in blocks, big-endian and with version-4 chunk indexes (through h5wasm): NumPy's values bit for bit", () => {
    if (python === undefined) throw new Error("no python3 with h5py and numpy found on PATH: install Debian's python3-h5py (or pip install h5py)");
    const [old, latest, raw] = [path.join(dir, "h5py.h5"), path.join(dir, "h5py-latest.h5"), path.join(dir, "np-")];
    const r = spawnSync(python, ["-c", SCRIPT, old, latest, raw], { encoding: "utf8" });
    expect(r.stderr).toBe("");
    const placed = { rows: true, flat: true, blocks: false, single: true, big_endian: false } as Record<string, boolean>;
    for (const name of Object.keys(placed)) {
      const numpy = new Float64Array(new Uint8Array(fs.readFileSync(raw + name)).buffer);
      expect(look(old, name).pieces !== undefined).toBe(placed[name]);
      expect(sameBits(psiboxRead(old, name), numpy)).toBe(true);
    }
    const numpy = new Float64Array(new Uint8Array(fs.readFileSync(raw + "rows")).buffer);
    expect(look(latest, "rows").pieces).toBeUndefined(); // a fixed-array chunk index
    for (const name of ["rows", "flat"]) expect(sameBits(psiboxRead(latest, name), numpy)).toBe(true);
  });
});
