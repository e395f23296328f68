// A ratchet on function length in src/ (outside the AssemblyScript kernels): no function, method, constructor,
// accessor or arrow function longer than LIMIT lines (first to last line, nested functions included), apart
// from the listed ones, which may only shrink. A listed function that fits under the limit must leave the list.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { functionLengths } from "../helpers/function-lengths.js";

const LIMIT = 80;

/** Functions over the limit today: "file (relative to src/) name" → its length now, the most it may have. */
const OVER: Readonly<Record<string, number>> = {};

function sources(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) return sources(p);
    return p.endsWith(".ts") && !p.endsWith(".as.ts") && !p.endsWith(".d.ts") ? [p] : [];
  });
}

describe("function lengths in src/", () => {
  it("measures what it claims (a function of 3 lines, an arrow inside a method, a constructor)", () => {
    const text = ["function f() {", "  return 1;", "}", "class C {", "  constructor() {}", "  m() {", "    const g = () => {", "      return 2;", "    };", "  }", "}"].join("\n");
    expect(functionLengths("x.ts", text).map((l) => [l.name, l.lines])).toEqual([
      ["f", 3],
      ["C.constructor", 1],
      ["C.m", 5],
      ["g", 3],
    ]);
  });

  it(`no function is longer than ${LIMIT} lines except the listed ones, which do not grow`, () => {
    const src = path.resolve("src");
    const found = new Map<string, number>();
    for (const file of sources(src)) {
      const rel = path.relative(src, file).split(path.sep).join("/");
      for (const f of functionLengths(file, fs.readFileSync(file, "utf8"))) {
        if (f.lines > LIMIT) found.set(`${rel} ${f.name}`, Math.max(found.get(`${rel} ${f.name}`) ?? 0, f.lines));
      }
    }
    const tooLong = [...found].filter(([key, lines]) => lines > (OVER[key] ?? LIMIT)).map(([key, lines]) => `${key}: ${lines} lines`);
    expect(tooLong, "split these functions").toEqual([]);
    const stale = Object.keys(OVER).filter((key) => !found.has(key));
    expect(stale, `now within ${LIMIT} lines (or gone): remove from OVER in test/unit/function-lengths.test.ts`).toEqual([]);
  });
});
