// Emitted Slurm scripts cannot be injected: hostile [cluster] values are refused with one line
// (exit 2, nothing written), and hostile folder and file names travel as data, so a task run by
// hand (as Slurm would run it) does its entry and nothing else. The reference is bash itself.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;
beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-slurm-inj-"));
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

function psibox(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const BASE = `[grid]
cells = 32
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "5 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
[sweep.values]
"initial.contrast" = [0.1, 0.2]
`;
const cluster = (over: Record<string, string>) => {
  const c: Record<string, string> = { partition: '"debug"', time: '"00:10:00"', cpus: "1", memory: '"1G"', max_parallel: "2", ...over };
  return `[cluster]\n${Object.entries(c).map(([k, v]) => `${k} = ${v}`).join("\n")}\n`;
};

describe("Slurm scripts cannot be injected", () => {
  const hostile: [string, string, RegExp][] = [
    ["partition", '"debug\\ntouch PWNED"', /^psibox: cluster\.partition: must be a partition name .*; got "debug\\ntouch PWNED"\n$/],
    ["time", '"01:00:00\\ntouch PWNED"', /^psibox: cluster\.time: must be a Slurm time limit .*; got "01:00:00\\ntouch PWNED"\n$/],
    ["memory", '"4G\\ntouch PWNED"', /^psibox: cluster\.memory: .*; got "4G\\ntouch PWNED"\n$/],
    ["max_parallel", "0", /^psibox: cluster\.max_parallel: must be a whole number from 1 to 1000000; got 0\n$/],
    ["cpus", "-1", /^psibox: cluster\.cpus: must be a whole number from 1 to 100000; got -1\n$/],
  ];
  for (const [key, value, message] of hostile) {
    it(`refuses cluster.${key} = ${value} with one line and writes nothing`, () => {
      fs.writeFileSync(path.join(work, "h.toml"), BASE + cluster({ [key]: value }));
      const r = psibox(["sweep", "h.toml", "--emit", "slurm"]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(fs.existsSync(path.join(work, "output/h"))).toBe(false);
    });
  }

  it("passes a hostile output folder and config name as data: the task runs its entry and nothing else", () => {
    const dir = "out put/%a\n$(touch PWNED1)'`touch PWNED2`";
    const config = "scan\n#SBATCH --wrap=touch PWNED3.toml";
    fs.writeFileSync(path.join(work, config), `${BASE.replace("[sweep.values]", `[output]\ndir = ${JSON.stringify(dir)}\n[sweep.values]`)}${cluster({})}`);
    const r = psibox(["sweep", config, "--emit", "slurm"]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout.split("\n")[0]).toBe("wrote a Slurm array of 2 tasks: out put/%a\\n$(touch PWNED1)'`touch PWNED2`/sweep.sbatch");
    const script = path.join(work, dir, "sweep.sbatch");
    const text = fs.readFileSync(script, "utf8");
    // every #SBATCH line holds checked values only; no path or name text anywhere in the script
    for (const line of text.split("\n").filter((l) => l.startsWith("#SBATCH"))) expect(line).toMatch(/^#SBATCH --[a-z-]+=[A-Za-z0-9_.:%,-]+$/);
    expect(text).not.toMatch(/PWNED1|PWNED2|out put|\$\(touch/);
    expect(text).toMatch(/^#SBATCH --job-name=psibox-scan_SBATCH_--wrap_touch_PWNED3$/m);
    expect(spawnSync("bash", ["-n", script]).status).toBe(0);
    const task = spawnSync("bash", [script], { cwd: work, encoding: "utf8", env: { ...process.env, SLURM_ARRAY_TASK_ID: "1" } });
    expect(task.status, task.stderr).toBe(0);
    const entries = fs.readdirSync(path.join(work, dir)).filter((n) => n.startsWith("contrast="));
    expect(entries.sort()).toEqual(["contrast=0.1", "contrast=0.2"]);
    expect(JSON.parse(fs.readFileSync(path.join(work, dir, "contrast=0.2/summary.json"), "utf8")).status).toBe("completed");
    expect(fs.existsSync(path.join(work, dir, "contrast=0.1/summary.json"))).toBe(false);
    // the task's output went to the sweep's logs (the folder could not go in an #SBATCH line)
    expect(fs.existsSync(path.join(work, dir, "logs/task-1.err"))).toBe(true);
    const collect = spawnSync("bash", [path.join(work, dir, "collect.sbatch")], { cwd: work, encoding: "utf8" });
    expect(collect.status, collect.stderr).toBe(0);
    expect(fs.readFileSync(path.join(work, dir, "sweep-summary.csv"), "utf8")).toMatch(/completed/);
    const planted = [work, path.join(work, dir), os.tmpdir()].flatMap((d) => fs.readdirSync(d).filter((n) => n.startsWith("PWNED")));
    expect(planted).toEqual([]);
  });
});
