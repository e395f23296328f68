// Density pictures are drawn the way their axes say: a soliton placed off-centre (at a
// different position along every axis) is found in the rendered PNG at the coordinates
// that the picture's own tick labels give, in 2D and 3D, in slices and projections, for
// every choice of the normal axis. The reference is the soliton's configured centre
// (the field is built by psibox ic), read back through the figure's axes; tolerance one cell.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { PNG } from "pngjs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;

function psibox(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-orient-"));
  fs.writeFileSync(
    path.join(work, "two.toml"),
    `[grid]\ncells = [32, 32]\nbox = "20 kpc"\ngravity = "isolated"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "1 Myr"\n` +
      `[initial]\nkind = "solitons"\n[[initial.soliton]]\nmass = "2e9 Msun"\ncenter = ["6 kpc", "13 kpc"]\n`,
  );
  fs.writeFileSync(
    path.join(work, "three.toml"),
    `[grid]\ncells = [32, 32, 32]\nbox = "3 kpc"\ngravity = "isolated"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "1 Myr"\n` +
      `[initial]\nkind = "solitons"\nprofile = "core-fit"\n[[initial.soliton]]\ncore_radius = "0.12 kpc"\ncenter = ["0.9 kpc", "1.9 kpc", "1.3 kpc"]\n`,
  );
  for (const c of ["two", "three"]) {
    const r = psibox(["ic", `${c}.toml`, "-q"]);
    expect(r.code, r.stderr).toBe(0);
  }
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

/** Pairs (value, SVG position) of an axis's labelled ticks, read from the figure's SVG (psibox's chart writer). */
function axisTicks(svg: string, which: "X" | "Y", title: string): { value: number; at: number }[] {
  const axes = [...svg.matchAll(/<g class="axis (bottom|left|right)" transform="translate\(([-\d.e]+),([-\d.e]+)\)">(.*?)<\/g>/g)];
  const axis = axes.find((m) => (m[1] === "bottom") === (which === "X") && m[4]!.includes(`>${title}</text>`));
  expect(axis, `axis ${title}`).toBeDefined();
  const [gx, gy] = [Number(axis![2]), Number(axis![3])];
  // a bottom axis's label is centred on its tick; a left one's middle baseline puts its y 3 units below it (10-unit labels)
  const labels = [...axis![4]!.matchAll(/<text class="tick" x="([-\d.e]+)" y="([-\d.e]+)"[^>]*>([^<]+)<\/text>/g)];
  expect(labels.length).toBeGreaterThan(1);
  return labels.map((m) => ({ value: Number(m[3]!.replace("−", "-")), at: which === "X" ? gx + Number(m[1]) : gy + Number(m[2]) - 3 })).filter((t) => Number.isFinite(t.value));
}

/** Inverse of the axis: SVG position → value, by a least-squares line through the ticks. */
function invert(ticks: { value: number; at: number }[]): (at: number) => number {
  const n = ticks.length;
  const mv = ticks.reduce((s, t) => s + t.value, 0) / n;
  const ma = ticks.reduce((s, t) => s + t.at, 0) / n;
  const slope = ticks.reduce((s, t) => s + (t.at - ma) * (t.value - mv), 0) / ticks.reduce((s, t) => s + (t.at - ma) ** 2, 0);
  return (at) => mv + slope * (at - ma);
}

/** Where the brightest colour of the map (viridis' top, yellow) sits in the PNG, in SVG units relative to the plot's origin. */
function brightest(pngFile: string, svg: string): { x: number; y: number } {
  const png = PNG.sync.read(fs.readFileSync(pngFile));
  const [, ox, oy] = /<g fill="none" stroke-miterlimit="10" transform="translate\(([-\d.]+),([-\d.]+)\)">/.exec(svg)!.map(Number) as [number, number, number];
  const [, pw, ph] = /<image [^>]*width="([\d.]+)" height="([\d.]+)"/.exec(svg)!.map(Number) as [number, number, number];
  const scale = png.width / Number(/<svg[^>]* width="([\d.]+)"/.exec(svg)![1]);
  let best = Infinity;
  let sx = 0;
  let sy = 0;
  let count = 0;
  for (let py = Math.ceil(oy * scale); py < (oy + ph) * scale; py++)
    for (let px = Math.ceil(ox * scale); px < (ox + pw) * scale; px++) {
      const o = 4 * (py * png.width + px);
      const d = (png.data[o]! - 253) ** 2 + (png.data[o + 1]! - 231) ** 2 + (png.data[o + 2]! - 37) ** 2;
      if (d < best - 1e-9) {
        best = d;
        sx = sy = count = 0;
      }
      if (d <= best) {
        sx += px + 0.5;
        sy += py + 0.5;
        count++;
      }
    }
  return { x: sx / count / scale - ox, y: sy / count / scale - oy };
}

/** The soliton's position as the picture's axes say: (across, up) in the axis unit. */
function located(dir: string, name: string, xTitle: string, yTitle: string): [number, number] {
  const svg = fs.readFileSync(path.join(dir, `${name}.svg`), "utf8");
  const p = brightest(path.join(dir, `${name}.png`), svg);
  return [invert(axisTicks(svg, "X", xTitle))(p.x), invert(axisTicks(svg, "Y", yTitle))(p.y)];
}

describe("orientation of density pictures", () => {
  it("2D: the soliton at x = 6, y = 13 kpc is drawn at x = 6, y = 13 kpc (one cell: 0.625 kpc)", () => {
    const r = psibox(["analyze", "output/two/snapshots/snap_00000.h5", "--out", "a2"]);
    expect(r.code, r.stderr).toBe(0);
    const [x, y] = located(path.join(work, "a2"), "slice", "x [kpc]", "y [kpc]");
    expect(Math.abs(x - 6)).toBeLessThan(0.625);
    expect(Math.abs(y - 13)).toBeLessThan(0.625);
  });

  // the soliton sits at (0.9, 1.9, 1.3) kpc; a cell is 3/32 = 0.094 kpc
  const expected: Record<string, { across: string; up: string; at: [number, number] }> = {
    z: { across: "x", up: "y", at: [0.9, 1.9] },
    y: { across: "x", up: "z", at: [0.9, 1.3] },
    x: { across: "y", up: "z", at: [1.9, 1.3] },
  };
  for (const [normal, e] of Object.entries(expected)) {
    it(`3D, normal ${normal}: slice and projection show the soliton at ${e.across} = ${e.at[0]}, ${e.up} = ${e.at[1]} kpc`, () => {
      const out = `a3${normal}`;
      const r = psibox(["analyze", "output/three/snapshots/snap_00000.h5", "--out", out, "--slice-axis", normal]);
      expect(r.code, r.stderr).toBe(0);
      for (const name of ["slice", "projection"]) {
        const svg = fs.readFileSync(path.join(work, out, `${name}.svg`), "utf8");
        expect(svg).toContain(name === "slice" ? `density slice, ${normal} = ` : `column density, along ${normal}`);
        const [a, b] = located(path.join(work, out), name, `${e.across} [kpc]`, `${e.up} [kpc]`);
        expect(Math.abs(a - e.at[0]), `${name} ${e.across}`).toBeLessThan(0.094);
        expect(Math.abs(b - e.at[1]), `${name} ${e.up}`).toBeLessThan(0.094);
      }
    });
  }
});
