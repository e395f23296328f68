/**
 * A movie of the density over a run's snapshots: numbered PNG frames on a
 * common colour range, encoded by ffmpeg when it is on the PATH (H.264 in
 * MP4 if it has libx264, else VP9 or VP8 in WebM); without an encoder the
 * frames stay as the result, and the caller says so.
 */
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { fsyncFolder, fsyncPath, temporaryPathFor } from "../io/atomic.js";

export interface Encoder {
  readonly program: string;
  readonly codec: string;
  readonly extension: "mp4" | "webm";
}

/** The best video encoder on this machine, or undefined. `program` may name another ffmpeg binary. */
export function findEncoder(program = process.env["PSIBOX_FFMPEG"] ?? "ffmpeg"): Encoder | undefined {
  const r = spawnSync(program, ["-hide_banner", "-encoders"], { encoding: "utf8" });
  if (r.error || r.status !== 0) return undefined;
  for (const [codec, extension] of [["libx264", "mp4"], ["libvpx-vp9", "webm"], ["libvpx", "webm"]] as const) {
    if (new RegExp(`\\s${codec}\\s`).test(r.stdout)) return { program, codec, extension };
  }
  return undefined;
}

/** A PNG file's size in pixels, from its header (the IHDR chunk's first eight bytes). */
function pngSize(file: string): { width: number; height: number } {
  const head = Buffer.alloc(24);
  const fd = fs.openSync(file, "r");
  try {
    fs.readSync(fd, head, 0, 24, 0);
  } finally {
    fs.closeSync(fd);
  }
  return { width: head.readUInt32BE(16), height: head.readUInt32BE(20) };
}

const evenUp = (n: number) => n + (n % 2);

/** Encode `frame_NNNNN.png` files (all from one run) into `<outBase>.<ext>`, written atomically; returns the file. */
export function encodeMovie(encoder: Encoder, frameDir: string, outBase: string, framesPerSecond = 4): string {
  const frames = fs.readdirSync(frameDir).filter((f) => /^frame_\d{5}\.png$/.test(f)).sort();
  if (frames.length === 0) throw new Error(`no frames in ${frameDir}`);
  // frames differ in width with their subtitle's length (the time and step): each is put at the top left of the
  // largest one, on white, as it is, so that the plot stays in place and at its size from frame to frame; H.264 and
  // VP9 with 4:2:0 colour need even sizes
  const sizes = frames.map((f) => pngSize(path.join(frameDir, f)));
  const W = evenUp(Math.max(...sizes.map((s) => s.width)));
  const H = evenUp(Math.max(...sizes.map((s) => s.height)));
  const target = `${outBase}.${encoder.extension}`;
  const temp = temporaryPathFor(target);
  const codecArgs = encoder.codec === "libx264" ? ["-c:v", "libx264", "-crf", "18", "-preset", "medium"] : ["-c:v", encoder.codec, "-b:v", "0", "-crf", "30"];
  const r = spawnSync(
    encoder.program,
    [
      "-hide_banner", "-loglevel", "error", "-y",
      "-framerate", String(framesPerSecond),
      "-i", path.join(frameDir, "frame_%05d.png"),
      "-vf", `pad=${W}:${H}:0:0:color=white`,
      ...codecArgs,
      "-pix_fmt", "yuv420p",
      "-threads", "1",
      "-f", encoder.extension,
      temp,
    ],
    { encoding: "utf8" },
  );
  if (r.error || r.status !== 0) {
    fs.rmSync(temp, { force: true });
    throw new Error(`${encoder.program} failed to encode the movie: ${(r.stderr || String(r.error)).trim().split("\n")[0]}`);
  }
  fsyncPath(temp);
  fs.renameSync(temp, target);
  fsyncFolder(path.dirname(path.resolve(target)));
  return target;
}
