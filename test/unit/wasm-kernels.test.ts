// The WebAssembly module's own contracts: no static data of its own (the
// memory belongs to JavaScript), a constants table inside the reserved bytes,
// and its vectorised sin/cos against the JavaScript engine's Math.sin and
// Math.cos (the ECMAScript library functions, correctly rounded to within an ulp or so).
import fs from "node:fs";
import { describe, expect, it } from "vitest";
import { instantiateKernels, kernelModule, WASM_RESERVED_BYTES } from "../../src/fields/wasm-kernels.js";
import { seededRandom } from "../helpers/fields.js";

function sections(bytes: Uint8Array): number[] {
  const ids: number[] = [];
  let p = 8;
  while (p < bytes.length) {
    const id = bytes[p++]!;
    let len = 0;
    let shift = 0;
    let b: number;
    do {
      b = bytes[p++]!;
      len |= (b & 127) << shift;
      shift += 7;
    } while (b & 128);
    ids.push(id);
    p += len;
  }
  return ids;
}

/** Kernels in a fresh memory with room for `count` angles and their (cos, sin) pairs. */
function sinCosScratch(count: number) {
  const memory = new WebAssembly.Memory({ initial: 8, maximum: 8, shared: true });
  const k = instantiateKernels(kernelModule()!, memory);
  k.initConstants();
  const anglesAt = WASM_RESERVED_BYTES;
  const outAt = anglesAt + 8 * count;
  return { k, anglesAt, outAt, angles: new Float64Array(memory.buffer, anglesAt, count), out: new Float64Array(memory.buffer, outAt, 2 * count) };
}

/** One unit in the last place of x (subnormals included). */
const ulp = (x: number) => 2 ** (Math.max(Math.floor(Math.log2(Math.abs(x))), -1022) - 52);

describe("WebAssembly kernels", () => {
  it("carry no data segment and keep their constants inside the reserved bytes", () => {
    const file = new URL("../../dist/fields/wasm/kernels.wasm", import.meta.url);
    const ids = sections(new Uint8Array(fs.readFileSync(file)));
    expect(ids).not.toContain(11); // data
    expect(ids).not.toContain(12); // data count
    const memory = new WebAssembly.Memory({ initial: 1, maximum: 1, shared: true });
    const k = instantiateKernels(kernelModule()!, memory);
    expect(64 + k.CONSTANTS_BYTES.value).toBeLessThanOrEqual(WASM_RESERVED_BYTES);
  });

  it("rotate by sin and cos within 2 ulp-sized errors of Math.sin and Math.cos, from tiny angles to 1e9", () => {
    const count = 20000;
    const memory = new WebAssembly.Memory({ initial: 8, maximum: 8, shared: true });
    const k = instantiateKernels(kernelModule()!, memory);
    k.initConstants();
    const anglesAt = WASM_RESERVED_BYTES;
    const outAt = anglesAt + 8 * count;
    const angles = new Float64Array(memory.buffer, anglesAt, count);
    const out = new Float64Array(memory.buffer, outAt, 2 * count);
    const rnd = seededRandom(5);
    for (const scale of [1e-9, 0.5, Math.PI, 30, 1e4, 1e5, 3e5, 1e9]) {
      for (let i = 0; i < count; i++) angles[i] = rnd() * scale;
      angles[0] = 0;
      angles[1] = scale;
      k.sinCos(anglesAt, outAt, count);
      let worst = 0;
      for (let i = 0; i < count; i++) {
        worst = Math.max(worst, Math.abs(out[2 * i]! - Math.cos(angles[i]!)), Math.abs(out[2 * i + 1]! - Math.sin(angles[i]!)));
      }
      expect(worst, `angles up to ${scale}`).toBeLessThan(2.3e-16);
    }
  });

  // Reference: Math.sin and Math.cos, fdlibm's algorithms in V8, within 1 ulp of the exact value (from memory).
  // The kernel reduces the angle as fdlibm does (by π/64 instead of π/2) and adds short Taylor corrections to a
  // table value, so it stays within 2 ulp of them, relative to each value (not an absolute bound, which is
  // loose for small angles), and sin is odd and cos even, bit for bit.
  it("are within 2 ulp of Math.sin and Math.cos on negative angles, relative to each value, and exactly odd and even", () => {
    const count = 20000;
    const { k, anglesAt, outAt, angles, out } = sinCosScratch(count);
    const rnd = seededRandom(11);
    for (const scale of [1e-300, 1e-9, 1e-3, 0.5, Math.PI, 30, 1e4, 1e5, 3e5, 1e9]) {
      for (let i = 0; i < count; i++) angles[i] = -scale * (0.5 + 0.5 * Math.abs(rnd()));
      k.sinCos(anglesAt, outAt, count);
      const negative = Float64Array.from(out);
      let worst = 0;
      for (let i = 0; i < count; i++) {
        const x = angles[i]!;
        worst = Math.max(worst, Math.abs(negative[2 * i]! - Math.cos(x)) / ulp(Math.cos(x)), Math.abs(negative[2 * i + 1]! - Math.sin(x)) / ulp(Math.sin(x)));
      }
      expect(worst, `angles down to −${scale}`).toBeLessThanOrEqual(2);
      for (let i = 0; i < count; i++) angles[i] = -angles[i]!;
      k.sinCos(anglesAt, outAt, count);
      let asymmetric = 0;
      for (let i = 0; i < count; i++) if (out[2 * i] !== negative[2 * i] || out[2 * i + 1] !== -negative[2 * i + 1]!) asymmetric++;
      expect(asymmetric, `angles of ±${scale}`).toBe(0);
    }
  });

  it("are within 2 ulp of Math.sin and Math.cos next to the table's angles and the zeros of sin and cos", () => {
    const count = 4000;
    const { k, anglesAt, outAt, angles, out } = sinCosScratch(count);
    // j·π/128 (half of the table's step, so both table angles and the midpoints between them), a few ulp and 1e-9 off
    for (let i = 0; i < count; i++) angles[i] = ((i >> 2) * Math.PI) / 128 + [0, 4e-16, -1e-9, 1e-9][i & 3]! * (1 + (i >> 2) / 64);
    k.sinCos(anglesAt, outAt, count);
    let worst = 0;
    for (let i = 0; i < count; i++) {
      const x = angles[i]!;
      worst = Math.max(worst, Math.abs(out[2 * i]! - Math.cos(x)) / ulp(Math.cos(x)), Math.abs(out[2 * i + 1]! - Math.sin(x)) / ulp(Math.sin(x)));
    }
    expect(worst).toBeLessThanOrEqual(2);
  });
});
