/**
 * `psibox clocks --track ID`: the mode's region follows a tracked halo. The
 * track table (analysis/tracks.h5, written by psibox analyze) gives the
 * halo's centre at each snapshot; the region is a sphere about it of a fixed
 * comoving radius (--radius, or the halo's R at the first snapshot used), so
 * the particles it holds change only by the flux through its moving
 * boundary: the outflow that psibox clocks reports as a loss rate.
 * Snapshots where the track does not exist (before the halo forms, after it
 * merges) are left out.
 */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { hdf5Reason, openHdf5 } from "../io/h5.js";
import { stringOf } from "../io/h5-attrs.js";
import { readSnapshotMeta } from "../io/snapshot.js";
import { checkOneRun } from "../io/run-identity.js";
import type { ModeRegion } from "../quantum/mode.js";
import { PC_M } from "../physics/constants.js";
import { parseUnit } from "../physics/units.js";
import type { loadField } from "../simulation/from-snapshot.js";

const KPC_M = 1e3 * PC_M;

/** One snapshot of the track: its time, centre (comoving kpc) and radius (proper kpc) and scale factor. */
interface TrackPoint {
  readonly seconds: number;
  readonly centreKpc: number[];
  readonly radiusKpc: number;
  readonly a: number;
}

/** The regions of a tracked halo, by snapshot file. */
export interface TrackedRegions {
  readonly files: string[];
  readonly radiusKpc: number;
  readonly table: string;
  region(file: string, field: ReturnType<typeof loadField>): ModeRegion;
}

/** The rows of one track from tracks.h5 (one-line errors for a missing table or track). */
function readTrack(table: string, id: number): { points: TrackPoint[]; identity: string } {
  if (!fs.existsSync(table)) throw new InputError(`--track: no track table ${fileName(table)}; run psibox analyze on the run folder first (it follows the halos), or give --track-table FILE`);
  let columns: Record<string, Float64Array>;
  let identity: string;
  const f = openHdf5(table);
  try {
    identity = stringOf(f, "run_identity", table);
    const names = ["track", "t_s", "a", "R_kpc", ...["x", "y", "z"].map((x) => `${x}_kpc`)].filter((n) => f.get(n) !== null);
    columns = Object.fromEntries(names.map((n) => [n, Float64Array.from((f.get(n) as { value: Float64Array }).value)]));
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`${fileName(table)}: cannot read the track table (${hdf5Reason(e)})`);
  } finally {
    f.close();
  }
  const ids = [...new Set(columns["track"] ?? [])].sort((x, y) => x - y);
  if (!ids.includes(id)) {
    const have = ids.length === 0 ? "it has no tracks" : ids.length === 1 ? `it has track ${ids[0]} only` : `it has tracks ${ids[0]} … ${ids.at(-1)}`;
    throw new InputError(`--track: no track ${id} in ${fileName(table)}; ${have}`);
  }
  const axes = ["x", "y", "z"].filter((x) => columns[`${x}_kpc`]);
  const points: TrackPoint[] = [];
  columns["track"]!.forEach((t, i) => {
    if (t === id) points.push({ seconds: columns["t_s"]![i]!, centreKpc: axes.map((x) => columns[`${x}_kpc`]![i]!), radiusKpc: columns["R_kpc"]![i]!, a: columns["a"]![i]! });
  });
  return { points, identity };
}

/** Parse --track: a whole number ≥ 1. */
function trackId(text: string): number {
  const id = Number(text);
  if (!(Number.isInteger(id) && id >= 1)) throw new InputError(`--track: "${text.slice(0, 60)}" is not a track id; give a whole number ≥ 1 from the track table (analysis/tracks.csv)`);
  return id;
}

/**
 * The regions that follow track `text` through `files` (the snapshots the user gave, one run, in time order).
 * @param radiusM the region's radius from --radius [m, comoving], or undefined for the halo's first R
 */
export function trackedRegions(paths: readonly string[], files: readonly string[], text: string, tableFlag: string | undefined, radiusM: number | undefined): TrackedRegions {
  const id = trackId(text);
  const folder = paths.length === 1 && fs.statSync(paths[0]!).isDirectory() ? paths[0]! : undefined;
  if (!tableFlag && !folder) throw new InputError("--track-table: needed with --track when the snapshots are not given as one run folder (its analysis/tracks.h5)");
  const table = tableFlag ?? path.join(folder!, "analysis", "tracks.h5");
  const { points, identity } = readTrack(table, id);
  const metas = files.map(readSnapshotMeta);
  if (checkOneRun(files, metas, "--track") !== identity) throw new InputError(`${fileName(files[0]!)}: not a snapshot of the run in the track table ${fileName(table)}; give that run's snapshots`);
  const byFile = new Map<string, TrackPoint>();
  files.forEach((f, i) => {
    const seconds = metas[i]!.time * parseUnit(metas[i]!.timeUnit).si;
    const p = points.find((q) => Math.abs(q.seconds - seconds) <= 1e-9 * Math.max(Math.abs(seconds), 1));
    if (p) byFile.set(f, p);
  });
  const kept = files.filter((f) => byFile.has(f));
  if (kept.length === 0) throw new InputError(`--track: track ${id} is in none of the ${files.length} snapshots given`);
  const first = byFile.get(kept[0]!)!;
  const radiusKpc = radiusM !== undefined ? radiusM / KPC_M : first.radiusKpc / first.a;
  return {
    files: kept,
    radiusKpc,
    table,
    region: (file, field) => {
      const p = byFile.get(file)!;
      const code = KPC_M / field.units.lengthM;
      return { kind: "sphere", center: p.centreKpc.map((x) => x * code), radius: radiusKpc * code };
    },
  };
}
