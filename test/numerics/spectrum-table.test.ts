// Cosmological fields from a user's table of P(k) or T(k): a tabulated copy of the built-in Eisenstein & Hu
// spectrum must give the same initial field as the formula, to the table's log–log interpolation error.
// Reference: psibox's Eisenstein & Hu 1998 (no-wiggle) formula, checked against published values elsewhere in the
// suite; the tolerance is the log–log interpolation error Δ²/8 |d² ln P/d(ln k)²| of the table (computed independently).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { checkConfig, parseTomlText } from "../../src/config/load.js";
import { resolveRun, type ResolvedRun } from "../../src/config/resolve.js";
import { Grid } from "../../src/grid/grid.js";
import { makeBackground } from "../../src/physics/cosmology/background.js";
import { LinearPower, transferEisensteinHu } from "../../src/physics/cosmology/power.js";
import { buildCosmological } from "../../src/initial-conditions/cosmological-field.js";

let dir: string;
beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-table-"));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function config(extra: string): ResolvedRun {
  const text = `[grid]\ncells = [16, 16, 16]\nbox = "2 Mpc/h"\n[particle]\nmass = "1e-22 eV"\n[background]\nkind = "lcdm"\n[span]\nstart_redshift = 100\n[initial]\nkind = "cosmological"\nseed = 5\n${extra}\n`;
  return resolveRun(checkConfig(parseTomlText(text, "t.toml")), "t", dir);
}

function field(run: ResolvedRun): Float64Array {
  if (run.initial.kind !== "cosmological") throw new Error("not cosmological");
  const grid = new Grid(run.grid.cells, run.grid.lengths);
  const bg = makeBackground(run.background);
  return buildCosmological(run.initial, grid, bg, bg.scaleFactor(run.span.startTime)).psi;
}

/** max |δψ| / max |ψ − mean| (the field's fluctuation, where the spectra act). */
function relativeFluctuationError(a: Float64Array, b: Float64Array): number {
  let mean = 0;
  for (let i = 0; i < b.length; i += 2) mean += b[i]!;
  mean /= b.length / 2;
  let num = 0;
  let den = 0;
  for (let i = 0; i < a.length; i++) {
    num = Math.max(num, Math.abs(a[i]! - b[i]!));
    den = Math.max(den, Math.abs(b[i]! - (i % 2 === 0 ? mean : 0)));
  }
  return num / den;
}

describe("tabulated spectra", () => {
  const formula = () => config("");
  const h = 0.6736;
  // 1200 points from 1e-4 to 1e2 h/Mpc: Δln k = 0.0115, interpolation error ≈ Δ²/8 |d²ln P/d(ln k)²| ≈ 2e-5
  const ks = Array.from({ length: 1200 }, (_, i) => 1e-4 * Math.pow(1e6, i / 1199));

  it("P(k) of Eisenstein & Hu (no wiggles) in h/Mpc and (Mpc/h)³ gives the formula's field to 1e-4", () => {
    const run = formula();
    if (run.initial.kind !== "cosmological") throw new Error("not cosmological");
    const cdm = new LinearPower({ ...run.initial.power, m22: undefined }); // the table holds cold matter; psibox applies T_FDM
    const lines = ["# k [h/Mpc]   P(k) [(Mpc/h)^3] at z = 0", "k P", ...ks.map((k) => `${k} ${cdm.at(k * h) * h ** 3}`)];
    fs.writeFileSync(path.join(dir, "p.txt"), lines.join("\n") + "\n");
    const tabulated = config(`transfer = "table"\nspectrum_table = "p.txt"`);
    expect(relativeFluctuationError(field(tabulated), field(run))).toBeLessThan(1e-4);
  });

  it("T(k) of Eisenstein & Hu in 1/Mpc, normalised to sigma_8 over the table, gives the formula's field to 1e-4", () => {
    const run = formula();
    if (run.initial.kind !== "cosmological") throw new Error("not cosmological");
    const lines = ks.map((k) => `${k * h}, ${transferEisensteinHu(k * h, run.initial.kind === "cosmological" ? run.initial.power : (undefined as never))}`);
    fs.writeFileSync(path.join(dir, "t.txt"), lines.join("\n") + "\n");
    const tabulated = config(`transfer = "table"\nspectrum_table = "t.txt"\ntable_quantity = "transfer"\ntable_k_unit = "1/Mpc"`);
    expect(relativeFluctuationError(field(tabulated), field(run))).toBeLessThan(1e-4);
  });

  it("rejects keys of a table without transfer = \"table\", and a wrong unit, naming the key", () => {
    expect(() => config(`spectrum_table = "p.txt"`)).toThrow(/initial\.spectrum_table: needs initial\.transfer = "table"/);
    expect(() => config(`transfer = "table"\nspectrum_table = "p.txt"\ntable_k_unit = "Mpc"`)).toThrow(/initial\.table_k_unit: "Mpc" is not an inverse length/);
    expect(() => config(`transfer = "table"`)).toThrow(/initial\.spectrum_table: missing/);
  });
});
