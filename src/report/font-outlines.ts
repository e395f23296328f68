/**
 * A copy of a TrueType face that keeps the outlines of some glyphs only
 * (OpenType specification: the table directory, 'cmap', 'glyf', 'loca',
 * 'head', 'post' and 'GSUB'). Every glyph keeps its id, and every other
 * table (metrics, kerning, positioning, substitutions, names) is copied as
 * it is, so text in the kept characters is laid out and drawn exactly as
 * with the whole face; the glyphs kept are those the characters map to,
 * every glyph a substitution can put in their place, and the components of
 * composite glyphs. The other glyphs' outlines are left empty, and the
 * glyph names of 'post' are dropped (version 3). resvg reads a face's
 * whole file again for each glyph it lays out, so a face of a fifth of the
 * size lays text out in about a third of the time.
 */

export interface Table {
  readonly offset: number;
  readonly length: number;
}

/** A single face's tables by tag (TrueType or CFF outlines); undefined for anything else (a collection, a web font). */
export function fontTables(v: DataView): Map<string, Table> | undefined {
  if (v.byteLength < 12) return undefined;
  const version = v.getUint32(0);
  // 'true': Apple's TrueType tag; 'OTTO': CFF outlines
  if (version !== 0x00010000 && version !== 0x74727565 && version !== 0x4f54544f) return undefined;
  const tables = new Map<string, Table>();
  for (let i = 0, n = v.getUint16(4); i < n; i++) {
    const o = 12 + 16 * i;
    const tag = String.fromCharCode(v.getUint8(o), v.getUint8(o + 1), v.getUint8(o + 2), v.getUint8(o + 3));
    tables.set(tag, { offset: v.getUint32(o + 8), length: v.getUint32(o + 12) });
  }
  return tables;
}

/** The face's tables by tag; undefined unless it is a single TrueType face with outlines in 'glyf'. */
function tableDirectory(v: DataView): Map<string, Table> | undefined {
  const tables = fontTables(v);
  return tables && v.getUint32(0) !== 0x4f54544f && ["cmap", "glyf", "loca", "head", "maxp", "post"].every((t) => tables.has(t)) ? tables : undefined;
}

/** Where the Unicode subtables of 'cmap' (at `cmap`) of formats 12 and 4 start, the first of each. */
export function unicodeSubtables(v: DataView, cmap: number): { format4?: number; format12?: number } {
  let format4: number | undefined;
  let format12: number | undefined;
  for (let i = 0, n = v.getUint16(cmap + 2); i < n; i++) {
    const [platform, encoding] = [v.getUint16(cmap + 4 + 8 * i), v.getUint16(cmap + 6 + 8 * i)];
    const at = cmap + v.getUint32(cmap + 8 + 8 * i);
    const unicode = platform === 0 || (platform === 3 && (encoding === 1 || encoding === 10));
    if (!unicode) continue;
    const format = v.getUint16(at);
    if (format === 12) format12 ??= at;
    else if (format === 4) format4 ??= at;
  }
  return { ...(format4 !== undefined ? { format4 } : {}), ...(format12 !== undefined ? { format12 } : {}) };
}

/** The glyphs that 'cmap' maps the code points to (its Unicode subtable: format 12, else format 4). */
function mappedGlyphs(v: DataView, cmap: number, codePoints: ReadonlySet<number>): Set<number> {
  const { format4, format12 } = unicodeSubtables(v, cmap);
  // the code points in order, walked once beside the subtable's groups or segments (sorted by the format); the
  // walk ends with the last code point
  const sorted = Float64Array.from(codePoints).sort();
  const glyphs = new Set<number>();
  let k = 0;
  if (format12 !== undefined) {
    for (let i = 0, n = v.getUint32(format12 + 12); i < n && k < sorted.length; i++) {
      const o = format12 + 16 + 12 * i;
      const last = v.getUint32(o + 4);
      if (last < sorted[k]!) continue;
      const [first, glyph] = [v.getUint32(o), v.getUint32(o + 8)];
      while (k < sorted.length && sorted[k]! < first) k++;
      for (; k < sorted.length && sorted[k]! <= last; k++) glyphs.add(glyph + sorted[k]! - first);
    }
  } else if (format4 !== undefined) {
    const segments = v.getUint16(format4 + 6) / 2;
    const ends = format4 + 14;
    const [starts, deltas, rangeOffsets] = [ends + 2 * segments + 2, ends + 4 * segments + 2, ends + 6 * segments + 2];
    for (let s = 0; s < segments && k < sorted.length; s++) {
      const last = v.getUint16(ends + 2 * s);
      if (last < sorted[k]!) continue;
      const [first, delta, rangeOffset] = [v.getUint16(starts + 2 * s), v.getUint16(deltas + 2 * s), v.getUint16(rangeOffsets + 2 * s)];
      while (k < sorted.length && sorted[k]! < first) k++;
      for (; k < sorted.length && sorted[k]! <= last; k++) {
        const c = sorted[k]!;
        const g = rangeOffset === 0 ? c : v.getUint16(rangeOffsets + 2 * s + rangeOffset + 2 * (c - first));
        if (rangeOffset === 0 || g !== 0) glyphs.add((g + delta) & 0xffff);
      }
    }
  }
  return glyphs;
}

/** The glyphs of a coverage table (its list, or its ranges). */
function coverage(v: DataView, at: number): number[] {
  const out: number[] = [];
  const n = v.getUint16(at + 2);
  if (v.getUint16(at) === 1) for (let i = 0; i < n; i++) out.push(v.getUint16(at + 4 + 2 * i));
  else for (let i = 0; i < n; i++) for (let g = v.getUint16(at + 4 + 6 * i), last = v.getUint16(at + 6 + 6 * i); g <= last; g++) out.push(g);
  return out;
}

/** Every glyph that one of the face's substitutions ('GSUB' lookups of every type) can put into a text. */
function substitutes(v: DataView, gsub: number): Set<number> {
  const out = new Set<number>();
  const list = (at: number) => {
    for (let i = 0, n = v.getUint16(at); i < n; i++) out.add(v.getUint16(at + 2 + 2 * i));
  };
  const subtable = (type: number, at: number): void => {
    switch (type) {
      case 1: // single: a delta to each covered glyph, or a list of substitutes
        if (v.getUint16(at) === 1) for (const g of coverage(v, at + v.getUint16(at + 2))) out.add((g + v.getInt16(at + 4)) & 0xffff);
        else list(at + 4);
        return;
      case 2: // multiple: sequences
      case 3: // alternate: sets
        for (let i = 0, n = v.getUint16(at + 4); i < n; i++) list(at + v.getUint16(at + 6 + 2 * i));
        return;
      case 4: // ligature: each set's ligatures
        for (let i = 0, n = v.getUint16(at + 4); i < n; i++) {
          const set = at + v.getUint16(at + 6 + 2 * i);
          for (let j = 0, m = v.getUint16(set); j < m; j++) out.add(v.getUint16(set + v.getUint16(set + 2 + 2 * j)));
        }
        return;
      case 7: // extension: a subtable of another type further on
        return subtable(v.getUint16(at + 2), at + v.getUint32(at + 4));
      case 8: {
        // reverse chaining single: substitutes after the backtrack and lookahead coverages
        const backtrack = v.getUint16(at + 4);
        const lookahead = v.getUint16(at + 6 + 2 * backtrack);
        return list(at + 8 + 2 * backtrack + 2 * lookahead);
      }
      default: // contextual lookups (5, 6) only call the others
        return;
    }
  };
  const lookups = gsub + v.getUint16(gsub + 8);
  for (let i = 0, n = v.getUint16(lookups); i < n; i++) {
    const lookup = lookups + v.getUint16(lookups + 2 + 2 * i);
    const type = v.getUint16(lookup);
    for (let j = 0, m = v.getUint16(lookup + 4); j < m; j++) subtable(type, lookup + v.getUint16(lookup + 6 + 2 * j));
  }
  return out;
}

/** Composite glyph flags: word arguments, a scale, x and y scales, a 2×2 matrix, more components. */
const WORDS = 0x1;
const SCALE = 0x8;
const MORE = 0x20;
const XY_SCALE = 0x40;
const MATRIX = 0x80;

/** The glyphs with the components of the composite ones among them, and theirs. */
function withComponents(v: DataView, glyphs: Set<number>, starts: Uint32Array): Set<number> {
  const todo = [...glyphs].filter((g) => g + 1 < starts.length);
  while (todo.length > 0) {
    const g = todo.pop()!;
    const at = starts[g]!;
    if (starts[g + 1]! - at < 10 || v.getInt16(at) >= 0) continue; // empty, or simple: a contour count
    for (let p = at + 10, more = true; more; ) {
      const [flags, component] = [v.getUint16(p), v.getUint16(p + 2)];
      if (!glyphs.has(component) && component + 1 < starts.length) {
        glyphs.add(component);
        todo.push(component);
      }
      p += 4 + (flags & WORDS ? 4 : 2) + (flags & SCALE ? 2 : flags & XY_SCALE ? 4 : flags & MATRIX ? 8 : 0);
      more = (flags & MORE) !== 0;
    }
  }
  return glyphs;
}

const padded = (n: number) => (n + 3) & ~3;

/** Big-endian 32-bit words from native ones, or back (Node.js's byte swap, in place). */
const swapped = (words: Uint32Array) => Buffer.from(words.buffer, words.byteOffset, words.byteLength).swap32();

/** Where each glyph's outline starts in the face, and after the last glyph its end: 'loca' (short or long offsets) read at once. */
function outlineStarts(font: Uint8Array, loca: Table, glyf: Table, count: number, long: boolean): Uint32Array {
  const starts = new Uint32Array(count + 1);
  if (long) {
    new Uint8Array(starts.buffer).set(font.subarray(loca.offset, loca.offset + 4 * (count + 1)));
    swapped(starts);
  } else {
    const v = new DataView(font.buffer, font.byteOffset + loca.offset);
    for (let g = 0; g <= count; g++) starts[g] = 2 * v.getUint16(2 * g);
  }
  for (let g = 0; g <= count; g++) starts[g] = starts[g]! + glyf.offset;
  return starts;
}

/**
 * The face `font` with only the outlines the characters `codePoints` can be drawn with (glyph 0, the missing
 * glyph, too); undefined where the face is not a single TrueType face with 'glyf' outlines (a collection, or
 * CFF outlines), so that the caller uses the whole face.
 */
export function outlineSubset(font: Uint8Array, codePoints: ReadonlySet<number>): Uint8Array | undefined {
  const v = new DataView(font.buffer, font.byteOffset, font.byteLength);
  // a plain view (a Buffer's subarray is slower)
  const bytes = new Uint8Array(font.buffer, font.byteOffset, font.byteLength);
  const tables = tableDirectory(v);
  if (!tables) return undefined;
  const [head, loca, glyf, post] = (["head", "loca", "glyf", "post"] as const).map((t) => tables.get(t)!);
  const count = v.getUint16(tables.get("maxp")!.offset + 4);
  const starts = outlineStarts(font, loca!, glyf!, count, v.getInt16(head!.offset + 50) === 1);
  const keep = mappedGlyphs(v, tables.get("cmap")!.offset, codePoints);
  keep.add(0);
  const gsub = tables.get("GSUB");
  if (gsub) for (const g of substitutes(v, gsub.offset)) keep.add(g);
  withComponents(v, keep, starts);
  const kept = new Uint8Array(count);
  for (const g of keep) if (g < count) kept[g] = 1;
  // the kept outlines in glyph order, each run of kept glyphs copied as it lies in the face from a multiple of 4
  // bytes on, and a long 'loca'
  let size = 0;
  for (let g = 0; g < count; g++) if (kept[g]) size += padded(starts[g + 1]! - starts[g]!);
  const room = new Uint8Array(size);
  const offsets = new Uint32Array(count + 1);
  let at = 0;
  for (let g = 0; g < count; ) {
    let end = g;
    while (end < count && kept[end]) end++;
    if (end === g) {
      offsets[++g] = at;
      continue;
    }
    for (let k = g; k < end; k++) offsets[k + 1] = at + starts[k + 1]! - starts[g]!;
    room.set(bytes.subarray(starts[g]!, starts[end]!), at);
    at = offsets[end] = padded(offsets[end]!);
    g = end;
  }
  const outlines = room.subarray(0, at);
  swapped(offsets);
  // copies (a Buffer's slice would be a view of the face)
  const newHead = new Uint8Array(font.subarray(head!.offset, head!.offset + head!.length));
  new DataView(newHead.buffer).setInt16(50, 1); // indexToLocFormat: long offsets
  new DataView(newHead.buffer).setUint32(8, 0); // checksum adjustment
  const newPost = new Uint8Array(font.subarray(post!.offset, post!.offset + 32));
  new DataView(newPost.buffer).setUint32(0, 0x00030000); // version 3: no glyph names
  const replaced = new Map<string, Uint8Array>([
    ["glyf", outlines],
    ["loca", new Uint8Array(offsets.buffer)],
    ["head", newHead],
    ["post", newPost],
  ]);
  // the tables in the directory's order, each at a multiple of 4 bytes; checksums left 0 (resvg's font reader, like
  // most, does not check them, and the copy is read by resvg only)
  const tags = [...tables.keys()];
  const parts = tags.map((t) => replaced.get(t) ?? font.subarray(tables.get(t)!.offset, tables.get(t)!.offset + tables.get(t)!.length));
  const directory = 12 + 16 * tags.length;
  const out = new Uint8Array(directory + parts.reduce((s, p) => s + padded(p.length), 0));
  const w = new DataView(out.buffer);
  out.set(font.subarray(0, 12));
  for (let i = 0, at = directory; i < tags.length; i++) {
    const o = 12 + 16 * i;
    const part = parts[i]!;
    out.set(font.subarray(o, o + 4), o);
    out.set(part, at);
    w.setUint32(o + 8, at);
    w.setUint32(o + 12, part.length);
    at += padded(part.length);
  }
  return out;
}
