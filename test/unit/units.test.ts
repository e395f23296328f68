// Unit parsing and code units against CODATA 2018 / IAU 2015 values.
import { describe, expect, it } from "vitest";
import { CodeUnits, parseAs, parseQuantity, UnitSyntaxError } from "../../src/physics/units.js";
import { G_SI, HBAR_J_S, KG_PER_EV, M_SUN_KG, PC_M, YEAR_S } from "../../src/physics/constants.js";

describe("constants", () => {
  it("match CODATA 2018 and IAU 2015", () => {
    expect(HBAR_J_S / 1.602176634e-19).toBeCloseTo(6.582119569e-16, 24); // ħ in eV s (exact)
    expect(KG_PER_EV).toBeCloseTo(1.782661921e-36, 44); // eV/c² in kg (exact)
    expect(M_SUN_KG / 1.98841e30).toBeCloseTo(1, 5); // IAU 2015 B3 with CODATA G
    expect(PC_M).toBeCloseTo(3.0856775814913673e16, 0); // IAU 2015 B2
    // G in kpc (km/s)²/Msun = 4.300917e-6
    expect((G_SI * M_SUN_KG) / (1e3 * PC_M) / 1e6).toBeCloseTo(4.300917e-6, 11);
  });

  it("ħ/m = 19.1715 kpc km/s for m = 1e-22 eV (computed independently)", () => {
    const m = parseAs("1e-22 eV", "mass");
    expect(HBAR_J_S / m / (1e3 * PC_M * 1e3)).toBeCloseTo(19.1715, 3);
  });

  it("1/(100 km/s/Mpc) = 9.777922 Gyr", () => {
    expect(1 / parseAs("100 km/s/Mpc", "rate") / (1e9 * YEAR_S)).toBeCloseTo(9.777922, 5);
  });
});

describe("quantity parsing", () => {
  it("reads numbers with compound units", () => {
    expect(parseAs("2 kpc", "length")).toBeCloseTo(2e3 * PC_M, 0);
    expect(parseAs("250 km/s", "velocity")).toBe(250e3);
    expect(parseAs("1e7 Msun/kpc^3", "density")).toBeCloseTo((1e7 * M_SUN_KG) / (1e3 * PC_M) ** 3, 30);
    expect(parseAs("0.5 Gyr", "time")).toBeCloseTo(0.5e9 * YEAR_S, 0);
    expect(parseAs("3 s^-1", "rate")).toBe(3);
    expect(parseAs("1.5e-5 eV", "mass")).toBeCloseTo(1.5e-5 * KG_PER_EV, 50);
    expect(parseAs("2 Mpc/h", "length", { littleH: 0.5 })).toBeCloseTo(4e6 * PC_M, -2);
    expect(parseQuantity("  -1.5e3   km * s / s ").si).toBe(-1.5e6);
  });

  it("rejects wrong dimensions, unknown units and h without a cosmology, naming what is accepted", () => {
    expect(() => parseAs("10 km", "time")).toThrow(/not a time; use s, ms/);
    expect(() => parseAs("10 parsecs", "length")).toThrow(/unknown unit "parsecs"/);
    expect(() => parseAs("10", "length")).toThrow(UnitSyntaxError);
    expect(() => parseAs("1 Mpc/h", "length")).toThrow(/needs a cosmology/);
    expect(() => parseAs("kpc", "length")).toThrow(/does not start with a number/);
  });
});

describe("code units", () => {
  it("have ħ/m = 1 and 4πG = 1", () => {
    const u = new CodeUnits(parseAs("1e-22 eV", "mass"), parseAs("1 kpc", "length"));
    const hbarOverM = HBAR_J_S / u.particleMassKg; // m²/s
    expect(hbarOverM / (u.lengthM ** 2 / u.timeS)).toBeCloseTo(1, 14);
    const fourPiG = (4 * Math.PI * G_SI * u.massKg * u.timeS ** 2) / u.lengthM ** 3;
    expect(fourPiG).toBeCloseTo(1, 14);
    expect(u.toSI(u.toCode(123.4, "velocity"), "velocity")).toBeCloseTo(123.4, 10);
  });
});
