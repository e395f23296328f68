// 200+ randomly corrupted configs: each must end in a one-line error naming a key or the file,
// exit code 2, no stack trace, and nothing written anywhere.
import fs from "node:fs";
import path from "node:path";
import { stringify } from "smol-toml";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { main } from "../../src/cli/main.js";
import { seededRandom } from "../helpers/fields.js";
import { makeWork, removeWork } from "../helpers/cli.js";

let work: string;
beforeAll(() => {
  work = makeWork("fuzz");
});
afterAll(() => removeWork(work));

type Config = Record<string, Record<string, unknown>>;
const base = (): Config => ({
  grid: { cells: [16], box: "10 kpc", gravity: "periodic" },
  particle: { mass: "1e-22 eV" },
  span: { duration: "1 Gyr" },
  initial: { kind: "plane-wave", mean_density: "1e7 Msun/kpc^3", contrast: 0.1, mode: [1] },
  integrator: { safety: 0.25 },
  output: { dir: path.join(work, "out") },
});

const wrongTypes: [string, string, unknown[]][] = [
  ["grid", "cells", ["sixteen", true, [16.5], []]],
  ["grid", "box", [10, true, [], [1, 2]]],
  ["particle", "mass", [1e-22, [1], false]],
  ["span", "duration", [true, 5, ["1 Gyr", 2]]],
  ["initial", "contrast", ["0.1", [0.1]]],
  ["initial", "mode", ["1", [1.5], 1]],
  ["integrator", "safety", ["high", [0.2]]],
];
const missingUnits: [string, string, string][] = [
  ["particle", "mass", "1e-22"],
  ["grid", "box", "10"],
  ["span", "duration", "5"],
  ["initial", "mean_density", "1e7"],
];
const wrongUnits: [string, string, string][] = [
  ["grid", "box", "10 km/s"],
  ["span", "duration", "10 kpc"],
  ["particle", "mass", "1 s"],
  ["initial", "mean_density", "1e7 Msun"],
  ["grid", "box", "10 parsecs"],
];
const negatives: [string, string, unknown][] = [
  ["grid", "box", "-10 kpc"],
  ["particle", "mass", "-1e-22 eV"],
  ["span", "duration", "-1 Gyr"],
  ["initial", "mean_density", "-1 Msun/kpc^3"],
  ["grid", "cells", [-16]],
  ["grid", "cells", [0]],
  ["grid", "cells", [12]],
  ["integrator", "safety", -0.1],
  ["initial", "contrast", 1.5],
];
const badEnums: [string, string, string][] = [
  ["grid", "gravity", "sideways"],
  ["initial", "kind", "cube"],
  ["grid", "poisson", "magic"],
];

function corrupt(rnd: () => number, i: number): { text: string; what: string } {
  const pick = <T>(list: readonly T[]): T => list[Math.floor(((rnd() + 1) / 2) * list.length) % list.length] as T;
  const c = base();
  switch (i % 7) {
    case 0: {
      const [s, k, values] = pick(wrongTypes);
      c[s]![k] = pick(values);
      return { text: stringify(c), what: `wrong type ${s}.${k}` };
    }
    case 1: {
      const [s, k, v] = pick(missingUnits);
      c[s]![k] = v;
      return { text: stringify(c), what: `missing unit ${s}.${k}` };
    }
    case 2: {
      const [s, k, v] = pick(negatives);
      c[s]![k] = v;
      return { text: stringify(c), what: `out of range ${s}.${k}` };
    }
    case 3: {
      const section = pick(["grid", "particle", "span", "initial", "integrator", "output", ""]);
      const key = `k${Math.floor(((rnd() + 1) / 2) * 1e6)}`;
      if (section === "") (c as Record<string, unknown>)[key] = 1;
      else c[section]![key] = "1 kpc";
      return { text: stringify(c), what: `unknown key ${section}.${key}` };
    }
    case 4: {
      const text = stringify(c);
      const cut = Math.floor(((rnd() + 1) / 2) * text.indexOf('kind = "plane-wave"'));
      return { text: text.slice(0, cut), what: `truncated at ${cut}` };
    }
    case 5: {
      const [s, k, v] = pick(wrongUnits);
      c[s]![k] = v;
      return { text: stringify(c), what: `wrong unit ${s}.${k}` };
    }
    default: {
      const [s, k, v] = pick(badEnums);
      c[s]![k] = v;
      return { text: stringify(c), what: `bad choice ${s}.${k}` };
    }
  }
}

describe("corrupted configs", () => {
  it("each of 210 corrupted configs fails cleanly with exit code 2", async () => {
    const rnd = seededRandom(2024);
    const file = path.join(work, "c.toml");
    let stderr = "";
    const spy = vi.spyOn(process.stderr, "write").mockImplementation((chunk: string | Uint8Array) => {
      stderr += String(chunk);
      return true;
    });
    const stdout = vi.spyOn(process.stdout, "write").mockImplementation(() => true);
    try {
      for (let i = 0; i < 210; i++) {
        const { text, what } = corrupt(rnd, i);
        fs.writeFileSync(file, text);
        stderr = "";
        const code = await main(["run", file]);
        const lines = stderr.trim().split("\n");
        expect(code, `${what}: ${stderr}`).toBe(2);
        expect(lines, what).toHaveLength(1);
        expect(lines[0], what).toMatch(/^psibox: (.*c\.toml|--set|[a-z_][a-z_0-9]*(\.[a-z_0-9[\]]+)*): /);
        expect(stderr, what).not.toMatch(/\n\s+at /);
        expect(fs.readdirSync(work).sort(), what).toEqual(["c.toml"]);
      }
    } finally {
      spy.mockRestore();
      stdout.mockRestore();
    }
  });
});
