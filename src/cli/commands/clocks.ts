/** `psibox clocks PATH...` and `psibox estimate`. */
import type { ClocksFlags } from "../clocks-command.js";
import type { EstimateFlags } from "../estimate-command.js";
import type { CommandSpec } from "../options.js";
import { MODE_STATE_OPTIONS } from "../mode-state-options.js";

const SQUEEZING_DB = { flags: "--squeezing-db <dB>", help: "squeezing level to time", default: "-10" };

export const clocksSpec: CommandSpec<ClocksFlags, [string[]]> = {
  name: "clocks",
  summary: "the quantum sidecar on saved snapshots: mode coefficients and the squeezing, phase-diffusion and breakdown clocks",
  arguments: [{ name: "paths", help: "a run folder, snapshot files, or both (imported snapshots too)", required: true, variadic: true }],
  options: {
    region: { flags: "--region <kind>", help: "box (whole box), sphere, cube or densest (a sphere around the densest cell)", default: "box" },
    center: { flags: "--center <lengths>", help: 'region centre, one length per axis, e.g. "10 kpc, 10 kpc"' },
    radius: { flags: "--radius <length>", help: "sphere radius or cube half-width (with --track: the sphere's radius, comoving; default the halo's R at the first snapshot)" },
    track: { flags: "--track <id>", help: "follow halo track ID of the run's track table (from psibox analyze): a sphere about the halo at every snapshot" },
    trackTable: { flags: "--track-table <file>", help: "the track table for --track (default: <run>/analysis/tracks.h5)" },
    squeezingDb: SQUEEZING_DB,
    ...MODE_STATE_OPTIONS,
    out: { flags: "--out <dir>", help: "where to write snapshot-clocks.csv and .json (default: the run folder, or .)" },
    json: { flags: "--json", help: "print the summary, the final state and every snapshot's numbers as JSON", default: false },
  },
  run: async ([paths], flags) => (await import("../clocks-command.js")).clocksCommand(paths, flags),
};

export const estimateSpec: CommandSpec<EstimateFlags, []> = {
  name: "estimate",
  summary: "order-of-magnitude squeezing, phase-diffusion and breakdown times from physical inputs alone",
  arguments: [],
  options: {
    particleMass: { flags: "--particle-mass <mass>", help: 'particle mass, e.g. "1e-5 eV"', required: true },
    velocity: { flags: "--velocity <v>", help: 'velocity dispersion, e.g. "200 km/s" or "1e-3 c"' },
    haloMass: { flags: "--halo-mass <mass>", help: 'object mass, e.g. "1e12 Msun"' },
    radius: { flags: "--radius <length>", help: 'object radius, e.g. "100 kpc"' },
    density: { flags: "--density <density>", help: 'density for the breakdown rate, e.g. "0.3 GeV/cm^3" or "1e7 Msun/kpc^3"' },
    solitonMass: { flags: "--soliton-mass <mass>", help: 'an exact soliton of this mass, e.g. "1e9 Msun" (its own ⟨v²⟩; the mode mass defaults to it)' },
    modeMass: { flags: "--mode-mass <mass>", help: "mass in the condensate mode (default: the soliton or halo mass)" },
    scatteringLength: { flags: "--scattering-length <length>", help: 'a contact interaction by its scattering length, e.g. "1e-80 m" (negative: attractive)' },
    decayConstant: { flags: "--decay-constant <energy>", help: 'a contact interaction of an axion-like field by its decay constant, e.g. "1e17 GeV" (attractive)' },
    squeezingDb: SQUEEZING_DB,
    ...MODE_STATE_OPTIONS,
    json: { flags: "--json", help: "print JSON: every number, χ < 0 like everywhere else, clock times in seconds", default: false },
  },
  run: async (_args, flags) => (await import("../estimate-command.js")).estimateCommand(flags),
};
