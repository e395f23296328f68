/** `psibox inspect FILE`: a snapshot's metadata and field statistics (of the first species, with a line for each species of a file of several). */
import { loadHdf5 } from "../io/h5.js";
import { readSnapshot, type SnapshotMeta } from "../io/snapshot.js";
import { fieldStats, loadField } from "../simulation/from-snapshot.js";
import { formatNumber, tidyDeep } from "../core/format.js";

/** Four significant digits: enough to tell snapshots apart, short enough to read. */
const fmt = (x: number): string => formatNumber(x, 4);

/** A line per species of a file of several: name, particle mass, mass and its own contact interaction. */
function speciesRows(m: SnapshotMeta): [string, string][] {
  if (!m.species) return [];
  const interaction = (a: number | undefined): string => (a === undefined ? "scattering length not recorded" : a === 0 ? "no self-interaction" : `a_s = ${fmt(a)} m`);
  return m.species.map((s, i) => [`species ${i + 1}: ${s.name}`, `m = ${fmt(s.particleMassEv)} eV, ${fmt(s.massMsun)} Msun, ${interaction(s.scatteringLengthM)}`]);
}

/** Inspect a snapshot; returns the exit code. */
export async function inspectCommand(file: string, json: boolean): Promise<number> {
  await loadHdf5();
  const snap = readSnapshot(file);
  const stats = fieldStats(loadField(snap));
  const m = snap.meta;
  if (json) {
    const { config, ...rest } = m;
    process.stdout.write(JSON.stringify(tidyDeep({ file, ...rest, config_toml: config, stats }), null, 2) + "\n");
    return 0;
  }
  const bg =
    m.background.kind === "lcdm"
      ? `flat ΛCDM, H0 = ${fmt(m.background.hubbleKmSMpc)} km/s/Mpc, Ω_m = ${fmt(m.background.omegaMatter)}, Ω_r = ${fmt(m.background.omegaRadiation)}`
      : "static";
  const rows: [string, string][] = [
    ["file", file],
    ["kind", `${m.kind} (${m.software})`],
    ["step", String(m.step)],
    ["time", `${fmt(m.time)} ${m.timeUnit}`],
    ...(m.redshift !== null ? ([["scale factor, redshift", `${fmt(m.scaleFactor)}, z = ${fmt(m.redshift)}`]] as [string, string][]) : []),
    ["grid", `${m.cells.join("×")} cells, box ${m.boxSizeKpc.map(fmt).join(" × ")} kpc`],
    ["particle mass", `${fmt(m.particleMassEv)} eV`],
    ["gravity", m.gravity],
    ["background", bg],
    ...speciesRows(m),
    ["mass", `${fmt(stats.massMsun)} Msun${m.species ? ` (the first species; all: ${fmt(m.massMsun)} Msun)` : ""}`],
    ["density min / mean / max", `${fmt(stats.minDensityMsunKpc3)} / ${fmt(stats.meanDensityMsunKpc3)} / ${fmt(stats.maxDensityMsunKpc3)} Msun/kpc³`],
    ["kinetic energy K", `${fmt(stats.kineticMsunKm2S2)} Msun (km/s)²`],
    ["potential energy W", `${fmt(stats.potentialMsunKm2S2)} Msun (km/s)²`],
    ...(stats.contactMsunKm2S2 !== 0
      ? ([
          ["contact energy U", `${fmt(stats.contactMsunKm2S2)} Msun (km/s)²`],
          ["total energy K + W + U", `${fmt(stats.totalMsunKm2S2)} Msun (km/s)²`],
        ] as [string, string][])
      : ([["total energy K + W", `${fmt(stats.totalMsunKm2S2)} Msun (km/s)²`]] as [string, string][])),
    ["virial ratio 2K/|W|", fmt(stats.virialRatio)],
    ["config sha256", m.configSha256.slice(0, 16) + "…"],
  ];
  const width = Math.max(...rows.map(([k]) => k.length));
  process.stdout.write(rows.map(([k, v]) => `${k.padEnd(width)}  ${v}`).join("\n") + "\n");
  return 0;
}
