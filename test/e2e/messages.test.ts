// Failures that used to end in "unexpected error" (exit 1) or in messages of several lines, through
// the CLI in a temporary folder: each is now one line naming the file or key, exit 2 for bad input,
// exit 3 for a run stopped by a failed write (with summary.json and run.log saying why). The write
// failure is real: the run's file-size limit (ulimit -f, with SIGXFSZ ignored) makes the kernel refuse
// the checkpoint, as a full disk would.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import h5wasm from "h5wasm/node";
import { loadHdf5 } from "../../src/io/h5.js";
import { BIN, makeWork, removeWork, runPsibox } from "../helpers/cli.js";
import { PLANE_WAVE_2D } from "../helpers/configs.js";

let work: string;
const CONFIG = `${PLANE_WAVE_2D.replace("cells = [32, 32]", "cells = [64, 64]").replace("contrast = 0.3", "contrast = 0.2")}[output]
snapshot_every = 20
snapshot_precision = "float32"
checkpoint_every = 50
`;
beforeAll(async () => {
  await loadHdf5();
  work = makeWork("messages");
  fs.writeFileSync(path.join(work, "m.toml"), CONFIG);
});
afterAll(() => removeWork(work));

const psibox = (args: string[]) => runPsibox(work, args);
/** One line on stderr, starting with "psibox: ", no control characters, exit code `code`. */
function oneLine(r: { code: number | null; stderr: string }, code: number): string {
  expect(r.code, r.stderr).toBe(code);
  expect(r.stderr).toMatch(/^psibox: [^\n]*\n$/);
  // eslint-disable-next-line no-control-regex
  expect(r.stderr.slice(0, -1)).not.toMatch(/[\u0000-\u001f\u007f]/);
  return r.stderr.slice("psibox: ".length, -1);
}

describe("one-line messages instead of crashes", () => {
  it("init into a path that is a file", () => {
    fs.writeFileSync(path.join(work, "existing.toml"), "keep");
    expect(oneLine(psibox(["init", "packet-free-1d", "existing.toml"]), 2)).toBe("existing.toml exists and is not a folder; psibox init TEMPLATE [DIR] writes DIR/TEMPLATE.toml");
  });

  it("import into a folder that does not exist", () => {
    // a NumPy .npy file written by hand after the NEP 1 layout: magic, version 1.0, header, complex128 data
    const header = "{'descr': '<c16', 'fortran_order': False, 'shape': (8,), }";
    const padded = header + " ".repeat(64 - ((10 + header.length + 1) % 64)) + "\n";
    const head = Buffer.concat([Buffer.from([0x93]), Buffer.from("NUMPY"), Buffer.from([1, 0]), Buffer.from([padded.length, 0]), Buffer.from(padded)]);
    fs.writeFileSync(path.join(work, "f.npy"), Buffer.concat([head, Buffer.from(new Float64Array(16).fill(1).buffer)]));
    const r = psibox(["import", "f.npy", "--out", "no/such/dir/x.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV"]);
    expect(oneLine(r, 2)).toBe("--out: the folder of no/such/dir/x.h5 does not exist; create it first or give a path in an existing folder");
  });

  it("clocks on a snapshot whose time unit is unknown", () => {
    expect(psibox(["ic", "m.toml", "-q", "--set", "output.dir=ic"]).code).toBe(0);
    const snap = path.join(work, "ic/snapshots/snap_00000.h5");
    const f = new h5wasm.File(snap, "a");
    f.attrs["time_units"] && f.delete_attribute("time_units");
    f.create_attribute("time_units", "fortnights\n");
    f.close();
    expect(oneLine(psibox(["clocks", snap]), 2)).toMatch(/snap_00000\.h5: attribute "time_units" is "fortnights\\n", not a time unit psibox knows/);
  });

  it("an isolated grid too large is told in the cells the user wrote, not the padded ones", () => {
    const r = psibox(["run", "m.toml", "-q", "--set", "grid.cells=[1048576]", "--set", 'grid.gravity="isolated"', "--set", "initial.mode=[1]"]);
    expect(oneLine(r, 2)).toBe("grid.cells: 1048576 is too large for isolated gravity, whose zero-padded solve doubles every axis: use at most 524288 cells per axis and 67108864 in all (e.g. 524288), or periodic gravity");
  });

  it("values: cut to 60 characters, control characters escaped, no code-unit numbers, nesting bounded", () => {
    fs.writeFileSync(path.join(work, "huge.toml"), CONFIG.replace('"1e-22 eV"', `"${"x".repeat(10_000_000)}"`));
    const huge = psibox(["run", "huge.toml"]);
    expect(oneLine(huge, 2)).toMatch(/^particle\.mass: "x{60}… \(10000000 characters\)" does not start with a number; expected a mass/);
    const hugeSet = psibox(["run", "m.toml", "--set", `particle.mass="${"y".repeat(100_000)}"`]);
    expect(oneLine(hugeSet, 2)).toMatch(/^particle\.mass: "y{60}… \(100000 characters\)" does not start/);
    const ansi = psibox(["run", "m.toml", "--set", 'particle.mass="1e-22 e\u001b[31mV\u0007"']);
    expect(oneLine(ansi, 2)).toMatch(/^particle\.mass: cannot read unit "e\\x1b\[31mV\\x07"/);
    const negative = psibox(["run", "m.toml", "--set", 'grid.box="-0.5 kpc"']);
    expect(oneLine(negative, 2)).toBe("grid.box: must be positive, got a negative value");
    fs.writeFileSync(path.join(work, "deep.toml"), `[${Array(5000).fill("a").join(".")}]\n`);
    expect(oneLine(psibox(["run", "deep.toml"]), 2)).toMatch(/^a(\.a){16}: deep\.toml nests tables or lists more than 16 levels deep; a psibox config needs at most 4$/);
    const deepSet = psibox(["run", "m.toml", "--set", `${Array(3000).fill("a").join(".")}=1`]);
    expect(oneLine(deepSet, 2)).toMatch(/^a(\.a){16}: --set nests tables or lists more than 16 levels deep/);
    // a value with a trailing newline is a value with trailing white space
    const trailing = psibox(["ic", "m.toml", "-q", "--set", "output.dir=nl", "--set", 'grid.box="20 kpc\n"']);
    expect(trailing.code, trailing.stderr).toBe(0);
  });

  it("a write failure mid-run stops it with exit 3, and summary.json and run.log say which file and why", () => {
    const r = spawnSync("bash", ["-c", `trap '' XFSZ; ulimit -f 100; exec "${process.execPath}" "${BIN}" run m.toml -q --set output.dir=full`], { cwd: work, encoding: "utf8" });
    const message = oneLine({ code: r.status, stderr: r.stderr }, 3);
    expect(message).toMatch(/^run stopped: after step 50: .*full\/checkpoint\.h5: could not be written \(Write failed\); the disk may be full or a file size limit reached; no checkpoint was written yet: free space and run again; outputs up to the last good step in full$/);
    const summary = JSON.parse(fs.readFileSync(path.join(work, "full/summary.json"), "utf8"));
    expect(summary).toMatchObject({ status: "stopped", steps: 50 });
    expect(summary.reason).toMatch(/checkpoint\.h5: could not be written/);
    expect(fs.readFileSync(path.join(work, "full/run.log"), "utf8")).toMatch(/stopped: after step 50: .*checkpoint\.h5: could not be written/);
    // the snapshots written before the failure are whole
    expect(fs.readdirSync(path.join(work, "full/snapshots")).filter((n) => n.endsWith(".h5"))).toEqual(["snap_00000.h5", "snap_00001.h5", "snap_00002.h5"]);
  });
});
