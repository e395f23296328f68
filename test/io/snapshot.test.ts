// Snapshot files: a round trip through psibox's reader, a read by an independent HDF5 tool (h5dump), and files of the earlier layout.
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import h5wasm from "h5wasm/node";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot, writeSnapshot, type Snapshot, type SnapshotMeta } from "../../src/io/snapshot.js";
import { seededRandom } from "../helpers/fields.js";

let dir: string;
beforeAll(async () => {
  await loadHdf5();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-io-"));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function snapshot(cells: number[], kind: "snapshot" | "checkpoint" = "snapshot"): Snapshot {
  const n = cells.reduce((p, c) => p * c, 1);
  const rnd = seededRandom(cells.length);
  const psi = Float64Array.from({ length: 2 * n }, () => 1e3 * rnd());
  const meta: SnapshotMeta = {
    kind,
    software: "psibox test",
    step: 42,
    time: 123.456789,
    timeUnit: "Myr",
    scaleFactor: 0.25,
    redshift: 3,
    cells,
    boxSizeKpc: cells.map((c) => c * 0.5),
    particleMassEv: 1e-22,
    gravity: "periodic",
    background: { kind: "lcdm", hubbleKmSMpc: 67.36, omegaMatter: 0.3153, omegaRadiation: 0 },
    massMsun: 1.5e10,
    config: '[grid]\ncells = [4]\nbox = "2 kpc"\n',
    configSha256: "0123abcd",
  };
  return kind === "checkpoint"
    ? { meta, psi, state: { psiCode: psi, phiCode: psi.subarray(0, n), timeCode: 7.5, massCode: 3.25, mass0Code: 3.25, steps: 42, wallTimeS: 9, snapshotsWritten: 3 } }
    : { meta, psi };
}

describe("snapshot round trip", () => {
  for (const cells of [[16], [8, 16], [4, 8, 16]]) {
    for (const precision of ["float64", "float32"] as const) {
      it(`${cells.length}D ${precision}: metadata exact, field exact (float64) or to float32 rounding`, () => {
        const snap = snapshot(cells);
        const file = path.join(dir, `s-${cells.length}-${precision}.h5`);
        writeSnapshot(file, snap, precision);
        const back = readSnapshot(file);
        expect(back.meta).toEqual(snap.meta);
        if (precision === "float64") expect(Array.from(back.psi)).toEqual(Array.from(snap.psi));
        else for (let i = 0; i < snap.psi.length; i++) expect(back.psi[i]).toBe(Math.fround(snap.psi[i]!));
      });
    }
  }

  it("several species: each one's scattering length round-trips; a file written before it was recorded still reads, without it", () => {
    const base = snapshot([8, 8]);
    const species = [
      { name: "light", particleMassEv: 1e-22, massMsun: 1e10, scatteringLengthM: 1e-80 },
      { name: "heavy", particleMassEv: 3e-22, massMsun: 5e9, scatteringLengthM: 0 },
    ];
    const snap: Snapshot = { ...base, meta: { ...base.meta, species }, speciesPsi: [base.psi.map((v) => v / 2)] };
    const file = path.join(dir, "species.h5");
    writeSnapshot(file, snap);
    expect(readSnapshot(file).meta.species).toEqual(species);
    // the layout before species_scattering_length: the same file without the attribute
    const h5 = new h5wasm.File(file, "a");
    h5.delete_attribute("species_scattering_length");
    h5.delete_attribute("species_scattering_length_units");
    h5.close();
    const old = readSnapshot(file);
    expect(old.meta.species).toEqual(species.map(({ scatteringLengthM: _, ...s }) => s));
    expect(Array.from(old.speciesPsi![0]!)).toEqual(Array.from(snap.speciesPsi![0]!));
  });

  it("a checkpoint keeps its exact code-unit state", () => {
    const snap = snapshot([8, 8], "checkpoint");
    const file = path.join(dir, "cp.h5");
    writeSnapshot(file, snap);
    const back = readSnapshot(file, true);
    expect(back.state?.steps).toBe(42);
    expect(Array.from(back.state!.phiCode)).toEqual(Array.from(snap.state!.phiCode));
    expect(back.state?.mass0Code).toBe(3.25);
  });

  it("rejects missing, truncated and non-HDF5 files with a message naming the file", () => {
    const good = path.join(dir, "good.h5");
    writeSnapshot(good, snapshot([8, 8]));
    const truncated = path.join(dir, "truncated.h5");
    fs.writeFileSync(truncated, fs.readFileSync(good).subarray(0, 2000));
    const text = path.join(dir, "text.h5");
    fs.writeFileSync(text, "not hdf5");
    expect(() => readSnapshot(path.join(dir, "missing.h5"))).toThrow(/missing\.h5: no such file/);
    expect(() => readSnapshot(truncated)).toThrow(/truncated\.h5: not a readable HDF5 file/);
    expect(() => readSnapshot(text)).toThrow(/text\.h5: not a readable HDF5 file \(Not an HDF5 file\)/);
    expect(() => readSnapshot(good, true)).toThrow(/not a checkpoint/);
  });
});

// An independent reader: h5dump from the HDF5 project's own tools (Debian hdf5-tools; .ci/run installs it).
const h5dump = spawnSync("h5dump", ["--version"], { encoding: "utf8" }).status === 0;
describe.runIf(h5dump || process.env["CI"] === "true")("snapshot read by h5dump", () => {
  it("shows the attributes and the field values psibox wrote", () => {
    const snap = snapshot([4, 8]);
    const file = path.join(dir, "dump.h5");
    writeSnapshot(file, snap);
    const attrs = spawnSync("h5dump", ["-A", file], { encoding: "utf8" });
    expect(attrs.status).toBe(0);
    expect(attrs.stdout).toMatch(/ATTRIBUTE "format" \{[\s\S]*?"psibox snapshot"/);
    expect(attrs.stdout).toMatch(/ATTRIBUTE "time" \{[\s\S]*?DATA \{\s*\(0\): 123\.457/);
    expect(attrs.stdout).toMatch(/ATTRIBUTE "time_units" \{[\s\S]*?"Myr"/);
    expect(attrs.stdout).toMatch(/ATTRIBUTE "cells" \{[\s\S]*?\(0\): 4, 8/);
    expect(attrs.stdout).toMatch(/DATASET "psi_re" \{\s*DATATYPE\s+H5T_IEEE_F64LE\s*DATASPACE\s+SIMPLE \{ \( 4, 8 \)/);
    // the dimension scales that make the file a netCDF-4 file
    expect(attrs.stdout).toMatch(/DATASET "x" \{[\s\S]*?ATTRIBUTE "CLASS" \{[\s\S]*?"DIMENSION_SCALE"/);
    expect(attrs.stdout).toMatch(/DATASET "psi_im" \{[\s\S]*?ATTRIBUTE "DIMENSION_LIST"[\s\S]*?DATASET \d+ "\/x"[\s\S]*?DATASET \d+ "\/y"/);
    // the raw values, exported by h5dump as little-endian binary
    const parts = ["psi_re", "psi_im"].map((name) => {
      const raw = path.join(dir, `${name}.bin`);
      const data = spawnSync("h5dump", ["-d", `/${name}`, "-b", "LE", "-o", raw, file], { encoding: "utf8" });
      expect(data.status).toBe(0);
      const bytes = fs.readFileSync(raw);
      return new Float64Array(bytes.buffer, bytes.byteOffset, bytes.byteLength / 8);
    });
    expect(Array.from(parts[0]!)).toEqual(Array.from(snap.psi.filter((_, i) => i % 2 === 0)));
    expect(Array.from(parts[1]!)).toEqual(Array.from(snap.psi.filter((_, i) => i % 2 === 1)));
  });
});

// Files in the version-1 layout, written by psibox before the netCDF layout, with what that version's reader returned.
describe("snapshots in the earlier layout (version 1)", () => {
  const fixtures = path.join(path.dirname(fileURLToPath(import.meta.url)), "..", "fixtures", "layout-v1");
  const expected = JSON.parse(fs.readFileSync(path.join(fixtures, "expected.json"), "utf8")) as Record<string, Record<string, unknown>>;
  const hash = (a: Float64Array) => createHash("sha256").update(Buffer.from(a.buffer, a.byteOffset, a.byteLength)).digest("hex");
  for (const [name, want] of Object.entries(expected)) {
    it(`${name}: the same metadata, field and exact state as before`, () => {
      const snap = readSnapshot(path.join(fixtures, name), name.includes("checkpoint"));
      expect(snap.meta).toEqual(want["meta"]);
      expect(hash(snap.psi)).toBe(want["psi_sha256"]);
      if (snap.state) {
        const st = want["state"] as Record<string, unknown>;
        expect(hash(snap.state.psiCode)).toBe(st["psiCode"]);
        expect(hash(snap.state.phiCode)).toBe(st["phiCode"]);
        // the sidecar's state of that layout is read as the sidecar plug-in's state, version 1
        const { sidecar, ...rest } = st;
        const plugins = sidecar === undefined ? {} : { plugins: { sidecar: `{"version":1,"state":${String(sidecar)}}` } };
        expect({ ...snap.state, psiCode: st["psiCode"], phiCode: st["phiCode"] }).toEqual({ ...rest, ...plugins });
      }
    });
  }

  it("a version-1 checkpoint rewritten in the current layout keeps its exact state bit for bit", () => {
    const old = readSnapshot(path.join(fixtures, "static-2d-checkpoint.h5"), true);
    const file = path.join(dir, "rewritten.h5");
    writeSnapshot(file, old);
    const back = readSnapshot(file, true);
    expect(back.meta).toEqual(old.meta);
    expect(hash(back.psi)).toBe(hash(old.psi));
    expect(hash(back.state!.psiCode)).toBe(hash(old.state!.psiCode));
    expect(hash(back.state!.phiCode)).toBe(hash(old.state!.phiCode));
    expect(back.state!.timeCode).toBe(old.state!.timeCode);
  });
});
