// The CSV tables' numbers: the same text as the JavaScript engine's own Number.prototype.toPrecision(8) (the reference,
// ECMA-262's algorithm), value by value, over random doubles of every exponent, grid coordinates, exact ties, powers of ten
// and their neighbours, and the values CSV writes in other ways (integers, −0, NaN, ±∞); CsvBytes writes csvTable's text.
import { describe, expect, it } from "vitest";
import { precision8, writePrecision8, PRECISION8_ROOM } from "../../src/report/csv-number.js";
import { CsvBytes, csvTable, csvValue } from "../../src/report/csv-table.js";

/** A seeded generator of 32-bit words (a linear congruential generator, Numerical Recipes' constants). */
function words(seed: number): () => number {
  let x = seed >>> 0;
  return () => (x = (Math.imul(x, 1664525) + 1013904223) >>> 0);
}

const next = words(20261203);
const uniform = () => (next() + 0.5) / 4294967296;

/** Doubles from random bit patterns: every exponent, subnormals, NaN and ±∞ included. */
function randomBits(count: number): number[] {
  const view = new DataView(new ArrayBuffer(8));
  return Array.from({ length: count }, () => {
    view.setUint32(0, next());
    view.setUint32(4, next());
    return view.getFloat64(0);
  });
}

/** The doubles next to x on either side. */
function neighbours(x: number): number[] {
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, x);
  const bits = view.getBigUint64(0);
  return [-1n, 1n].map((d) => {
    view.setBigUint64(0, bits + d);
    return view.getFloat64(0);
  });
}

const samples: Record<string, number[]> = {
  "random bit patterns": randomBits(200_000),
  "log-uniform over 1e-20 … 1e35, both signs": Array.from({ length: 200_000 }, (_, i) => (i % 2 ? -1 : 1) * 10 ** (-20 + 55 * uniform())),
  "uniform in [0, 100)": Array.from({ length: 100_000 }, () => 100 * uniform()),
  "grid coordinates (i + 1/2)·L/n and i·L/n": [20, 100, 3.7, 1e-3, 2.5e4].flatMap((L) => [64, 100, 128, 256, 1000].flatMap((n) => Array.from({ length: 2 * n }, (_, k) => ((k >> 1) + (k % 2) / 2) * (L / n)))),
  // I + k/2^j with k odd has j decimals ending in 5: with 9 − j digits in I, nine significant digits ending in 5
  "exact ties at the ninth digit and their neighbours": Array.from({ length: 20_000 }, () => {
    const j = 1 + Math.floor(4 * uniform());
    const whole = 10 ** (8 - j) + Math.floor(9 * 10 ** (8 - j) * uniform());
    const k = 2 * Math.floor(2 ** (j - 1) * uniform()) + 1;
    return (whole + k / 2 ** j) * (uniform() < 0.5 ? -1 : 1);
  }).flatMap((x) => [x, ...neighbours(x)]),
  "nine-digit values times powers of two": Array.from({ length: 20_000 }, () => (100_000_000 + Math.floor(900_000_000 * uniform())) * 2 ** Math.floor(-40 + 60 * uniform())),
  "powers of ten and their neighbours": Array.from({ length: 80 }, (_, k) => Number(`1e${k - 40}`)).flatMap((x) => [x, ...neighbours(x), 9.99999995 * x, 9.9999999 * x, 9.999999949999 * x, ...neighbours(9.99999995 * x)]),
  "tiny and huge": [Number.MIN_VALUE, 2.2250738585072014e-308, 1e-300, 1.5e-16, 9.5e-16, 1e-15, 1.0000000000000002e-15, 9.99999999e29, 1e30, 1.7976931348623157e308, ...neighbours(1e-15), ...neighbours(1e30)],
};

describe("numbers as toPrecision(8) writes them", () => {
  it.each(Object.keys(samples))("%s: precision8 and writePrecision8 give toPrecision(8)'s text (the engine's own, the reference)", (name) => {
    const bytes = new Uint8Array(PRECISION8_ROOM);
    let fast = 0;
    for (const x of samples[name]!) {
      const want = x.toPrecision(8);
      if (precision8(x) !== want) expect(precision8(x), `${x}`).toBe(want);
      const end = writePrecision8(bytes, 0, x);
      if (end >= 0) {
        fast++;
        const got = Buffer.from(bytes.subarray(0, end)).toString("latin1");
        if (got !== want) expect(got, `${x}`).toBe(want);
      }
    }
    // values that are neither ties nor at the edges of its range mostly take the fast path
    if (!/bit patterns|ties|powers|tiny/.test(name)) expect(fast).toBeGreaterThan(0.75 * samples[name]!.length);
    if (/ties/.test(name)) expect(fast).toBe(0);
  });

  it("csvValue: integers with String (−0 as 0), NaN and ±∞ as toPrecision writes them, strings as they are", () => {
    expect([0, -0, 7, -12, 1e21, NaN, Infinity, -Infinity, "x"].map(csvValue)).toEqual(["0", "0", "7", "-12", "1e+21", "NaN", "Infinity", "-Infinity", "x"]);
  });

  it("CsvBytes writes csvTable's text byte for byte", () => {
    const rows = Array.from({ length: 3000 }, (_, r) => [samples["random bit patterns"]![r]!, r - 1500, -0, samples["log-uniform over 1e-20 … 1e35, both signs"]![r]!, 1e21 * r, samples["exact ties at the ninth digit and their neighbours"]![r]!]);
    const table = new CsvBytes(["a", "b", "c", "d", "e", "f"]);
    for (const row of rows) {
      for (const v of row) table.value(v);
      table.endRow();
    }
    expect(Buffer.from(table.finish()).toString("latin1")).toBe(csvTable(["a", "b", "c", "d", "e", "f"], rows));
  });
});
