/**
 * A run's halos followed through its snapshots (diagnostics/halo-tracks.ts)
 * and each track's history: tracks.csv and tracks.h5 under the analysis
 * folder, one row per track and snapshot, sorted by track then time. The
 * columns are the snapshot's (`track`, `snapshot`, `t_s`, `a`, `z`) followed
 * by the halo catalogue's own (halo-columns.ts), so the two tables share
 * one declaration.
 */
import path from "node:path";
import type { Snapshot } from "../io/snapshot.js";
import type { LoadedField } from "../simulation/from-snapshot.js";
import { writeFileAtomic } from "../io/atomic.js";
import { HaloTracker } from "../diagnostics/halo-tracks.js";
import type { Halo } from "../diagnostics/halo-catalogue.js";
import { parseUnit } from "../physics/units.js";
import { csvTable } from "./csv-table.js";
import { writeColumnTable, type HaloColumn } from "./halo-columns.js";

/** The columns a track row has before the catalogue's. */
export const TRACK_PREFIX = [
  { name: "track", units: "1", meaning: "track id, from 1 in the order the tracks start" },
  { name: "snapshot", units: "1", meaning: "snapshot number (NNNNN of snap_NNNNN.h5)" },
  { name: "t_s", units: "s", meaning: "snapshot time: cosmic time in comoving runs, time since the start in static runs" },
  { name: "a", units: "1", meaning: "scale factor (1 in static runs)" },
  { name: "z", units: "1", meaning: "redshift (NaN in static runs)" },
] as const;

/** A snapshot's time in seconds from its `time` and `time_units`. */
export function snapshotSeconds(snap: Snapshot): number {
  return snap.meta.time * parseUnit(snap.meta.timeUnit).si;
}

/** The snapshot number of a file named snap_NNNNN.h5 (else its position in the run). */
function snapshotNumber(file: string, position: number): number {
  const m = /(\d+)\.h5$/.exec(path.basename(file));
  return m ? Number(m[1]) : position;
}

/** Follows a run's halos snapshot by snapshot and keeps every track's rows. */
export class RunTracks {
  private readonly tracker = new HaloTracker();
  private previous: { seconds: number; a: number } | undefined;
  private current: { snapshot: number; seconds: number; a: number; z: number } | undefined;
  private count = 0;
  private rows: number[][] = [];
  private columns: readonly HaloColumn[] = [];
  private definitionText = "";

  /** Track ids of a snapshot's halos (snapshots in time order). */
  assign(file: string, snap: Snapshot, field: LoadedField, halos: readonly Halo[]): number[] {
    const seconds = snapshotSeconds(snap);
    const a = field.scaleFactor;
    // ∫dt/a between the snapshots (trapezoid in 1/a), in code time
    const drift = this.previous ? ((seconds - this.previous.seconds) / field.units.timeS) * 0.5 * (1 / this.previous.a + 1 / a) : 0;
    const ids = this.tracker.assign(field.grid, field.psi, halos, drift);
    this.previous = { seconds, a };
    this.current = { snapshot: snapshotNumber(file, this.count++), seconds, a, z: snap.meta.background.kind === "lcdm" ? 1 / a - 1 : NaN };
    return ids;
  }

  /** Keep the rows just written to the snapshot's catalogue (its columns include `track`). */
  add(columns: readonly HaloColumn[], rows: readonly (readonly number[])[], definition: string): void {
    const c = this.current!;
    this.columns = columns;
    this.definitionText = definition;
    const track = columns.findIndex((col) => col.name === "track");
    for (const r of rows) this.rows.push([r[track]!, c.snapshot, c.seconds, c.a, c.z, ...r.filter((_, j) => j !== track)]);
  }

  /** The catalogue's overdensity definition (e.g. "200m"). */
  definition(): string {
    return this.definitionText;
  }

  /** The table's columns: the track's and snapshot's first, then the catalogue's (without its track column). */
  header(): { name: string; units: string; meaning: string }[] {
    return [...TRACK_PREFIX, ...this.columns.filter((c) => c.name !== "track")];
  }

  /** The rows, by track then time. */
  sortedRows(): number[][] {
    return [...this.rows].sort((x, y) => x[0]! - y[0]! || x[2]! - y[2]!);
  }

  /** Write tracks.csv and tracks.h5 into `outDir`; returns the number of tracks. */
  write(outDir: string, identity: string): number {
    const cols = this.header();
    const rows = this.sortedRows();
    writeFileAtomic(path.join(outDir, "tracks.csv"), csvTable(cols.map((c) => c.name), rows));
    writeColumnTable(path.join(outDir, "tracks.h5"), "psibox halo tracks", cols, rows, { overdensity_definition: this.definitionText, run_identity: identity });
    return new Set(rows.map((r) => r[0])).size;
  }
}
