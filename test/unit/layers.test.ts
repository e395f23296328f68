// The dependency order of src/, read from its one declaration, src/layers.json: a folder imports only
// from itself and the folders before it, and never across a forbidden edge. Static imports, re-exports,
// side-effect imports, dynamic import() and worker scripts (new URL(..., import.meta.url)) all count.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

interface LayerTable {
  readonly order: readonly string[];
  readonly forbidden: readonly { readonly from: readonly string[]; readonly to: string; readonly why: string }[];
}

const SRC = path.resolve("src");
const TABLE = JSON.parse(fs.readFileSync(path.join(SRC, "layers.json"), "utf8")) as LayerTable;

function filesUnder(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    return e.isDirectory() ? filesUnder(p) : p.endsWith(".ts") && !p.endsWith(".d.ts") ? [p] : [];
  });
}

/** Relative module specifiers a source text depends on, in any of the forms above. */
function relativeImports(text: string): string[] {
  const forms = [
    /\b(?:from|import)\s*["'](\.{1,2}\/[^"']+)["']/g, // import … from "x", export … from "x", import "x"
    /\bimport\s*\(\s*["'`](\.{1,2}\/[^"'`]+)["'`]\s*\)/g, // import("x")
    /\bnew\s+URL\s*\(\s*["'`](\.{1,2}\/[^"'`]+)["'`]\s*,\s*import\.meta\.url/g, // a worker script
  ];
  return forms.flatMap((re) => [...text.matchAll(re)].map((m) => m[1]!));
}

/** Every dependency edge between files of src/, as paths relative to src/ with .ts endings. */
function edges(): { file: string; target: string }[] {
  const out: { file: string; target: string }[] = [];
  for (const file of filesUnder(SRC)) {
    if (file.endsWith(".as.ts")) continue; // AssemblyScript kernels import nothing of the project
    for (const spec of relativeImports(fs.readFileSync(file, "utf8"))) {
      const target = path.relative(SRC, path.resolve(path.dirname(file), spec)).replace(/\.js$/, ".ts");
      out.push({ file: path.relative(SRC, file).split(path.sep).join("/"), target: target.split(path.sep).join("/") });
    }
  }
  return out;
}

const layerOf = (rel: string): string | undefined => (rel.includes("/") ? rel.split("/")[0] : undefined);

describe("layering (src/layers.json)", () => {
  it("finds static, re-exported, side-effect and dynamic imports and worker scripts", () => {
    const sample = [
      'import { a } from "../core/errors.js";',
      'export { b } from "./b.js";',
      'import "./side.js";',
      'const m = await import("../quantum/tracker.js");',
      "const w = new Worker(new URL(`./step-worker.js`, import.meta.url));",
      'import x from "node:fs";',
    ].join("\n");
    expect(relativeImports(sample).sort()).toEqual(["../core/errors.js", "../quantum/tracker.js", "./b.js", "./side.js", "./step-worker.js"]);
  });

  it("lists every folder of src/ once, and names only listed folders in its rules", () => {
    const folders = fs.readdirSync(SRC, { withFileTypes: true }).filter((e) => e.isDirectory()).map((e) => e.name);
    expect([...folders].sort()).toEqual([...TABLE.order].sort());
    expect(new Set(TABLE.order).size).toBe(TABLE.order.length);
    for (const rule of TABLE.forbidden) for (const f of [...rule.from, rule.to]) expect(TABLE.order, `rule names ${f}`).toContain(f);
  });

  it("DEVELOPERS.md lists the layers in the table's order", () => {
    const listed = [...fs.readFileSync("DEVELOPERS.md", "utf8").matchAll(/^([a-z-]+)\/\s{2,}/gm)].map((m) => m[1]);
    expect(listed).toEqual(TABLE.order);
  });

  it("no module imports from a layer after its own", () => {
    const violations = edges()
      .filter(({ file, target }) => {
        const own = layerOf(file);
        const other = layerOf(target);
        return own !== undefined && other !== undefined && TABLE.order.indexOf(other) > TABLE.order.indexOf(own);
      })
      .map(({ file, target }) => `${file} imports ${target}`);
    expect(violations).toEqual([]);
  });

  it("no module crosses a forbidden edge", () => {
    const crossing = edges().filter(({ file, target }) =>
      TABLE.forbidden.some((r) => r.from.includes(layerOf(file) ?? "") && layerOf(target) === r.to),
    );
    expect(crossing.map((e) => `${e.file} imports ${e.target}`)).toEqual([]);
  });
});
