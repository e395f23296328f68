// Worker threads end cleanly: after a normal run, after a run stopped by a guard rail, and on SIGINT;
// and a run whose worker threads cannot start stops with exit code 1 and a one-line reason.
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { BIN, makeWork, removeWork } from "../helpers/cli.js";

let work: string;
const CONFIG = (duration: string, extra = "") =>
  `[grid]\ncells = [32, 32, 32]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "${duration}"\n` +
  `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.2\nmode = [1, 1, 0]\n[integrator]\nthreads = 2\n${extra}`;

beforeAll(() => {
  work = makeWork("threads");
});
afterAll(() => removeWork(work));

describe("worker threads shut down", () => {
  it("after a normal end and after a guard-rail stop, the process exits by itself", () => {
    fs.writeFileSync(path.join(work, "ok.toml"), CONFIG("20 Myr"));
    const ok = spawnSync(process.execPath, [BIN, "run", "ok.toml", "-q"], { cwd: work, encoding: "utf8", timeout: 60_000 });
    expect(ok.status, ok.stderr).toBe(0);
    fs.writeFileSync(path.join(work, "bad.toml"), CONFIG("20 Myr", "mass_tolerance = 1e-18\n"));
    const bad = spawnSync(process.execPath, [BIN, "run", "bad.toml", "-q"], { cwd: work, encoding: "utf8", timeout: 60_000 });
    expect(bad.status).toBe(3);
    expect(bad.stderr).toMatch(/run stopped: step \d+/);
  });

  it("on SIGINT the run stops at its next step, checkpoints and exits with 130", async () => {
    fs.writeFileSync(path.join(work, "long.toml"), CONFIG("100 Gyr", "[output]\ncheckpoint_every = 10\n"));
    const child = spawn(process.execPath, [BIN, "run", "long.toml", "-q"], { cwd: work, stdio: ["ignore", "ignore", "pipe"] });
    let stderr = "";
    child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
    const exited = new Promise<number | null>((r) => child.on("exit", (code) => r(code)));
    const checkpoint = path.join(work, "output/long/checkpoint.h5");
    const start = Date.now();
    while (!fs.existsSync(checkpoint) && Date.now() - start < 60_000) await new Promise((r) => setTimeout(r, 20));
    const sent = Date.now();
    child.kill("SIGINT");
    const code = await exited;
    expect(code).toBe(130);
    expect(Date.now() - sent).toBeLessThan(15_000);
    expect(stderr).toMatch(/interrupted \(SIGINT\).*psibox run --resume/);
  });
});

describe("worker threads that cannot start", () => {
  it("stop the run with exit code 1 and a one-line reason when the built worker script is missing", () => {
    // a copy of the built program without its worker script, as after a partial build
    const copy = path.join(work, "partial");
    fs.mkdirSync(copy);
    fs.cpSync(path.resolve("dist"), path.join(copy, "dist"), { recursive: true });
    fs.copyFileSync(path.resolve("package.json"), path.join(copy, "package.json"));
    fs.symlinkSync(path.resolve("node_modules"), path.join(copy, "node_modules"), "dir");
    fs.rmSync(path.join(copy, "dist/integrators/step-worker.js"));
    fs.writeFileSync(path.join(work, "partial.toml"), CONFIG("20 Myr"));
    const r = spawnSync(process.execPath, [path.join(copy, "dist/cli/bin.js"), "run", "partial.toml", "-q"], { cwd: work, encoding: "utf8", timeout: 60_000 });
    expect(r.status, r.stderr).toBe(1);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/^psibox: the worker thread script .*step-worker\.js is missing \(is psibox built\? run npm run build\)/);
  });
});
