/**
 * How wide a face sets a line of text, from its own tables (OpenType
 * specification: 'head' for the units per em and the bold style bit,
 * 'hhea' and 'hmtx' for each glyph's advance width, and the Unicode
 * subtable of 'cmap', format 12 or 4, for each character's glyph), so that
 * the figures' layout gives a title, a legend or a tick label the room the
 * font draws it in. Kerning and shaping are left out: the figures' labels
 * are set within a few per cent of their drawn width (tested against
 * resvg's drawing). A character the face lacks is taken as wide as its
 * missing-glyph box.
 */
import { fontTables, unicodeSubtables } from "./font-outlines.js";

/** A face's widths: whether it is the bold one, and a line's advance in em. */
export interface FaceMetrics {
  readonly bold: boolean;
  /** The sum of the advance widths of the line's characters, in em. */
  width(text: string): number;
}

/** The glyph 'cmap' gives code point `c` (0, the missing glyph, where it gives none). */
type GlyphOf = (c: number) => number;

/** The lookup of a format 12 subtable at `at`: groups of consecutive code points, searched by their last one. */
function format12Glyphs(v: DataView, at: number): GlyphOf {
  const groups = v.getUint32(at + 12);
  return (c) => {
    let [lo, hi] = [0, groups];
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (v.getUint32(at + 16 + 12 * mid + 4) < c) lo = mid + 1;
      else hi = mid;
    }
    if (lo === groups) return 0;
    const o = at + 16 + 12 * lo;
    const first = v.getUint32(o);
    return c < first ? 0 : v.getUint32(o + 8) + c - first;
  };
}

/** The lookup of a format 4 subtable at `at`: segments searched by their last code point, then a delta or the glyph array. */
function format4Glyphs(v: DataView, at: number): GlyphOf {
  const segments = v.getUint16(at + 6) / 2;
  const ends = at + 14;
  const [starts, deltas, rangeOffsets] = [ends + 2 * segments + 2, ends + 4 * segments + 2, ends + 6 * segments + 2];
  return (c) => {
    if (c > 0xffff) return 0;
    let [lo, hi] = [0, segments];
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (v.getUint16(ends + 2 * mid) < c) lo = mid + 1;
      else hi = mid;
    }
    if (lo === segments) return 0;
    const first = v.getUint16(starts + 2 * lo);
    if (c < first) return 0;
    const [delta, rangeOffset] = [v.getUint16(deltas + 2 * lo), v.getUint16(rangeOffsets + 2 * lo)];
    if (rangeOffset === 0) return (c + delta) & 0xffff;
    const g = v.getUint16(rangeOffsets + 2 * lo + rangeOffset + 2 * (c - first));
    return g === 0 ? 0 : (g + delta) & 0xffff;
  };
}

/** The widths of the face in `font` (a TrueType or CFF face's bytes); undefined where it lacks the tables. */
export function faceMetrics(font: Uint8Array): FaceMetrics | undefined {
  const v = new DataView(font.buffer, font.byteOffset, font.byteLength);
  const tables = fontTables(v);
  const [head, hhea, hmtx, cmap] = (["head", "hhea", "hmtx", "cmap"] as const).map((t) => tables?.get(t));
  if (!head || !hhea || !hmtx || !cmap) return undefined;
  const unitsPerEm = v.getUint16(head.offset + 18);
  const metrics = v.getUint16(hhea.offset + 34);
  const { format4, format12 } = unicodeSubtables(v, cmap.offset);
  if (!(unitsPerEm > 0) || metrics === 0 || (format4 === undefined && format12 === undefined)) return undefined;
  const glyphOf = format12 !== undefined ? format12Glyphs(v, format12) : format4Glyphs(v, format4!);
  // glyphs after the last long metric share its advance
  const advance = (g: number) => v.getUint16(hmtx.offset + 4 * Math.min(g, metrics - 1)) / unitsPerEm;
  const known = new Map<number, number>();
  return {
    bold: (v.getUint16(head.offset + 44) & 1) === 1,
    width(text: string): number {
      let w = 0;
      for (const ch of text) {
        const c = ch.codePointAt(0)!;
        let a = known.get(c);
        if (a === undefined) known.set(c, (a = advance(glyphOf(c))));
        w += a;
      }
      return w;
    },
  };
}
