/**
 * The figure font's files and resvg's options: only the regular and bold
 * faces of the figure font are loaded, found once per thread through
 * fontconfig (`fc-list`); without fontconfig, or without the font, resvg
 * loads every system font (slower, the same pictures). The figure workers
 * ask for themselves, so the thread that requests a figure never waits for
 * fontconfig.
 */
import { execFile, execFileSync } from "node:child_process";
import fs from "node:fs";
import type { ResvgRenderOptions } from "@resvg/resvg-js";
import { FONT } from "./figure-style.js";
import { faceMetrics, type FaceMetrics } from "./font-metrics.js";
import type { TextMeasure } from "./chart/text.js";

let fontFiles: string[] | null | undefined;

/** fontconfig's listing of the figure font's faces: file, weight, width and slant, one face a line. */
const FC_ARGS = ["--format", "%{file}\t%{weight}\t%{width}\t%{slant}\n", FONT];
/** fontconfig's weights of the figures' two styles (regular, bold), its upright slant and its normal width. */
const REGULAR = 80;
const BOLD = 200;

/**
 * The files of the faces the figures use (upright, normal width: the regular and the bold, each the listed weight
 * nearest to it), sorted; every listed file where none is upright and of normal width; null when none exists.
 * resvg reads every file it is given for each figure: the two faces instead of the family's nine.
 */
export function figureFaces(listed: string): string[] | null {
  const faces = listed
    .split("\n")
    .map((l) => l.split("\t"))
    .filter((f) => f.length === 4 && f[0]!.length > 0 && fs.existsSync(f[0]!))
    .map(([file, weight, width, slant]) => ({ file: file!, weight: Number(weight), upright: Number(slant) === 0 && Number(width) === 100 }));
  if (faces.length === 0) return null;
  const upright = faces.filter((f) => f.upright);
  if (upright.length === 0) return [...new Set(faces.map((f) => f.file))].sort();
  const nearest = (w: number) => upright.reduce((best, f) => (Math.abs(f.weight - w) < Math.abs(best.weight - w) ? f : best)).file;
  return [...new Set([nearest(REGULAR), nearest(BOLD)])].sort();
}

/** The figure font's files (its regular and bold faces), asked of fontconfig once per thread; null when it cannot say. */
export function figureFontFiles(): string[] | null {
  if (fontFiles !== undefined) return fontFiles;
  fontFiles = null;
  try {
    fontFiles = figureFaces(execFileSync("fc-list", FC_ARGS, { encoding: "utf8", timeout: 10_000, stdio: ["ignore", "pipe", "ignore"] }));
  } catch {
    // no fontconfig: resvg loads the system's fonts itself
  }
  return fontFiles;
}

/** The same answer, asked in the background (a figure worker asks as it starts, while it loads the rest). */
export function findFigureFont(): Promise<string[] | null> {
  if (fontFiles !== undefined) return Promise.resolve(fontFiles);
  return new Promise((resolve) => {
    execFile("fc-list", FC_ARGS, { encoding: "utf8", timeout: 10_000 }, (error, stdout) => {
      // a synchronous ask meanwhile has settled it already
      if (fontFiles === undefined) fontFiles = error ? null : figureFaces(stdout);
      resolve(fontFiles);
    });
  });
}

/** resvg's options: the zoom, the figure font (its files, or the system's fonts where they are unknown) and a white background. */
export function rasterOptions(scale: number, files: string[] | null): ResvgRenderOptions {
  const font = files ? { loadSystemFonts: false, fontFiles: files } : { loadSystemFonts: true };
  return { fitTo: { mode: "zoom", value: scale }, font: { ...font, defaultFontFamily: FONT, sansSerifFamily: FONT }, background: "white" };
}

const measures = new Map<string, TextMeasure | undefined>();

/**
 * How the faces in `files` (the figure font's, as resvg is given them) set a line of text: the bold face for bold
 * text, the regular one for the rest (read once per thread); undefined where no face can be read, or where the
 * files are unknown (resvg then picks among the system's fonts).
 */
export function figureTextMeasure(files: readonly string[] | null): TextMeasure | undefined {
  if (!files || files.length === 0) return undefined;
  const key = files.join("\n");
  if (!measures.has(key)) {
    let faces: FaceMetrics[] = [];
    try {
      faces = files.map((f) => faceMetrics(fs.readFileSync(f))).filter((f): f is FaceMetrics => f !== undefined);
    } catch {
      // an unreadable face: the estimate
    }
    const regular = faces.find((f) => !f.bold) ?? faces[0];
    const bold = faces.find((f) => f.bold) ?? regular;
    measures.set(key, regular && bold ? (text, b) => (b ? bold : regular).width(text) : undefined);
  }
  return measures.get(key);
}
