// psibox ic and the initial-condition kinds from the CLI.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot } from "../../src/io/snapshot.js";
import { makeWork, removeWork, runPsibox } from "../helpers/cli.js";

let work: string;
beforeAll(async () => {
  await loadHdf5();
  work = makeWork("ic");
});
afterAll(() => removeWork(work));

const psibox = (args: string[]) => runPsibox(work, args);

const COSMO = `[grid]
cells = [16, 16, 16]
box = "2 Mpc/h"
[particle]
mass = "1e-22 eV"
[background]
kind = "lcdm"
[span]
start_redshift = 100
[initial]
kind = "cosmological"
seed = 5
`;

describe("psibox ic", () => {
  it("writes the initial snapshot and the spectrum table, and psibox run uses the same field", () => {
    fs.writeFileSync(path.join(work, "cosmo.toml"), COSMO);
    const r = psibox(["ic", "cosmo.toml", "-q"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    expect(r.stdout).toBe("wrote the initial conditions to output/cosmo/snapshots/snap_00000.h5\n");
    const table = fs.readFileSync(path.join(work, "output/cosmo/initial-power.csv"), "utf8").trim().split("\n");
    expect(table[0]).toBe("k_h_per_Mpc,k_per_Mpc,P_z0_Mpc3_per_h3,P_start_Mpc3_per_h3,P_z0_Mpc3,P_start_Mpc3,transfer");
    expect(table).toHaveLength(201);
    const ic = readSnapshot(path.join(work, "output/cosmo/snapshots/snap_00000.h5"));
    expect(ic.meta.redshift).toBeCloseTo(100, 9);
    expect(psibox(["run", "cosmo.toml", "-q", "--set", "span.end_redshift=80", "--set", "output.dir=run"]).code).toBe(0);
    const first = readSnapshot(path.join(work, "run/snapshots/snap_00000.h5"));
    expect(Buffer.from(first.psi.buffer).equals(Buffer.from(ic.psi.buffer))).toBe(true);
  });

  it("warns clearly when the field is already nonlinear at the start", () => {
    fs.writeFileSync(path.join(work, "late.toml"), COSMO.replace("start_redshift = 100", "start_redshift = 0.5").replace('"2 Mpc/h"', '"0.5 Mpc/h"').replace("[16, 16, 16]", "[32, 32, 32]").replace('"1e-22 eV"', '"1e-20 eV"'));
    const r = psibox(["ic", "late.toml"]);
    expect(r.code).toBe(0);
    // headed by the command the user gave
    expect(r.stderr).toMatch(/^psibox ic "late"\n├─ grid /);
    expect(r.stderr).toMatch(/warning: span\.start_redshift: the field is already nonlinear at the start \(max \|δ\| = [\d.]+ > 1.*\); start at a higher redshift or use a coarser grid/);
  });

  it("rejects σ₈ ≤ 0, cosmological fields without ΛCDM, and solitons that do not fit", () => {
    fs.writeFileSync(path.join(work, "s8.toml"), COSMO.replace("seed = 5", "seed = 5\nsigma_8 = 0"));
    expect(psibox(["ic", "s8.toml"]).stderr).toBe("psibox: initial.sigma_8: must be positive, got 0\n");
    fs.writeFileSync(path.join(work, "static.toml"), COSMO.replace('kind = "lcdm"', 'kind = "static"').replace("start_redshift = 100", 'duration = "1 Gyr"').replace('"2 Mpc/h"', '"2 Mpc"'));
    expect(psibox(["ic", "static.toml"]).stderr).toBe('psibox: initial.kind: "cosmological" needs background.kind = "lcdm"\n');
    fs.writeFileSync(
      path.join(work, "big.toml"),
      `[grid]\ncells = [32, 32, 32]\nbox = "1 kpc"\ngravity = "isolated"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "1 Myr"\n` +
        `[initial]\nkind = "solitons"\n[[initial.soliton]]\nmass = "1e8 Msun"\ncenter = ["0.5 kpc", "0.5 kpc", "0.5 kpc"]\n`,
    );
    const big = psibox(["ic", "big.toml"]);
    expect(big.code).toBe(2);
    expect(big.stderr).toMatch(/^psibox: initial\.soliton\[0\]: the soliton \(r₉₉ = [\d.]+ kpc\) does not fit in the box/);
  });

  it("builds random soliton sets and noisy uniform fields from their seeds", () => {
    fs.writeFileSync(
      path.join(work, "halo.toml"),
      `[grid]\ncells = [64, 64]\nbox = "40 kpc"\ngravity = "isolated"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "1 Myr"\n` +
        `[initial]\nkind = "random-solitons"\ncount = 5\nmass = "5e8 Msun"\nseed = 9\nvelocity_dispersion = "10 km/s"\n`,
    );
    expect(psibox(["ic", "halo.toml", "-q"]).code).toBe(0);
    const snap = readSnapshot(path.join(work, "output/halo/snapshots/snap_00000.h5"));
    expect(snap.meta.massMsun / 2.5e9).toBeCloseTo(1, 10); // five solitons of 5e8 Msun
    expect(fs.readFileSync(path.join(work, "output/halo/config.toml"), "utf8")).toMatch(/kind = "random-solitons"/);
    fs.writeFileSync(
      path.join(work, "noise.toml"),
      `[grid]\ncells = 256\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "1 Myr"\n` +
        `[initial]\nkind = "white-noise"\nmean_density = "1e7 Msun/kpc^3"\namplitude = 0.1\nseed = 3\n`,
    );
    expect(psibox(["ic", "noise.toml", "-q"]).code).toBe(0);
    const noise = readSnapshot(path.join(work, "output/noise/snapshots/snap_00000.h5"));
    let s = 0;
    let s2 = 0;
    for (let i = 0; i < noise.psi.length; i += 2) {
      const d = noise.psi[i]! ** 2 / 1e7 - 1;
      s += d;
      s2 += d * d;
    }
    const n = noise.psi.length / 2;
    expect(Math.abs(s / n)).toBeLessThan(4 * 0.1 / Math.sqrt(n));
    expect(Math.sqrt(s2 / n)).toBeCloseTo(0.1, 1);
  });
});
