// psibox import: fields written by other programs become psibox snapshots with the same values.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import h5wasm from "h5wasm/node";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot } from "../../src/io/snapshot.js";
import { writeNpy } from "../helpers/npy.js";
import { makeWork, removeWork, runPsibox } from "../helpers/cli.js";

let work: string;
beforeAll(async () => {
  await loadHdf5();
  work = makeWork("import");
});
afterAll(() => removeWork(work));

const psibox = (args: string[]) => runPsibox(work, args);

const shape = [8, 16];
const values = Float64Array.from({ length: 2 * 8 * 16 }, (_, i) => 100 + Math.sin(i));

describe("psibox import", () => {
  it("reads a .npy complex field: values scaled from the given density unit, metadata from the options", () => {
    writeNpy(path.join(work, "f.npy"), shape, values);
    const r = psibox(["import", "f.npy", "--out", "f.h5", "--box", "1 Mpc/h", "--particle-mass", "2e-22 eV", "--density-unit", "Msun/pc^3", "--redshift", "3"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const snap = readSnapshot(path.join(work, "f.h5"));
    expect(snap.meta.cells).toEqual(shape);
    expect(snap.meta.redshift).toBe(3);
    // a comoving field's time is the cosmic time at z = 3: for flat matter + Λ,
    // t(a) = 2/(3 H0 √Ω_Λ) asinh(√(Ω_Λ/Ω_m) a^{3/2}) (closed form, computed independently)
    const H0 = (67.36 * 1e3) / 3.0856775814913673e22; // 1/s, with the IAU parsec
    const tGyr = ((2 / (3 * H0 * Math.sqrt(1 - 0.3153))) * Math.asinh(Math.sqrt((1 - 0.3153) / 0.3153) * 0.25 ** 1.5)) / (1e9 * 365.25 * 86400);
    expect(snap.meta.timeUnit).toBe("Gyr");
    expect(Math.abs(snap.meta.time / tGyr - 1)).toBeLessThan(1e-8);
    expect(snap.meta.scaleFactor).toBe(0.25);
    expect(snap.meta.particleMassEv).toBeCloseTo(2e-22, 30);
    expect(snap.meta.boxSizeKpc[0]).toBeCloseTo(1000 / 0.6736, 9);
    // |ψ|² in Msun/pc³ → Msun/kpc³ multiplies ψ by √1e9
    for (let i = 0; i < values.length; i++) expect(snap.psi[i]! / values[i]!).toBeCloseTo(Math.sqrt(1e9), 6);
  });

  const hasNumpy = spawnSync("python3", ["-c", "import numpy"]).status === 0;
  it.runIf(hasNumpy)("reads a .npy written by NumPy itself (an independent writer)", () => {
    const py = spawnSync("python3", ["-c", `import numpy as np; a=(np.arange(32)+1j*np.arange(32)[::-1]).reshape(4,8); np.save(${JSON.stringify(path.join(work, "np.npy"))}, a)`]);
    expect(py.status).toBe(0);
    expect(psibox(["import", "np.npy", "--out", "np.h5", "--box", "4 kpc", "--particle-mass", "1e-22 eV"]).code).toBe(0);
    const snap = readSnapshot(path.join(work, "np.h5"));
    expect(Array.from(snap.psi.subarray(0, 6))).toEqual([0, 31, 1, 30, 2, 29]);
  });

  it("reads separate real and imaginary HDF5 datasets", () => {
    const f = new h5wasm.File(path.join(work, "other.h5"), "w");
    const re = Float64Array.from({ length: 32 }, (_, i) => i);
    const im = Float64Array.from({ length: 32 }, (_, i) => -i);
    f.create_group("fields");
    f.create_dataset({ name: "fields/re", data: re, shape: [4, 8], dtype: "<d" });
    f.create_dataset({ name: "fields/im", data: im, shape: [4, 8], dtype: "<d" });
    f.close();
    const r = psibox(["import", "other.h5", "--re", "fields/re", "--im", "fields/im", "--out", "o.h5", "--box", "4 kpc", "--particle-mass", "1e-22 eV", "--gravity", "isolated"]);
    expect(r.code).toBe(0);
    const snap = readSnapshot(path.join(work, "o.h5"));
    expect(snap.meta.gravity).toBe("isolated");
    expect(Array.from(snap.psi.subarray(0, 6))).toEqual([0, -0, 1, -1, 2, -2]);
  });

  it("rejects bad sources and options with one line and exit code 2", () => {
    fs.writeFileSync(path.join(work, "bad.npy"), "not numpy");
    writeNpy(path.join(work, "odd.npy"), [6, 8], new Float64Array(96));
    const cases: [string[], RegExp][] = [
      [["import", "bad.npy", "--out", "x.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV"], /bad\.npy: not a NumPy \.npy file/],
      [["import", "odd.npy", "--out", "x.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV"], /odd\.npy: field shape 6×8: 6 is not a power of two/],
      [["import", "f.npy", "--out", "x.h5", "--box", "1 kpc", "--particle-mass", "1e-22"], /--particle-mass: "1e-22" is not a mass/],
      [["import", "other.h5", "--dataset", "nope", "--out", "x.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV"], /other\.h5: no dataset "nope"/],
      [["import", "f.npy", "--out", "f.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV"], /f\.h5 exists; pass --force/],
      [["import", "f.npy", "--out", "x.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV", "--density-unit", "kpc"], /--density-unit: "kpc" is not a density \(mass per volume\)/],
      [["import", "f.npy", "--out", "no-such-folder/x.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV"], /--out: the folder of no-such-folder\/x\.h5 does not exist/],
      [["import", "f.npy", "--out", "x.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV", "--redshift", "3", "--time", "1 Gyr"], /give --time .* or --redshift .*, not both/],
    ];
    for (const [args, message] of cases) {
      const r = psibox(args);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
    }
    expect(fs.existsSync(path.join(work, "x.h5"))).toBe(false);
  });
});
