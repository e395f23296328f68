/**
 * PNG encoding of 8-bit RGB or RGBA pixels (W3C PNG specification, 2nd
 * edition), for the rasters that figures embed (a density plane enlarged
 * to whole pixel blocks, a colour bar): the scanlines filtered by "Up"
 * (each byte minus the one above it, so the repeated rows of an enlarged
 * raster become runs of zeros), then deflated by zlib on libuv's thread
 * pool while the main thread goes on.
 */
import zlib from "node:zlib";
import { promisify } from "node:util";

const deflate = promisify(zlib.deflate);

const SIGNATURE = Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]);

let crcTable: Int32Array | undefined;

/** CRC-32 of a chunk's type and data (ISO 3309, as in the specification's sample code). */
function crc32(bytes: Uint8Array): number {
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

/** A PNG of 8-bit pixels (RGB with 3 channels, RGBA with 4), row by row from the top; compressed on the thread pool. */
export async function encodePng(pixels: Uint8Array, width: number, height: number, channels: 3 | 4): Promise<Buffer> {
  if (pixels.length !== channels * width * height) throw new RangeError(`${pixels.length} bytes are not ${width} × ${height} pixels of ${channels} channels`);
  const header = Buffer.alloc(13);
  header.writeUInt32BE(width, 0);
  header.writeUInt32BE(height, 4);
  header[8] = 8; // bits per sample
  header[9] = channels === 3 ? 2 : 6; // colour type: truecolour, or truecolour with alpha
  const data = await deflate(upFiltered(pixels, width * channels, height));
  return Buffer.concat([SIGNATURE, chunk("IHDR", header), chunk("IDAT", data), chunk("IEND", new Uint8Array(0))]);
}
