// Run-folder ownership through the CLI, with real child processes: folders a run must never write
// into, symbolic links resolved and reported, a lock held for the whole run (a real race of two runs,
// --force against a running run, stale locks of dead processes), and --force deleting only what
// psibox's own manifest lists.
import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { FREE_PACKET_1D } from "../helpers/configs.js";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;
beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-folder-"));
  fs.writeFileSync(path.join(work, "p.toml"), CONFIG("20 Myr"));
  fs.writeFileSync(path.join(work, "long.toml"), CONFIG("400 Myr").replace("snapshot_every = 200", "checkpoint_every = 100000"));
  fs.writeFileSync(path.join(work, "endless.toml"), CONFIG("1000 Gyr").replace("snapshot_every = 200", "checkpoint_every = 100000"));
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

// the shared free packet (no gravity, analytic), with the span given and few snapshots
const CONFIG = (duration: string) => `${FREE_PACKET_1D.replace('duration = "10 Myr"', `duration = "${duration}"`)}\n[output]\nsnapshot_every = 200\n`;

function psibox(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
function start(args: string[]) {
  const child = spawn(process.execPath, [BIN, ...args], { cwd: work, stdio: ["ignore", "pipe", "pipe"] });
  let stderr = "";
  child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
  const done = new Promise<{ code: number | null; stderr: string }>((resolve) => child.on("close", (code) => resolve({ code, stderr })));
  return { child, done };
}
const read = (p: string) => fs.readFileSync(path.join(work, p), "utf8");

describe("run folders", () => {
  it.each([
    ["/", /^psibox: output\.dir: \/ is the filesystem root, a system folder or a home folder; set output\.dir to a folder of its own/],
    ["/etc", /^psibox: output\.dir: \/etc is the filesystem root/],
    ["/usr/share/psibox-run", /^psibox: output\.dir: \/usr\/share\/psibox-run is the filesystem root/],
    ['""', /^psibox: output\.dir: is empty; give a folder of its own/],
  ])("refuses output.dir = %s with one line, exit 2", (dir, message) => {
    const r = psibox(["run", "p.toml", "-q", "--set", `output.dir=${dir}`]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
  });

  it("resolves a symbolic link to the root and refuses it; follows a link to a real folder and says where it writes", () => {
    fs.symlinkSync("/", path.join(work, "to-root"));
    const r = psibox(["run", "p.toml", "-q", "--set", "output.dir=to-root/x/.."]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^psibox: output\.dir: \/ \(.*to-root leads there\) is the filesystem root/);
    fs.mkdirSync(path.join(work, "elsewhere"));
    fs.symlinkSync(path.join(work, "elsewhere"), path.join(work, "linked"));
    const ok = psibox(["run", "p.toml", "-q", "--set", "output.dir=linked"]);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stderr).toContain(`psibox: ${path.join(work, "linked")} is a link; the run writes to ${path.join(work, "elsewhere")}`);
    expect(fs.existsSync(path.join(work, "elsewhere/summary.json"))).toBe(true);
  });

  it("--force deletes exactly what the manifest lists (analysis/ included) and never a foreign file", () => {
    expect(psibox(["run", "p.toml", "-q", "--set", "output.dir=f"]).code).toBe(0);
    expect(psibox(["analyze", "f", "--no-pictures"]).code).toBe(0);
    expect(read("f/psibox-files.txt")).toMatch(/^analysis\/$/m);
    fs.writeFileSync(path.join(work, "f/notes.txt"), "mine");
    fs.writeFileSync(path.join(work, "f/analysis-notes.txt"), "mine too");
    const again = psibox(["run", "p.toml", "-q", "--set", "output.dir=f", "--set", 'span.duration="10 Myr"', "--force"]);
    expect(again.code, again.stderr).toBe(0);
    expect(again.stderr).toMatch(/--force: removed \d+ files and folders of the earlier run listed in psibox-files\.txt/);
    expect(fs.existsSync(path.join(work, "f/analysis"))).toBe(false);
    expect(read("f/notes.txt")).toBe("mine");
    expect(read("f/analysis-notes.txt")).toBe("mine too");
    expect(read("f/config.toml")).toMatch(/duration = "10 Myr"/);
    // a snapshot of someone else's run, with psibox's naming pattern, is never deleted or overwritten
    fs.copyFileSync(path.join(work, "f/snapshots/snap_00000.h5"), path.join(work, "f/snapshots/snap_00099.h5"));
    const before = fs.readFileSync(path.join(work, "f/snapshots/snap_00099.h5"));
    const foreign = psibox(["run", "p.toml", "-q", "--set", "output.dir=f", "--force"]);
    expect(foreign.code).toBe(2);
    expect(foreign.stderr).toMatch(/^psibox: .*f\/snapshots\/snap_00099\.h5 was not written by psibox in this folder \(it is not listed in psibox-files\.txt\); move it away or choose another output\.dir\n$/);
    expect(fs.readFileSync(path.join(work, "f/snapshots/snap_00099.h5")).equals(before)).toBe(true);
  });

  it("refuses --force on a folder of run files psibox did not list", () => {
    fs.mkdirSync(path.join(work, "old"));
    fs.writeFileSync(path.join(work, "old/summary.json"), "{}");
    const r = psibox(["run", "p.toml", "-q", "--set", "output.dir=old", "--force"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/holds run files that psibox did not list as its own \(no psibox-files\.txt\)/);
    expect(read("old/summary.json")).toBe("{}");
  });

  it("lets one of two runs started at once into one folder write it; the other stops with one line", async () => {
    const a = start(["run", "long.toml", "-q", "--set", "output.dir=race", "--set", 'initial.width="1 kpc"']);
    const b = start(["run", "long.toml", "-q", "--set", "output.dir=race", "--set", 'initial.width="1.5 kpc"']);
    const [ra, rb] = await Promise.all([a.done, b.done]);
    const codes = [ra.code, rb.code].sort();
    expect(codes, ra.stderr + rb.stderr).toEqual([0, 2]);
    const loser = ra.code === 2 ? ra : rb;
    expect(loser.stderr).toMatch(/^psibox: (run folder .*race is in use by psibox process \d+ \(since .*\); wait for it to end or choose another output\.dir|output folder .*race already holds a run;.*)\n$/);
    const width = ra.code === 0 ? "1 kpc" : "1.5 kpc";
    expect(read("race/config.toml")).toContain(`width = "${width}"`);
    expect(JSON.parse(read("race/summary.json")).status).toBe("completed");
    expect(fs.existsSync(path.join(work, "race/.psibox-lock"))).toBe(false);
  });

  it("refuses run --force while another run writes the folder; the writer goes on undisturbed", async () => {
    // the writer runs until it is told to stop (SIGTERM: it ends after its current step with a checkpoint)
    const a = start(["run", "endless.toml", "-q", "--set", "output.dir=busy"]);
    const lock = path.join(work, "busy/.psibox-lock");
    while (!fs.existsSync(lock)) await new Promise((r) => setTimeout(r, 20));
    const b = psibox(["run", "endless.toml", "-q", "--set", "output.dir=busy", "--force"]);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(new RegExp(`^psibox: run folder .*busy is in use by psibox process ${a.child.pid} `));
    a.child.kill("SIGTERM");
    const ra = await a.done;
    expect(ra.code, ra.stderr).toBe(130);
    expect(JSON.parse(read("busy/summary.json"))).toMatchObject({ status: "stopped", reason: "interrupted (SIGTERM)" });
    expect(fs.existsSync(path.join(work, "busy/checkpoint.h5"))).toBe(true);
  });

  it("cleans a stale lock of a dead process with a message; reports a lock of another host", () => {
    const dead = spawnSync(process.execPath, ["-e", "0"]).pid;
    fs.mkdirSync(path.join(work, "stale"));
    fs.writeFileSync(path.join(work, "stale/.psibox-lock"), JSON.stringify({ pid: dead, host: os.hostname(), started: null, since: "2026-01-01T00:00:00Z" }));
    const r = psibox(["run", "p.toml", "-q", "--set", "output.dir=stale"]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toBe(`psibox: removed a stale lock of process ${dead} on this host (started 2026-01-01T00:00:00Z; that process is gone)\n`);
    fs.mkdirSync(path.join(work, "remote"));
    fs.writeFileSync(path.join(work, "remote/.psibox-lock"), JSON.stringify({ pid: process.pid, host: "node-17\n", started: 1, since: "2026-01-01T00:00:00Z" }));
    const other = psibox(["run", "p.toml", "-q", "--set", "output.dir=remote"]);
    expect(other.code).toBe(2);
    expect(other.stderr).toMatch(/^psibox: run folder .*remote is in use by psibox process \d+ on host node-17\\n \(since 2026-01-01T00:00:00Z\); if that run is gone, delete .*remote\/\.psibox-lock\n$/);
  });
});
