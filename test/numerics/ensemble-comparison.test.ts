// psibox ensemble beside the single-mode picture: a relaxed 1D soliton (one mode holds nearly every particle) at
// N = 1000, where the mean field dephases within 100 Myr. The ensemble's |⟨b⟩|/√N and the mode's smallest quadrature
// variance follow the Kerr mode with the Hartree χ of the sidecar while the accumulated phase X is small
// (|X| < 0.02 here), and the Kerr mode with the adiabatic χ_ad is resolved apart. The uniform boxes, where the
// ensemble, the tangent-linear depletion and the exact Bogoliubov theory must all agree, are in ensemble.test.ts.
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun } from "../../src/config/resolve.js";
import { runEnsemble } from "../../src/ensemble/ensemble.js";
import { runCompanion } from "../../src/app/ensemble-companion.js";
import { makeWork, readJson, removeWork, writeIn } from "../helpers/cli.js";

let work: string;
beforeAll(() => (work = makeWork("ensemble-kerr")));
afterAll(() => removeWork(work));

type C = [number, number];
const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const cexp = (z: C): C => [Math.exp(z[0]) * Math.cos(z[1]), Math.exp(z[0]) * Math.sin(z[1])];

/**
 * The Kerr oscillator H = (ħχ/2) b†b†bb from a coherent state of real amplitude √N, after X = χt (Yurke & Stoler 1986,
 * PRL 57, 13; Kitagawa & Yamamoto 1986, PRA 34, 3974): ⟨b⟩ = √N exp(N(e^{−iX} − 1)), ⟨b²⟩ = N e^{−iX} exp(N(e^{−2iX} − 1)),
 * ⟨b†b⟩ = N; |⟨b⟩|/√N and V_min = 1/2 + N − |⟨b⟩|² − |⟨b²⟩ − ⟨b⟩²| (computed independently of kerr.ts).
 */
function kerrMode(n: number, x: number): { meanField: number; vMin: number } {
  const b = mul([Math.sqrt(n), 0], cexp([n * (Math.cos(x) - 1), -n * Math.sin(x)]));
  const b2 = mul(cexp([0, -x]), mul([n, 0], cexp([n * (Math.cos(2 * x) - 1), -n * Math.sin(2 * x)])));
  const bb = mul(b, b);
  const abs2 = b[0] ** 2 + b[1] ** 2;
  return { meanField: Math.sqrt(abs2 / n), vMin: 0.5 + n - abs2 - Math.hypot(b2[0] - bb[0], b2[1] - bb[1]) };
}

describe("single-mode case: a relaxed 1D soliton at N = 1000 against the Kerr mode", () => {
  it("|⟨b⟩|/√N and V_min follow the Kerr mode of the Hartree χ within 3 errors while X is small; the adiabatic χ_ad is resolved apart", async () => {
    const text =
      `[grid]\ncells = 64\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "100 Myr"\n` +
      `[initial]\nkind = "ground-state"\nmass = "1e10 Msun"\nguess_width = "1 kpc"\n[output]\ntime_unit = "Myr"\n` +
      `[ensemble]\nmembers = 64\nparticles = 1000\nsamples = 4\nnoise_seed = 3\n`;
    const run = resolveRun(loadConfig(writeIn(work, "soliton.toml", text)), "soliton", work);
    const dir = path.join(work, "soliton");
    const result = await runEnsemble(run, { workers: 2, dir, companion: runCompanion });
    const rows = result.comparison!.rows;
    expect(Math.abs(rows.at(-1)!.x)).toBeGreaterThan(0.01);
    expect(Math.abs(rows.at(-1)!.x)).toBeLessThan(0.03);
    for (const r of rows.slice(1)) {
      const kerr = kerrMode(1000, r.x);
      expect(Math.abs(r.meanFieldKerr / kerr.meanField - 1)).toBeLessThan(1e-9);
      expect(Math.abs(r.meanField.value - kerr.meanField)).toBeLessThan(3 * r.meanField.error);
      expect(Math.abs(r.vMin.value - kerr.vMin)).toBeLessThan(3 * r.vMin.error);
    }
    const end = rows.at(-1)!;
    expect(end.meanField.value).toBeLessThan(0.9); // the mean field has visibly dephased
    expect(Math.abs(end.meanField.value - kerrMode(1000, end.xAdiabatic).meanField)).toBeGreaterThan(5 * end.meanField.error);
    // summary.json: the clocks at the same level, |⟨b⟩|²/N = 1/e: the adiabatic Kerr mode rings within the span, the others later
    const clocks = (readJson(path.join(dir, "summary.json"))["comparison"] as { meanfield_clocks: Record<string, { time: number | null }> }).meanfield_clocks;
    expect(clocks["kerr_adiabatic"]!.time).toBeGreaterThan(90);
    expect(clocks["kerr"]!.time).toBeNull();
    expect(clocks["ensemble"]!.time).toBeNull();
  });
});
