// The memory estimate made before a run: its parts against a count of the step's arrays made by hand
// (computed independently), and the one-line refusal that says which grid fits.
import { describe, expect, it } from "vitest";
import { checkMemory, estimateMemory, PROGRAM_BYTES } from "../../src/simulation/memory-estimate.js";
import { ConfigError } from "../../src/core/errors.js";

const GiB = 2 ** 30;

describe("memory estimate", () => {
  it("a periodic n³ grid holds ψ, its undo copy (16 bytes a cell each), φ (8) and φ's half spectrum (16 per complex value)", () => {
    for (const n of [32, 64, 512]) {
      const e = estimateMemory({ cells: [n, n, n], gravity: "periodic", threads: 1, fft: "js" });
      const cells = n ** 3;
      expect(e.fields).toBe(16 * cells + 16 * cells + 8 * cells + 16 * n * n * (n / 2 + 1));
      // a resume reads ψ and φ as stored (24 bytes a cell) beside the step's own
      expect(e.io).toBeGreaterThanOrEqual(24 * cells);
      expect(e.io).toBeLessThan(24 * cells + 64 * 2 ** 20);
      expect(e.total).toBe(e.fields + e.scratch + e.threads + e.io + PROGRAM_BYTES);
    }
  });

  it("isolated gravity adds the zero-padded grid (8 times the cells): its work grid, half spectrum and kernel", () => {
    const n = 32;
    const e = estimateMemory({ cells: [n, n, n], gravity: "isolated", threads: 1, fft: "js" });
    const cells = n ** 3;
    const paddedHalf = 2 * n * 2 * n * (n + 1);
    expect(e.fields).toBe(40 * cells + 8 * 8 * cells + 16 * paddedHalf + 8 * paddedHalf);
    // the solver keeps the kernel beside the step's copy
    expect(e.scratch).toBeGreaterThanOrEqual(8 * paddedHalf);
  });

  it("a tangent companion field (a measured Lyapunov rate) adds its grid, its undo copy and the real grid of its potential; a checkpoint and a resume hold it too", () => {
    const n = 32;
    const plain = estimateMemory({ cells: [n, n, n], gravity: "periodic", threads: 1, fft: "js" });
    const tangent = estimateMemory({ cells: [n, n, n], gravity: "periodic", threads: 1, fft: "js", fields: [{ kind: "tangent" }] });
    expect(tangent.fields - plain.fields).toBe((16 + 16 + 8) * n ** 3);
    expect(tangent.io - plain.io).toBe(16 * n ** 3);
  });

  it("threads add their own memory and address space; the wasm backend's tables and per-thread scratch are counted", () => {
    const one = estimateMemory({ cells: [64, 64, 64], gravity: "periodic", threads: 1, fft: "auto" });
    const two = estimateMemory({ cells: [64, 64, 64], gravity: "periodic", threads: 2, fft: "auto" });
    expect(two.threads).toBeGreaterThan(0);
    expect(two.scratch).toBeGreaterThan(one.scratch);
    expect(two.addressSpace - one.addressSpace).toBeGreaterThan(0.5 * GiB);
  });

  it("refuses a grid beyond the machine's memory with one line naming the need, the parts and the largest grid like it that fits", () => {
    const inputs = { cells: [512, 512, 512], gravity: "periodic" as const, threads: 2, fft: "auto" as const };
    let error: unknown;
    try {
      checkMemory(inputs, { memory: 4 * GiB });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ConfigError);
    const message = (error as Error).message;
    expect(message).not.toContain("\n");
    expect(message).toMatch(/^grid\.cells: a 512³ run needs about 9\.\d GiB \(fields 6\.0 GiB, step tables and scratch \d+ MiB, 2 threads 24 MiB, snapshot and checkpoint I\/O 3\.0 GiB, program 210 MiB\); more than this machine's 4\.0 GiB of memory: 256×256×512 cells fit \(about 2\.\d GiB\)$/);
    // what it says fits does fit
    expect(checkMemory({ ...inputs, cells: [256, 256, 512] }, { memory: 4 * GiB }).total).toBeLessThan(4 * GiB);
    expect(() => checkMemory({ ...inputs, cells: [256, 512, 512] }, { memory: 4 * GiB })).toThrow(ConfigError);
  });

  it("refuses by the address-space limit only when one is set", () => {
    const inputs = { cells: [128, 128, 128], gravity: "periodic" as const, threads: 1, fft: "auto" as const };
    expect(checkMemory(inputs, { memory: 16 * GiB }).total).toBeLessThan(GiB);
    expect(() => checkMemory(inputs, { memory: 16 * GiB, addressSpace: GiB })).toThrow(/more than the limit of 1\.0 GiB \(ulimit -v\): no grid of this shape fits$/);
  });
});
