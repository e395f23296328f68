/** `psibox import SOURCE --out FILE`. */
import type { ImportFlags } from "../import-command.js";
import type { CommandSpec } from "../options.js";

export const importSpec: CommandSpec<ImportFlags, [string]> = {
  name: "import",
  summary: "convert a complex field from a .npy or HDF5 file into a psibox snapshot",
  arguments: [{ name: "source", help: "a .npy file, or an HDF5 file with --dataset or --re/--im", required: true }],
  options: {
    out: { flags: "--out <file>", help: "the snapshot to write (.h5)", required: true },
    box: { flags: "--box <length>", help: 'box side(s), e.g. "20 kpc" or "20 kpc, 10 kpc"', required: true },
    particleMass: { flags: "--particle-mass <mass>", help: 'particle mass, e.g. "1e-22 eV"', required: true },
    dataset: { flags: "--dataset <path>", help: "HDF5: a complex dataset, or a real one with a last axis (re, im)" },
    re: { flags: "--re <path>", help: "HDF5: dataset of the real part" },
    im: { flags: "--im <path>", help: "HDF5: dataset of the imaginary part" },
    densityUnit: { flags: "--density-unit <unit>", help: "unit of |ψ|² in the source", default: "Msun/kpc^3" },
    time: { flags: "--time <time>", help: 'time of the field, e.g. "1.2 Gyr"' },
    redshift: { flags: "--redshift <z>", help: "redshift of the field (makes the snapshot comoving, flat ΛCDM)" },
    hubble: { flags: "--hubble <rate>", help: "H0 with --redshift", default: "67.36 km/s/Mpc" },
    omegaMatter: { flags: "--omega-matter <value>", help: "Ω_m with --redshift", default: "0.3153" },
    gravity: { flags: "--gravity <kind>", help: "periodic, isolated or none", default: "periodic" },
    force: { flags: "--force", help: "overwrite the output file", default: false },
  },
  run: async ([source], flags) => (await import("../import-command.js")).importCommand(source, flags),
};
