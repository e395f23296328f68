// The dependency order of src/ (DEVELOPERS.md): a folder imports only from folders above it.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

const ORDER = [
  "core",
  "math",
  "grid",
  "fields",
  "physics",
  "diagnostics",
  "integrators",
  "ground-state",
  "config",
  "initial-conditions",
  "io",
  "quantum",
  "simulation",
  "report",
  "batch",
  "cli",
];

function filesUnder(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    return e.isDirectory() ? filesUnder(p) : p.endsWith(".ts") ? [p] : [];
  });
}

describe("layering", () => {
  it("no module imports from a layer below its own", () => {
    const src = path.resolve("src");
    const violations: string[] = [];
    for (const file of filesUnder(src)) {
      const rel = path.relative(src, file).split(path.sep);
      if (rel.length < 2) continue; // index.ts, version.ts sit above the layers
      const own = ORDER.indexOf(rel[0]!);
      expect(own, `folder ${rel[0]} is missing from the layer list`).toBeGreaterThanOrEqual(0);
      const text = fs.readFileSync(file, "utf8");
      for (const m of text.matchAll(/from\s+"(\.{1,2}\/[^"]+)"/g)) {
        const target = path.relative(src, path.resolve(path.dirname(file), m[1]!)).split(path.sep);
        if (target.length < 2) continue;
        const layer = ORDER.indexOf(target[0]!);
        if (layer > own) violations.push(`${rel.join("/")} imports ${target.join("/")}`);
      }
    }
    expect(violations).toEqual([]);
  });
});
