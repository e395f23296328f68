// Snapshots read without h5wasm (the root's attributes and links, the datasets' places, all from the HDF5 file
// format's own structures: h5-native.ts) must give exactly what the HDF5 library itself reads: the metadata deep-equal
// and ψ bit for bit equal to psibox's read through h5wasm, every attribute's value equal to h5wasm's, and for files
// written by h5py (HDF5's own library, another version: compact attribute messages, dense link storage) equal to
// what h5py and NumPy read. Files that reader does not place are read through h5wasm with the same values.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { isDeepStrictEqual } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5, openHdf5 } from "../../src/io/h5.js";
import h5wasm from "h5wasm/node";
import { Attributes, textAttr } from "../../src/io/h5-attrs.js";
import { NativeRoot } from "../../src/io/h5-native.js";
import { readSnapshot, readSnapshotMeta, writeSnapshot, type Snapshot, type SnapshotMeta } from "../../src/io/snapshot.js";
import { readThroughHdf5 } from "../../src/io/snapshot-read.js";
import { readNative } from "../../src/io/snapshot-native.js";
import { seededRandom } from "../helpers/fields.js";
import { pythonWith } from "../helpers/python.js";

let dir: string;
beforeAll(async () => {
  await loadHdf5();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-native-"));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const field = (n: number, seed: number): Float64Array => {
  const rnd = seededRandom(seed);
  return Float64Array.from({ length: n }, () => (rnd() - 0.5) * 10 ** Math.floor(40 * rnd() - 20));
};
const sameBits = (a: Float64Array, b: Float64Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

const META: SnapshotMeta = {
  kind: "snapshot", software: "psibox test", step: 7, time: 12.5, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: [5, 4, 3],
  boxSizeKpc: [1, 2, 3], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 3e8, config: "", configSha256: "0",
};

/** Every attribute of the root, as the native reader decodes it and as h5wasm reads it. */
function attributesBothWays(file: string): { native: [string, unknown][]; hdf5: [string, unknown][] } {
  const fd = fs.openSync(file, "r");
  const f = openHdf5(file);
  try {
    const native = new NativeRoot(fd).attributes;
    const hdf5 = new Attributes(f);
    return { native: native.list().map((n) => [n, native.value(n)]), hdf5: hdf5.list().map((n) => [n, hdf5.value(n)]) };
  } finally {
    f.close();
    fs.closeSync(fd);
  }
}

/** Read `file` both ways: natively (must be placed) and through h5wasm; everything equal bit for bit. */
function expectSameBothWays(file: string): void {
  const native = readNative(file, true);
  expect(native).toBeDefined();
  const hdf5 = readThroughHdf5(file);
  expect(isDeepStrictEqual(native!.meta, hdf5.meta)).toBe(true);
  expect(sameBits(native!.psi, hdf5.psi)).toBe(true);
  expect(native!.speciesPsi?.length).toBe(hdf5.speciesPsi?.length);
  (hdf5.speciesPsi ?? []).forEach((p, i) => expect(sameBits(native!.speciesPsi![i]!, p)).toBe(true));
  expect(isDeepStrictEqual(readSnapshotMeta(file), hdf5.meta)).toBe(true);
  const { native: a, hdf5: b } = attributesBothWays(file);
  expect(new Map(a)).toEqual(new Map(b));
}

describe("snapshots read without h5wasm", () => {
  it("a static float64 snapshot with an empty config, and an added text attribute too long for the heap's blocks (a huge object): all equal to h5wasm's read", () => {
    const file = path.join(dir, "static.h5");
    writeSnapshot(file, { meta: META, psi: field(2 * 60, 1) });
    const f = new h5wasm.File(file, "a");
    textAttr(f, "history", "x".repeat(6000));
    f.close();
    expectSameBothWays(file);
    expect(attributesBothWays(file).native.find(([n]) => n === "history")?.[1]).toBe("x".repeat(6000));
  });

  it("an expanding float32 checkpoint with a long multi-line, non-ASCII config (a variable-length string in the global heap) and a scattering length", () => {
    const config = Array.from({ length: 300 }, (_, i) => `key_${i} = "välue ${i} σ₈ ħ"`).join("\n");
    const meta: SnapshotMeta = { ...META, kind: "checkpoint", scaleFactor: 0.25, redshift: 3, config, scatteringLengthM: 1e-76, background: { kind: "lcdm", hubbleKmSMpc: 67.7, omegaMatter: 0.31, omegaRadiation: 9e-5 } };
    const file = path.join(dir, "lcdm.h5");
    writeSnapshot(file, { meta, psi: field(2 * 60, 2) }, "float32");
    expectSameBothWays(file);
  });

  it("five species (more links than the root's header holds: dense link storage), each field bit for bit", () => {
    const names = ["a", "b", "c", "d", "e"];
    const meta: SnapshotMeta = { ...META, cells: [6, 5], boxSizeKpc: [1, 1], species: names.map((name, i) => ({ name, particleMassEv: 1e-22 * (i + 1), massMsun: 1e8 * (i + 1), scatteringLengthM: 0 })) };
    const snap: Snapshot = { meta, psi: field(60, 3), speciesPsi: names.slice(1).map((_, i) => field(60, 10 + i)) };
    const file = path.join(dir, "species.h5");
    writeSnapshot(file, snap);
    expectSameBothWays(file);
    expect(sameBits(readSnapshot(file).speciesPsi![3]!, snap.speciesPsi![3]!)).toBe(true);
  });

  it("into an earlier read's array: the same array, the same values", () => {
    const file = path.join(dir, "into.h5");
    const psi = field(2 * 60, 4);
    writeSnapshot(file, { meta: META, psi });
    const into = new Float64Array(psi.length);
    expect(readSnapshot(file, false, into).psi).toBe(into);
    expect(sameBits(into, psi)).toBe(true);
  });

  it("a file of the earlier layout (version 1) is not placed and is read through h5wasm", () => {
    const fixture = path.join("test", "fixtures", "layout-v1", "static-2d-snapshot.h5");
    expect(readNative(fixture, true)).toBeUndefined();
    expect(sameBits(readSnapshot(fixture).psi, readThroughHdf5(fixture).psi)).toBe(true);
  });
});

// h5py (HDF5's own library) writes: a psibox snapshot copied with its field gzip-compressed (not placed: read through
// h5wasm, NumPy's values); a file of the newest format with a few attributes of each kind psibox reads (compact, in
// the object header) and twelve contiguous datasets (dense links); NumPy dumps the values h5py reads.
const SCRIPT = `
import sys, numpy as np, h5py
src, packed, latest, raw = sys.argv[1:5]
with h5py.File(src, "r") as s, h5py.File(packed, "w", track_order=True) as d:
  for k, v in s.attrs.items(): d.attrs[k] = v
  for name in ["psi_re", "psi_im"]: d.create_dataset(name, data=s[name][...], chunks=(1,) + s[name].shape[1:], compression="gzip")
  (s["psi_re"][...] + 0j + 1j * s["psi_im"][...]).view("<f8").tofile(raw + "packed")
rng = np.random.default_rng(3)
with h5py.File(latest, "w", libver="latest") as f:
  f.attrs["count"] = np.int64(-5)
  f.attrs["small"] = np.int32(7)
  f.attrs["values"] = np.array([1.5, -2.25e-300, np.inf])
  f.attrs["fixed"] = np.bytes_("fixed text")
  f.attrs["vlen"] = "variable ünïcødé"
  for i in range(12): f.create_dataset(f"d{i:02d}", data=rng.standard_normal((4, 3)))
  f["d07"][...].tofile(raw + "d07")
`;

const python = pythonWith(["h5py", "numpy"]);
const noPython = process.env["PSIBOX_NO_XARRAY"];
describe.skipIf(python === undefined && noPython !== undefined)(`files written by h5py${noPython ? `: not run, ${noPython}` : ""}`, () => {
  it("compact attributes and dense links read natively equal h5wasm's and NumPy's; a compressed field falls back to h5wasm with NumPy's values", () => {
    if (python === undefined) throw new Error("no python3 with h5py and numpy found on PATH: install Debian's python3-h5py (or pip install h5py)");
    const src = path.join(dir, "src.h5");
    writeSnapshot(src, { meta: META, psi: field(2 * 60, 5) });
    const [packed, latest, raw] = [path.join(dir, "packed.h5"), path.join(dir, "latest.h5"), path.join(dir, "np-")];
    const r = spawnSync(python, ["-c", SCRIPT, src, packed, latest, raw], { encoding: "utf8" });
    expect(r.stderr).toBe("");
    expect(readNative(packed, true)).toBeUndefined();
    const numpy = (name: string): Float64Array => new Float64Array(new Uint8Array(fs.readFileSync(raw + name)).buffer);
    expect(sameBits(readSnapshot(packed).psi, numpy("packed"))).toBe(true);
    const { native, hdf5 } = attributesBothWays(latest);
    expect(new Map(native)).toEqual(new Map(hdf5));
    expect(native.map(([n]) => n).sort()).toEqual(["count", "fixed", "small", "values", "vlen"]);
    const fd = fs.openSync(latest, "r");
    try {
      const d07 = new NativeRoot(fd).dataset("d07");
      expect(d07.shape).toEqual([4, 3]);
      const values = new Float64Array(12);
      for (const p of d07.pieces) fs.readSync(fd, new Uint8Array(values.buffer, p.row * 24, p.rows * 24), 0, p.rows * 24, p.at);
      expect(sameBits(values, numpy("d07"))).toBe(true);
    } finally {
      fs.closeSync(fd);
    }
  });
});
