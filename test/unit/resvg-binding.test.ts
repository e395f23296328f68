import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { glibcPackage, resvgClass } from "../../src/report/resvg-binding.js";

const require = createRequire(import.meta.url);

describe("resvg's native binding", () => {
  it("names, for Linux, a glibc package that resvg-js itself lists as an optional dependency, and none elsewhere", () => {
    // the outside reference: resvg-js's own package manifest
    const optional = Object.keys((require("@resvg/resvg-js/package.json") as { optionalDependencies: Record<string, string> }).optionalDependencies);
    for (const arch of ["x64", "arm64"]) expect(optional).toContain(glibcPackage("linux", arch));
    expect(glibcPackage("darwin", "arm64")).toBeUndefined();
    expect(glibcPackage("win32", "x64")).toBeUndefined();
  });

  it("loads a Resvg that draws the same pixels as the one resvg-js's loader gives", () => {
    const svg = '<svg xmlns="http://www.w3.org/2000/svg" width="4" height="3"><rect x="1" y="0" width="2" height="2" fill="#c03010"/></svg>';
    const { Resvg } = require("@resvg/resvg-js") as { Resvg: ReturnType<typeof resvgClass> };
    const ours = new (resvgClass())(svg).render();
    const theirs = new Resvg(svg).render();
    expect([ours.width, ours.height]).toEqual([4, 3]);
    expect(Buffer.compare(ours.pixels, theirs.pixels)).toBe(0);
    // the rectangle's top-left pixel, opaque #c03010 (RGBA, straight alpha)
    expect([...ours.pixels.subarray(4, 8)]).toEqual([0xc0, 0x30, 0x10, 0xff]);
    // options reach the renderer: twice the size, on white
    const options = { fitTo: { mode: "zoom" as const, value: 2 }, background: "white" };
    const zoomed = new (resvgClass())(svg, options).render();
    expect([zoomed.width, zoomed.height]).toEqual([8, 6]);
    expect(Buffer.compare(zoomed.pixels, new Resvg(svg, options).render().pixels)).toBe(0);
    expect([...zoomed.pixels.subarray(0, 4)]).toEqual([0xff, 0xff, 0xff, 0xff]);
  });
});
