// The pure pieces behind psibox's pictures: planes, colour ranges, log ticks, the cut of the
// linear spectrum, space–time bands, picture options and the conservation drifts.
import path from "node:path";
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { densityPlane, planeAxes } from "../../src/report/planes.js";
import { colourRange } from "../../src/report/field-image.js";
import { cutAtFirstZero, logTicks } from "../../src/report/plots.js";
import { bandRows } from "../../src/report/spacetime.js";
import { pictureOptions, checkSliceIndex } from "../../src/report/picture-options.js";
import { conservationDrifts } from "../../src/report/energy-series.js";
import { InputError } from "../../src/core/errors.js";

describe("density planes", () => {
  it("put the first user axis across and the second up, with each pixel on its cell (2D)", () => {
    const g = new Grid([8, 4], [8, 4]);
    // storage: (i, j) at i·4 + j; value = 10 i + j
    const p = densityPlane(g, (c) => 10 * Math.floor(c / 4) + (c % 4), "slice", { normal: null, index: null }, 1);
    expect([p.nx, p.ny, p.across, p.up]).toEqual([8, 4, 0, 1]);
    expect(p.values[2 * 8 + 5]).toBe(52); // row j = 2, column i = 5
    expect([p.x0, p.y0, p.width, p.height]).toEqual([-0.5, -0.5, 8, 4]);
  });

  it("sum the column density along the normal (3D), in mass per area", () => {
    const g = new Grid([4, 4, 4], [2, 2, 2]);
    const p = densityPlane(g, () => 3, "projection", { normal: 1, index: null }, 1);
    expect(planeAxes(3, 1)).toEqual({ across: 0, up: 2 });
    // Σ = ρ × side = 3 × 2 for a uniform box
    for (const v of p.values) expect(v).toBeCloseTo(6, 12);
  });
});

describe("the column density in one pass", () => {
  it("is the projection densityPlane sums, bit for bit, along each axis, and finds the densest cell (the first of equals)", async () => {
    const { columnDensity } = await import("../../src/report/planes.js");
    const { densestPoints } = await import("../../src/diagnostics/peaks.js");
    const g = new Grid([8, 16, 4], [3, 2.5, 1]);
    const psi = Float64Array.from({ length: 2 * g.size }, (_, i) => Math.sin(1.7 * i + 0.3) * (1 + (i % 7)));
    // two cells of the largest density: the first in storage order is the one
    psi.set([40, -3], 2 * 17);
    psi.set([40, -3], 2 * 95);
    const unit = 1.37;
    for (const normal of [0, 1, 2]) {
      const { plane, densest } = columnDensity(g, psi, unit, normal, 0.7);
      const reference = densityPlane(g, (c) => (psi[2 * c]! ** 2 + psi[2 * c + 1]! ** 2) * unit, "projection", { normal, index: null }, 0.7);
      expect(plane).toEqual(reference);
      expect(Buffer.compare(Buffer.from(plane.values.buffer), Buffer.from(reference.values.buffer))).toBe(0);
      expect(densest).toBe(17);
      expect(densestPoints(g, psi, 1, 1)[0]!.index).toBe(17);
    }
  });
});

describe("colour ranges and ticks", () => {
  it("clip to the stated decades below the maximum, or keep a narrower range, or take a fixed one", () => {
    expect(colourRange(Float64Array.of(-17, 3, 8), 5)).toEqual([3, 8]);
    expect(colourRange(Float64Array.of(1.2, 1.6), 5)).toEqual([1.2, 1.6]);
    expect(colourRange(Float64Array.of(1, 2), 5, [0, 9])).toEqual([0, 9]);
    expect(colourRange(Float64Array.of(-Infinity, 4), 5)).toEqual([3.5, 4.5]);
  });
  it("label whole decades on log axes, 1-2-5 inside narrow ones", () => {
    expect(logTicks(1e-7, 1e-1)).toEqual([1e-7, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 1e-1]);
    expect(logTicks(1e-100, 1).map((v) => Math.round(Math.log10(v)))).toEqual([-100, -80, -60, -40, -20, 0]);
    expect(logTicks(100, 1000)).toEqual([100, 200, 500, 1000]);
  });
});

describe("the linear spectrum's cut", () => {
  it("ends at the first zero of the wave suppression cos(x³)/(1 + x⁸) (Hu, Barkana & Gruzinov 2000)", () => {
    const rows = Array.from({ length: 400 }, (_, i) => {
      const x = 0.01 + (2 * i) / 400;
      const t = Math.cos(x ** 3) / (1 + x ** 8);
      return { k: x, P: (x / (1 + x * x)) * t * t };
    });
    const cut = cutAtFirstZero(rows);
    // computed independently: cos(x³) first vanishes at x = (π/2)^(1/3) = 1.1624
    expect(Math.abs(cut.at(-1)!.k - Math.cbrt(Math.PI / 2))).toBeLessThan(2 / 400 + 1e-12);
  });
});

describe("space–time bands", () => {
  it("give each snapshot its own band and leave a missing snapshot as a gap", () => {
    const rows = bandRows([0, 1, 2, 4], 40);
    expect(rows[0]).toBe(0);
    expect(rows[12]).toBe(1);
    expect(rows[20]).toBe(2); // t = 2.05
    expect(rows[30]).toBe(-1); // t = 3.05: no snapshot within half an interval
    expect(rows[39]).toBe(3);
  });
  it("split two snapshots half and half, never blending them", () => {
    const rows = bandRows([0, 10], 10);
    expect([...rows]).toEqual([0, 0, 0, 0, 0, 1, 1, 1, 1, 1]);
  });
});

describe("picture options from the command line", () => {
  const bad: [Record<string, string>, RegExp][] = [
    [{ range: "8,3" }, /^--range: LO must be below HI, got 8 ≥ 3$/],
    [{ range: "5,5" }, /^--range: LO must be below HI/],
    [{ columnRange: "a,b" }, /^--column-range: give two numbers LO,HI/],
    [{ colormap: "jet" }, /^--colormap: unknown colour map "jet"; choose a perceptually uniform one: viridis, magma, inferno, plasma, cividis$/],
    [{ sliceAxis: "w" }, /^--slice-axis: must be x, y or z/],
    [{ sliceIndex: "-1" }, /^--slice-index: give a cell index/],
    [{ decades: "0" }, /^--decades: give a positive number/],
  ];
  for (const [flags, message] of bad)
    it(`rejects ${JSON.stringify(flags)} in one line`, () => {
      expect(() => pictureOptions(flags)).toThrow(InputError);
      expect(() => pictureOptions(flags)).toThrow(message);
    });
  it("accepts good values and checks a slice index against the grid", () => {
    const o = pictureOptions({ colormap: "magma", range: "3, 8", sliceAxis: "x", sliceIndex: "31" });
    expect(o).toMatchObject({ colourMap: "magma", densityRange: [3, 8], normal: 0, sliceIndex: 31 });
    expect(() => checkSliceIndex(o, [32, 32, 32], "s.h5")).not.toThrow();
    expect(() => checkSliceIndex(o, [16, 32, 32], "s.h5")).toThrow(/^--slice-index: 31 is outside the grid of s\.h5 \(x has cells 0 … 15\)$/);
  });
});

describe("conservation drifts", () => {
  it("are zero for conserved energy and mass; the Layzer–Irvine residual detects a violation", () => {
    const flat = conservationDrifts([0, 1, 2].map((t) => ({ t, mass: 5, kinetic: 2 + t, potential: -4 - t })));
    expect(flat.map((d) => d.energy)).toEqual([0, 0, 0]);
    expect(flat.map((d) => d.mass)).toEqual([0, 0, 0]);
    // W = −2K makes 2K + W = 0, so Layzer–Irvine demands constant K + W; here K + W = −a is not:
    // the residual is (−a + 1)/|W| = −1/4 at a = 2 (computed independently)
    const li = conservationDrifts([1, 1.1, 1.3, 2].map((a, i) => ({ t: i, a, mass: 1, kinetic: a, potential: -2 * a })));
    expect(li.at(-1)!.energy).toBeCloseTo(-0.25, 12);
  });
  it("vanish to second order for an exact solution of the Layzer–Irvine equation (Layzer 1963)", () => {
    // computed independently: in ln a the equation reads dK/dln a + dW/dln a + 2K + W = 0,
    // solved exactly by K = a⁻², W = −a⁻¹ (each term cancels separately)
    const residual = (n: number) => {
      const rows = Array.from({ length: n + 1 }, (_, i) => {
        const a = Math.exp((i / n) * Math.log(3));
        return { t: i, a, mass: 1, kinetic: a ** -2, potential: -1 / a };
      });
      return Math.abs(conservationDrifts(rows).at(-1)!.energy);
    };
    expect(residual(200)).toBeLessThan(1e-4);
    expect(residual(100) / residual(200)).toBeCloseTo(4, 1); // trapezoid: second order
  });
  it("carry the contact energy with its own power of a: U = a⁻³ solves dU/dln a + 3U = 0 (computed independently)", () => {
    // a fixed comoving field: K = a⁻², W = −a⁻¹, U = a⁻³ each solve their part of
    // d(K + W + U)/dln a + 2K + W + 3U = 0; the residual vanishes to second order, and counting half of U
    // as kinetic (weight 2 instead of 3) leaves −½∫U d ln a = −(1 − 3⁻³)/6 ≈ −0.16 at a = 3, 0.48 of |W| = 1/3
    const rows = (n: number) =>
      Array.from({ length: n + 1 }, (_, i) => {
        const a = Math.exp((i / n) * Math.log(3));
        return { t: i, a, mass: 1, kinetic: a ** -2, potential: -1 / a, contact: a ** -3 };
      });
    const residual = (n: number) => Math.abs(conservationDrifts(rows(n)).at(-1)!.energy);
    expect(residual(200)).toBeLessThan(1e-4);
    expect(residual(100) / residual(200)).toBeCloseTo(4, 1);
    const wrong = rows(200).map((r) => ({ ...r, kinetic: r.kinetic + r.contact / 2, contact: r.contact / 2 }));
    expect(Math.abs(conservationDrifts(wrong).at(-1)!.energy)).toBeGreaterThan(0.1);
  });
  it("integrate U exactly where it is a power of a, so a U far above |W| (a nearly uniform field) leaves no quadrature error", () => {
    // rows 0.08 apart in ln a (every 16th step of 0.005): the trapezoid on 3U = 3e6 a⁻³ would leave
    // (0.24²/12)·3e6 a⁻³ per interval, thousands of |W|; the logarithmic mean is exact for a power law
    const rows = (u: number) =>
      Array.from({ length: 30 }, (_, i) => {
        const a = Math.exp(0.08 * i);
        return { t: i, a, mass: 1, kinetic: a ** -2, potential: -1 / a, contact: u * a ** -3 };
      });
    // K's and W's own trapezoid error (1.7e-2 of |W| at this spacing) is all there is: U adds below 1e-6
    const [withU, without] = [conservationDrifts(rows(1e6)), conservationDrifts(rows(0))];
    for (let i = 0; i < withU.length; i++) expect(Math.abs(withU[i]!.energy - without[i]!.energy)).toBeLessThan(1e-6);
  });
});

describe("the figure font", () => {
  it("is loaded from its own files, and draws the same pixels as loading every system font", async () => {
    const { Resvg } = await import("@resvg/resvg-js");
    const { FONT, PNG_SCALE, figureFontFiles, rasterise } = await import("../../src/report/render.js");
    const { PNG } = await import("pngjs");
    const files = figureFontFiles();
    expect(files?.some((f) => /DejaVuSans\.ttf$/.test(f))).toBe(true);
    // the glyphs the labels use, in the regular and the bold title style
    const svg =
      `<svg xmlns="http://www.w3.org/2000/svg" width="240" height="60"><text x="4" y="22" font-family="${FONT}" font-size="10">⟨ρ⟩ log₁₀ Σ [Msun/kpc²] −∫λ dt χ</text>` +
      `<text x="4" y="48" font-family="${FONT}" font-weight="bold" font-size="11">Density power spectrum</text></svg>`;
    const all = new Resvg(svg, { fitTo: { mode: "zoom", value: PNG_SCALE }, font: { loadSystemFonts: true, defaultFontFamily: FONT, sansSerifFamily: FONT }, background: "white" }).render();
    const own = PNG.sync.read((await rasterise(svg)).png);
    expect([own.width, own.height]).toEqual([all.width, all.height]);
    expect(Buffer.compare(Buffer.from(own.data), Buffer.from(all.pixels))).toBe(0);
    // and there is text: dark pixels
    let ink = 0;
    for (let i = 0; i < own.data.length; i += 4) if (own.data[i]! < 128) ink++;
    expect(ink).toBeGreaterThan(500);
  });
});

describe("the figure font's faces", () => {
  it("are the upright regular and bold of normal width, from fontconfig's listing (file, weight, width, slant)", async () => {
    const { figureFaces, figureFontFiles } = await import("../../src/report/render.js");
    // fontconfig's scales (its documentation): weight 80 regular, 200 bold, 40 extra light; width 100 normal, 87 semi-condensed; slant 0 roman, 110 oblique
    const real = figureFontFiles()!;
    const dir = path.dirname(real[0]!);
    const line = (file: string, weight: number, width: number, slant: number) => `${path.join(dir, file)}\t${weight}\t${width}\t${slant}`;
    const bold = real.find((f) => /Bold/.test(path.basename(f)));
    const regular = real.find((f) => f !== bold)!;
    expect(real.length).toBe(2);
    const listing = [
      line(path.basename(regular), 80, 87, 0),
      line(path.basename(regular), 80, 100, 110),
      line(path.basename(bold!), 200, 100, 0),
      line(path.basename(regular), 80, 100, 0),
      line("no-such-face.ttf", 80, 100, 0),
    ].join("\n");
    expect(figureFaces(listing)).toEqual([bold, regular].sort());
    // where nothing upright of normal width is listed: every listed file; nothing at all: null
    expect(figureFaces(line(path.basename(regular), 80, 87, 110))).toEqual([regular]);
    expect(figureFaces("")).toBeNull();
  });
});

describe("PNG files", () => {
  it("carry CRC-32s as the specification's sample code computes them: 0xCBF43926 for \"123456789\" (the check value of CRC-32/ISO-HDLC), zlib's where Node.js has it", async () => {
    const { tableCrc32 } = await import("../../src/report/png.js");
    const zlib = await import("node:zlib");
    expect(tableCrc32(Buffer.from("123456789"))).toBe(0xcbf43926);
    const bytes = Uint8Array.from({ length: 5000 }, (_, i) => (i * 7919) & 255);
    const native = (zlib as { crc32?: (d: Uint8Array) => number }).crc32;
    if (native) expect(tableCrc32(bytes)).toBe(native(bytes));
  });

  it("of embedded rasters decode to the same pixels in pngjs (an independent PNG reader), RGB and RGBA", async () => {
    const { encodePng } = await import("../../src/report/png.js");
    const { PNG } = await import("pngjs");
    for (const channels of [3, 4] as const) {
      const [w, h] = [37, 23];
      const px = Uint8Array.from({ length: channels * w * h }, (_, i) => (i * 7919 + (i >> 5) * 13) & 255);
      const back = PNG.sync.read(await encodePng(px, w, h, channels));
      expect([back.width, back.height]).toEqual([w, h]);
      const rgba = Uint8Array.from({ length: 4 * w * h }, (_, i) => (i % 4 === 3 && channels === 3 ? 255 : px[channels * (i >> 2) + (i % 4)]!));
      expect(Buffer.compare(Buffer.from(back.data), Buffer.from(rgba))).toBe(0);
    }
  });

  it("written band by band decode in pngjs (an independent PNG reader) to the pixels written, and deflate to the same bytes as zlib's one-shot deflate of all the scanlines", async () => {
    const { bandedPng } = await import("../../src/report/png.js");
    const { PNG } = await import("pngjs");
    const zlib = await import("node:zlib");
    // 700 RGBA pixels a row: about 93 rows a band, so 250 rows make three bands, the last one short
    for (const channels of [3, 4] as const) {
      const [w, h] = [700, 250];
      const px = Uint8Array.from({ length: channels * w * h }, (_, i) => ((i >> 6) * 7919 + (i % 17)) & 255);
      const line = channels * w;
      const scanlines = new Uint8Array((line + 1) * h);
      for (let y = 0; y < h; y++) scanlines.set(px.subarray(line * y, line * (y + 1)), (line + 1) * y + 1);
      const bands: number[] = [];
      const png = await bandedPng(w, h, channels, 2, (out, y, rows) => {
        bands.push(rows);
        out.set(scanlines.subarray((line + 1) * y, (line + 1) * (y + rows)));
      });
      expect(bands.length).toBeGreaterThan(2);
      expect(bands.reduce((a, b) => a + b)).toBe(h);
      const back = PNG.sync.read(png);
      expect([back.width, back.height]).toEqual([w, h]);
      const rgba = Uint8Array.from({ length: 4 * w * h }, (_, i) => (i % 4 === 3 && channels === 3 ? 255 : px[channels * (i >> 2) + (i % 4)]!));
      expect(Buffer.compare(Buffer.from(back.data), Buffer.from(rgba))).toBe(0);
      // the IDAT chunk's data (after signature 8, IHDR 25, length and type 8) is zlib's deflate of the whole scanlines
      const idat = zlib.deflateSync(scanlines, { level: 2 });
      expect(png.readUInt32BE(33)).toBe(idat.length);
      expect(Buffer.compare(png.subarray(41, 41 + idat.length), idat)).toBe(0);
    }
  });

  it("of a density plane show its cells as blocks of the zoom, the top row at the largest vertical coordinate", async () => {
    const { planePng } = await import("../../src/report/field-image.js");
    const { colourTable } = await import("../../src/report/colormaps.js");
    const { PNG } = await import("pngjs");
    const plane = { nx: 3, ny: 2, values: Float64Array.from([0, 0.5, 1, NaN, 0.25, 2]), x0: 0, y0: 0, width: 3, height: 2 };
    const png = PNG.sync.read(await planePng(plane, 0, 1, "viridis", 4));
    expect([png.width, png.height]).toEqual([12, 8]);
    const lut = colourTable("viridis");
    const at = (col: number, row: number) => Array.from(png.data.subarray(4 * (row * 12 + col), 4 * (row * 12 + col) + 3));
    // value v → entry round(255 v) (clipped); NaN → light grey; plane row 1 is drawn on top
    const expected = (v: number) => (Number.isNaN(v) ? [225, 225, 225] : Array.from(lut.subarray(3 * Math.round(255 * Math.min(1, v)), 3 * Math.round(255 * Math.min(1, v)) + 3)));
    for (let row = 0; row < 8; row++)
      for (let col = 0; col < 12; col++) expect(at(col, row)).toEqual(expected(plane.values[(1 - Math.floor(row / 4)) * 3 + Math.floor(col / 4)]!));
  });

  it("of a raster of many bands decode in pngjs (an independent PNG reader) to zoom × zoom blocks of its cells, band edges inside blocks", async () => {
    const { blockPng } = await import("../../src/report/png.js");
    const { PNG } = await import("pngjs");
    // 128 × 96 cells at zoom 5: 640-pixel rows, about 136 rows a band (not a multiple of 5)
    const [nx, ny, zoom] = [128, 96, 5];
    const colours = Uint8Array.from({ length: 3 * nx * ny }, (_, i) => (i * 2654435761) >>> 24);
    const png = PNG.sync.read(await blockPng(colours, nx, ny, zoom));
    expect([png.width, png.height]).toEqual([nx * zoom, ny * zoom]);
    for (let row = 0; row < ny * zoom; row++)
      for (let col = 0; col < nx * zoom; col++) {
        const cell = 3 * (Math.floor(row / zoom) * nx + Math.floor(col / zoom));
        const o = 4 * (row * nx * zoom + col);
        if (png.data[o] !== colours[cell] || png.data[o + 1] !== colours[cell + 1] || png.data[o + 2] !== colours[cell + 2]) throw new Error(`pixel (${col}, ${row}) differs`);
      }
  });

  it("of figures come from the workers with the pixels resvg draws on this thread (decoded by pngjs)", async () => {
    const { Resvg } = await import("@resvg/resvg-js");
    const { FONT, PNG_SCALE, figureFontFiles, rasterise } = await import("../../src/report/render.js");
    const { PNG } = await import("pngjs");
    // translucent marks over each other and over text: the worker copies resvg's pixels over its white background as
    // they are, which source-over onto opaque pixels leaves opaque (every alpha 255)
    const svg =
      `<svg xmlns="http://www.w3.org/2000/svg" width="120" height="40"><text x="4" y="22" font-family="${FONT}" font-size="10">log₁₀ Σ</text><circle cx="100" cy="20" r="12" fill="#3b528b"/>` +
      `<g fill="#e45756" fill-opacity="0.7"><circle cx="20" cy="18" r="7.3"/><circle cx="25.5" cy="21.2" r="6.1"/></g><path d="M2,30.3L117.6,7.1" stroke="#f58518" stroke-width="1.7" stroke-opacity="0.4" stroke-dasharray="3,2"/></svg>`;
    const here = new Resvg(svg, { fitTo: { mode: "zoom", value: PNG_SCALE }, font: { loadSystemFonts: false, fontFiles: figureFontFiles()!, defaultFontFamily: FONT, sansSerifFamily: FONT }, background: "white" }).render();
    const alphas = new Set(Array.from({ length: here.pixels.length / 4 }, (_, i) => here.pixels[4 * i + 3]));
    expect([...alphas]).toEqual([255]);
    const [a, b] = await Promise.all([rasterise(svg), rasterise(svg)]);
    for (const f of [a, b]) expect(Buffer.compare(Buffer.from(PNG.sync.read(f.png).data), Buffer.from(here.pixels))).toBe(0);
  });

  it("of Vega-Lite figures are the same whether the worker or this thread draws them", async () => {
    const { Resvg } = await import("@resvg/resvg-js");
    const { FONT, PNG_SCALE, figureFontFiles, renderVegaLite } = await import("../../src/report/render.js");
    const { drawFigure } = await import("../../src/report/figure-draw.js");
    const { PNG } = await import("pngjs");
    const spec = { data: { values: [1, 2, 3, 4].map((k) => ({ k, P: 10 ** -k })) }, mark: "line", encoding: { x: { field: "k", type: "quantitative" }, y: { field: "P", type: "quantitative", scale: { type: "log" } } } } as const;
    const [there, here] = await Promise.all([renderVegaLite(spec), drawFigure(Resvg, { vegaLite: spec, scale: PNG_SCALE }, figureFontFiles())]);
    expect(there.svg).toBe(here.svg);
    expect(Buffer.compare(there.png, Buffer.from(here.png))).toBe(0);
    // and the pixels are resvg's own drawing of that SVG (decoded by pngjs)
    const options = { fitTo: { mode: "zoom", value: PNG_SCALE }, font: { loadSystemFonts: false, fontFiles: figureFontFiles()!, defaultFontFamily: FONT, sansSerifFamily: FONT }, background: "white" } as const;
    expect(Buffer.compare(Buffer.from(PNG.sync.read(there.png).data), Buffer.from(new Resvg(there.svg, options).render().pixels))).toBe(0);
    // the ticks went through psibox's formatter on the worker too: 10⁻⁴ as a power of ten (Vega's own says 0.0001)
    expect(there.svg).toContain(">10⁻⁴</text>");
  });

  it("of plane pictures put the cells under the frame where resvg draws the SVG file's embedded raster", async () => {
    const { Resvg } = await import("@resvg/resvg-js");
    const { FONT, PNG_SCALE, figureFontFiles } = await import("../../src/report/render.js");
    const { fieldFigure, planePng } = await import("../../src/report/field-image.js");
    const { PNG } = await import("pngjs");
    // 12 × 10 cells of distinct colours, one without data, drawn 90 × 80 units: at 3 pixels a unit 22.5 × 24
    // pixels a cell, from an embedded raster of 24 × 24 pixel blocks (zoom ceil(3·80/10) = 24)
    const plane = { nx: 12, ny: 10, values: Float64Array.from({ length: 120 }, (_, i) => (i === 40 ? NaN : ((i * 37) % 119) / 118)), x0: 0, y0: 0, width: 12, height: 10 };
    const fig = await fieldFigure(plane, { xTitle: "x", yTitle: "y", legend: "v", title: "cells", range: [0, 1], colourMap: "viridis", size: 90 });
    expect(fig.svg).toContain(`data:image/png;base64,${(await planePng(plane, 0, 1, "viridis", 24)).toString("base64")}`);
    expect(fig.svg).toContain('width="90" height="80" preserveAspectRatio="none"');
    const ours = PNG.sync.read(fig.png);
    const theirs = new Resvg(fig.svg, { fitTo: { mode: "zoom", value: PNG_SCALE }, font: { loadSystemFonts: false, fontFiles: figureFontFiles()!, defaultFontFamily: FONT, sansSerifFamily: FONT }, background: "white" }).render();
    expect([ours.width, ours.height]).toEqual([theirs.width, theirs.height]);
    const drawn = theirs.pixels; // a copy at each read
    // the same pixels to ±1, except within a pixel of the cells' edges, which resvg blends where the cells here stay
    // sharp (and the frame's half-covered inner pixel, where the ticks' inner ends, under the raster before, show)
    const [x0, y0] = /<g fill="none" stroke-miterlimit="10" transform="translate\(([\d.]+),([\d.]+)\)"/.exec(fig.svg)!.slice(1).map((v) => PNG_SCALE * Number(v));
    const nearEdge = (p: number, origin: number, cell: number) => {
      const r = (((p + 0.5 - origin) % cell) + cell) % cell;
      return Math.min(r, cell - r) < 1.5;
    };
    let compared = 0;
    let worst = 0;
    for (let y = 0; y < ours.height; y++)
      for (let x = 0; x < ours.width; x++) {
        if (nearEdge(x, x0!, 22.5) || nearEdge(y, y0!, 24) || x === x0! + 1) continue;
        compared++;
        for (let c = 0, i = 4 * (y * ours.width + x); c < 3; c++) worst = Math.max(worst, Math.abs(ours.data[i + c]! - drawn[i + c]!));
      }
    expect(worst).toBeLessThanOrEqual(1);
    expect(compared).toBeGreaterThan(0.75 * ours.width * ours.height);
    // outside the raster's rectangle (90 × 80 units from the plot's origin) resvg drew on white in both: the same pixels
    let outside = 0;
    for (let y = 0; y < ours.height; y++)
      for (let x = 0; x < ours.width; x++) {
        if (x >= x0! && x < x0! + 90 * PNG_SCALE && y >= y0! && y < y0! + 80 * PNG_SCALE) continue;
        outside++;
        for (let c = 0, i = 4 * (y * ours.width + x); c < 4; c++) if (ours.data[i + c] !== drawn[i + c]) throw new Error(`pixel (${x}, ${y}) outside the raster differs`);
      }
    expect(outside).toBeGreaterThan(0.3 * ours.width * ours.height);
  });
});
