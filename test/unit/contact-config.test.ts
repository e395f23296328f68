// The contact interaction's config: energies in the units module, the scattering length of an
// axion-like field from its decay constant, and one-line errors naming the key.
import { describe, expect, it } from "vitest";
import { checkConfig } from "../../src/config/load.js";
import { resolveRun } from "../../src/config/resolve.js";
import { resolveContact } from "../../src/config/resolve-contact.js";
import { ConfigError } from "../../src/core/errors.js";
import { parseAs } from "../../src/physics/units.js";
import { KG_PER_EV } from "../../src/physics/constants.js";

const M = 1e-22 * KG_PER_EV;

describe("energy units", () => {
  it("read eV, GeV, J and erg as energies where an energy is asked for, and eV as a mass elsewhere", () => {
    expect(parseAs("1e17 GeV", "energy") / 1.602176634e-19).toBeCloseTo(1e26, -12); // 1 eV = 1.602176634e-19 J (SI 2019, exact)
    expect(parseAs("3 erg", "energy")).toBeCloseTo(3e-7, 20);
    expect(parseAs("2 TeV", "energy")).toBeCloseTo(2e12 * 1.602176634e-19, 19);
    expect(parseAs("1 eV", "mass")).toBe(KG_PER_EV);
    expect(parseAs("5 fm", "length")).toBeCloseTo(5e-15, 28);
    expect(() => parseAs("1e17 fm", "energy")).toThrow(/is not an energy; use eV, keV/);
  });
});

describe("the contact interaction of a particle", () => {
  it("takes the attractive scattering length −(ħc)(mc²)/(32π f²) from a decay constant", () => {
    // in electronvolts (computed independently of the SI path): ħc = 197.3269804 MeV fm (CODATA 2018),
    // mc² = 1e-22 eV, f = 1e17 GeV: a_s = −197.3269804e6 eV · 1e-15 m · 1e-22 eV / (32π · 1e52 eV²)
    const expected = -(197.3269804e6 * 1e-15 * 1e-22) / (32 * Math.PI * 1e52);
    const c = resolveContact({ decay_constant: "1e17 GeV" }, "particle", M)!;
    expect(c.scatteringLengthM / expected - 1).toBeLessThan(1e-9);
    expect(expected).toBeCloseTo(-1.9628e-83, 87);
  });

  it("keeps the sign of a scattering length, and none for zero or no key", () => {
    expect(resolveContact({ scattering_length: "-2e-62 fm" }, "particle", M)!.scatteringLengthM).toBeCloseTo(-2e-77, 90);
    expect(resolveContact({ scattering_length: "0 m" }, "particle", M)).toBeUndefined();
    expect(resolveContact({}, "particle", M)).toBeUndefined();
  });

  const base = {
    grid: { cells: [32], box: "10 kpc" },
    particle: { mass: "1e-22 eV" },
    span: { duration: "1 Gyr" },
    initial: { kind: "plane-wave", mean_density: "1e7 Msun/kpc^3" },
  };
  const errorOf = (particle: object, extra: object = {}) => {
    try {
      resolveRun(checkConfig({ ...base, ...extra, particle: { mass: "1e-22 eV", ...particle } }), "t", "/");
    } catch (e) {
      expect(e).toBeInstanceOf(ConfigError);
      return (e as Error).message;
    }
    throw new Error("expected a config error");
  };

  it("refuses both keys, a decay constant with a length unit, and a non-positive decay constant, naming the key in one line", () => {
    expect(errorOf({ scattering_length: "1e-80 m", decay_constant: "1e17 GeV" })).toMatch(/^particle\.decay_constant: give either particle\.scattering_length or particle\.decay_constant, not both/);
    expect(errorOf({ decay_constant: "1e17 m" })).toMatch(/^particle\.decay_constant: "1e17 m" is not an energy; use eV/);
    expect(errorOf({ decay_constant: "-1 GeV" })).toMatch(/^particle\.decay_constant: must be a positive energy/);
    expect(errorOf({ scattering_length: "1e-80 GeV" })).toMatch(/^particle\.scattering_length: "1e-80 GeV" is not a length/);
    // an expanding box takes a contact term, but not a relaxed ground state with it (relaxation is static)
    const lcdm = { background: { kind: "lcdm" }, span: { start_redshift: 10 } };
    expect(resolveRun(checkConfig({ ...base, ...lcdm, particle: { mass: "1e-22 eV", scattering_length: "1e-80 m" } }), "t", "/").contact).toEqual({ scatteringLengthM: 1e-80 });
    const groundState = { ...lcdm, grid: { cells: [16, 16, 16], box: "10 kpc" }, initial: { kind: "ground-state", mass: "1e8 Msun" } };
    expect(errorOf({ scattering_length: "1e-80 m" }, groundState)).toMatch(/^initial\.kind: a relaxed ground state with a contact interaction is made in static boxes only/);
    for (const m of [errorOf({ decay_constant: "1e17 m" })]) expect(m).not.toMatch(/\n/);
  });

  it("is resolved into the run", () => {
    const run = resolveRun(checkConfig({ ...base, particle: { mass: "1e-22 eV", scattering_length: "1e-80 m" } }), "t", "/");
    expect(run.contact).toEqual({ scatteringLengthM: 1e-80 });
  });
});
