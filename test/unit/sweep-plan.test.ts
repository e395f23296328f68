// The sweep's entries as planned from a config (no runs): their folder names and values, and the config errors of
// the [sweep] section. The values of a log range are its ends times powers of their ratio (computed independently).
import { describe, expect, it } from "vitest";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parse, stringify } from "smol-toml";
import { planSweep } from "../../src/batch/plan.js";
import { prepareSweepFolder } from "../../src/batch/sweep-folder.js";
import { entryStatus } from "../../src/batch/summary.js";
import { checkConfig } from "../../src/config/load.js";
import { clockPlot, sweptNumber } from "../../src/batch/sweep-report.js";
import { FREE_PACKET_1D } from "../helpers/configs.js";

const BASE = FREE_PACKET_1D;

const plan = (values: string) => planSweep(parse(`${BASE}[sweep]\n[sweep.values]\n${values}\n`) as Record<string, unknown>, "names", "/");

describe("sweep entries", () => {
  it("are named with as few digits as keep them apart (at least 4), and keep their values whole", () => {
    const p = plan(`"particle.mass" = { from = "1e-22 eV", to = "1e-21 eV", count = 4, scale = "log" }`);
    expect(p.entries.map((e) => e.name)).toEqual(["mass=1e-22eV", "mass=2.154e-22eV", "mass=4.642e-22eV", "mass=1e-21eV"]);
    // 10^(-22 + 1/3) and 10^(-22 + 2/3) to the 12 digits the range keeps
    expect(p.entries.map((e) => e.values["particle.mass"])).toEqual(["1e-22 eV", "2.15443469003e-22 eV", "4.64158883361e-22 eV", "1e-21 eV"]);
    expect(p.entries[1]!.config).toMatchObject({ particle: { mass: "2.15443469003e-22 eV" } });
  });

  it("take more digits where four would merge two values", () => {
    const p = plan(`"initial.width" = ["1.00001 kpc", "1.00002 kpc", "2 kpc"]`);
    expect(p.entries.map((e) => e.name)).toEqual(["width=1.00001kpc", "width=1.00002kpc", "width=2kpc"]);
  });

  it("sweep vector keys given as lists of quantities", () => {
    const p = plan(`"initial.center" = [["6 kpc"], ["6.5 kpc"]]\n"grid.cells" = [[64], [128]]`);
    expect(p.entries.map((e) => e.name)).toEqual(["center=6kpc_cells=64", "center=6kpc_cells=128", "center=6.5kpc_cells=64", "center=6.5kpc_cells=128"]);
    expect(p.entries[2]!.config).toMatchObject({ initial: { center: ["6.5 kpc"] }, grid: { cells: [64] } });
  });

  it("say what a swept key's values may be", () => {
    for (const bad of [`"initial.width" = "1 kpc"`, `"initial.width" = [{ a = 1 }]`]) {
      expect(() => checkConfig(parse(`${BASE}[sweep]\n[sweep.values]\n${bad}\n`))).toThrow(
        'sweep.values."initial.width": expected a list of values (numbers, quantities such as "2 kpc", true or false, or lists of them for a vector key such as initial.center) or a range { from = …, to = …, count = … }',
      );
    }
  });

  it("are read back as numbers of a unit where they are, for the sweep report's axes", () => {
    expect(sweptNumber("2.15443469003e-22 eV")).toEqual({ value: 2.15443469003e-22, unit: "eV" });
    expect(sweptNumber("1.5 Mpc/h")).toEqual({ value: 1.5, unit: "Mpc/h" });
    expect(sweptNumber(".5kpc")).toEqual({ value: 0.5, unit: "kpc" });
    expect(sweptNumber(0.1)).toEqual({ value: 0.1, unit: "" });
    for (const v of ["bbks", true, ["6 kpc"], Number.NaN, "kpc 3"]) expect(sweptNumber(v)).toBeUndefined();
  });

  it("are joined in the report's figures by the other keys' values, or all of them in a zipped sweep", async () => {
    // two keys, two entries; the clock times are placeholders for the layout (no physics is checked here)
    const row = (mass: string, contrast: number, t: number) => ({ entry: `${mass}_${contrast}`, "particle.mass": mass, "initial.contrast": contrast, "squeezing-onset_s": t, "squeezing-onset_reached": true });
    const rows = [row("1e-22 eV", 0.1, 3e15), row("2e-22 eV", 0.2, 2e15)];
    const x = { values: [1e-22, 2e-22], unit: "eV" };
    const product = await clockPlot(rows, ["particle.mass", "initial.contrast"], false, "particle.mass", x);
    const zipped = await clockPlot(rows, ["particle.mass", "initial.contrast"], true, "particle.mass", x);
    expect(product!.svg).toContain("a line joins the entries of equal initial.contrast");
    expect(zipped!.svg).toContain("a line joins the entries (particle.mass, initial.contrast zipped)");
    // one line through both entries when zipped, a lone point each otherwise
    const lines = (svg: string) => (svg.match(/aria-roledescription="line mark" d="M[^"]*L/g) ?? []).length;
    expect([lines(product!.svg), lines(zipped!.svg)]).toEqual([0, 1]);
  });

  it("are refused when a kept result (a completed run or a checkpoint) came from another config, and not for a failure that runs afresh", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-sweep-folder-"));
    try {
      const at = (duration: string) => planSweep(parse(`${BASE.replace('"10 Myr"', duration)}[output]\ndir = "s"\n[sweep]\n[sweep.values]\n"initial.width" = ["1 kpc"]\n`) as Record<string, unknown>, "s", dir);
      const before = at('"10 Myr"');
      const entry = path.join(dir, "s", before.entries[0]!.name);
      fs.mkdirSync(entry, { recursive: true });
      fs.writeFileSync(path.join(entry, "entry.toml"), stringify(before.entries[0]!.config));
      // failed before its first checkpoint: it would run again from the start, so no --force is needed
      fs.writeFileSync(path.join(entry, "sweep-status.json"), JSON.stringify({ status: "failed", reason: "x" }));
      expect(prepareSweepFolder(at('"20 Myr"'), false)).toEqual([]);
      // completed: it would be skipped, so the change is refused, or the entry cleared with force
      fs.writeFileSync(path.join(entry, "summary.json"), JSON.stringify({ status: "completed" }));
      fs.writeFileSync(path.join(entry, "psibox-files.txt"), "summary.json\n");
      expect(() => prepareSweepFolder(at('"20 Myr"'), false)).toThrow(/^sweep entry width=1kpc in .* was run with another config \(span\.duration differs\); pass --force/);
      expect(prepareSweepFolder(at('"10 Myr"'), false)).toEqual([]);
      expect(prepareSweepFolder(at('"20 Myr"'), true)).toEqual(["--force: entry width=1kpc starts afresh (span.duration changed)"]);
      expect(fs.readdirSync(entry).sort()).toEqual(["entry.toml"]);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("are running while a live process holds their run folder's lock, whatever files they hold yet", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-entry-status-"));
    try {
      expect(entryStatus(dir)).toEqual({ status: "pending", reason: null });
      fs.writeFileSync(path.join(dir, "checkpoint.h5"), "");
      const lock = (pid: number) => fs.writeFileSync(path.join(dir, ".psibox-lock"), JSON.stringify({ pid, host: os.hostname(), started: null, since: "2026-01-01T00:00:00.000Z" }));
      // this test's own process stands for the run
      lock(process.pid);
      expect(entryStatus(dir)).toEqual({ status: "running", reason: `psibox process ${process.pid} on ${os.hostname()} since 2026-01-01T00:00:00.000Z` });
      // a lock whose process is gone is a killed run's: resumable from its checkpoint
      lock(2 ** 22 + 12345);
      expect(entryStatus(dir).status).toBe("interrupted");
      fs.writeFileSync(path.join(dir, "summary.json"), JSON.stringify({ status: "completed" }));
      lock(process.pid);
      expect(entryStatus(dir).status).toBe("completed");
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
