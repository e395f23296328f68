// psibox ensemble --emit slurm: the array's scripts are valid bash (bash -n, the reference being bash itself);
// running each task's command by hand with its array index, as Slurm would, and then the collect step gives a
// series.csv byte-identical to a local psibox ensemble of the same config (the members are the same files, reduced
// in index order); the collect step says which members are missing, exit 3; a bad [cluster] value stops with the
// sweep's one-line error (exit 2) before anything is written.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, removeWork, runPsibox, writeIn } from "../helpers/cli.js";
import { modeOf, type ModeFlags } from "../../src/cli/ensemble-slurm.js";

let work: string;
beforeAll(() => (work = makeWork("ensemble-slurm")));
afterAll(() => removeWork(work));

const config = (extra: string) =>
  `[grid]\ncells = 16\nbox = "10 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "100 Myr"\n` +
  `[initial]\nkind = "plane-wave"\nmean_density = "1e6 Msun/kpc^3"\ncontrast = 0.1\n[output]\ntime_unit = "Myr"\n${extra}` +
  `[ensemble]\nmembers = 5\nparticles = 1000\nsamples = 2\n[cluster]\ntime = "00:05:00"\nmemory = "1G"\nmax_parallel = 2\n`;

const bash = (script: string, env: Record<string, string> = {}) => spawnSync("bash", [script], { cwd: work, encoding: "utf8", env: { ...process.env, ...env } });

describe("psibox ensemble --emit slurm", () => {
  it("emits an array whose tasks, run by hand, and the collect step reproduce a local ensemble's series.csv byte for byte", () => {
    writeIn(work, "arr.toml", config(""));
    const emitted = runPsibox(work, ["ensemble", "arr.toml", "--emit", "slurm", "-q"]);
    expect(emitted.code, emitted.stderr).toBe(0);
    expect(emitted.stdout).toMatch(/^wrote a Slurm array of 2 tasks for 5 members: output\/arr\/ensemble\/slurm\/ensemble\.sbatch\nsubmit: .*--dependency=afterany:\$jobid output\/arr\/ensemble\/slurm\/collect\.sbatch\n$/);
    const dir = path.join(work, "output", "arr", "ensemble");
    expect(fs.existsSync(path.join(dir, "ensemble.json"))).toBe(true); // set up once, before the array
    const [script, collect] = ["ensemble.sbatch", "collect.sbatch"].map((f) => path.join(dir, "slurm", f)) as [string, string];
    for (const s of [script, collect]) expect(spawnSync("bash", ["-n", s]).status).toBe(0);
    expect(fs.readFileSync(script, "utf8")).toMatch(/^#SBATCH --array=0-1%2$/m);
    const task0 = bash(script, { SLURM_ARRAY_TASK_ID: "0" });
    expect(task0.status).toBe(0);
    // the task's log (its stderr) shows its progress
    expect(task0.stderr).toMatch(/\n {2}100% 3 of 5 members\n/);
    expect(fs.readdirSync(path.join(dir, "members")).sort()).toEqual(["m000000.f64", "m000002.f64", "m000004.f64"]);
    const early = bash(collect);
    expect(early.status).toBe(3);
    expect(early.stderr).toMatch(/ensemble reduced incompletely: 2 of 5 members are missing/);
    expect(bash(script, { SLURM_ARRAY_TASK_ID: "1" }).status).toBe(0);
    expect(bash(collect).status).toBe(0);
    writeIn(work, "local.toml", config('dir = "local"\n'));
    expect(runPsibox(work, ["ensemble", "local.toml", "-q", "--workers", "2"]).code).toBe(0);
    const series = (d: string) => fs.readFileSync(path.join(d, "series.csv"), "utf8");
    expect(series(dir)).toBe(series(path.join(work, "local", "ensemble")));
    // a task of another ensemble than the folder's is refused
    const other = runPsibox(work, ["ensemble", "arr.toml", "--task", "0", "--tasks", "2", "--set", "ensemble.noise_seed=3"]);
    expect(other.code).toBe(2);
    expect(other.stderr).toMatch(/holds an ensemble with another seed; emit the array again/);
  });
  it("refuses a bad [cluster] value with the sweep's one-line error, writing nothing", () => {
    writeIn(work, "bad.toml", config("").replace('time = "00:05:00"', 'time = "01:00:00\\ntouch PWNED"'));
    const r = runPsibox(work, ["ensemble", "bad.toml", "--emit", "slurm"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^psibox: cluster\.time: must be a Slurm time limit .*; got "01:00:00\\ntouch PWNED"\n$/);
    expect(fs.existsSync(path.join(work, "output", "bad"))).toBe(false);
  });
  it("takes one mode at a time, and a task index below the task count", () => {
    const mode = (f: Partial<ModeFlags>) => () => modeOf({ reduce: false, ...f });
    expect(mode({ emit: "slurm", tasks: "4" })()).toEqual({ kind: "emit", tasks: 4 });
    expect(mode({ task: "3", tasks: "4" })()).toEqual({ kind: "task", task: 3, count: 4 });
    expect(mode({ task: "0" })).toThrow(/^--task: needs --tasks/);
    expect(mode({ task: "4", tasks: "4" })).toThrow(/^--task: must be a whole number from 0 to 3, got 4$/);
    expect(mode({ emit: "slurm", reduce: true })).toThrow(/^--emit and --reduce: give one of them/);
    expect(mode({ emit: "pbs" })).toThrow(/^--emit: the only target is "slurm"/);
    expect(mode({ tasks: "2" })).toThrow(/^--tasks: goes with --emit slurm or --task$/);
  });
});
