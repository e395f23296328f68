/**
 * A psibox snapshot's metadata from its attributes (see snapshot-layout.ts),
 * whichever reader gives them: h5wasm's (h5-attrs.ts) or the file's own
 * structures read without it (h5-native.ts).
 */
import { InputError } from "../core/errors.js";
import { hasAttr, numberOf, numbersOf, stringOf, type AttributeReader, type AttrSource } from "./h5-attrs.js";
import { SNAPSHOT_FORMAT, SNAPSHOT_VERSION, SPECIES_ATTRS } from "./snapshot-layout.js";
import type { SnapshotBackground, SnapshotMeta, SpeciesMeta } from "./snapshot.js";

/** The metadata, from the root's attributes `f` (read once each) and the grid's `gridNode`. */
export function readMeta(gridNode: AttrSource, f: AttrSource, file: string): SnapshotMeta {
  const bgKind = stringOf(f, "background", file);
  const background: SnapshotBackground =
    bgKind === "lcdm"
      ? { kind: "lcdm", hubbleKmSMpc: numberOf(f, "hubble", file), omegaMatter: numberOf(f, "omega_matter", file), omegaRadiation: numberOf(f, "omega_radiation", file) }
      : { kind: "static" };
  return {
    kind: stringOf(f, "kind", file) === "checkpoint" ? "checkpoint" : "snapshot",
    software: stringOf(f, "software", file),
    step: numberOf(f, "step", file),
    time: numberOf(f, "time", file),
    timeUnit: stringOf(f, "time_units", file),
    scaleFactor: numberOf(f, "scale_factor", file),
    redshift: hasAttr(f, "redshift") ? numberOf(f, "redshift", file) : null,
    cells: numbersOf(gridNode, "cells", file),
    boxSizeKpc: numbersOf(gridNode, "box_size", file),
    particleMassEv: numberOf(f, "particle_mass", file),
    gravity: stringOf(f, "gravity", file),
    // files written before the first field's contact interaction was recorded lack it (the config text has it)
    ...(hasAttr(f, "scattering_length") ? { scatteringLengthM: numberOf(f, "scattering_length", file) } : {}),
    background,
    massMsun: numberOf(f, "mass", file),
    config: stringOf(f, "config", file),
    configSha256: stringOf(f, "config_sha256", file),
    ...speciesOf(f, file),
  };
}

/** The species of a file of several (none: a file of one). */
function speciesOf(f: AttrSource, file: string): { species?: SpeciesMeta[] } {
  if (!hasAttr(f, SPECIES_ATTRS.names)) return {};
  const names = stringOf(f, SPECIES_ATTRS.names, file).split(" ").filter((n) => n !== "");
  const masses = numbersOf(f, SPECIES_ATTRS.particleMass, file);
  const totals = numbersOf(f, SPECIES_ATTRS.mass, file);
  if (masses.length !== names.length || totals.length !== names.length) {
    throw new InputError(`${file}: the attributes ${SPECIES_ATTRS.particleMass} and ${SPECIES_ATTRS.mass} need one value per species (${names.length})`);
  }
  // files written before the species' contact interactions were recorded lack their scattering lengths
  const lengths = hasAttr(f, SPECIES_ATTRS.scatteringLength) ? numbersOf(f, SPECIES_ATTRS.scatteringLength, file) : undefined;
  if (lengths && lengths.length !== names.length) throw new InputError(`${file}: the attribute ${SPECIES_ATTRS.scatteringLength} needs one value per species (${names.length})`);
  return { species: names.map((name, i) => ({ name, particleMassEv: masses[i]!, massMsun: totals[i]!, ...(lengths ? { scatteringLengthM: lengths[i]! } : {}) })) };
}

/** The layout version of an open file; an InputError when it is not a psibox snapshot psibox can read. */
export function layoutVersion(f: AttributeReader, file: string): number {
  const format = f.value("format");
  if (format !== SNAPSHOT_FORMAT) throw new InputError(`${file}: not a psibox snapshot (no "format" attribute "${SNAPSHOT_FORMAT}")`);
  const version = numberOf(f, "format_version", file);
  if (version > SNAPSHOT_VERSION) throw new InputError(`${file}: snapshot format version ${version} is newer than this psibox reads (${SNAPSHOT_VERSION})`);
  return version;
}
