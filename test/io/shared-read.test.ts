// A field read on two threads (shared-read.ts, read-worker.ts) must give ψ bit for bit as the main thread alone
// does, and as h5wasm's read does: the helper's own slabs (the worker run alone on a job, into shared memory and
// into a WebAssembly memory with its SIMD kernel), the two threads together into new and reused memory, one thread
// with the kernel and with the JavaScript loop, and a helper that fails (its slabs are then read on the main thread).
// Rows of 15 cells (odd) leave one cell after the kernel's pairs.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Worker } from "node:worker_threads";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { loadHdf5 } from "../../src/io/h5.js";
import { NativeRoot } from "../../src/io/h5-native.js";
import { DONE, FAILED, PENDING, readIntoPsi, setSharedReadBytes, startReadHelper, stopReadHelper, type ReadJob } from "../../src/io/shared-read.js";
import { newWasmPsi, psiMemoryOf, wasmReading, type PsiMemory } from "../../src/io/psi-wasm.js";
import { setSlabBytes } from "../../src/io/row-read.js";
import { readSnapshot, writeSnapshot, type SnapshotMeta } from "../../src/io/snapshot.js";
import { readThroughHdf5 } from "../../src/io/snapshot-read.js";
import { seededRandom } from "../helpers/fields.js";

const CELLS = [48, 5, 3];
const ROW = 15;
const LENGTH = 2 * 48 * ROW;
const META: SnapshotMeta = {
  kind: "snapshot", software: "psibox test", step: 0, time: 0, timeUnit: "Myr", scaleFactor: 1, redshift: null, cells: CELLS,
  boxSizeKpc: [1, 1, 1], particleMassEv: 1e-22, gravity: "periodic", background: { kind: "static" }, massMsun: 1, config: "", configSha256: "0",
};
const WORKER = path.resolve("dist", "io", "read-worker.js");

let dir: string;
const files: Record<string, string> = {};
beforeAll(async () => {
  await loadHdf5();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "psibox-shared-"));
  const rnd = seededRandom(9);
  const psi = Float64Array.from({ length: LENGTH }, () => (rnd() - 0.5) * 10 ** Math.floor(40 * rnd() - 20));
  setSlabBytes(2 * ROW * 8); // two rows a chunk: 24 chunks
  for (const precision of ["float64", "float32"] as const) {
    files[precision] = path.join(dir, `${precision}.h5`);
    writeSnapshot(files[precision], { meta: META, psi }, precision);
  }
  setSlabBytes();
});
afterEach(async () => {
  setSlabBytes();
  setSharedReadBytes();
  await stopReadHelper();
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const sameBits = (a: Float64Array, b: Float64Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

/** A job for the whole field of `file` (its parts placed natively), into `psi`, with slabs of one row. */
function jobOf(file: string, psi: Float64Array, readFrom = file, wasm?: PsiMemory): { job: ReadJob; words: Int32Array } {
  const fd = fs.openSync(file, "r");
  try {
    const root = new NativeRoot(fd);
    const parts = ["psi_re", "psi_im"].map((n) => root.dataset(n));
    const words = new Int32Array(new SharedArrayBuffer(4 * (1 + CELLS[0]!)));
    const job: ReadJob = { file: readFrom, paths: parts.map((p) => p.path), pieces: parts.map((p) => p.pieces), shape: CELLS, size: parts[0]!.size, step: 1, psi: psi.buffer as SharedArrayBuffer, psiOffset: psi.byteOffset, psiLength: psi.length, control: words.buffer as SharedArrayBuffer, ...(wasm ? { wasm } : {}) };
    return { job, words };
  } finally {
    fs.closeSync(fd);
  }
}

/** The worker script run on one job alone: resolves once every slab is settled or the worker has stopped taking them. */
async function workerAlone(job: ReadJob, words: Int32Array): Promise<void> {
  const w = new Worker(WORKER);
  try {
    w.postMessage(job);
    for (let k = 0; k < CELLS[0]!; k++) {
      while (Atomics.load(words, 1 + k) === PENDING && Atomics.load(words, 0) <= CELLS[0]!) await new Promise((r) => setTimeout(r, 5));
      if (Atomics.load(words, 1 + k) === FAILED) return;
    }
  } finally {
    await w.terminate();
  }
}

describe("a field read on two threads", () => {
  for (const precision of ["float64", "float32"] as const) {
    it(`${precision}: the helper thread alone reads every slab of a job into shared memory, bit for bit as h5wasm's read`, async () => {
      const psi = new Float64Array(new SharedArrayBuffer(8 * LENGTH));
      const { job, words } = jobOf(files[precision]!, psi);
      await workerAlone(job, words);
      expect(Array.from(words.subarray(1))).toEqual(Array(CELLS[0]).fill(DONE));
      expect(sameBits(psi, readThroughHdf5(files[precision]!).psi)).toBe(true);
    });

    it(`${precision}: the helper thread alone, into a WebAssembly memory with the SIMD kernel, bit for bit as h5wasm's read`, async () => {
      const psi = newWasmPsi(LENGTH, ROW)!;
      const { job, words } = jobOf(files[precision]!, psi, files[precision]!, psiMemoryOf(psi));
      await workerAlone(job, words);
      expect(Array.from(words.subarray(1))).toEqual(Array(CELLS[0]).fill(DONE));
      expect(sameBits(psi, readThroughHdf5(files[precision]!).psi)).toBe(true);
    });
  }

  it("one thread: into a WebAssembly memory (the kernel), a shared and a plain array (the JavaScript loop), in slabs of one and of all rows, alike", () => {
    for (const precision of ["float64", "float32"] as const) {
      const expected = readThroughHdf5(files[precision]!).psi;
      for (const slab of [ROW * 8, 1 << 20]) {
        setSlabBytes(slab);
        const wasm = newWasmPsi(LENGTH, ROW)!;
        expect(psiMemoryOf(wasm)).toBeDefined();
        for (const into of [wasm, new Float64Array(new SharedArrayBuffer(8 * LENGTH)), new Float64Array(LENGTH)]) {
          expect(sameBits(readSnapshot(files[precision]!, false, into).psi, expected)).toBe(true);
        }
      }
    }
  });

  it("rows larger than a memory's buffers are not given to the kernel (the JavaScript loop reads them)", () => {
    const psi = newWasmPsi(LENGTH, ROW)!;
    const at = psiMemoryOf(psi)!;
    expect(wasmReading(at, psi, ROW, 2, 8, 1)).toBeDefined();
    expect(wasmReading({ memory: at.memory, partBytes: ROW * 8 }, psi, ROW, 2, 8, 1)).toBeUndefined();
    expect(psiMemoryOf(new Float64Array(LENGTH))).toBeUndefined();
  });

  it("both threads together, into new shared memory and into that array again: ψ bit for bit as h5wasm's read", async () => {
    setSharedReadBytes(8);
    setSlabBytes(ROW * 8); // one float64 row a slab: 48 slabs to share
    startReadHelper();
    await new Promise((r) => setTimeout(r, 200));
    for (const precision of ["float64", "float32"] as const) {
      const expected = readThroughHdf5(files[precision]!).psi;
      const first = readSnapshot(files[precision]!).psi;
      expect(first.buffer).toBeInstanceOf(SharedArrayBuffer);
      expect(sameBits(first, expected)).toBe(true);
      first.fill(0);
      expect(sameBits(readSnapshot(files[precision]!, false, first).psi, expected)).toBe(true);
    }
  });

  it("a helper that fails a slab (its file ends early) marks it failed and stops; the main thread then reads the whole field alike", async () => {
    const short = path.join(dir, "short.h5");
    fs.writeFileSync(short, fs.readFileSync(files["float64"]!).subarray(0, 4096));
    const psi = new Float64Array(new SharedArrayBuffer(8 * LENGTH));
    const { job, words } = jobOf(files["float64"]!, psi, short);
    await workerAlone(job, words);
    expect(Array.from(words.subarray(1)).filter((s) => s === FAILED)).toHaveLength(1);
    expect(words.subarray(1).every((s) => s !== DONE)).toBe(true);
    // the same broken path given to a shared read: the main thread reads what the helper cannot
    setSharedReadBytes(8);
    setSlabBytes(ROW * 8);
    startReadHelper();
    await new Promise((r) => setTimeout(r, 200));
    const fd = fs.openSync(files["float64"]!, "r");
    try {
      const into = new Float64Array(new SharedArrayBuffer(psi.byteLength));
      readIntoPsi(fd, short, job.paths, job.pieces, CELLS, 8, into);
      expect(sameBits(into, readThroughHdf5(files["float64"]!).psi)).toBe(true);
    } finally {
      fs.closeSync(fd);
    }
  });
});
