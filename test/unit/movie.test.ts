// Movie frames of different widths (their subtitles name the time and the step) encoded by ffmpeg
// (src/report/movie.ts): every frame keeps its size and place in the movie. The movie is decoded again by ffmpeg
// (the outside reference), and a marker drawn at one pixel of every frame is found at that pixel in every
// decoded frame.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { PNG } from "pngjs";
import { encodeMovie, findEncoder } from "../../src/report/movie.js";

const encoder = findEncoder();

/** A white frame `width` × 40 with a black 4×4 square at (12, 12)–(15, 15). */
function frame(width: number): Buffer {
  const png = new PNG({ width, height: 40 });
  png.data.fill(255);
  for (let y = 12; y < 16; y++) for (let x = 12; x < 16; x++) png.data.fill(0, 4 * (y * width + x), 4 * (y * width + x) + 3);
  return PNG.sync.write(png);
}

describe.skipIf(encoder === undefined)("a movie of frames of different widths", () => {
  it("is as large as the largest frame, and every frame sits at its top left, unscaled", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-movie-"));
    try {
      const widths = [48, 62, 55, 61];
      widths.forEach((w, i) => fs.writeFileSync(path.join(dir, `frame_${String(i).padStart(5, "0")}.png`), frame(w)));
      const movie = encodeMovie(encoder!, dir, path.join(dir, "movie"));
      // the movie's frames as raw grey pixels, by ffmpeg
      const probe = spawnSync("ffmpeg", ["-hide_banner", "-loglevel", "error", "-i", movie, "-f", "rawvideo", "-pix_fmt", "gray", "-"], { maxBuffer: 1 << 24 });
      expect(probe.status, String(probe.stderr)).toBe(0);
      const raw = probe.stdout as Buffer;
      const [W, H] = [62, 40];
      expect(raw.length).toBe(widths.length * W * H);
      for (let f = 0; f < widths.length; f++) {
        const at = (x: number, y: number) => raw[f * W * H + y * W + x]!;
        // the marker's centre dark, the places around it light (lossy coding blurs the edges only)
        expect(at(13, 13), `frame ${f}`).toBeLessThan(80);
        expect(at(14, 14), `frame ${f}`).toBeLessThan(80);
        for (const [x, y] of [[6, 6], [22, 22], [13, 30], [30, 13]] as const) expect(at(x, y), `frame ${f} at ${x},${y}`).toBeGreaterThan(170);
      }
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
