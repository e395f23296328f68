// The contact interaction through the CLI in a temporary folder: a 3D packet of three times the largest stable
// attractive soliton collapses and the run stops with exit code 3, a message naming the mass, the critical mass
// for this particle and interaction, and what to change, and the last good state kept (whose contact energy
// `psibox inspect` reads back as the time series wrote it); a ground state above
// that mass is refused before anything runs (there is none to relax to), exit 2; `psibox estimate` takes the
// interaction (bad keys are tested on the resolver, test/unit/contact-config.test.ts). For m = 1e-22 eV and a_s = −1e-80 m,
// M_max = 1.0125 ħ/√(G m |a_s|) = 4.92e9 Msun (computed independently from CODATA 2018 ħ and G, IAU 2015 Msun).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeWork, readCsv, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";

let work: string;
beforeAll(() => {
  work = makeWork("contact");
});
afterAll(() => removeWork(work));

const config = (initial: string, particle = 'scattering_length = "-1e-80 m"') => `[grid]
cells = [32, 32, 32]
box = "0.5 kpc"
gravity = "isolated"

[particle]
mass = "1e-22 eV"
${particle}

[span]
duration = "2 Myr"

[initial]
${initial}
`;

/** One line on stderr with exit code `code`; returns the message. */
function oneLine(r: { code: number | null; stderr: string }, code: number): string {
  expect(r.code, r.stderr).toBe(code);
  expect(r.stderr).toMatch(/^psibox: [^\n]*\n$/);
  return r.stderr.slice("psibox: ".length, -1);
}

describe("the collapse guard", () => {
  it("stops a collapsing attractive packet with exit code 3, naming its mass, the critical mass and what to change", () => {
    writeIn(work, "packet.toml", config('kind = "gaussian-packet"\nmass = "1.5e10 Msun"\nwidth = "40 pc"'));
    const msg = oneLine(runPsibox(work, ["run", "packet.toml", "-q"]), 3);
    expect(msg).toMatch(/collapses under its attractive self-interaction/);
    expect(msg).toMatch(/hold 1\.5 × 10¹⁰ Msun, above the largest stable soliton, 4\.92 × 10⁹ Msun \(M_max = 1\.0125 ħ\/√\(G m \|a_s\|\) for m = 1 × 10⁻²² eV and a_s = −1 × 10⁻⁸⁰ m\)/);
    // a weaker interaction with M_max = 1.5e10 Msun: |a_s| = 1e-80 m × (4.92e9/1.5e10)² = 1.08e-81 m
    expect(msg).toMatch(/use less mass \(below 4\.92 × 10⁹ Msun\), a weaker interaction \(\|particle\.scattering_length\| below 1\.08 × 10⁻⁸¹ m\) or a repulsive one/);
    const summary = readJson<{ status: string; reason: string }>(path.join(work, "output/packet/summary.json"));
    expect(summary.status).toBe("stopped");
    expect(fs.existsSync(path.join(work, "output/packet/checkpoint.h5"))).toBe(true);
    const rows = readCsv(path.join(work, "output/packet/timeseries.csv"));
    const u = Number(rows.at(-1)!["contact_Msun_km2_s2"]);
    expect(u).toBeLessThan(0);
    // the snapshot of the last good state: inspect reads the interaction from its config and gives the same U
    const ran = runPsibox(work, ["inspect", "--json", "output/packet/snapshots/snap_00001.h5"]);
    const stats = (JSON.parse(ran.stdout) as { stats: { contactMsunKm2S2: number; totalMsunKm2S2: number } }).stats;
    expect(Math.abs(stats.contactMsunKm2S2 / u - 1)).toBeLessThan(1e-9);
    expect(Math.abs(stats.totalMsunKm2S2 / Number(rows.at(-1)!["total_Msun_km2_s2"]) - 1)).toBeLessThan(1e-9);
  });

  it("refuses a ground state above the critical mass before running, given a scattering length or a decay constant", () => {
    writeIn(work, "gs.toml", config('kind = "ground-state"\nmass = "1e10 Msun"'));
    expect(oneLine(runPsibox(work, ["run", "gs.toml", "-q"]), 2)).toMatch(/^initial\.mass: 1 × 10¹⁰ Msun is above the largest stable soliton, 4\.92 × 10⁹ Msun .*: no ground state exists to relax to; use less mass/);
    // f = √((ħc)(mc²)/(32π|a_s|)) = 4.43e15 GeV gives a_s = −1e-80 m for m = 1e-22 eV (computed independently)
    writeIn(work, "gs-f.toml", config('kind = "ground-state"\nmass = "1e10 Msun"', 'decay_constant = "4.4304e15 GeV"'));
    expect(oneLine(runPsibox(work, ["run", "gs-f.toml", "-q"]), 2)).toMatch(/4\.92 × 10⁹ Msun .*f = 4\.43 × 10¹⁵ GeV.*particle\.decay_constant above 9 × 10¹⁵ GeV/);
  });
});

describe("psibox estimate with an interaction", () => {
  it("reports the contact Kerr part beside the gravitational one and the critical mass; refuses both keys", () => {
    const r = runPsibox(work, ["estimate", "--particle-mass", "1e-22 eV", "--soliton-mass", "1e9 Msun", "--scattering-length", "-1e-80 m", "--json"]);
    expect(r.code, r.stderr).toBe(0);
    const est = JSON.parse(r.stdout) as { chiPerS: number; chiContactPerS: number; criticalMassKg: number };
    expect(est.chiContactPerS).toBeLessThan(0);
    expect(est.criticalMassKg / 1.98841e30 / 4.92e9 - 1).toBeLessThan(1e-3);
    const text = runPsibox(work, ["estimate", "--particle-mass", "1e-22 eV", "--soliton-mass", "1e10 Msun", "--scattering-length", "-1e-80 m"]);
    expect(text.stdout).toMatch(/largest stable soliton {2}M_max = 1\.0125 ħ\/√\(G m \|a_s\|\) = 4\.92\d × 10⁹ Msun; the soliton is above it and collapses/);
    expect(oneLine(runPsibox(work, ["estimate", "--particle-mass", "1e-22 eV", "--soliton-mass", "1e9 Msun", "--scattering-length", "1 m", "--decay-constant", "1 GeV"]), 2)).toMatch(/^--decay-constant: give either/);
  });
});
