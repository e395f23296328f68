/**
 * What an ensemble checks before it starts: that the method applies (N
 * well above the number of modes, Sinatra, Lobo & Castin 2002, J. Phys. B
 * 35, 3599; "well above" is taken as ten times, common practice), and that
 * the members fit the machine: the reduction holds every member at one
 * sample time in memory, and the folder holds every member at every sample
 * time on disk.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { ConfigError } from "../core/errors.js";
import { formatNumber } from "../core/format.js";
import { formatBytes } from "../simulation/memory-estimate.js";
import type { Grid } from "../grid/grid.js";
import type { ResolvedEnsemble } from "../config/resolve-ensemble.js";
import type { ResolvedRun } from "../config/resolve.js";

/** N over the number of modes below which the ensemble warns. */
export const VALIDITY_RATIO = 10;

/** A warning when N is not well above the grid's modes (undefined when it is). */
export function validityWarning(particles: number, modes: number): string | undefined {
  if (particles >= VALIDITY_RATIO * modes) return undefined;
  return (
    `N = ${formatNumber(particles, 4)} particles is not well above the grid's ${modes} modes (N/modes = ${formatNumber(particles / modes, 3)}, ` +
    `below ${VALIDITY_RATIO}): the vacuum noise, ${formatNumber(modes / 2, 4)} quanta in all, is a large part of the field and the truncated Wigner method ` +
    "is not reliable; raise ensemble.particles or use fewer cells"
  );
}

/**
 * Refuse what the members' equations leave out: species beside the first
 * (members advance one field, under gravity and the particle's contact
 * interaction, so such an ensemble would silently drop part of the model).
 */
export function checkEnsembleModel(run: ResolvedRun): void {
  if (run.species.length > 0) throw new ConfigError("species", `psibox ensemble advances one species, and the config has ${run.species.length + 1}; remove [[species]] for an ensemble`);
}

/** Bytes the reduction holds (every member at one sample time) and the folder needs (every member at every time). */
export function ensembleBytes(members: number, cells: number, times: number): { memory: number; disk: number } {
  const field = 16 * cells;
  // the members and their number-unit copies, plus the bootstrap's scratch
  return { memory: 2 * members * field + 8 * field, disk: (members + 1) * times * field };
}

/** Refuse an ensemble that cannot fit in half the machine's memory, or on the folder's disk. */
export function checkEnsembleSize(settings: ResolvedEnsemble, grid: Grid, times: number, dir: string): void {
  const need = ensembleBytes(settings.members, grid.size, times);
  const memory = os.totalmem() / 2;
  const cells = grid.cells.slice(0, grid.dims).join("×");
  if (need.memory > memory) {
    const most = Math.floor((memory - 8 * 16 * grid.size) / (32 * grid.size));
    throw new ConfigError("ensemble.members", `${settings.members} members of ${cells} cells need about ${formatBytes(need.memory)} of memory for the reduction, more than half of this machine's ${formatBytes(2 * memory)}; at most ${Math.max(0, most)} members fit, or use fewer cells`);
  }
  let free = Number.POSITIVE_INFINITY;
  try {
    let existing = path.resolve(dir);
    while (!fs.existsSync(existing) && path.dirname(existing) !== existing) existing = path.dirname(existing);
    const fsStat = fs.statfsSync(existing);
    free = fsStat.bavail * fsStat.bsize;
  } catch {
    /* a folder whose free space cannot be read is not refused here; a failed write still says why */
  }
  if (need.disk > free) {
    throw new ConfigError("ensemble.members", `${settings.members} members of ${cells} cells at ${times} sample times need about ${formatBytes(need.disk)} on disk, and ${formatBytes(free)} is free; lower ensemble.members or ensemble.samples, or free space`);
  }
}
