// psibox analyze's granule statistics whichever other diagnostics are chosen with them (the energy split, whose
// measurements they reuse, or not), against granuleStats on fft.js on this thread (SimpleTransforms; fft.js is a
// general-purpose library from the registry), computed independently of the analysis's work grids.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { SimpleTransforms } from "../../src/fields/field-transforms.js";
import { granuleStats } from "../../src/diagnostics/granules.js";
import { loadHdf5 } from "../../src/io/h5.js";
import { readSnapshot, writeSnapshot } from "../../src/io/snapshot.js";
import { analyzeSnapshot } from "../../src/report/analyze.js";
import type { FieldDiagnostic } from "../../src/report/diagnostic-options.js";
import { physicalScales } from "../../src/report/field-diagnostics.js";
import { loadField } from "../../src/simulation/from-snapshot.js";
import { gaussianComplexField } from "../helpers/random-field.js";

let work: string;
let file: string;

beforeAll(async () => {
  await loadHdf5();
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-analyze-granules-"));
  file = path.join(work, "snap_00000.h5");
  const grid = new Grid([16, 16, 16], [1, 1, 1]);
  const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 400), 7);
  for (let i = 0; i < psi.length; i++) psi[i] = psi[i]! * 3e3;
  writeSnapshot(file, {
    meta: { kind: "snapshot", software: "test", step: 0, time: 0, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: [16, 16, 16], boxSizeKpc: [20, 20, 20], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 1, config: "", configSha256: "" },
    psi,
  });
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

it.each<{ only: FieldDiagnostic[] }>([{ only: ["granules"] }, { only: ["granules", "energy-split"] }, { only: ["granules", "vortices", "husimi"] }])("with $only: ξ(r) and the correlation length of fft.js's granule statistics to 1e-12 (the table to its 8 digits)", async ({ only }) => {
  const out = path.join(work, only.join("-"));
  const { summary } = await analyzeSnapshot(file, out, false, { only });
  const field = loadField(readSnapshot(file));
  const reference = granuleStats(field.grid, field.psi, field.scaleFactor, new SimpleTransforms(field.grid.shape));
  const s = physicalScales(field);
  const granules = summary["granules"] as Record<string, number>;
  expect(Math.abs(granules["correlation_length_kpc"]! / (reference.correlationLength * s.kpc) - 1)).toBeLessThan(1e-12);
  expect(Math.abs(granules["random_phase_quasi_particle_mass_Msun"]! / (reference.predictedQuasiParticleMass * s.mass) - 1)).toBeLessThan(1e-12);
  const xi = fs.readFileSync(path.join(out, "granule-correlation.csv"), "utf8").trim().split("\n").slice(1).map((l) => Number(l.split(",")[1]));
  expect(xi.length).toBe(reference.correlation.length);
  const xi0 = reference.correlation[0]!.xi;
  // the table's 8 significant digits
  xi.forEach((x, i) => expect(Math.abs(x - reference.correlation[i]!.xi)).toBeLessThan(1e-7 * Math.abs(x) + 1e-12 * xi0));
});
