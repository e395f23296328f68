// The table of each mode's shell (modeShells, which takes half of each row's |k| from the mirrored modes) against
// a direct count of every mode's |k| in storage order (computed independently): the same shells, Σ|k| and counts.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { modeShells, Shells } from "../../src/diagnostics/shells.js";

describe("the shells of a grid's modes", () => {
  it.each([
    { cells: [8, 16, 32], lengths: [1, 1.3, 2] },
    { cells: [16, 4], lengths: [1, 0.8] },
    { cells: [64], lengths: [3] },
  ])("$cells: every mode's shell, Σ|k| and the mode counts equal a direct count bit for bit", ({ cells, lengths }) => {
    const grid = new Grid(cells, lengths);
    const table = modeShells(grid);
    const direct = new Shells(grid, 0);
    const [n0, n1, n2] = grid.shape;
    const k = [grid.wavenumbers(0), grid.wavenumbers(1), grid.wavenumbers(2)];
    const bins: number[] = [];
    for (let a = 0; a < n0; a++) for (let b = 0; b < n1; b++) for (let c = 0; c < n2; c++) bins.push(direct.addMode(Math.sqrt(k[0]![a]! * k[0]![a]! + k[1]![b]! * k[1]![b]! + k[2]![c]! * k[2]![c]!)));
    expect(Array.from(table.bins)).toEqual(bins);
    expect(table.ksum).toStrictEqual(direct.sumsOfK());
    expect(table.modes).toStrictEqual(direct.modeCounts());
  });
});
