// The one number formatter of plots, tables, inspect, the report and progress lines.
// Expected strings are written out by hand (computed independently): three significant
// digits, plain decimals for 10⁻³ ≤ |x| < 10⁴, otherwise "m × 10ⁿ", a true minus sign.
import { describe, expect, it } from "vitest";
import { axisExponent, formatDuration, formatNumber, formatQuantity, formatTick, scaledUnit, superscript, tidy, tidyDeep } from "../../src/core/format.js";

describe("formatNumber on a table of awkward values", () => {
  const table: [number, string][] = [
    [1e22, "1 × 10²²"],
    [19.999999999999996, "20"],
    [0, "0"],
    [-0, "0"],
    [-1.3155282596785014e22, "−1.32 × 10²²"],
    [NaN, "—"],
    [Infinity, "∞"],
    [-Infinity, "−∞"],
    [262766687845036930, "2.63 × 10¹⁷"],
    [9999999999999998, "1 × 10¹⁶"],
    [10000000000404330, "1 × 10¹⁶"],
    [6e12, "6 × 10¹²"],
    [1e-7, "1 × 10⁻⁷"],
    [0.000001, "1 × 10⁻⁶"],
    [0.001, "0.001"],
    [0.00099996, "0.001"],
    [0.0123456, "0.0123"],
    [1.5, "1.5"],
    [-2.25, "−2.25"],
    [9.9996, "10"],
    [128, "128"],
    [1234.5, "1235"],
    [9999.6, "1 × 10⁴"],
    [12345, "1.23 × 10⁴"],
    [-0.5, "−0.5"],
    [5.34, "5.34"],
  ];
  for (const [x, s] of table) it(`${x} → ${s}`, () => expect(formatNumber(x)).toBe(s));

  it("takes the number of significant digits", () => {
    expect(formatNumber(19.999999999999996, 6)).toBe("20");
    expect(formatNumber(Math.PI, 6)).toBe("3.14159");
    expect(formatNumber(1.1554e97, 4)).toBe("1.155 × 10⁹⁷");
  });

  it("never prints binary noise, long digit runs or computer exponents", () => {
    for (const [x] of table) {
      const s = formatNumber(x);
      expect(s).not.toMatch(/\d{6,}|e[+-]?\d|\.\d*0$/);
      expect(s).not.toContain("-");
    }
  });
});

describe("quantities, ticks, units and durations", () => {
  it("puts the unit after the number and leaves it off for a missing value", () => {
    expect(formatQuantity(2.6277e17, "Msun")).toBe("2.63 × 10¹⁷ Msun");
    expect(formatQuantity(NaN, "Msun")).toBe("—");
  });
  it("writes decades on log axes as bare powers of ten", () => {
    expect(formatTick(1e-7)).toBe("10⁻⁷");
    expect(formatTick(1e6)).toBe("10⁶");
    expect(formatTick(100)).toBe("100");
    expect(formatTick(0.01)).toBe("0.01");
    expect(formatTick(-1e-12)).toBe("−10⁻¹²");
    expect(formatTick(2e-5)).toBe("2 × 10⁻⁵");
  });
  it("chooses an axis factor that is a power of 1000 and writes it into the unit", () => {
    expect(axisExponent([6e12, -1.2e13])).toBe(12);
    expect(axisExponent([3e-9, 1e-10])).toBe(-9);
    expect(axisExponent([0.5, 250])).toBe(0);
    expect(axisExponent([0, NaN])).toBe(0);
    expect(scaledUnit(12, "Msun (km/s)²")).toBe("10¹² Msun (km/s)²");
    expect(scaledUnit(0, "kpc")).toBe("kpc");
    expect(superscript(-12)).toBe("⁻¹²");
  });
  it("writes wall-clock durations for progress lines", () => {
    expect(formatDuration(3.25)).toBe("3.3 s");
    expect(formatDuration(45)).toBe("45 s");
    expect(formatDuration(200)).toBe("3 min 20 s");
    expect(formatDuration(7500)).toBe("2 h 05 min");
  });
  it("tidies round-off out of values for scripts, keeping twelve digits", () => {
    expect(tidy(19.999999999999996)).toBe(20);
    expect(tidy(0.1 + 0.2)).toBe(0.3);
    expect(tidy(1.2345678901234e-30)).toBe(1.23456789012e-30);
    expect(tidyDeep({ a: [19.999999999999996, "x"], b: { c: NaN } })).toEqual({ a: [20, "x"], b: { c: NaN } });
  });
});
