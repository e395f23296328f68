// Text widths for the figures' layout (src/report/font-metrics.ts, chart/text.ts, vega-svg.ts): each character's
// advance width in the figure font's faces against the general-purpose opentype.js font parser from the registry
// (its cmap lookup and hmtx, character by character), a line's width against resvg's own drawing of it (with
// shaping and kerning), and figures that end a few units after their widest text, neither clipped nor padded.
import fs from "node:fs";
import { afterEach, describe, expect, it } from "vitest";
import opentype from "opentype.js";
import { Resvg } from "@resvg/resvg-js";
import { faceMetrics, type FaceMetrics } from "../../src/report/font-metrics.js";
import { figureFontFiles, figureTextMeasure, rasterOptions } from "../../src/report/figure-font.js";
import { chartSvg, type ChartSpec } from "../../src/report/chart/chart.js";
import { setTextMeasure, textWidth } from "../../src/report/chart/text.js";
import { vegaOfLite, vegaSvg } from "../../src/report/vega-svg.js";

const faces = figureFontFiles();
// every character the figures' text uses, and beyond: ASCII, Latin-1, Greek, sub- and superscripts, arrows,
// mathematical operators, angle brackets, one past the Basic Multilingual Plane and ones no face has
const characters = [
  ...Array.from({ length: 0x7f - 0x20 }, (_, i) => 0x20 + i),
  ...Array.from({ length: 0x180 - 0xa0 }, (_, i) => 0xa0 + i),
  ...Array.from({ length: 0x3d0 - 0x390 }, (_, i) => 0x390 + i),
  ...Array.from({ length: 0x20a0 - 0x2070 }, (_, i) => 0x2070 + i),
  ...Array.from({ length: 0x2300 - 0x2190 }, (_, i) => 0x2190 + i),
  0x27e8, 0x27e9, 0x210f, 0x1f600, 0xe000, 0xfffd, 0x10fffd,
].map((c) => String.fromCodePoint(c));

/** The face's bytes with every format 12 subtable of 'cmap' put under another platform (2, which no reader takes as Unicode): read through format 4. */
function withoutFormat12(font: Buffer): Uint8Array {
  const out = new Uint8Array(font);
  const v = new DataView(out.buffer);
  let cmap = -1;
  for (let i = 0, n = v.getUint16(4); i < n; i++) if (String.fromCharCode(...out.subarray(12 + 16 * i, 16 + 16 * i)) === "cmap") cmap = v.getUint32(12 + 16 * i + 8);
  for (let i = 0, n = v.getUint16(cmap + 2); i < n; i++) {
    const record = cmap + 4 + 8 * i;
    if (v.getUint16(cmap + v.getUint32(record + 4)) === 12) v.setUint16(record, 2);
  }
  return out;
}

describe.skipIf(faces === null)("the figure font's advance widths", () => {
  for (const file of faces ?? []) {
    const bytes = fs.readFileSync(file);
    const reference = opentype.parse(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
    const expected = (ch: string) => reference.charToGlyph(ch).advanceWidth! / reference.unitsPerEm;
    // format 4 maps the Basic Multilingual Plane only: beyond it, the missing glyph
    const check = (m: FaceMetrics | undefined, bmpOnly = false) => {
      expect(m).toBeDefined();
      for (const ch of characters) expect(m!.width(ch), `U+${ch.codePointAt(0)!.toString(16)}`).toBe(expected(bmpOnly && ch.codePointAt(0)! > 0xffff ? "\u{10fffd}" : ch));
      // a line is the sum of its characters
      const line = "kinetic energy spectra, t = 350 Myr (step 1771) −ln(|⟨b⟩|²/N) ξ(r) ħ/(m a σ) λ₁₀";
      expect(m!.width(line)).toBeCloseTo([...line].reduce((s, ch) => s + expected(ch), 0), 12);
    };

    it(`${file.split("/").pop()}: every character as opentype.js reads it (cmap format 12, or 4, and hmtx), and its bold bit`, () => {
      check(faceMetrics(bytes));
      expect(faceMetrics(bytes)!.bold).toBe((reference.tables["head"] as { macStyle: number }).macStyle % 2 === 1);
    });

    it(`${file.split("/").pop()}: the same through the format 4 subtable alone`, () => check(faceMetrics(withoutFormat12(bytes)), true));
  }

  it("has one regular and one bold face, and nothing is read from bytes that are not a face", () => {
    expect(faces!.map((f) => faceMetrics(fs.readFileSync(f))!.bold).sort()).toEqual([false, true]);
    expect(faceMetrics(new Uint8Array(64))).toBeUndefined();
    expect(faceMetrics(new TextEncoder().encode("wOFF not a TrueType face at all"))).toBeUndefined();
  });
});

/** The rightmost column of a rendered image's pixels (RGBA) that is not near white. */
function rightmostInk(image: { pixels: Buffer; width: number; height: number }): number {
  // resvg's pixels are copied at each read of the property: read once
  const px = image.pixels;
  let right = -1;
  for (let y = 0; y < image.height; y++)
    for (let x = image.width - 1; x > right; x--) {
      const i = 4 * (y * image.width + x);
      if (px[i]! < 200 || px[i + 1]! < 200 || px[i + 2]! < 200) right = x;
    }
  return right;
}

describe.skipIf(faces === null)("figures laid out with the figure font's widths", () => {
  const measure = figureTextMeasure(faces);
  afterEach(() => setTextMeasure(undefined));

  it("gives a line the width resvg draws it in (within the last glyph's side bearing and kerning: 2% and 0.15 em)", () => {
    setTextMeasure(measure);
    const scale = 4;
    for (const [text, bold] of [
      ["kinetic energy spectra, t = 350 Myr (step 1771)", true],
      ["dotted: when a clock rang; dashed: its threshold (squeezing target −10 dB)", false],
      ["exponential (random phase)", false],
      ["−ln(|⟨b⟩|²/N)", false],
      ["Husimi f(x, v), η = 0.125 kpc", true],
    ] as const) {
      const size = 10;
      const width = textWidth(text, size, bold);
      const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width + 40}" height="20"><rect width="100%" height="100%" fill="white"/><text x="0" y="14" font-family="DejaVu Sans" font-size="${size}"${bold ? ` font-weight="bold"` : ""}>${text.replace(/&/g, "&amp;").replace(/</g, "&lt;")}</text></svg>`;
      const drawn = (rightmostInk(new Resvg(svg, rasterOptions(scale, faces)).render()) + 1) / scale;
      expect(drawn, text).toBeLessThanOrEqual(width * 1.02);
      expect(drawn, text).toBeGreaterThan(width * 0.98 - 0.15 * size);
    }
  });

  const spec: ChartSpec = {
    title: "kinetic energy spectra, t = 350 Myr (step 1771)",
    subtitle: "dotted: when a clock rang; dashed: its threshold (squeezing target −10 dB), and a little more",
    panels: [{ width: 200, height: 100, x: { title: "k [1/kpc]" }, y: { title: "E" }, series: [{ name: "compressible", colour: "#1f5fa8", x: [0, 1], y: [0, 1], mark: "line" }] }],
  };

  it("ends a chart whose subtitle is its widest text a margin after it, drawn; the estimate of 0.8 em a character left a third of it blank", () => {
    setTextMeasure(measure);
    const measured = chartSvg(spec).svg;
    const image = new Resvg(measured, rasterOptions(1, faces)).render();
    // the chart's margin is 5 units: the subtitle's last glyph ends within it
    expect(image.width - 1 - rightmostInk(image)).toBeGreaterThanOrEqual(4);
    expect(image.width - 1 - rightmostInk(image)).toBeLessThanOrEqual(8);
    setTextMeasure(undefined);
    const estimated = new Resvg(chartSvg(spec).svg, rasterOptions(1, faces)).render();
    expect(estimated.width - 1 - rightmostInk(estimated)).toBeGreaterThan(0.25 * estimated.width);
  });

  it("gives Vega the same widths: a Vega-Lite figure ends a few units after its title", async () => {
    const lite = {
      title: { text: "Quantum clocks of the whole-box mode", subtitle: "dotted: when a clock rang; dashed: its threshold (squeezing target −10 dB)" },
      width: 120,
      height: 60,
      data: { values: [{ t: 0, y: 0 }, { t: 1, y: 1 }] },
      mark: "line",
      encoding: { x: { field: "t", type: "quantitative" }, y: { field: "y", type: "quantitative" } },
    };
    setTextMeasure(measure);
    const { svg } = await vegaSvg(vegaOfLite(lite as never));
    const image = new Resvg(svg, rasterOptions(1, faces)).render();
    const blank = image.width - 1 - rightmostInk(image);
    expect(blank).toBeGreaterThanOrEqual(0);
    expect(blank).toBeLessThanOrEqual(10);
  });
});
