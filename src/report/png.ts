/**
 * PNG encoding of 8-bit RGB or RGBA pixels (W3C PNG specification, 2nd
 * edition), deflated by zlib where it is called: the rasters that figures
 * embed (a colour bar, its scanlines filtered by "Up": each byte minus the
 * one above it; a density plane enlarged to whole pixel blocks, filtered so
 * that its repeated bytes become runs of zeros: `blockPng`), and the
 * figures themselves band by band (`bandedPng`): the caller writes a band
 * of scanlines at a time into one of two buffers of about 256 kB, and
 * zlib's stream deflates it on libuv's thread pool while the next band is
 * written, so a figure's whole scanlines (megabytes) are never held. The
 * stream keeps its window across the bands: the file is the same, byte for
 * byte, as deflating all the scanlines at once.
 */
import { once } from "node:events";
import zlib from "node:zlib";

/** zlib's level for the figures' PNGs: a third of the default level's time, files about a sixth larger. */
export const FIGURE_LEVEL = 2;

const SIGNATURE = Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]);

let crcTable: Int32Array | undefined;

/** zlib's own CRC-32 (Node.js from 20.15), where there is one. */
const zlibCrc = (zlib as { crc32?: (data: Uint8Array) => number }).crc32;

/** CRC-32 of a chunk's type and data (ISO 3309): zlib's where Node.js has it, else `tableCrc32`. */
function crc32(bytes: Uint8Array): number {
  return zlibCrc ? zlibCrc(bytes) : tableCrc32(bytes);
}

/** CRC-32 as in the PNG specification's sample code (a table of 256 words). */
export function tableCrc32(bytes: Uint8Array): number {
  if (!crcTable) {
    crcTable = new Int32Array(256);
    for (let n = 0; n < 256; n++) {
      let c = n;
      for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
      crcTable[n] = c;
    }
  }
  let c = 0xffffffff;
  for (let i = 0; i < bytes.length; i++) c = crcTable[(c ^ bytes[i]!) & 0xff]! ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

function chunk(type: string, data: Uint8Array): Buffer {
  const out = Buffer.alloc(12 + data.length);
  out.writeUInt32BE(data.length, 0);
  out.write(type, 4, "latin1");
  out.set(data, 8);
  out.writeUInt32BE(crc32(out.subarray(4, 8 + data.length)), 8 + data.length);
  return out;
}

/** The scanlines, each with filter byte 2 (Up: minus the byte above; the first row has zeros above it). */
function upFiltered(pixels: Uint8Array, line: number, height: number): Buffer {
  const out = Buffer.allocUnsafe((line + 1) * height);
  for (let y = 0; y < height; y++) {
    const o = y * (line + 1) + 1;
    const r = y * line;
    out[o - 1] = 2;
    if (y === 0) out.set(pixels.subarray(0, line), o);
    else for (let x = 0; x < line; x++) out[o + x] = (pixels[r + x]! - pixels[r - line + x]!) & 255;
  }
  return out;
}

function checkSize(bytes: number, width: number, height: number, channels: 3 | 4): void {
  if (bytes !== channels * width * height) throw new RangeError(`${bytes} bytes are not ${width} × ${height} pixels of ${channels} channels`);
}

/** The file around deflated scanlines: signature, IHDR (8-bit RGB or RGBA), IDAT, IEND. */
function assemble(data: Uint8Array, width: number, height: number, channels: 3 | 4): Buffer {
  const header = Buffer.alloc(13);
  header.writeUInt32BE(width, 0);
  header.writeUInt32BE(height, 4);
  header[8] = 8; // bits per sample
  header[9] = channels === 3 ? 2 : 6; // colour type: truecolour, or truecolour with alpha
  return Buffer.concat([SIGNATURE, chunk("IHDR", header), chunk("IDAT", data), chunk("IEND", new Uint8Array(0))]);
}

/** A PNG of 8-bit pixels (RGB with 3 channels, RGBA with 4), row by row from the top, at zlib's default level. */
export function encodePng(pixels: Uint8Array, width: number, height: number, channels: 3 | 4): Buffer {
  checkSize(pixels.length, width, height, channels);
  return pngFile(upFiltered(pixels, width * channels, height), width, height, channels);
}

/** A PNG of scanlines filtered already (each row: its filter byte, then the row), compressed here at zlib `level` (default: zlib's). */
export function pngFile(filtered: Uint8Array, width: number, height: number, channels: 3 | 4, level?: number): Buffer {
  checkSize(filtered.length - height, width, height, channels);
  return assemble(zlib.deflateSync(filtered, level === undefined ? {} : { level }), width, height, channels);
}

/** Writes the filtered scanlines of `rows` rows from row `y` into `out` (each its filter byte, then the row's bytes). */
export type ScanlineWriter = (out: Uint8Array, y: number, rows: number) => void;

/** Bytes of scanlines in a band (whole rows; at least one row). */
const BAND_BYTES = 1 << 18;

/** How a PNG's scanlines are deflated: zlib's level, or its options (a level and a strategy). */
export type Deflation = number | zlib.ZlibOptions;

/** The embedded rasters' deflation: zlib's run-length strategy (matches at a distance of one byte only). */
const BLOCK_DEFLATE: zlib.ZlibOptions = { level: 6, strategy: zlib.constants.Z_RLE };

/** A PNG of `width` × `height` 8-bit pixels (RGB with 3 channels, RGBA with 4), its scanlines written band by band by `write` and deflated (at zlib `level`, or with zlib's options) as they come. */
export async function bandedPng(width: number, height: number, channels: 3 | 4, level: Deflation, write: ScanlineWriter): Promise<Buffer> {
  const line = channels * width + 1;
  const rows = Math.max(1, Math.floor(BAND_BYTES / line));
  const deflate = zlib.createDeflate(typeof level === "number" ? { level } : level);
  const parts: Buffer[] = [];
  deflate.on("data", (b: Buffer) => parts.push(b));
  const done = once(deflate, "end");
  done.catch(() => undefined); // awaited below: a failure is thrown there
  // two bands: one written here while zlib deflates the other; a band is written again once zlib has read it
  const bands = [new Uint8Array(rows * line), new Uint8Array(rows * line)];
  const read: Promise<unknown>[] = [Promise.resolve(), Promise.resolve()];
  for (let y = 0, k = 0; y < height; y += rows, k ^= 1) {
    await read[k];
    const n = Math.min(rows, height - y);
    const band = bands[k]!.subarray(0, n * line);
    write(band, y, n);
    read[k] = new Promise((settled) => deflate.write(band, settled));
  }
  deflate.end();
  await done;
  return assemble(Buffer.concat(parts), width, height, channels);
}

/**
 * The cells as a PNG of zoom × zoom pixel blocks, written band by band without enlarging first. A block's
 * first row is filtered by "Sub" (each byte minus the one a pixel to its left: the cell's colour minus its
 * left neighbour's at the block's first pixel, zeros across the rest of the block), its other rows by "Up"
 * (all zeros), so that nearly every byte is a zero in long runs, which zlib's run-length strategy deflates in
 * about a third of the time its default level took for the Up-filtered rows, to files about a sixth larger.
 */
export function blockPng(colours: Uint8Array, nx: number, ny: number, zoom: number): Promise<Buffer> {
  const line = 3 * nx * zoom;
  return bandedPng(nx * zoom, ny * zoom, 3, BLOCK_DEFLATE, (out, y0, rows) => {
    out.fill(0);
    for (let row = y0; row < y0 + rows; row++) {
      const o = (line + 1) * (row - y0);
      if (row % zoom !== 0) {
        out[o] = 2;
        continue;
      }
      out[o] = 1;
      const first = 3 * nx * (row / zoom);
      for (let x = 0; x < nx; x++)
        for (let c = 0; c < 3; c++) {
          const i = first + 3 * x + c;
          out[o + 1 + 3 * x * zoom + c] = (colours[i]! - (x > 0 ? colours[i - 3]! : 0)) & 255;
        }
    }
  });
}
