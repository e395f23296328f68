// Snapshots and checkpoints written and read slab by slab: a slab size forced small makes a modest grid take many
// slabs (and chunks); the round trip must be bit for bit, and h5dump (an independent reader) must see the same values.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5, openHdf5, Dataset } from "../../src/io/h5.js";
import { readCheckpoint, readSnapshot, writeSnapshot, type Snapshot } from "../../src/io/snapshot.js";
import { setSlabBytes, slabRows } from "../../src/io/row-read.js";
import { seededRandom } from "../helpers/fields.js";

let dir: string;
beforeAll(async () => {
  await loadHdf5();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-slabs-"));
});
afterEach(() => setSlabBytes());
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

/** A checkpoint of `cells` with random ψ (values of every exponent and sign) and φ. */
function checkpoint(cells: number[]): Snapshot {
  const n = cells.reduce((p, c) => p * c, 1);
  const rnd = seededRandom(n);
  const value = () => (rnd() - 0.5) * 10 ** Math.floor(40 * rnd() - 20);
  const psi = Float64Array.from({ length: 2 * n }, value);
  const phi = Float64Array.from({ length: n }, value);
  return {
    meta: {
      kind: "checkpoint",
      software: "psibox test",
      step: 7,
      time: 1.25,
      timeUnit: "Gyr",
      scaleFactor: 1,
      redshift: null,
      cells,
      boxSizeKpc: cells.map(() => 10),
      particleMassEv: 1e-22,
      gravity: "periodic",
      background: { kind: "static" },
      massMsun: 1e9,
      config: "[grid]\n",
      configSha256: "00",
    },
    psi,
    psiScale: 3,
    state: { psiCode: psi, phiCode: phi, timeCode: 0.5, massCode: 2, mass0Code: 2, steps: 7, wallTimeS: 1, snapshotsWritten: 2 },
  };
}

/** Chunk rows of a dataset as stored. */
function chunks(file: string, name: string): number[] | null {
  const f = openHdf5(file);
  try {
    const ds = f.get(name);
    return ds instanceof Dataset ? ds.metadata.chunks : null;
  } finally {
    f.close();
  }
}

describe("slab I/O", () => {
  it("slab rows: whole rows of about the slab size, at least one, at most the dataset", () => {
    setSlabBytes(1000);
    expect(slabRows([64, 5, 5], 8)).toBe(5); // 200 bytes a row
    expect(slabRows([64, 50, 50], 8)).toBe(1); // a row larger than the slab is one slab
    expect(slabRows([3, 5], 8)).toBe(3);
    expect(slabRows([1000], 8)).toBe(125);
  });

  for (const cells of [[24, 10, 6], [4096], [37, 11]]) {
    it(`a ${cells.join("×")} checkpoint in slabs of 1 KiB: state, field and metadata read back bit for bit, also with the default slab size`, () => {
      setSlabBytes(1024);
      const cp = checkpoint(cells);
      const file = path.join(dir, `cp-${cells.join("x")}.h5`);
      writeSnapshot(file, cp);
      const rowBytes = 8 * cells.slice(1).reduce((p, n) => p * n, 1);
      const rows = Math.max(1, Math.floor(1024 / rowBytes));
      expect(chunks(file, "psi_re")).toEqual([rows, ...cells.slice(1)]);
      expect(chunks(file, "state/psi_code")).toEqual([128]);
      expect(Math.ceil((cells[0] as number) / rows)).toBeGreaterThan(2); // many slabs
      for (const slab of [1024, 24, undefined]) {
        setSlabBytes(slab);
        const back = readCheckpoint(file);
        expect(back.meta).toEqual(cp.meta);
        expect(Buffer.from(back.state.psiCode.buffer).equals(Buffer.from(cp.state!.psiCode.buffer))).toBe(true);
        expect(Buffer.from(back.state.phiCode.buffer).equals(Buffer.from(cp.state!.phiCode.buffer))).toBe(true);
        const snap = readSnapshot(file);
        const scaled = cp.psi.map((v) => v * 3);
        expect(Buffer.from(snap.psi.buffer).equals(Buffer.from(scaled.buffer))).toBe(true);
      }
    });
  }

  it("float32 snapshots in slabs: each value is the float32 rounding of the float64 one", () => {
    setSlabBytes(64); // two float32 rows of 8
    const cp = checkpoint([16, 8]);
    const file = path.join(dir, "f32.h5");
    writeSnapshot(file, { meta: { ...cp.meta, kind: "snapshot" }, psi: cp.psi }, "float32");
    expect(chunks(file, "psi_re")).toEqual([2, 8]);
    const back = readSnapshot(file);
    for (let i = 0; i < cp.psi.length; i++) expect(back.psi[i]).toBe(Math.fround(cp.psi[i]!));
  });
});

// An independent reader: h5dump from the HDF5 project's own tools (Debian hdf5-tools; .ci/run installs it).
const h5dump = spawnSync("h5dump", ["--version"], { encoding: "utf8" }).status === 0;
describe.runIf(h5dump || process.env["CI"] === "true")("slab-written files read by h5dump", () => {
  it("the state and the field written in 512-byte slabs are the values given", () => {
    setSlabBytes(512);
    const cp = checkpoint([32, 4, 4]);
    const file = path.join(dir, "dump.h5");
    writeSnapshot(file, cp);
    const read = (name: string) => {
      const raw = path.join(dir, `${name.replace("/", "_")}.bin`);
      expect(spawnSync("h5dump", ["-d", `/${name}`, "-b", "LE", "-o", raw, file], { encoding: "utf8" }).status).toBe(0);
      const bytes = fs.readFileSync(raw);
      return Buffer.from(bytes);
    };
    expect(read("state/psi_code").equals(Buffer.from(cp.state!.psiCode.buffer))).toBe(true);
    expect(read("state/phi_code").equals(Buffer.from(cp.state!.phiCode.buffer))).toBe(true);
    const re = Float64Array.from(cp.psi.filter((_, i) => i % 2 === 0), (v) => v * 3);
    expect(read("psi_re").equals(Buffer.from(re.buffer))).toBe(true);
  });
});
