/**
 * A figure's pixels into a PNG's scanlines: resvg's premultiplied RGBA
 * pixels, drawn over white (opaque) everywhere but inside a plane
 * picture's rectangle, laid there, in place, over its cells (source-over:
 * colour + (1 − alpha)·what is under it), every pixel ending opaque; then
 * the rows copied behind their filter bytes (0, none: at a fast zlib
 * level, filtering a figure's large flat areas gains little). Both are
 * done a band of rows at a time, as the PNG encoder asks for its next band
 * (png.ts), so the band is still in the cache when it is copied and a
 * figure's whole scanlines are never held. Pixels are read and written
 * whole, as 32-bit words (R in the lowest byte: the platform's byte order,
 * checked once), where most of them are copied or left as they are.
 */
import type { ScanlineWriter } from "./png.js";

/** A plane picture's cells in the pixels: the rectangle, and for each of its pixel columns and rows the index of its cell. */
export interface Underlay {
  readonly x0: number;
  readonly y0: number;
  readonly columns: Int32Array;
  readonly rows: Int32Array;
  /** The cells' RGB, top row first. */
  readonly colours: Uint8Array;
}

/** Pixel (i + ½) of n samples the enlarged raster at (i + ½)·N/n, N = cells·zoom (nearest neighbour), whose block is its cell. */
function cellOf(n: number, cells: number, zoom: number): Int32Array {
  const src = cells * zoom;
  const out = new Int32Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.min(cells - 1, Math.floor(Math.floor(((i + 0.5) * src) / n) / zoom));
  return out;
}

/** Where a raster of nx × ny cells (`zoom` pixels a cell in its embedded PNG) drawn `width` × `height` SVG units at `origin` falls in pixels at `scale` pixels a unit. */
export function underlay(r: { readonly width: number; readonly height: number; readonly nx: number; readonly ny: number; readonly colours: Uint8Array; readonly zoom: number }, [x, y]: readonly [number, number], scale: number): Underlay {
  const [x0, y0] = [Math.round(x * scale), Math.round(y * scale)];
  const w = Math.round((x + r.width) * scale) - x0;
  const h = Math.round((y + r.height) * scale) - y0;
  const columns = cellOf(w, r.nx, r.zoom);
  const rows = cellOf(h, r.ny, r.zoom).map((c) => r.nx * c);
  return { x0, y0, columns, rows, colours: r.colours };
}

const LITTLE_ENDIAN = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;
/** Alpha 255 in a pixel word, as a signed 32-bit integer (words are read and written signed: small integers to V8, never boxed numbers, even before it optimises a loop). */
const OPAQUE = 0xff000000 | 0;

/** A colour as a pixel word: R, G, B, A = 255 from the lowest byte up. */
const word = (r: number, g: number, b: number) => OPAQUE | (b << 16) | (g << 8) | r;

/** A premultiplied pixel word over an opaque colour (r, g, b), as the bytes: c + round(colour·(255 − a)/255). */
function over(v: number, r: number, g: number, b: number): number {
  const k = 255 - (v >>> 24);
  return word((v & 255) + Math.round((r * k) / 255), ((v >>> 8) & 255) + Math.round((g * k) / 255), ((v >>> 16) & 255) + Math.round((b * k) / 255));
}

/** The underlay's pixel columns of one row (starting at word `i`, the rectangle's left edge), over the cells of the row starting at cell `cellRow`; `cells` holds each cell's pixel word. */
function rowOverCells(p: Int32Array, i: number, columns: Int32Array, from: number, to: number, cells: Int32Array, cellRow: number): void {
  for (let x = from; x < to; x++) {
    const v = p[i + x]!;
    if (v >> 24 === -1) continue;
    const c = cells[cellRow + columns[x]!]!;
    p[i + x] = v === 0 ? c : over(v, c & 255, (c >>> 8) & 255, (c >>> 16) & 255);
  }
}

/** Each cell's colour as an opaque pixel word. */
function cellWords(colours: Uint8Array): Int32Array {
  const out = new Int32Array(colours.length / 3);
  for (let c = 0; c < out.length; c++) out[c] = word(colours[3 * c]!, colours[3 * c + 1]!, colours[3 * c + 2]!);
  return out;
}

/**
 * A figure's PNG scanlines from resvg's premultiplied RGBA pixels `px`, band by band, each row written behind
 * filter byte 0. resvg drew on a white background, so every pixel is opaque already (source-over onto an opaque
 * pixel stays opaque), except, with an underlay, inside its rectangle, which resvg's background left clear: there
 * each band's pixels are laid, in place, over their cells first, so that every pixel ends opaque.
 */
export function figureScanlines(px: Uint8Array, width: number, under?: Underlay): ScanlineWriter {
  if (!LITTLE_ENDIAN || px.byteOffset % 4 !== 0) throw new Error("figure pixels must be 32-bit aligned words on a little-endian machine");
  const p = new Int32Array(px.buffer, px.byteOffset, px.length >> 2);
  // a plain view (a Buffer's subarray is slower)
  const bytes = new Uint8Array(px.buffer, px.byteOffset, px.length);
  const cells = under ? cellWords(under.colours) : new Int32Array(0);
  const line = 4 * width;
  return (out, y0, rows) => {
    for (let y = y0; y < y0 + rows; y++) {
      if (under) layOverCells(p, width, y, under, cells);
      const o = (line + 1) * (y - y0);
      out[o] = 0;
      out.set(bytes.subarray(line * y, line * (y + 1)), o + 1);
    }
  };
}

/** Row y's pixel words inside the underlay's rectangle over its cells (`cells`: each cell's pixel word). */
function layOverCells(p: Int32Array, width: number, y: number, under: Underlay, cells: Int32Array): void {
  const r = y - under.y0;
  if (r < 0 || r >= under.rows.length) return;
  const x0 = Math.max(0, Math.min(width, under.x0));
  const x1 = Math.max(x0, Math.min(width, under.x0 + under.columns.length));
  rowOverCells(p, width * y + under.x0, under.columns, x0 - under.x0, x1 - under.x0, cells, under.rows[r]!);
}
