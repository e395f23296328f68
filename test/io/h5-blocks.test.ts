// Small reads of an HDF5 file's structures served from 4 KiB blocks read once (h5-file.ts withBlocks) must give
// the file's bytes exactly as single reads do: within a block, across two blocks, of more than a block, and an
// error at the file's end, whichever way; the bytes are checked against the file's contents computed independently.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { bytesAt, withBlocks } from "../../src/io/h5-file.js";

let dir: string;
let file: string;
const SIZE = 3 * 4096 + 1000;
const content = Buffer.from(Array.from({ length: SIZE }, (_, i) => (i * 131 + (i >> 8)) & 0xff));

beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-blocks-"));
  file = path.join(dir, "bytes.bin");
  fs.writeFileSync(file, content);
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe("block-cached reads of a file's structures", () => {
  it("the same bytes as single reads, within, across and beyond blocks; a read past the end fails either way", () => {
    const fd = fs.openSync(file, "r");
    try {
      const spans: [number, number][] = [[0, 96], [4000, 96], [4096, 8], [8190, 4], [100, 5000], [3 * 4096, 1000], [SIZE - 8, 8], [12, 4096]];
      withBlocks(fd, () => {
        for (const [at, length] of spans) {
          expect(bytesAt(fd, at, length).equals(content.subarray(at, at + length))).toBe(true);
          // twice: the second from the blocks already read
          expect(bytesAt(fd, at, length).equals(content.subarray(at, at + length))).toBe(true);
        }
        expect(() => bytesAt(fd, SIZE - 4, 8)).toThrow(RangeError);
      });
      for (const [at, length] of spans) expect(bytesAt(fd, at, length).equals(content.subarray(at, at + length))).toBe(true);
      expect(() => bytesAt(fd, SIZE - 4, 8)).toThrow(RangeError);
    } finally {
      fs.closeSync(fd);
    }
  });
});
