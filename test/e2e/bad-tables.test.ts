// Bad spectrum tables stop psibox before anything runs: one line naming the file and the line, exit code 2.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;
beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-tables-"));
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

const CONFIG = (table: string) =>
  `[grid]\ncells = [8, 8, 8]\nbox = "2 Mpc/h"\n[particle]\nmass = "1e-22 eV"\n[background]\nkind = "lcdm"\n[span]\nstart_redshift = 100\n` +
  `[initial]\nkind = "cosmological"\ntransfer = "table"\nspectrum_table = "${table}"\n`;

describe("psibox ic with a bad spectrum table", () => {
  it("names the file and line of a k that does not increase or a negative P, and a table that misses the grid's k range", () => {
    const k = Array.from({ length: 60 }, (_, i) => 1e-3 * Math.pow(1e5, i / 59));
    const good = k.map((x) => `${x} ${1e4 * x / (1 + (x / 0.02) ** 2.5)}`);
    const tables: [string, string[], RegExp][] = [
      ["order.txt", ["# k P", ...good.slice(0, 3), good[1]!, ...good.slice(4)], /order\.txt:5: k = [\d.e-]+ does not increase/],
      ["negative.txt", [...good.slice(0, 2), `${k[2]} -3`, ...good.slice(3)], /negative\.txt:3: P must be positive, got -3/],
      ["short.txt", good.slice(0, 30), /short\.txt: the table covers k = 0\.001000 … [\d.]+ h\/Mpc, but the grid needs [\d.]+ … [\d.]+ h\/Mpc/],
    ];
    for (const [name, lines, message] of tables) {
      fs.writeFileSync(path.join(work, name), lines.join("\n") + "\n");
      fs.writeFileSync(path.join(work, "c.toml"), CONFIG(name));
      const r = spawnSync(process.execPath, [BIN, "ic", "c.toml", "-q", "--force"], { cwd: work, encoding: "utf8" });
      expect(r.status, r.stderr).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(fs.existsSync(path.join(work, "output", "c", "snapshots"))).toBe(false);
    }
  });
});
