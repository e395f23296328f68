// The memory estimate against the peak resident memory of real runs, measured by the operating system
// (getrusage of the child process, read by Python's resource module): a 128³ run that writes checkpoints,
// and its extension, which reads a checkpoint back (the larger peak). The estimate is meant as an upper
// bound that is not far off: at or above each measured peak, and within 35% of the resume's.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { BIN, makeWork, removeWork } from "../helpers/cli.js";

let work: string;
beforeAll(() => {
  work = makeWork("memory");
  fs.writeFileSync(
    path.join(work, "m.toml"),
    `[grid]\ncells = [128, 128, 128]\nbox = "100 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "6 Myr"\n[initial]\nkind = "plane-wave"\nmean_density = "1e6 Msun/kpc^3"\ncontrast = 0.3\nmode = [1, 0, 0]\n[integrator]\nthreads = 1\n[output]\ncheckpoint_every = 2\n`,
  );
});
afterAll(() => removeWork(work));

/** Run psibox with `args` under Python, which reports the child's peak resident memory (bytes) from getrusage. */
function measured(args: string[]): { code: number; peak: number; stderr: string } {
  const script = [
    "import resource, subprocess, sys",
    "r = subprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)",
    "sys.stderr.write(r.stderr)",
    "print(r.returncode, resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss * 1024)",
  ].join("\n");
  const r = spawnSync("python3", ["-c", script, process.execPath, BIN, ...args], { cwd: work, encoding: "utf8" });
  const [code, peak] = r.stdout.trim().split(" ").map(Number);
  return { code: code as number, peak: peak as number, stderr: r.stderr };
}

const summary = (dir: string) => JSON.parse(fs.readFileSync(path.join(work, dir, "summary.json"), "utf8"));

describe("memory estimate against measured peaks", () => {
  it("a 128³ run and its resume stay within the estimate, and the resume's peak is within 35% of it", () => {
    const run = measured(["run", "m.toml", "-q", "--set", "output.dir=m"]);
    expect(run.code, run.stderr).toBe(0);
    const estimate = summary("m").memory.estimate_bytes as number;
    expect(fs.readFileSync(path.join(work, "m", "run.log"), "utf8")).toMatch(/memory: about \d+ MiB \(fields 96 MiB, step tables and scratch \d+ MiB, snapshot and checkpoint I\/O \d+ MiB, program \d+ MiB\)/);
    expect(run.peak).toBeLessThanOrEqual(estimate);
    const resumed = measured(["extend", "m", "--to", "8 Myr", "-q"]);
    expect(resumed.code, resumed.stderr).toBe(0);
    expect(summary("m").resumed_from_step).toBeGreaterThan(0);
    expect(resumed.peak).toBeLessThanOrEqual(estimate);
    expect(resumed.peak).toBeGreaterThan(estimate / 1.35);
    // the run's own record of its peak agrees with the operating system's
    expect(Math.abs(summary("m").memory.peak_rss_bytes - resumed.peak) / resumed.peak).toBeLessThan(0.05);
  });
});
