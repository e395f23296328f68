// Halo tracks from the CLI: a soliton (the core profile of Schive, Chiueh & Broadhurst 2014) boosted to 25 km/s in
// a static 32³ box is followed by psibox analyze along its straight path (Galilean invariance of Schrödinger–Poisson:
// it moves at its boost velocity, v t, computed independently here), and psibox clocks --track puts the mode's region
// on it: the particles it holds stay constant (the soliton carries its mass along) while a sphere left at the start
// loses them; bad input gives one line and exit code 2 (a definition that needs a cosmology in a static box: halos.test.ts).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, readCsv, removeWork, runPsibox, writeIn } from "../helpers/cli.js";

let work: string;
const CELL = 20 / 32; // kpc
const V = 25; // km/s
const KPC_PER_KM_S_MYR = (1e3 * 3.15576e13) / 3.0856775814913673e19; // kpc travelled in one Myr at 1 km/s (Julian year, IAU parsec)

const soliton = (center: string, velocity: string) => `[grid]\ncells = [32, 32, 32]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "150 Myr"\n[initial]\nkind = "solitons"\nprofile = "core-fit"\n[[initial.soliton]]\nmass = "1e8 Msun"\ncenter = [${center}]\nvelocity = [${velocity}]\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "50 Myr"\n[sidecar]\nenabled = false\n`;

beforeAll(() => {
  work = makeWork("tracks");
  writeIn(work, "moving.toml", soliton(`"7 kpc", "10 kpc", "10 kpc"`, `"${V} km/s", "0 km/s", "0 km/s"`));
  writeIn(work, "other.toml", soliton(`"10 kpc", "10 kpc", "10 kpc"`, `"0 km/s", "0 km/s", "0 km/s"`));
  expect(runPsibox(work, ["run", "moving.toml", "-q"]).code).toBe(0);
  expect(runPsibox(work, ["ic", "other.toml", "-q"]).code).toBe(0);
});
afterAll(() => removeWork(work));

describe("halo tracks from the command line", () => {
  it("follows a boosted soliton along v t to 0.1 cell, and clocks --track keeps its particles where a fixed sphere loses them", () => {
    const r = runPsibox(work, ["analyze", "output/moving", "--no-pictures", "--diagnostics", "none", "--overdensity", "20m"]);
    expect(r.code, r.stderr).toBe(0);
    const rows = readCsv(path.join(work, "output/moving/analysis/tracks.csv"));
    expect(rows).toHaveLength(4);
    rows.forEach((row, j) => {
      expect(row["track"]).toBe("1");
      expect(row["snapshot"]).toBe(String(j));
      const expected = 7 + V * 50 * j * KPC_PER_KM_S_MYR;
      expect(Math.abs(Number(row["x_kpc"]) - expected) / CELL, `snapshot ${j}`).toBeLessThan(0.1);
      expect(row["core_resolved"]).toBe("1");
    });
    expect(readCsv(path.join(work, "output/moving/analysis/snap_00003/halos.csv"))[0]!["track"]).toBe("1");
    const tracked = runPsibox(work, ["clocks", "output/moving", "--track", "1", "--out", "tracked"]);
    expect(tracked.code, tracked.stderr).toBe(0);
    expect(tracked.stdout).toMatch(/^4 snapshots, mode: track 1 \(a sphere of [\d.]+ kpc following it\)/);
    const n = readCsv(path.join(work, "tracked/snapshot-clocks.csv")).map((c) => Number(c["particles_N"]));
    // measured up to 6.5e-3: the core profile is close to, not exactly, the ground state, and its outskirts breathe
    for (const x of n) expect(Math.abs(x / n[0]! - 1)).toBeLessThan(1e-2);
    const radius = `${Number(JSON.parse(fs.readFileSync(path.join(work, "tracked/snapshot-clocks.json"), "utf8")).track.radius_kpc)} kpc`;
    const fixed = runPsibox(work, ["clocks", "output/moving", "--region", "sphere", "--center", "7 kpc, 10 kpc, 10 kpc", "--radius", radius, "--out", "fixed", "--json"]);
    const fixedRows = JSON.parse(fixed.stdout).rows as { particles_N: number }[];
    expect(fixedRows.at(-1)!.particles_N / fixedRows[0]!.particles_N).toBeLessThan(0.5); // the soliton has moved 6 cells: most of it has left
    const fixedRate = JSON.parse(fixed.stdout).outflow_loss_rate_per_s as number;
    const trackedRate = JSON.parse(fs.readFileSync(path.join(work, "tracked/snapshot-clocks.json"), "utf8")).outflow_loss_rate_per_s as number;
    expect(fixedRate).toBeGreaterThan(0);
    expect(Math.abs(trackedRate)).toBeLessThan(0.02 * fixedRate); // measured 0.7%
  });

  it("refuses a track that does not exist, --track with another region and snapshots of two runs (in clocks and in analyze): one line, exit 2", () => {
    // the run's analysis (the track table) was written by the test above
    const table = path.join(work, "output/moving/analysis/tracks.csv");
    const before = fs.readFileSync(table, "utf8");
    fs.copyFileSync(path.join(work, "output/other/snapshots/snap_00000.h5"), path.join(work, "foreign.h5"));
    const cases: [string[], RegExp][] = [
      [["clocks", "output/moving", "--track", "7"], /^psibox: --track: no track 7 in output\/moving\/analysis\/tracks\.h5; it has track 1 only$/],
      [["clocks", "output/moving", "--track", "1", "--region", "densest", "--radius", "1 kpc"], /^psibox: --track: the region follows the tracked halo; leave out --region "densest"$/],
      [["clocks", "output/moving/snapshots/snap_00001.h5", "foreign.h5", "--track", "1", "--track-table", "output/moving/analysis/tracks.h5"], /^psibox: foreign\.h5: a snapshot of another run than .*snap_00001\.h5 .*needs the snapshots of one run$/],
    ];
    for (const [args, message] of cases) {
      const bad = runPsibox(work, args);
      expect(bad.code, args.join(" ")).toBe(2);
      expect(bad.stderr.trim()).toMatch(message);
      expect(bad.stderr.trim().split("\n")).toHaveLength(1);
    }
    // a snapshot of another run slipped into the run's folder: refused before anything is written
    fs.copyFileSync(path.join(work, "foreign.h5"), path.join(work, "output/moving/snapshots/snap_00009.h5"));
    const mixed = runPsibox(work, ["analyze", "output/moving", "--no-pictures", "--overdensity", "20m"]);
    expect(mixed.code).toBe(2);
    expect(mixed.stderr.trim()).toMatch(/^psibox: .*snap_00009\.h5: a snapshot of another run than .*snap_00000\.h5 \(its grid, particle, background or initial config differ\); following halos through a run needs the snapshots of one run$/);
    expect(fs.readFileSync(table, "utf8")).toBe(before);
    fs.rmSync(path.join(work, "output/moving/snapshots/snap_00009.h5"));
  });
});
