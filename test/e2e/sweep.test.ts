// psibox sweep: a local pool of real child processes, resume after SIGKILL, failures, Slurm scripts, bad input.
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { BIN, makeWork, readJson, removeWork, runPsibox } from "../helpers/cli.js";
import { CHROMIUM, launchChromium, openPage, overflowing, pageImages } from "../helpers/page-check.js";

let work: string;
beforeAll(() => {
  work = makeWork("sweep");
});
afterAll(() => removeWork(work));

const psibox = (args: string[], env: Record<string, string> = {}) => runPsibox(work, args, { ...process.env, ...env });

const BASE = `[grid]
cells = [64, 64]
box = "20 kpc"
[particle]
mass = "1e-22 eV"
[span]
duration = "300 Myr"
[initial]
kind = "plane-wave"
mean_density = "1e7 Msun/kpc^3"
contrast = 0.2
mode = [1, 1]
[output]
time_unit = "Myr"
checkpoint_every = 50
`;
const SWEEP = `${BASE}[sweep]
combine = "product"
[sweep.values]
"particle.mass" = ["1e-22 eV", "2e-22 eV"]
"initial.contrast" = { from = 0.1, to = 0.2, count = 2 }
`;

/** The summary without what legitimately differs between two runs (wall times). */
function comparable(dir: string): unknown {
  const s = JSON.parse(fs.readFileSync(path.join(work, dir, "sweep-summary.json"), "utf8")) as { entries: Record<string, unknown>[] };
  return s.entries.map(({ wall_time_s: _w, ...rest }) => rest);
}

describe("psibox sweep", () => {
  it("runs a 4-entry sweep with 2 workers; killed mid-way and re-run, it finishes with the same summary", async () => {
    fs.writeFileSync(path.join(work, "s.toml"), SWEEP);
    const full = psibox(["sweep", "s.toml", "--workers", "2", "--set", 'output.dir="full"']);
    expect(full.code, full.stderr).toBe(0);
    expect(full.stdout).toMatch(/^sweep done: 4 completed, 0 already done, 0 failed/);
    const rows = JSON.parse(fs.readFileSync(path.join(work, "full/sweep-summary.json"), "utf8")).entries;
    expect(rows.map((r: { entry: string }) => r.entry)).toEqual([
      "mass=1e-22eV_contrast=0.1",
      "mass=1e-22eV_contrast=0.2",
      "mass=2e-22eV_contrast=0.1",
      "mass=2e-22eV_contrast=0.2",
    ]);
    expect(rows.every((r: { status: string }) => r.status === "completed")).toBe(true);
    for (const r of rows as { entry: string; flow_resolved: boolean; unresolved_mass_fraction: number }[]) {
      const entrySummary = readJson<{ name: string; end: { t: number }; flow_resolution: { resolved: boolean; worst_unresolved_mass_fraction: number } }>(path.join(work, "full", r.entry, "summary.json"));
      const flow = entrySummary.flow_resolution;
      // each entry's run is named after its entry (its config file is entry.toml), as a resumed one is
      expect(entrySummary.name).toBe(r.entry);
      expect(fs.readFileSync(path.join(work, "full", r.entry, "run.log"), "utf8")).toContain(`started ${r.entry}:`);
      // the end of the span, not its round-off (300 Myr reached by steps of a few Myr)
      expect(entrySummary.end.t).toBe(300);
      expect([r.flow_resolved, r.unresolved_mass_fraction]).toEqual([flow.resolved, flow.worst_unresolved_mass_fraction]);
      // the mode's start and rates from clocks.json, the final squeezing and mean field from the time series
      expect(r).toMatchObject({ mode_start: "coherent", loss_rate_per_s: 0, dephasing_rate_per_s: 0, outflow_loss_rate_per_s: null });
      const final = readJson<{ final: { squeezing_db: number } }>(path.join(work, "full", r.entry, "clocks.json")).final;
      expect((r as unknown as { final_squeezing_dB: number }).final_squeezing_dB).toBeCloseTo(final.squeezing_db, 9);
      expect((r as unknown as { final_log10_meanfield_fraction: number }).final_log10_meanfield_fraction).toBeLessThanOrEqual(0);
    }
    const csv = fs.readFileSync(path.join(work, "full/sweep-summary.csv"), "utf8");
    expect(csv.split("\n")[0]).toMatch(/^entry,particle\.mass,initial\.contrast,status,reason,steps,wall_time_s,/);
    // numbers to at most 12 significant digits (a wall time of 0.8445765140000001 s is round-off)
    const digits = csv.match(/(?<=^|,)-?[\d.]+(?:e[-+]?\d+)?(?=,|$)/gm)!.map((v) => v.replace(/e.*$/, "").replace(/[-.]/g, "").replace(/^0+|0+$/g, "").length);
    expect(digits.length).toBeGreaterThan(40);
    expect(Math.max(...digits), csv).toBeLessThanOrEqual(12);

    // the same sweep, its parent killed with SIGKILL once the first checkpoints exist
    const child = spawn(process.execPath, [BIN, "sweep", "s.toml", "--workers", "2", "--set", 'output.dir="cut"'], { cwd: work, stdio: "ignore" });
    const exited = new Promise<void>((r) => child.on("exit", () => r()));
    const start = Date.now();
    const anyCheckpoint = () =>
      fs.existsSync(path.join(work, "cut")) &&
      fs.readdirSync(path.join(work, "cut")).some((d) => fs.existsSync(path.join(work, "cut", d, "checkpoint.h5")));
    while (!anyCheckpoint() && Date.now() - start < 60_000) await new Promise((r) => setTimeout(r, 20));
    child.kill("SIGKILL");
    await exited;
    expect(fs.existsSync(path.join(work, "cut/sweep-summary.json"))).toBe(false);
    const again = psibox(["sweep", "s.toml", "--workers", "2", "--set", 'output.dir="cut"']);
    expect(again.code, again.stderr).toBe(0);
    expect(again.stderr).toMatch(/resumed|already completed/);
    expect(comparable("cut")).toEqual(comparable("full"));
    // --summary rebuilds the same table from the folders alone
    fs.rmSync(path.join(work, "cut/sweep-summary.json"));
    expect(psibox(["sweep", "--summary", "cut"]).code).toBe(0);
    expect(comparable("cut")).toEqual(comparable("full"));
  });

  it("records a failing entry with its reason while the others complete", () => {
    fs.writeFileSync(path.join(work, "f.toml"), `${BASE.replace('"300 Myr"', '"50 Myr"')}[sweep]\n[sweep.values]\n"integrator.mass_tolerance" = [1e-8, 1e-18]\n`);
    const r = psibox(["sweep", "f.toml", "--workers", "2"]);
    expect(r.code).toBe(3);
    expect(r.stdout).toMatch(/1 completed, 0 already done, 1 failed/);
    const rows = JSON.parse(fs.readFileSync(path.join(work, "output/f/sweep-summary.json"), "utf8")).entries;
    expect(rows[0].status).toBe("completed");
    expect(rows[1].status).toBe("failed");
    expect(rows[1].reason).toMatch(/the mass changed by .* \(tolerance 1\.0e-18\)/);
  });

  it("emits a Slurm job array: valid bash, every entry exactly once, each task runs its entry", () => {
    fs.writeFileSync(path.join(work, "c.toml"), `${SWEEP.replace('"300 Myr"', '"20 Myr"')}[cluster]\npartition = "debug"\ntime = "00:10:00"\ncpus = 2\nmemory = "1G"\nmax_parallel = 3\n`);
    const r = psibox(["sweep", "c.toml", "--emit", "slurm"]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^wrote a Slurm array of 4 tasks: output\/c\/sweep\.sbatch\nsubmit: /);
    const script = path.join(work, "output/c/sweep.sbatch");
    expect(spawnSync("bash", ["-n", script]).status).toBe(0);
    expect(spawnSync("bash", ["-n", path.join(work, "output/c/collect.sbatch")]).status).toBe(0);
    const text = fs.readFileSync(script, "utf8");
    expect(text).toMatch(/^#SBATCH --array=0-3%3$/m);
    expect(text).toMatch(/^#SBATCH --partition=debug$/m);
    expect(text).toMatch(/^#SBATCH --cpus-per-task=2$/m);
    const listed = [...text.matchAll(/^ {2}'(.*)'$/gm)].map((m) => m[1]!);
    const manifest = JSON.parse(fs.readFileSync(path.join(work, "output/c/sweep.json"), "utf8")).entries.map((e: { name: string }) => e.name);
    expect(listed).toEqual(manifest);
    expect(new Set(listed).size).toBe(4);
    // run task 2 by hand, as Slurm would
    const task = spawnSync("bash", [script], { cwd: work, encoding: "utf8", env: { ...process.env, SLURM_ARRAY_TASK_ID: "2" } });
    expect(task.status, task.stderr).toBe(0);
    // the task's log (its stderr) shows the run's progress
    expect(task.stderr).toMatch(/\n {2}100% step \d+, t = 20 Myr/);
    const entry = path.join(work, "output/c", manifest[2]);
    expect(JSON.parse(fs.readFileSync(path.join(entry, "summary.json"), "utf8")).status).toBe("completed");
    expect(fs.existsSync(path.join(work, "output/c", manifest[1], "summary.json"))).toBe(false);
    expect(spawnSync("bash", [script], { cwd: work, encoding: "utf8", env: { ...process.env, SLURM_ARRAY_TASK_ID: "2" } }).stdout).toMatch(/has already completed/);
    // the report of the sweep while three of its entries wait
    expect(psibox(["report", "output/c"]).code).toBe(0);
    const html = fs.readFileSync(path.join(work, "output/c/report.html"), "utf8");
    expect(html).toContain("4 entries, the combinations of particle.mass, initial.contrast: 3 pending, 1 completed.");
    expect(html).toContain("<th>status</th>");
  });

  const bad: [string, string, RegExp][] = [
    ["an empty sweep", `${BASE}[sweep]\n[sweep.values]\n`, /^psibox: sweep\.values: is empty/],
    ["a key that does not exist", `${BASE}[sweep]\n[sweep.values]\n"particle.masss" = ["1e-22 eV"]\n`, /^psibox: particle\.masss: unknown key; valid keys here: mass, scattering_length, decay_constant, name \(in sweep entry "masss=1e-22eV"\)/],
    ["values of the wrong unit", `${BASE}[sweep]\n[sweep.values]\n"particle.mass" = ["1e-22 eV", "2 kpc"]\n`, /^psibox: particle\.mass: "2 kpc" is not a mass.*\(in sweep entry "mass=2kpc"\)/],
    ["two entries in one folder", `${BASE}[sweep]\n[sweep.values]\n"particle.mass" = ["1e-22 eV", "1e-22eV"]\n`, /^psibox: sweep\.values: entries 1 and 2 would share the folder "mass=1e-22eV"/],
    ["zipped lists of different lengths", `${BASE}[sweep]\ncombine = "zip"\n[sweep.values]\n"particle.mass" = ["1e-22 eV", "2e-22 eV"]\n"initial.contrast" = [0.1]\n`, /^psibox: sweep\.values\."initial\.contrast": has 1 values; combine = "zip" needs every list to have 2/],
  ];
  for (const [what, text, message] of bad) {
    it(`rejects ${what} before anything runs`, () => {
      fs.writeFileSync(path.join(work, "bad.toml"), text);
      const r = psibox(["sweep", "bad.toml"]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(fs.existsSync(path.join(work, "output/bad"))).toBe(false);
    });
  }

  it("never mixes a sweep with a run, nor results of another config: refused in one line, --force starts the changed entries afresh", () => {
    const base = `[grid]\ncells = 64\nbox = "20 kpc"\ngravity = "none"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "10 Myr"\n[initial]\nkind = "gaussian-packet"\nmass = "1e8 Msun"\nwidth = "1 kpc"\ncenter = ["8 kpc"]\n[output]\ndir = "m"\n`;
    const sweep = `${base}[sweep]\n[sweep.values]\n"initial.width" = ["1 kpc", "2 kpc"]\n`;
    // a sweep into the folder of a run
    fs.writeFileSync(path.join(work, "m.toml"), base);
    expect(psibox(["run", "m.toml", "-q"]).code).toBe(0);
    fs.writeFileSync(path.join(work, "m.toml"), sweep);
    for (const extra of [[], ["--emit", "slurm"], ["--force"]]) {
      const r = psibox(["sweep", "m.toml", ...extra]);
      expect([r.code, r.stderr]).toEqual([2, `psibox: output folder ${path.join(work, "m")} holds a run; a sweep needs a folder of its own: set output.dir (e.g. --set 'output.dir="output/m-sweep"') or move the run away\n`]);
    }
    expect(fs.existsSync(path.join(work, "m/sweep.json"))).toBe(false);
    // a run into the folder of a sweep, even with --force
    expect(psibox(["sweep", "m.toml", "--workers", "2", "--set", 'output.dir="ms"']).code).toBe(0);
    fs.writeFileSync(path.join(work, "m.toml"), base);
    const into = psibox(["run", "m.toml", "--set", 'output.dir="ms"', "--force"]);
    expect([into.code, into.stderr]).toEqual([2, `psibox: output folder ${path.join(work, "ms")} holds a sweep (sweep.json); a run needs a folder of its own: set output.dir\n`]);
    // the same sweep with a longer span: the entries' 10 Myr results must not pass for 20 Myr ones
    fs.writeFileSync(path.join(work, "m.toml"), sweep);
    const endOf = (entry: string) => readJson<{ end: { t: number } }>(path.join(work, "ms", entry, "summary.json")).end.t;
    for (const extra of [[], ["--emit", "slurm"]]) {
      const r = psibox(["sweep", "m.toml", "--set", 'output.dir="ms"', "--set", 'span.duration="20 Myr"', ...extra]);
      expect([r.code, r.stderr]).toEqual([2, `psibox: sweep entry width=1kpc in ${path.join(work, "ms")} was run with another config (span.duration differs); pass --force to start the changed entries afresh, or set output.dir for a new sweep\n`]);
    }
    expect([endOf("width=1kpc"), endOf("width=2kpc")]).toEqual([10, 10]);
    // unchanged (keys in another order, output.dir given another way): nothing to start again
    fs.writeFileSync(path.join(work, "m.toml"), sweep.replace('[span]\nduration = "10 Myr"\n', "") + '[span]\nduration = "10 Myr"\n');
    const same = psibox(["sweep", "m.toml", "--set", `output.dir="${path.join(work, "ms")}"`]);
    expect(same.stderr).toMatch(/\[2\/2\] width=\dkpc: already completed/);
    const forced = psibox(["sweep", "m.toml", "--set", 'output.dir="ms"', "--set", 'span.duration="20 Myr"', "--force", "--workers", "2"]);
    expect(forced.code, forced.stderr).toBe(0);
    expect(forced.stderr).toContain("psibox: --force: entry width=2kpc starts afresh (span.duration changed)\n");
    expect(forced.stdout).toMatch(/^sweep done: 2 completed, 0 already done, 0 failed/);
    expect([endOf("width=1kpc"), endOf("width=2kpc")]).toEqual([20, 20]);
    // a sweep's folder given where a run's is wanted
    const analysed = psibox(["analyze", "ms"]);
    expect([analysed.code, analysed.stderr]).toEqual([2, "psibox: ms: a sweep's folder, not a run: give one of its entries, e.g. ms/width=1kpc; the sweep's table is sweep-summary.csv\n"]);
  });

  it("reports a sweep: each entry's clocks as its own clocks.json gives them, the clocks against each numeric key, a page that fits (headless Chromium)", async () => {
    fs.writeFileSync(path.join(work, "r.toml"), `${BASE}[sweep]\n[sweep.values]\n"particle.mass" = { from = "1e-22 eV", to = "3e-22 eV", count = 3, scale = "log" }\n"initial.contrast" = [0.1, 0.2]\n`);
    expect(psibox(["sweep", "r.toml", "--workers", "2"]).code).toBe(0);
    const r = psibox(["report", "output/r"]);
    expect([r.code, r.stdout, r.stderr]).toEqual([0, "wrote output/r/report.html\n", ""]);
    const html = fs.readFileSync(path.join(work, "output/r/report.html"), "utf8");
    expect(html).toContain("<h1>psibox sweep “r”</h1>");
    expect(html).toContain("6 entries, the combinations of particle.mass, initial.contrast: 6 completed.");
    expect(html).toContain("<p>Every entry: status completed; end 300 Myr.</p>");
    const manifest = readJson<{ entries: { name: string; values: Record<string, string | number> }[] }>(path.join(work, "output/r/sweep.json")).entries;
    const entries = manifest.map((e) => e.name);
    expect(entries).toContain("mass=1.732e-22eV_contrast=0.2");
    const rows = html.split("<tr>");
    let projected = 0;
    for (const { name, values } of manifest) {
      // the entries' table names the entry; the clocks' table gives its swept values first
      expect(rows.some((t) => t.startsWith(`<td>${name}</td>`)), name).toBe(true);
      const row = rows.find((t) => t.startsWith(`<td>${values["particle.mass"]}</td><td>${values["initial.contrast"]}</td><td>`))!;
      expect(row, name).toBeDefined();
      const clocks = readJson<{ clocks: { time_s: number | null; time: string; reached: boolean }[] }>(path.join(work, "output/r", name, "clocks.json")).clocks;
      for (const c of clocks.filter((x) => x.time_s !== null)) {
        expect(row).toContain(`<td>${c.reached ? "" : "≈ "}${c.time}</td>`);
        if (!c.reached) projected++;
      }
    }
    expect(projected).toBeGreaterThan(0);
    // one figure per swept key, the three clocks that ring before ten ages of the universe drawn in their colours
    const { PNG } = await import("pngjs");
    const figs = [...html.matchAll(/<img alt="Each clock of the whole-box condensate mode against ([^"]+), counted from each run's start\." src="data:image\/png;base64,([^"]+)"/g)];
    expect(figs.map((m) => m[1])).toEqual(["particle.mass", "initial.contrast"]);
    for (const [, , b64] of figs) {
      const png = PNG.sync.read(Buffer.from(b64!, "base64"));
      const colours = new Set<string>();
      for (let i = 0; i < png.data.length; i += 4) colours.add(((png.data[i]! << 16) | (png.data[i + 1]! << 8) | png.data[i + 2]!).toString(16).padStart(6, "0"));
      // Vega's tableau10 scheme: blue, orange, red for squeezing onset, squeezing level, breakdown (estimate)
      for (const c of ["4c78a8", "f58518", "e45756"]) expect(colours.has(c), c).toBe(true);
    }
    // in headless Chromium: the figures load, and no text overflows its box or the page
    if (CHROMIUM === undefined && process.env["CI"] !== "true") return;
    const browser = await launchChromium();
    try {
      const { page, errors } = await openPage(browser, path.join(work, "output/r/report.html"));
      for (const id of ["clocks", "entries", "parameters"]) expect(await page.locator(`#${id}`).count(), id).toBe(1);
      const images = await pageImages(page);
      expect(images.length).toBe(2);
      expect(images.every((i) => i.ok && i.w > 600)).toBe(true);
      expect(await overflowing(page)).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it("leaves an entry another sweep is running to it, and calls it running", async () => {
    fs.writeFileSync(path.join(work, "twice.toml"), `${BASE.replace("[64, 64]", "[128, 128]").replace('"300 Myr"', '"1500 Myr"')}[sweep]\n[sweep.values]\n"initial.contrast" = [0.15]\n`);
    const first = spawn(process.execPath, [BIN, "sweep", "twice.toml", "--workers", "1"], { cwd: work, stdio: "ignore" });
    const exited = new Promise<number | null>((r) => first.on("exit", (c) => r(c)));
    const lock = path.join(work, "output/twice/contrast=0.15/.psibox-lock");
    const start = Date.now();
    while (!fs.existsSync(lock) && Date.now() - start < 60_000) await new Promise((r) => setTimeout(r, 20));
    const second = psibox(["sweep", "twice.toml", "--workers", "1"]);
    expect(second.code, second.stderr).toBe(0);
    expect(second.stderr).toMatch(/\[1\/1\] contrast=0\.15: being run by psibox process \d+ on .* since .*; left to it\n/);
    expect(second.stdout).toMatch(/^sweep done: 0 completed, 0 already done, 1 being run by another process, 0 failed/);
    expect(readJson<{ entries: { status: string }[] }>(path.join(work, "output/twice/sweep-summary.json")).entries[0]!.status).toBe("running");
    expect(await exited).toBe(0);
    expect(readJson<{ entries: { status: string }[] }>(path.join(work, "output/twice/sweep-summary.json")).entries[0]!.status).toBe("completed");
  });

  it("psibox run refuses a sweep config and points to psibox sweep", () => {
    fs.writeFileSync(path.join(work, "sw.toml"), SWEEP);
    expect(psibox(["run", "sw.toml"]).stderr).toBe("psibox: sw.toml describes a sweep ([sweep] section): run it with psibox sweep sw.toml\n");
  });
});
