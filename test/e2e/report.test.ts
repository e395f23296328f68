// psibox analyze and psibox report: tables, pictures and an HTML page checked in a real headless browser.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { PNG } from "pngjs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fieldFigure } from "../../src/report/field-image.js";

const BIN = path.resolve("dist/cli/bin.js");
let work: string;
beforeAll(() => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-report-"));
  fs.writeFileSync(
    path.join(work, "jeans.toml"),
    `[grid]\ncells = [32, 32]\nbox = "20 kpc"\n[particle]\nmass = "1e-22 eV"\n[span]\nduration = "200 Myr"\n` +
      `[initial]\nkind = "plane-wave"\nmean_density = "1e7 Msun/kpc^3"\ncontrast = 0.3\nmode = [1, 1]\n[output]\ntime_unit = "Myr"\nsnapshot_interval = "100 Myr"\n`,
  );
  const r = spawnSync(process.execPath, [BIN, "run", "jeans.toml", "-q"], { cwd: work, encoding: "utf8" });
  expect(r.status, r.stderr).toBe(0);
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

function psibox(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: work, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

function readCsv(file: string): Record<string, number>[] {
  const [header, ...rows] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = header!.split(",");
  return rows.map((r) => Object.fromEntries(r.split(",").map((v, i) => [cols[i]!, Number(v)])));
}

describe("pictures", () => {
  it("a density image has its size, a non-constant colour range and axis labels and a colour bar title in the SVG", async () => {
    const nx = 48;
    const ny = 24;
    const values = Float64Array.from({ length: nx * ny }, (_, i) => Math.sin(i / 7));
    const fig = await fieldFigure({ nx, ny, values, width: 20, height: 10 }, { xTitle: "x [kpc]", yTitle: "y [kpc]", legend: "log₁₀ ρ [Msun/kpc³]", caption: "t = 1 Myr" });
    expect(fig.svg).toContain(">x [kpc]<");
    expect(fig.svg).toContain(">y [kpc]<");
    expect(fig.svg).toContain("log₁₀ ρ [Msun/kpc³]");
    expect(fig.svg).toContain("t = 1 Myr");
    const png = PNG.sync.read(fig.png);
    expect(png.width).toBe(fig.width);
    expect(png.height).toBe(fig.height);
    const colours = new Set<number>();
    for (let i = 0; i < png.data.length; i += 4 * 97) colours.add((png.data[i]! << 16) | (png.data[i + 1]! << 8) | png.data[i + 2]!);
    expect(colours.size).toBeGreaterThan(20);
  });
});

describe("psibox analyze", () => {
  it("writes the tables and pictures, with energies that equal the run's own time series (two code paths)", () => {
    const r = psibox(["analyze", "output/jeans"]);
    expect(r.code, r.stderr).toBe(0);
    const dir = path.join(work, "output/jeans/analysis/snap_00002");
    for (const f of ["power.csv", "pdf.csv", "peaks.csv", "profiles.csv", "summary.json", "slice.png", "power.png"]) expect(fs.existsSync(path.join(dir, f)), f).toBe(true);
    expect(fs.existsSync(path.join(work, "output/jeans/analysis/energies.png"))).toBe(true);
    expect(fs.existsSync(path.join(work, "output/jeans/analysis/clocks.png"))).toBe(true);
    const summary = JSON.parse(fs.readFileSync(path.join(dir, "summary.json"), "utf8"));
    const series = readCsv(path.join(work, "output/jeans/timeseries.csv"));
    const row = series.find((x) => x["step"] === summary.step)!;
    expect(summary.energies_Msun_km2_s2.kinetic / row["kinetic_Msun_km2_s2"]!).toBeCloseTo(1, 9);
    expect(summary.energies_Msun_km2_s2.potential / row["potential_Msun_km2_s2"]!).toBeCloseTo(1, 9);
    expect(summary.energies_Msun_km2_s2.kinetic_bulk_flow + summary.energies_Msun_km2_s2.kinetic_quantum_gradient).toBeCloseTo(summary.energies_Msun_km2_s2.kinetic, -3);
    const power = readCsv(path.join(dir, "power.csv"));
    // the first shell (width k_F = 2π/20 kpc⁻¹) holds the modes at k_F and √2 k_F
    expect(power[0]!["k_per_kpc"]).toBeGreaterThanOrEqual((2 * Math.PI) / 20);
    expect(power[0]!["k_per_kpc"]).toBeLessThanOrEqual((Math.SQRT2 * 2 * Math.PI) / 20);
    const frames = psibox(["analyze", "output/jeans", "--frames", "--out", "frames-out"]);
    expect(frames.code).toBe(0);
    expect(fs.readdirSync(path.join(work, "frames-out/frames"))).toEqual(["frame_00000.png", "frame_00001.png", "frame_00002.png"]);
  });
});

const chromium = ["/usr/bin/chromium", "/usr/bin/chromium-browser"].find((p) => fs.existsSync(p));
describe.runIf(chromium !== undefined || process.env["CI"] === "true")("psibox report", () => {
  it("writes one self-contained page that renders in headless Chromium without console errors", async () => {
    const r = psibox(["report", "output/jeans"]);
    expect(r.code, r.stderr).toBe(0);
    const file = path.join(work, "output/jeans/report.html");
    const html = fs.readFileSync(file, "utf8");
    expect(html).not.toMatch(/src="(?!data:)/); // every picture is inlined
    const { chromium: browserType } = await import("playwright-core");
    const browser = await browserType.launch({
      executablePath: chromium ?? "/usr/bin/chromium",
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
    try {
      const page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
      const errors: string[] = [];
      page.on("console", (m) => {
        if (m.type() === "error") errors.push(m.text());
      });
      page.on("pageerror", (e) => errors.push(e.message));
      await page.goto(`file://${file}`);
      for (const id of ["clocks", "energies", "field", "power", "diagnostics", "parameters"]) expect(await page.locator(`#${id}`).count(), id).toBe(1);
      const images = await page.locator("img").evaluateAll((els) => els.map((e) => (e as unknown as { naturalWidth: number }).naturalWidth));
      expect(images.length).toBeGreaterThanOrEqual(5);
      expect(images.every((w) => w > 100)).toBe(true);
      expect(await page.locator(".verdict li").count()).toBe(4);
      await page.screenshot({ path: path.join(work, "output/jeans/report-screenshot.png"), fullPage: true });
      // and one in the project's own (git-ignored) output/ folder, to look at
      fs.mkdirSync(path.resolve("output"), { recursive: true });
      fs.copyFileSync(path.join(work, "output/jeans/report-screenshot.png"), path.resolve("output/report-screenshot.png"));
      expect(errors).toEqual([]);
    } finally {
      await browser.close();
    }
    expect(fs.statSync(path.join(work, "output/jeans/report-screenshot.png")).size).toBeGreaterThan(10_000);
  });
});
