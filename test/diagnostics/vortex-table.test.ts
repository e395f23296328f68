// The vortex table as psibox analyze writes it: on the analysis's helper thread (ψ read from shared memory) the same
// bytes and totals as on this thread, the bytes those of the text as findVortices' points written row by row.
import { afterAll, describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { findVortices } from "../../src/diagnostics/vortices.js";
import { csvTable } from "../../src/report/csv-table.js";
import { vortexJobOf, vortexTable } from "../../src/report/vortex-table.js";
import { AnalysisHelper } from "../../src/report/analysis-helper.js";
import { gaussianComplexField } from "../helpers/random-field.js";

const helper = new AnalysisHelper();
afterAll(() => helper.close());

/** ψ of `grid` copied into shared memory, as analyze reads it. */
function sharedPsi(grid: Grid, seed: number): Float64Array {
  const psi = gaussianComplexField(grid, (k2) => Math.exp(-k2 / 200), seed);
  const shared = new Float64Array(new SharedArrayBuffer(psi.byteLength));
  shared.set(psi);
  return shared;
}

describe("the vortex table", () => {
  it.each([
    { cells: [16, 8, 32], lengths: [1, 0.6, 1.6] },
    { cells: [16, 32], lengths: [1, 1.8] },
  ])("$cells: on the helper thread the same text and totals as on this thread, and the text is findVortices' points row by row", async ({ cells, lengths }) => {
    const grid = new Grid(cells, lengths);
    const psi = sharedPsi(grid, 11);
    const kpc = 2.5;
    const here = vortexTable(grid, psi, kpc);
    const census = findVortices(grid, psi);
    expect(census.points.length).toBeGreaterThan(10);
    const rows = census.points.map((p) => (grid.dims === 3 ? [...p.position.map((x) => x * kpc), p.normal + 1, p.charge, p.length * kpc] : [...p.position.map((x) => x * kpc), p.charge]));
    const header = grid.dims === 3 ? ["x_kpc", "y_kpc", "z_kpc", "normal_axis", "charge", "length_kpc"] : ["x_kpc", "y_kpc", "charge"];
    expect(Buffer.from(here.csv).toString("latin1")).toBe(csvTable(header, rows));
    expect(here.report.piercings).toBe(census.points.length);
    const { points, ...totals } = census;
    expect(here.report).toMatchObject(totals);
    expect(here.report.points).toEqual(grid.dims === 2 ? points : []);
    const there = await helper.vortices(vortexJobOf(grid, psi, kpc)!);
    expect(there.csv).toEqual(here.csv);
    expect(there.report).toEqual(here.report);
  });

  it("needs ψ in shared memory to go to another thread", () => {
    const grid = new Grid([8, 8, 8], [1, 1, 1]);
    expect(vortexJobOf(grid, new Float64Array(2 * grid.size), 1)).toBeUndefined();
  });
});
