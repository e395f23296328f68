// Snapshots opened by standard tools without psibox: xarray with the h5netcdf engine (labelled arrays,
// coordinates, units) and ncdump (netCDF-C's own reader). Debian's python3-xarray, python3-h5netcdf
// and netcdf-bin; .ci/run installs them.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot, writeSnapshot, type Snapshot } from "../../src/io/snapshot.js";
import { pythonWith } from "../helpers/python.js";

let dir: string;
beforeAll(async () => {
  await loadHdf5();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-nc-"));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const RHO0 = 2.5e7; // Msun/kpc³

/** ρ = ρ0 (1 + ½ sin 2πx/L) with a phase: the mass is ρ0 V exactly (the sine sums to zero on the periodic grid). */
function field(cells: number[], boxKpc: number[], lcdm: boolean): Snapshot {
  const n = cells.reduce((p, c) => p * c, 1);
  const psi = new Float64Array(2 * n);
  const inner = n / (cells[0] as number);
  for (let i = 0; i < n; i++) {
    const i0 = Math.floor(i / inner);
    const rho = RHO0 * (1 + 0.5 * Math.sin((2 * Math.PI * i0) / (cells[0] as number)));
    const phase = 0.37 * i;
    psi[2 * i] = Math.sqrt(rho) * Math.cos(phase);
    psi[2 * i + 1] = Math.sqrt(rho) * Math.sin(phase);
  }
  const depth = (boxKpc[0] as number) ** (3 - cells.length);
  return {
    meta: {
      kind: "snapshot",
      software: "psibox test",
      step: 7,
      time: lcdm ? 2.1546 : 40,
      timeUnit: lcdm ? "Gyr" : "Myr",
      scaleFactor: lcdm ? 0.25 : 1,
      redshift: lcdm ? 3 : null,
      cells,
      boxSizeKpc: boxKpc,
      particleMassEv: 1e-22,
      gravity: "periodic",
      background: lcdm ? { kind: "lcdm", hubbleKmSMpc: 67.36, omegaMatter: 0.3153, omegaRadiation: 0 } : { kind: "static" },
      massMsun: RHO0 * boxKpc.reduce((p, b) => p * b, 1) * depth,
      config: "[grid]\ncells = 4\n",
      configSha256: "00",
    },
    psi,
  };
}

/** The same field as the first of two species, with a second species ψ/2 (a quarter of the mass). */
function twoSpecies(snap: Snapshot): Snapshot {
  const m = snap.meta.massMsun;
  const species = [
    { name: "light", particleMassEv: 1e-22, massMsun: m, scatteringLengthM: 0 },
    { name: "heavy", particleMassEv: 4e-22, massMsun: m / 4, scatteringLengthM: -2.5e-79 },
  ];
  return { ...snap, meta: { ...snap.meta, massMsun: 1.25 * m, species, scatteringLengthM: 0 }, speciesPsi: [snap.psi.map((v) => v / 2)] };
}

// The script reads the file with xarray alone and reports what it sees; the raw values go to a binary file.
const SCRIPT = `
import sys, json, numpy as np, xarray as xr
def look(file, raw):
  ds = xr.open_dataset(file, engine="h5netcdf")
  dims = list(ds["psi_re"].dims)
  coords = {d: ds[d].values.tolist() for d in dims}
  np.stack([ds["psi_re"].values.astype("<f8"), ds["psi_im"].values.astype("<f8")], axis=-1).tofile(raw)
  # the mass from the file alone: |psi|^2 summed times the cell volume, with a depth of the first side per missing axis
  rho = ds["psi_re"].values.astype("f8") ** 2 + ds["psi_im"].values.astype("f8") ** 2
  dx = [float(ds[d][1] - ds[d][0]) for d in dims]
  depth = (len(ds[dims[0]]) * dx[0]) ** (3 - len(dims))
  mass = float(rho.sum() * np.prod(dx) * depth)
  # several species: the names, which species each pair of variables holds, and the later species' masses
  names = ds.attrs["species"].split() if "species" in ds.attrs else []
  pairs = ["psi_re"] + ["psi_re_" + n for n in names[1:]]
  later = {n: float((ds["psi_re_" + n].values.astype("f8") ** 2 + ds["psi_im_" + n].values.astype("f8") ** 2).sum() * np.prod(dx) * depth) for n in names[1:]}
  return {
    "species": names, "species_of": [ds[v].attrs.get("species") for v in pairs], "species_mass": later,
    "scattering": [float(a) for a in np.atleast_1d(ds.attrs["species_scattering_length"])] if names else None,
    "scattering_units": ds.attrs.get("species_scattering_length_units"),
    "own_scattering": [float(ds.attrs["scattering_length"]), ds.attrs["scattering_length_units"]] if "scattering_length" in ds.attrs else None,
    "equations": ds.attrs["equations"],
    "dims": dims, "coords": coords, "mass": mass,
    "units": {v: ds[v].attrs.get("units") for v in dims + ["psi_re", "psi_im"]},
    "long_name": ds["psi_re"].attrs.get("long_name"),
    "attrs": {k: ds.attrs[k] for k in ["Conventions", "time_units", "mass_units", "cosmology", "constant_G_units", "unit_Msun_units"]},
    "numbers": {k: float(ds.attrs[k]) for k in ["time", "scale_factor", "constant_G", "constant_GM_sun", "unit_Msun", "mass"]},
    "redshift": float(ds.attrs["redshift"]) if "redshift" in ds.attrs else None,
  }
print(json.dumps([look(sys.argv[i], sys.argv[i + 1]) for i in range(1, len(sys.argv), 2)]))
`;

const python = pythonWith(["xarray", "h5netcdf"]);
const noPython = process.env["PSIBOX_NO_XARRAY"];
describe.skipIf(python === undefined && noPython !== undefined)(`snapshots in xarray (h5netcdf engine)${noPython ? `: not run, ${noPython}` : ""}`, () => {
  const cases: [number[], number[], boolean, "float64" | "float32", boolean?][] = [
    [[16], [3], true, "float64"],
    [[8, 4], [2, 1], false, "float64"],
    [[4, 8, 4], [4, 8, 4], true, "float32"],
    [[8, 4], [2, 1], false, "float64", true],
  ];
  const files = (i: number) => [path.join(dir, `f${i}.h5`), path.join(dir, `f${i}.bin`)] as const;
  let seenAll: Record<string, any>[] = [];
  beforeAll(() => {
    if (python === undefined) return;
    cases.forEach(([cells, box, lcdm, precision, species], i) => writeSnapshot(files(i)[0], species ? twoSpecies(field(cells, box, lcdm)) : field(cells, box, lcdm), precision));
    const r = spawnSync(python, ["-c", SCRIPT, ...cases.flatMap((_, i) => files(i))], { encoding: "utf8" });
    expect(r.stderr).toBe("");
    seenAll = JSON.parse(r.stdout);
  });
  cases.forEach(([cells, box, lcdm, precision, species], index) => {
    it(`${cells.length}D ${precision} ${lcdm ? "lcdm" : "static"}${species ? ", two species" : ""}: xarray → numpy equals psibox's reader bit for bit, coordinates at the cell centres, mass from the file alone`, () => {
      if (python === undefined) throw new Error("no python3 with xarray and h5netcdf found on PATH: install Debian's python3-xarray and python3-h5netcdf (or pip install xarray h5netcdf)");
      const [file, raw] = files(index);
      const seen = seenAll[index]!;
      const ours = readSnapshot(file).psi;
      const bytes = fs.readFileSync(raw);
      expect(Buffer.compare(bytes, Buffer.from(ours.buffer, ours.byteOffset, ours.byteLength))).toBe(0);
      expect(seen.dims).toEqual(["x", "y", "z"].slice(0, cells.length));
      // cell i of an axis of side L with n cells is centred at i·L/n (computed independently)
      cells.forEach((n, a) => {
        const coords = seen.coords[seen.dims[a]] as number[];
        expect(coords.length).toBe(n);
        coords.forEach((c, i) => expect(c).toBeCloseTo((i * (box[a] as number)) / n, 12));
      });
      expect(Object.values(seen.units)).toEqual([...cells.map(() => "kpc"), "(Msun/kpc^3)^(1/2)", "(Msun/kpc^3)^(1/2)"]);
      expect(seen.long_name).toMatch(/real part of the wave function/);
      // ρ0 V (analytic), from the file alone; float32 rounds ψ to 6e-8
      const exact = RHO0 * box.reduce((p, b) => p * b, 1) * (box[0] as number) ** (3 - cells.length);
      expect(Math.abs(seen.mass / exact - 1)).toBeLessThan(precision === "float64" ? 1e-12 : 3e-7);
      // a second species of a quarter of the mass (ψ/2) in its own pair of variables, each pair naming its species
      expect(seen.species).toEqual(species ? ["light", "heavy"] : []);
      expect(seen.species_of).toEqual([species ? "light" : null, ...(species ? ["heavy"] : [])]);
      if (species) expect(Math.abs(seen.species_mass.heavy / (exact / 4) - 1)).toBeLessThan(1e-12);
      // each species' own scattering length (0: none) beside its particle mass, and psibox's reader agrees
      expect(seen.scattering).toEqual(species ? [0, -2.5e-79] : null);
      expect(seen.scattering_units).toBe(species ? "m" : null);
      if (species) expect(readSnapshot(file).meta.species?.map((s) => s.scatteringLengthM)).toEqual([0, -2.5e-79]);
      // the first field's own scattering length at the root (a run writes it, 0 for none; this test's single-species files predate it)
      expect(seen.own_scattering).toEqual(species ? [0, "m"] : null);
      expect(readSnapshot(file).meta.scatteringLengthM).toBe(species ? 0 : undefined);
      // the equations name the contact term and its coefficient, so a reader needs nothing else
      expect(seen.equations).toMatch(/g\/\(m a\^3\) \|psi\|\^2 psi.*g = 4 pi hbar\^2 a_s \/ m with a_s = scattering_length/);
      expect(seen.attrs).toEqual({
        Conventions: "CF-1.10",
        time_units: lcdm ? "Gyr" : "Myr",
        mass_units: "Msun",
        cosmology: lcdm ? "flat LCDM (comoving box)" : "static (no expansion, scale factor 1)",
        constant_G_units: "m3 kg-1 s-2",
        unit_Msun_units: "kg",
      });
      // CODATA 2018 G and the IAU 2015 nominal GM_sun (from memory); Msun = GM_sun / G
      expect(seen.numbers.constant_G).toBe(6.6743e-11);
      expect(seen.numbers.constant_GM_sun).toBe(1.3271244e20);
      expect(seen.numbers.unit_Msun).toBe(1.3271244e20 / 6.6743e-11);
      expect(seen.numbers.scale_factor).toBe(lcdm ? 0.25 : 1);
      expect(seen.redshift).toBe(lcdm ? 3 : null);
    });
  });
});

const ncdump = spawnSync("ncdump", [], { encoding: "utf8" }).error === undefined;
describe("snapshot header read by ncdump (netCDF-C)", () => {
  it("lists the dimensions, coordinate and data variables with units, the global attributes and a checkpoint's state group", () => {
    if (!ncdump) throw new Error("ncdump not found: install Debian's netcdf-bin");
    const snap = field([8, 4], [2, 1], true);
    const file = path.join(dir, "cp.h5");
    const n = snap.psi.length / 2;
    writeSnapshot(file, {
      ...snap,
      meta: { ...snap.meta, kind: "checkpoint" },
      state: { psiCode: snap.psi, phiCode: snap.psi.subarray(0, n), timeCode: 1, massCode: 2, mass0Code: 2, steps: 7, wallTimeS: 1, snapshotsWritten: 2 },
    });
    const r = spawnSync("ncdump", ["-h", file], { encoding: "utf8" });
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
    const h = r.stdout;
    expect(h).toMatch(/dimensions:\s+x = 8 ;\s+y = 4 ;/);
    expect(h).toMatch(/double x\(x\) ;\s+x:long_name = "comoving x \(cell centres\)" ;\s+x:units = "kpc" ;/);
    expect(h).toMatch(/double psi_re\(x, y\) ;[\s\S]*?psi_re:units = "\(Msun\/kpc\^3\)\^\(1\/2\)" ;/);
    expect(h).toMatch(/double psi_im\(x, y\) ;/);
    expect(h).toMatch(/:Conventions = "CF-1\.10" ;/);
    expect(h).toMatch(/:redshift = 3\. ;/);
    expect(h).toMatch(/:constant_hbar_units = "J s" ;/);
    const state = h.slice(h.indexOf("group: state {"));
    expect(state).toMatch(/dimensions:[^:]*n_psi_code = 64 ;/);
    expect(state).toMatch(/dimensions:[^:]*n_phi_code = 32 ;/);
    expect(state).toMatch(/double psi_code\(n_psi_code\) ;/);
    expect(state).toMatch(/double phi_code\(n_phi_code\) ;/);
    expect(state).toMatch(/:steps = 7LL ;/);
  });
});
