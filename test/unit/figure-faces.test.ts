import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { FONT, figureFontFiles } from "../../src/report/render.js";
import { outlineSubset } from "../../src/report/font-outlines.js";
import { facesFor, newCharacters } from "../../src/report/figure-faces.js";

const files = figureFontFiles();
const codePoints = (s: string) => new Set([...s].map((c) => c.codePointAt(0)!));

/** resvg's pixels of `text` in the regular and the bold face at 3 pixels a unit, with the font files given. */
async function drawn(text: string, fontFiles: string[]): Promise<Buffer> {
  const { Resvg } = await import("@resvg/resvg-js");
  const svg =
    `<svg xmlns="http://www.w3.org/2000/svg" width="420" height="50"><text x="4" y="20" font-family="${FONT}" font-size="10">${text}</text>` +
    `<text x="4" y="42" font-family="${FONT}" font-size="11" font-weight="bold">${text}</text></svg>`;
  return new Resvg(svg, { fitTo: { mode: "zoom", value: 3 }, font: { loadSystemFonts: false, fontFiles, defaultFontFamily: FONT, sansSerifFamily: FONT }, background: "white" }).render().pixels;
}

/** Dark pixels (red below 128). */
const ink = (px: Buffer) => {
  let n = 0;
  for (let i = 0; i < px.length; i += 4) if (px[i]! < 128) n++;
  return n;
};

function inFolder<T>(body: (dir: string) => Promise<T>): Promise<T> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-faces-"));
  return body(dir).finally(() => fs.rmSync(dir, { recursive: true, force: true }));
}

// kerned pairs (AV, To, Ty), composite glyphs (é, ñ), a combining macron, super- and subscripts, Greek, brackets
const TEXT = "AV To Ty é ñ ρ̄ ⟨δ(x)δ(x+r)⟩ 10⁻⁴ log₁₀ Σ ħ/(m a σ) Ψ √(ρ/ρ̄) v × 1.5";

describe.runIf(files)("copies of the figure font with some glyphs' outlines", () => {
  it("draw their characters as the whole faces do in resvg, pixel for pixel, from a fraction of the bytes", async () => {
    await inFolder(async (dir) => {
      const copies = files!.map((f, i) => {
        const copy = outlineSubset(fs.readFileSync(f), codePoints(TEXT))!;
        expect(copy.length).toBeLessThan(fs.statSync(f).size / 3);
        fs.writeFileSync(path.join(dir, `${i}.ttf`), copy);
        return path.join(dir, `${i}.ttf`);
      });
      const whole = await drawn(TEXT, files!);
      expect(ink(whole)).toBeGreaterThan(2000);
      expect(Buffer.compare(await drawn(TEXT, copies), whole)).toBe(0);
      // a character left out draws without its outline: the copy really leaves the others out
      const cyrillic = "жЖ";
      expect(ink(await drawn(cyrillic, copies))).toBeLessThan(ink(await drawn(cyrillic, files!)) / 4);
    });
  });

  it("read a face's character map in its format 4 subtable as resvg does where the face has no format 12 one", async () => {
    await inFolder(async (dir) => {
      const bmp = TEXT.replace(/[^\u0000-\uffff]/gu, "");
      const pairs = files!.map((f, i) => {
        // the same face with its format 12 subtables relabelled as a platform no reader looks up (Macintosh, Korean)
        const face = new Uint8Array(fs.readFileSync(f));
        const v = new DataView(face.buffer);
        let cmap = 0;
        for (let t = 0; t < v.getUint16(4); t++) if (String.fromCharCode(...face.subarray(12 + 16 * t, 16 + 16 * t)) === "cmap") cmap = v.getUint32(20 + 16 * t);
        for (let r = 0; r < v.getUint16(cmap + 2); r++)
          if (v.getUint16(cmap + v.getUint32(cmap + 8 + 8 * r)) === 12) {
            v.setUint16(cmap + 4 + 8 * r, 1);
            v.setUint16(cmap + 6 + 8 * r, 3);
          }
        const [full, copy] = [path.join(dir, `full${i}.ttf`), path.join(dir, `copy${i}.ttf`)];
        fs.writeFileSync(full, face);
        fs.writeFileSync(copy, outlineSubset(face, codePoints(bmp))!);
        return [full, copy] as const;
      });
      const whole = await drawn(bmp, pairs.map((p) => p[0]));
      expect(ink(whole)).toBeGreaterThan(2000);
      expect(Buffer.compare(await drawn(bmp, pairs.map((p) => p[1])), whole)).toBe(0);
    });
  });

  it("are made again for a figure with characters they lack, and draw it as the whole faces do", async () => {
    const text = "Жж ѣ ∮ ⌀";
    const svg = `<text>${text}</text>`;
    const given = facesFor(files!, svg);
    if (fs.existsSync("/proc/self/fd")) expect(given.every((f) => f.startsWith("/proc/self/fd/"))).toBe(true);
    expect(Buffer.compare(await drawn(text, given), await drawn(text, files!))).toBe(0);
    // and nothing is left in the temporary folder
    expect(fs.readdirSync(os.tmpdir()).filter((f) => f.startsWith(`psibox-face-${process.pid}-`))).toEqual([]);
  });
});

describe("copies of faces", () => {
  it("are not made of a face other than a single TrueType face (a collection, CFF outlines)", () => {
    for (const tag of ["ttcf", "OTTO"]) {
      const face = new Uint8Array(64);
      face.set([...tag].map((c) => c.charCodeAt(0)));
      expect(outlineSubset(face, codePoints("a"))).toBeUndefined();
    }
  });

  it("keep the characters an SVG uses beyond printable ASCII, written as they are or as references", () => {
    const fresh = newCharacters(`<text x="1">ρ ħ\n\t 𝒜 &#x3c1; &#955; &amp; a</text>`, new Set([0x3c1]));
    expect([...fresh].sort((a, b) => a - b)).toEqual([0x127, 0x3bb, 0x1d49c]);
  });
});
