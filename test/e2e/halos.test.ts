// psibox analyze's halo catalogue from the CLI: an NFW halo (Navarro, Frenk & White 1996) on the mean
// background of a comoving ΛCDM box at z = 3, imported from a .npy file, found at 200 × the critical
// density with the mass and proper radius of the analytic profile (the critical density computed
// independently here from H0 and Ω_m); halos.h5 carries the same numbers; bad flags give one line.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import h5wasm from "h5wasm/node";
import { loadHdf5 } from "../../src/io/h5.js";
import { makeWork, readCsv, readJson, removeWork, runPsibox } from "../helpers/cli.js";
import { writeNpy } from "../helpers/npy.js";

let work: string;
beforeAll(async () => {
  await loadHdf5();
  work = makeWork("halos");
});
afterAll(() => removeWork(work));

// flat ΛCDM, H0 = 67.36 km/s/Mpc, Ω_m = 0.3153, z = 3; G in kpc (km/s)² / Msun (IAU 2015 GM☉, CODATA 2018 G)
const G = 6.6743e-11 * (1.988409870698051e30 / 3.0856775814913673e19) / 1e6;
const Z = 3;
const A = 1 / (1 + Z);
const H = (67.36 / 1000) * Math.sqrt(0.3153 * (1 + Z) ** 3 + 0.6847); // km/s/kpc
const CRIT = (3 * H * H) / (8 * Math.PI * G); // Msun/kpc³, physical
const MEAN_COMOVING = 0.3153 * ((3 * (67.36 / 1000) ** 2) / (8 * Math.PI * G)); // Msun/kpc³

describe("the halo catalogue of psibox analyze", () => {
  it("finds an NFW halo at 200c in a comoving box: M and proper R within 1% of the profile's integrals", () => {
    const n = 64;
    const box = 1600; // comoving kpc: cells of 25 kpc
    const dx = box / n;
    const rs = 3 * dx;
    const c = 4; // R_200c = 12 cells, comoving
    const R = c * rs;
    // ρ_s so that the mean comoving density inside R (profile plus background) is 200 ρ_crit a³
    const nfwMass = (r: number) => 4 * Math.PI * rs ** 3 * (Math.log(1 + r / rs) - r / rs / (1 + r / rs));
    const volume = (4 / 3) * Math.PI * R ** 3;
    const rhoS = (200 * CRIT * A ** 3 * volume - MEAN_COMOVING * volume) / nfwMass(R);
    const centre = [31.4 * dx, 32.3 * dx, 30.8 * dx];
    const data = new Float64Array(2 * n ** 3);
    const wrap = (d: number) => d - box * Math.round(d / box);
    for (let i = 0, p = 0; i < n; i++)
      for (let j = 0; j < n; j++)
        for (let k = 0; k < n; k++, p++) {
          const r = Math.max(Math.hypot(wrap(i * dx - centre[0]!), wrap(j * dx - centre[1]!), wrap(k * dx - centre[2]!)), 1e-3 * dx);
          data[2 * p] = Math.sqrt(MEAN_COMOVING + rhoS / (r / rs) / (1 + r / rs) ** 2);
        }
    writeNpy(path.join(work, "nfw.npy"), [n, n, n], data);
    const imported = runPsibox(work, ["import", "nfw.npy", "--out", "nfw.h5", "--box", "1600 kpc", "--particle-mass", "1e-22 eV", "--redshift", "3", "--hubble", "67.36 km/s/Mpc", "--omega-matter", "0.3153"]);
    expect(imported.code, imported.stderr).toBe(0);
    const r = runPsibox(work, ["analyze", "nfw.h5", "--out", "an", "--no-pictures", "--overdensity", "200c", "--diagnostics", "none"]);
    expect(r.code, r.stderr).toBe(0);
    const rows = readCsv(path.join(work, "an/halos.csv"));
    expect(rows).toHaveLength(1);
    const mass = 200 * CRIT * A ** 3 * volume; // comoving density × comoving volume = mass
    expect(Math.abs(Number(rows[0]!["M_Msun"]) / mass - 1)).toBeLessThan(0.01);
    expect(Math.abs(Number(rows[0]!["R_kpc"]) / (A * R) - 1)).toBeLessThan(0.01 / 3);
    expect(Number(rows[0]!["R_cells"])).toBeCloseTo(12, 1);
    expect(rows[0]!["resolved"]).toBe("1");
    const summary = readJson<{ halos: { definition: string; threshold_density_Msun_kpc3: number; count: number } }>(path.join(work, "an/summary.json")).halos;
    expect(summary.definition).toBe("200c");
    expect(Math.abs(summary.threshold_density_Msun_kpc3 / (200 * CRIT) - 1)).toBeLessThan(1e-6);
    // peaks.csv is comoving: the core relation there is 1.9 a⁻¹ (m/1e-23 eV)⁻² (r_c/kpc)⁻⁴ Msun/pc³ of the
    // comoving r_c (Schive, Chiueh & Broadhurst 2014), evaluated here independently
    const peak = readCsv(path.join(work, "an/peaks.csv"))[0]!;
    const rc = Number(peak["core_fit_r_c_kpc"]);
    expect(Number(peak["core_relation_rho_c_Msun_kpc3"]) / ((1.9e9 / A) * 10 ** -2 * rc ** -4) - 1).toBeCloseTo(0, 6);
    // the halo's core: this NFW cusp is one cell across, so it is not fitted and its upper limit is given
    expect(rows[0]!["core_resolved"]).toBe("0");
    expect(Number(rows[0]!["core_r_c_upper_kpc"])).toBeGreaterThan(0);
    const f = new h5wasm.File(path.join(work, "an/halos.h5"), "r");
    const dataset = (name: string) => f.get(name) as InstanceType<typeof h5wasm.Dataset>;
    expect(Math.abs((dataset("M_Msun").value as Float64Array)[0]! / Number(rows[0]!["M_Msun"]) - 1)).toBeLessThan(1e-7);
    expect(dataset("R_kpc").attrs["units"]!.value).toBe("kpc");
    f.close();
  });

  it("refuses a definition a static box cannot use, a malformed one and a minimum mass that is not a mass, before writing anything", () => {
    const data = Float64Array.from({ length: 2 * 8 ** 3 }, (_, i) => (i % 2 === 0 ? 1 : 0));
    writeNpy(path.join(work, "flat.npy"), [8, 8, 8], data);
    expect(runPsibox(work, ["import", "flat.npy", "--out", "flat.h5", "--box", "10 kpc", "--particle-mass", "1e-22 eV"]).code).toBe(0);
    const cases: [string[], RegExp][] = [
      [["--overdensity", "vir"], /^psibox: --overdensity: "vir" needs a cosmology, and flat\.h5 is a static box; use e\.g\. 200m/],
      [["--overdensity", "200x"], /^psibox: --overdensity: "200x" is not a definition; valid: Δ ≥ 1 followed by c/],
      [["--halo-min-mass", "3 kpc"], /^psibox: --halo-min-mass: "3 kpc" is not a mass/],
    ];
    for (const [flags, message] of cases) {
      const bad = runPsibox(work, ["analyze", "flat.h5", "--out", "bad", ...flags]);
      expect(bad.code).toBe(2);
      expect(bad.stderr.trim()).toMatch(message);
      expect(bad.stderr.trim().split("\n")).toHaveLength(1);
      expect(fs.existsSync(path.join(work, "bad"))).toBe(false);
    }
  });
});
