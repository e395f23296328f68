// Atomic writes, alone and grouped (writeTogether): a file appears under its final name only complete and durable;
// a group's files appear when the group ends, a failed group leaves none (and no temporaries), and a write that
// cannot be made durable is an error naming the file.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cleanStaleTemporaries, temporaryPathFor, writeFileAtomic, writeTogether } from "../../src/io/atomic.js";
import { loadHdf5, openHdf5, writeHdf5Atomic } from "../../src/io/h5.js";
import { numberAttr } from "../../src/io/h5-attrs.js";

let root: string;
beforeAll(async () => {
  await loadHdf5();
  root = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-atomic-"));
});
afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

function folder(name: string): string {
  const dir = path.join(root, name);
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}
const hidden = (dir: string): string[] => fs.readdirSync(dir).filter((f) => f.startsWith("."));

describe("atomic writes", () => {
  it("alone: the file is there, complete, when the call returns; temporary names are unique and recognised as stale", () => {
    const dir = folder("alone");
    writeFileAtomic(path.join(dir, "a.txt"), "one");
    expect(fs.readFileSync(path.join(dir, "a.txt"), "utf8")).toBe("one");
    expect(hidden(dir)).toEqual([]);
    const names = Array.from({ length: 50 }, () => temporaryPathFor(path.join(dir, "a.txt")));
    expect(new Set(names).size).toBe(50);
    for (const n of names.slice(0, 3)) fs.writeFileSync(n, "partial");
    expect(cleanStaleTemporaries(dir).length).toBe(3);
  });

  it("grouped: text and HDF5 files appear only when the group ends, with the last contents written; nested groups commit with the outermost", async () => {
    const dir = folder("group");
    const [a, b, h] = ["a.txt", "b.txt", "t.h5"].map((f) => path.join(dir, f));
    const value = await writeTogether(async () => {
      writeFileAtomic(a!, "first");
      await writeTogether(async () => writeFileAtomic(b!, "inner"));
      await new Promise((r) => setTimeout(r, 5)); // the group holds across turns of the event loop
      writeFileAtomic(a!, "second");
      writeHdf5Atomic(h!, (f) => numberAttr(f, "x", 2.5));
      expect([a, b, h].map((f) => fs.existsSync(f!))).toEqual([false, false, false]);
      expect(hidden(dir).length).toBe(4);
      return 7;
    });
    expect(value).toBe(7);
    expect(fs.readFileSync(a!, "utf8")).toBe("second");
    expect(fs.readFileSync(b!, "utf8")).toBe("inner");
    const f = openHdf5(h!);
    expect(f.attrs["x"]?.value).toBe(2.5);
    f.close();
    expect(hidden(dir)).toEqual([]);
  });

  it("a group that fails leaves the earlier file as it was and no temporaries", async () => {
    const dir = folder("failed");
    const a = path.join(dir, "a.txt");
    writeFileAtomic(a, "old");
    await expect(
      writeTogether(async () => {
        writeFileAtomic(a, "new");
        writeFileAtomic(path.join(dir, "b.txt"), "never");
        throw new Error("the analysis failed");
      }),
    ).rejects.toThrow("the analysis failed");
    expect(fs.readFileSync(a, "utf8")).toBe("old");
    expect(fs.readdirSync(dir)).toEqual(["a.txt"]);
  });

  it("a grouped write that cannot be made durable (its temporary gone) is an error naming the file, and the others are not renamed", async () => {
    const dir = folder("lost");
    await expect(
      writeTogether(async () => {
        writeFileAtomic(path.join(dir, "kept.txt"), "x");
        writeFileAtomic(path.join(dir, "lost.txt"), "y");
        for (const f of hidden(dir).filter((n) => n.startsWith(".lost"))) fs.unlinkSync(path.join(dir, f));
      }),
    ).rejects.toThrow(/lost\.txt/);
    expect(fs.readdirSync(dir)).toEqual([]);
  });
});
