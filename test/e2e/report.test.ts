// psibox analyze and psibox report from real (small) runs: every picture type is made and
// checked for size and content, the movie is encoded (or its fallback said), bad picture
// options are refused, and the HTML page is checked in headless Chromium for images that
// load and text that is neither clipped nor overflowing (bounding boxes through the DOM).
// The 1D and 2D analyses here leave out the field diagnostics (--diagnostics none): their
// tables and pictures are checked in analyze-diagnostics.test.ts, and the 3D report here has them.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { PNG } from "pngjs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { findEncoder } from "../../src/report/movie.js";
import { conservationDrifts, energyRows } from "../../src/report/energy-series.js";
import { CHROMIUM, launchChromium, openPage, overflowing, pageImages } from "../helpers/page-check.js";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;

function psibox(args: string[], env: Record<string, string> = {}) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8", env: { ...process.env, ...env } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const RUNS: Record<string, string> = {
  jeans:
    `[grid]\ncells = [32, 32]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "200 Myr"\n` +
    `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.3\nmode = [1, 1]\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "100 Myr"\n`,
  line:
    `[grid]\ncells = 64\nbox = "100 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "600 Myr"\n` +
    `[initial]\nkind = "plane-wave"\nmean_density = "1e6 Msun/kpc^3"\ncontrast = 0.2\nmode = [1]\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "200 Myr"\n`,
  cosmo:
    `[grid]\ncells = [16, 16, 16]\nbox = "2 Mpc/h"\n[particle]\nmass = "1e-22 eV"\n[background]\nkind = "lcdm"\n[span]\nstart_redshift = 50\nend_redshift = 10\n` +
    `[initial]\nkind = "cosmological"\nseed = 3\n[output]\nsnapshot_redshifts = [20]\n[breakdown]\ntangent = true\nprobes = 1\n`,
};

beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-report-"));
  for (const [name, toml] of Object.entries(RUNS)) {
    fs.writeFileSync(path.join(work, `${name}.toml`), toml);
    const r = psibox(["run", `${name}.toml`, "-q"]);
    expect(r.code, r.stderr).toBe(0);
  }
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

/** A picture worth looking at: at least `minWidth` pixels wide, many colours, a fair share of ink. */
function checkPicture(file: string, minWidth = 900, withSvg = true): void {
  expect(fs.existsSync(file), file).toBe(true);
  const png = PNG.sync.read(fs.readFileSync(file));
  expect(png.width, file).toBeGreaterThanOrEqual(minWidth);
  expect(png.height, file).toBeGreaterThanOrEqual(450);
  const colours = new Set<number>();
  let ink = 0;
  const pixels = png.width * png.height;
  for (let i = 0; i < png.data.length; i += 4) {
    const [r, g, b] = [png.data[i]!, png.data[i + 1]!, png.data[i + 2]!];
    if (r + g + b < 740) ink++;
    if (i % 28 === 0) colours.add((r << 16) | (g << 8) | b);
  }
  expect(colours.size, file).toBeGreaterThan(8);
  expect(ink / pixels, file).toBeGreaterThan(0.015);
  if (!withSvg) return;
  const svg = fs.readFileSync(file.replace(/\.png$/, ".svg"), "utf8");
  expect(svg.startsWith("<svg"), file).toBe(true);
  // what is drawn (not the embedded raster, nor the screen-reader labels) has no raw numbers
  expect(svg.replace(/data:[^"]+|aria-label="[^"]*"/g, "")).not.toMatch(/NaN|undefined|e[+-]\d\d/);
}

describe("psibox analyze: every picture type from real runs", () => {
  it("2D: density, P(k), energies, clocks, frames on one colour range and a movie (PNG and SVG)", () => {
    const r = psibox(["analyze", "output/jeans", "--movie", "--colormap", "cividis", "--diagnostics", "none"]);
    expect(r.code, r.stderr).toBe(0);
    const a = path.join(work, "output/jeans/analysis");
    for (const f of ["slice", "power"]) checkPicture(path.join(a, "snap_00002", `${f}.png`));
    for (const f of ["energies", "clocks"]) checkPicture(path.join(a, `${f}.png`));
    expect(fs.readdirSync(path.join(a, "frames"))).toEqual(["frame_00000.png", "frame_00001.png", "frame_00002.png"]);
    checkPicture(path.join(a, "frames/frame_00001.png"), 600, false); // frames are PNG only
    // every frame of one size, though their subtitles' times and steps differ in length
    const sizes = fs.readdirSync(path.join(a, "frames")).map((f) => PNG.sync.read(fs.readFileSync(path.join(a, "frames", f)))).map((p) => `${p.width}×${p.height}`);
    expect(new Set(sizes).size, sizes.join(", ")).toBe(1);
  });

  it("1D: the density on a log axis and the space–time diagram", () => {
    const r = psibox(["analyze", "output/line", "--diagnostics", "none"]);
    expect(r.code, r.stderr).toBe(0);
    checkPicture(path.join(work, "output/line/analysis/snap_00003/slice.png"));
    checkPicture(path.join(work, "output/line/analysis/spacetime.png"), 1100);
    expect(fs.readFileSync(path.join(work, "output/line/analysis/snap_00003/slice.svg"), "utf8")).toContain("ρ [Msun/kpc³]");
  });

  it("3D expanding: slice, column density, P(k) with linear theory, and a Layzer–Irvine residual below 1e-3 of |W| (Layzer 1963)", () => {
    const r = psibox(["analyze", "output/cosmo", "--slice-axis", "y", "--column-range", "7,8.5"]);
    expect(r.code, r.stderr).toBe(0);
    const a = path.join(work, "output/cosmo/analysis");
    for (const f of ["slice", "projection", "power"]) checkPicture(path.join(a, "snap_00002", `${f}.png`));
    checkPicture(path.join(a, "energies.png"));
    checkPicture(path.join(a, "breakdown.png")); // the measured breakdown ([breakdown] tangent and one probe)
    const projection = fs.readFileSync(path.join(a, "snap_00002/projection.svg"), "utf8");
    expect(projection).toContain("log₁₀ Σ [Msun/kpc²]");
    expect(projection).toContain("column density, along y");
    expect(projection).toContain("colours fixed");
    expect(fs.readFileSync(path.join(a, "snap_00002/power.svg"), "utf8")).toContain("linear theory");
    expect(fs.readFileSync(path.join(a, "energies.svg"), "utf8")).toContain("Layzer–Irvine");
    const [header, ...lines] = fs.readFileSync(path.join(work, "output/cosmo/timeseries.csv"), "utf8").trim().split("\n");
    const cols = header!.split(",");
    const rows = lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [cols[i]!, cols[i] === "limiter" ? v : Number(v)])));
    const drifts = conservationDrifts(energyRows(rows, "t_Gyr"));
    expect(Math.max(...drifts.map((d) => Math.abs(d.energy)))).toBeLessThan(1e-3);
  });

  it("encodes the movie with ffmpeg when it is there, and says when only frames could be made", () => {
    const encoder = findEncoder();
    const a = path.join(work, "output/jeans/analysis");
    if (encoder) {
      const movie = fs.readFileSync(path.join(a, `movie.${encoder.extension}`));
      expect(movie.length).toBeGreaterThan(2000);
      // MP4 files open with an ftyp box, WebM with the EBML magic number
      expect(encoder.extension === "mp4" ? movie.subarray(4, 8).toString("latin1") : movie.subarray(0, 4).toString("hex")).toBe(encoder.extension === "mp4" ? "ftyp" : "1a45dfa3");
    }
    const r = psibox(["analyze", "output/jeans", "--movie", "--out", "no-encoder", "--diagnostics", "none"], { PSIBOX_FFMPEG: path.join(work, "no-such-ffmpeg") });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/no video encoder found \(ffmpeg with libx264 or libvpx on the PATH\); the movie is the 3 frames in /);
    expect(fs.readdirSync(path.join(work, "no-encoder/frames"))).toHaveLength(3);
  });

  it("refuses bad picture options and a movie of one snapshot with one line and exit code 2", () => {
    expect(psibox(["ic", "cosmo.toml", "--set", 'output.dir="single"', "-q"]).code).toBe(0);
    const cases: [string[], RegExp][] = [
      [["analyze", "output/jeans", "--range", "8,3"], /^psibox: --range: LO must be below HI, got 8 ≥ 3\n$/],
      [["analyze", "output/jeans", "--colormap", "jet"], /^psibox: --colormap: unknown colour map "jet"; choose a perceptually uniform one: viridis, magma, inferno, plasma, cividis\n$/],
      [["analyze", "output/cosmo/snapshots/snap_00001.h5", "--slice-index", "16", "--out", "x"], /^psibox: --slice-index: 16 is outside the grid of .*snap_00001\.h5 \(z has cells 0 … 15\)\n$/],
      [["analyze", "single", "--movie"], /^psibox: --movie: needs at least two snapshots; single has 1\n$/],
      [["report", "output/jeans", "--slice-axis", "w"], /^psibox: --slice-axis: must be x, y or z, got "w"\n$/],
    ];
    for (const [args, message] of cases) {
      const r = psibox(args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stderr).toMatch(message);
    }
    const tables = psibox(["analyze", "output/line", "--no-pictures", "--out", "tables-only", "--diagnostics", "none"]);
    expect(tables.stdout).toMatch(/tables \(no pictures\) in tables-only/);
  });
});

describe.runIf(CHROMIUM !== undefined || process.env["CI"] === "true")("psibox report in headless Chromium", () => {
  it("loads every image, and no text of the page or of any figure is clipped or overflows (DOM bounding boxes)", async () => {
    const r = psibox(["report", "output/cosmo"]);
    expect(r.code, r.stderr).toBe(0);
    const file = path.join(work, "output/cosmo/report.html");
    const html = fs.readFileSync(file, "utf8");
    expect(html).not.toMatch(/src="(?!data:)/); // every picture is inlined
    const text = html.replace(/data:[^"]+/g, "").replace(/<pre>[^]*<\/pre>/, ""); // pictures and the config as written
    expect(text).not.toMatch(/_Msun|_km_s|e[+-]\d\d|\. \(/); // human headers, formatted numbers, sentences that read
    const browser = await launchChromium();
    try {
      const { page, errors } = await openPage(browser, file);
      for (const id of ["clocks", "breakdown", "energies", "field", "power", "diagnostics", "halos", "parameters"]) expect(await page.locator(`#${id}`).count(), id).toBe(1);
      const images = await pageImages(page);
      expect(images.length).toBeGreaterThanOrEqual(7);
      expect(images.every((i) => i.ok && i.w > 600)).toBe(true);
      // five sidecar clocks (onset, level, phase diffusion frozen and adiabatic, breakdown estimate), then four measured lines
      // (depletion, its time from the rate, scrambling, the finite-time rate)
      expect(await page.locator(".verdict li").count()).toBe(9);
      // text that overflows its box, or boxes that stick out of the page's column
      const overflow = await overflowing(page);
      expect(overflow).toEqual([]);
      await page.screenshot({ path: path.join(work, "report-screenshot.png"), fullPage: true });
      // kept in the project's own (git-ignored) output/ folder for a person to look at
      fs.mkdirSync(path.resolve("output"), { recursive: true });
      fs.copyFileSync(path.join(work, "report-screenshot.png"), path.resolve("output/report-screenshot.png"));
      expect(errors).toEqual([]);
      // every figure's text lies inside its own picture
      const svgs = [...fs.readdirSync(path.join(work, "output/cosmo/analysis")).filter((f) => f.endsWith(".svg")).map((f) => path.join("output/cosmo/analysis", f)), "output/cosmo/analysis/snap_00002/slice.svg", "output/cosmo/analysis/snap_00002/projection.svg", "output/cosmo/analysis/snap_00002/power.svg"];
      for (const svg of svgs) {
        await page.setContent(`<body style="margin:0">${fs.readFileSync(path.join(work, svg), "utf8")}</body>`);
        const outside = (await page.evaluate(`(() => {
          const root = document.querySelector("svg").getBoundingClientRect();
          return Array.from(document.querySelectorAll("svg text"))
            .filter((t) => t.getAttribute("opacity") !== "0" && t.textContent.length > 0)
            .filter((t) => { const b = t.getBoundingClientRect(); return b.left < root.left - 0.5 || b.right > root.right + 0.5 || b.top < root.top - 0.5 || b.bottom > root.bottom + 0.5; })
            .map((t) => t.textContent);
        })()`)) as string[];
        expect(outside, svg).toEqual([]);
      }
    } finally {
      await browser.close();
    }
    expect(fs.statSync(path.join(work, "report-screenshot.png")).size).toBeGreaterThan(10_000);
  });
});
