/**
 * The font files resvg is given for a figure: copies of the figure font's
 * faces that keep only the outlines of the characters figures use
 * (font-outlines.ts), made once per thread and made again, with the new
 * characters, when a figure has one the copies lack. resvg reads a face's
 * whole file for each glyph it lays out (hundreds of glyphs a figure), and
 * draws the same pixels from the copies. A copy is written to a file of
 * the system's temporary folder that is removed at once and kept open:
 * resvg opens it by its descriptor's name (/proc/self/fd, Linux), and
 * nothing is left behind when the process ends, however it ends. Where
 * that cannot be done (no /proc, no temporary folder, a face that is not
 * plain TrueType), resvg is given the whole faces.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { threadId } from "node:worker_threads";
import { outlineSubset } from "./font-outlines.js";

/** The characters the copies always keep: printable ASCII, Latin-1 and Latin Extended-A, combining marks, Greek, punctuation, super- and subscripts, letterlike symbols, arrows, mathematical operators, angle brackets. */
const FIGURE_CHARACTERS: readonly (readonly [number, number])[] = [
  [0x20, 0x7e],
  [0xa0, 0x17f],
  [0x300, 0x3ff],
  [0x2000, 0x209f],
  [0x2100, 0x214f],
  [0x2190, 0x22ff],
  [0x27e8, 0x27e9],
];

const PROC_FD = "/proc/self/fd";

/** Characters outside printable ASCII and its line breaks and tabs (found by the regular expression engine: an SVG has few). */
const BEYOND_ASCII = /[^\t\n\r\x20-\x7e]/gu;

/** The code points of `svg` (its text and, written as references, &#…;) that `covered` lacks; printable ASCII is always covered. */
export function newCharacters(svg: string, covered: ReadonlySet<number>): Set<number> {
  const fresh = new Set<number>();
  for (const [ch] of svg.matchAll(BEYOND_ASCII)) {
    const c = ch.codePointAt(0)!;
    if (!covered.has(c)) fresh.add(c);
  }
  if (svg.includes("&#"))
    for (const [, ref] of svg.matchAll(/&#(x[0-9a-fA-F]+|[0-9]+);/g)) {
      const c = ref!.startsWith("x") ? parseInt(ref!.slice(1), 16) : Number(ref);
      if (c <= 0x10ffff && !covered.has(c)) fresh.add(c);
    }
  return fresh;
}

/** A file of `bytes`, removed from its folder and held open: its name under /proc/self/fd and its descriptor. */
function heldFile(bytes: Uint8Array): { name: string; fd: number } {
  // a name of its own (created exclusively: a name taken already fails, and the whole faces are used)
  const file = path.join(os.tmpdir(), `psibox-face-${process.pid}-${threadId}-${Math.floor(Math.random() * 2 ** 48).toString(36)}.ttf`);
  const fd = fs.openSync(file, "wx+", 0o600);
  try {
    fs.unlinkSync(file);
    fs.writeFileSync(fd, bytes);
  } catch (e) {
    fs.closeSync(fd);
    throw e;
  }
  return { name: `${PROC_FD}/${fd}`, fd };
}

/** The copies of one set of faces on this thread. */
class FaceCopies {
  private readonly covered = new Set<number>();
  private names: string[] | undefined;
  private fds: number[] = [];
  private failed = !fs.existsSync(PROC_FD);

  constructor(private readonly faces: readonly string[]) {
    for (const [first, last] of FIGURE_CHARACTERS) for (let c = first; c <= last; c++) this.covered.add(c);
  }

  /** The files for a figure's SVG: the copies (made again when the SVG has characters they lack), or the whole faces. */
  filesFor(svg: string): string[] {
    if (this.failed) return [...this.faces];
    const fresh = newCharacters(svg, this.covered);
    if (this.names && fresh.size === 0) return this.names;
    for (const c of fresh) this.covered.add(c);
    const old = this.fds;
    const held: { name: string; fd: number }[] = [];
    try {
      for (const face of this.faces) {
        const copy = outlineSubset(fs.readFileSync(face), this.covered);
        if (!copy) throw new Error("not a plain TrueType face");
        held.push(heldFile(copy));
      }
      this.names = held.map((h) => h.name);
    } catch {
      // the whole faces from now on: the same pixels
      this.failed = true;
      this.names = undefined;
      held.splice(0).forEach((h) => fs.closeSync(h.fd));
    }
    this.fds = held.map((h) => h.fd);
    for (const fd of old) fs.closeSync(fd);
    return this.names ?? [...this.faces];
  }
}

const copies = new Map<string, FaceCopies>();

/** The font files for drawing `svg` with the faces `faces` (the figure font's files): copies with only the outlines the figures use, or the faces themselves. */
export function facesFor(faces: readonly string[], svg: string): string[] {
  const key = faces.join("\n");
  let c = copies.get(key);
  if (!c) copies.set(key, (c = new FaceCopies(faces)));
  return c.filesFor(svg);
}
