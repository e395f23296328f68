/**
 * The run's halo figures, from its track table (halo-track-table.ts):
 * - core-halo: the measured core mass (inside the fitted r_c) against the
 *   halo mass for every resolved halo whose core was fitted, at every
 *   snapshot, with the relation of Schive et al. (2014) drawn at each of
 *   those snapshots' redshifts as an overlay (never fitted);
 * - tracks: each track's halo mass (solid) and core mass (dashed) against
 *   time, for the most massive tracks.
 */
import type { TopLevelSpec } from "vega-lite";
import { formatNumber } from "../core/format.js";
import type { SnapshotMeta } from "../io/snapshot.js";
import { YEAR_S } from "../physics/constants.js";
import { schiveCoreMass } from "../physics/cosmology/core-halo.js";
import { logAxis, PANEL, SCHEMA } from "./plots.js";
import { renderVegaLite, type Figure } from "./render.js";
import { colourTable } from "./colormaps.js";
import type { RunTracks } from "./halo-track-table.js";

type TrackRow = Record<string, number>;

/** A viridis colour at f ∈ [0, 1] as #rrggbb. */
function viridis(f: number): string {
  // the dark end of viridis, not its pale yellow, so points stay visible on white
  const lut = colourTable("viridis");
  const i = 3 * Math.round(f * 200);
  return `#${[lut[i]!, lut[i + 1]!, lut[i + 2]!].map((v) => v.toString(16).padStart(2, "0")).join("")}`;
}

/** The most tracks the history figure draws (the most massive ones). */
const MAX_TRACKS = 8;

function rowsOf(tracks: RunTracks): TrackRow[] {
  const names = tracks.header().map((c) => c.name);
  return tracks.sortedRows().map((r) => Object.fromEntries(names.map((n, j) => [n, r[j]!])));
}

/** The label of a snapshot: its redshift in comoving runs, else its time. */
function snapshotLabel(r: TrackRow, unit: { name: string; seconds: number }): string {
  return Number.isFinite(r["z"]!) ? `z = ${formatNumber(r["z"]!, 3)}` : `t = ${formatNumber(r["t_s"]! / unit.seconds, 3)} ${unit.name}`;
}

function timeUnit(rows: readonly TrackRow[]): { name: string; seconds: number } {
  const span = Math.max(...rows.map((r) => r["t_s"]!));
  return span >= 1e9 * YEAR_S ? { name: "Gyr", seconds: 1e9 * YEAR_S } : { name: "Myr", seconds: 1e6 * YEAR_S };
}

/** Measured cores against the published relation (3D runs with at least one halo). */
function coreHaloPlot(rows: readonly TrackRow[], meta: SnapshotMeta, definition: string): Promise<Figure> {
  const unit = timeUnit(rows);
  const measured = rows.filter((r) => r["resolved"] === 1 && r["core_resolved"] === 1).map((r) => ({ Mh: r["M_Msun"]!, Mc: r["core_mass_Msun"]!, snapshot: snapshotLabel(r, unit), order: r["t_s"]! }));
  const masses = (measured.length ? measured : rows.map((r) => ({ Mh: r["M_Msun"]! }))).map((p) => p.Mh);
  const [lo, hi] = [Math.min(...masses) / 3, Math.max(...masses) * 3];
  const bg = meta.background;
  const cosmology = bg.kind === "lcdm" ? { omegaMatter: bg.omegaMatter, omegaRadiation: bg.omegaRadiation } : undefined;
  // one line per snapshot with measured cores (or the last snapshot when there are none), in its colour
  // a static box has no redshift: one line at a = 1, in grey
  const at = cosmology && measured.length ? [...new Map(rows.filter((r) => r["core_resolved"] === 1 && r["resolved"] === 1).map((r) => [snapshotLabel(r, unit), r])).values()] : [rows.at(-1)!];
  const line = at.flatMap((r) =>
    Array.from({ length: 24 }, (_, i) => {
      const Mh = lo * (hi / lo) ** (i / 23);
      return { Mh, Mc: schiveCoreMass(Mh, meta.particleMassEv, cosmology ? r["z"]! : 0, cosmology), snapshot: cosmology ? snapshotLabel(r, unit) : "relation at a = 1", order: cosmology ? r["t_s"]! : -1 };
    }),
  );
  const xa = logAxis([lo, hi]);
  const ya = logAxis([...measured.map((p) => p.Mc), ...line.map((p) => p.Mc)]);
  const labels = [...new Set([...line, ...measured].sort((a, b) => a.order - b.order).map((p) => p.snapshot))];
  const range = labels.map((l, i) => (l === "relation at a = 1" ? "#777777" : viridis(i / Math.max(1, labels.length - 1))));
  const colour = { field: "snapshot", type: "nominal", title: null, sort: labels, scale: { domain: labels, range }, legend: { orient: "right" } };
  const x = { field: "Mh", type: "quantitative", title: `halo mass M (${definition}) [Msun]`, scale: { type: "log", domain: xa.domain, nice: false }, axis: { values: xa.values } };
  const y = { field: "Mc", type: "quantitative", title: "core mass M_c [Msun]", scale: { type: "log", domain: ya.domain, nice: false }, axis: { values: ya.values } };
  const lines = cosmology && measured.length ? "dashed: Schive et al. (2014) at each snapshot's z" : `dashed: Schive et al. (2014)${cosmology ? ` at z = ${formatNumber(rows.at(-1)!["z"]!, 3)}` : ", a = 1"}`;
  // two short lines: Vega sizes the figure by an estimate of the text's width, which runs long
  const note = [`${measured.length ? `${measured.length} resolved core${measured.length === 1 ? "" : "s"}` : "no resolved core yet"}; ${lines},`, "drawn as published, never fitted (a contested relation)"];
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: "Core–halo relation", subtitle: note },
    ...PANEL,
    layer: [
      { data: { values: line }, mark: { type: "line", strokeDash: [6, 3], strokeWidth: 1.2 }, encoding: { x, y, color: colour, detail: { field: "snapshot" } } },
      ...(measured.length ? [{ data: { values: measured }, mark: { type: "point", filled: true, size: 30, opacity: 1 }, encoding: { x, y, color: colour } }] : []),
    ],
  } as unknown as TopLevelSpec);
}

/** Halo mass (solid) and core mass (dashed) of the most massive tracks against time. */
function trackPlot(rows: readonly TrackRow[], dims: number): Promise<Figure> {
  const unit = timeUnit(rows);
  const peak = new Map<number, number>();
  for (const r of rows) peak.set(r["track"]!, Math.max(peak.get(r["track"]!) ?? 0, r["M_Msun"]!));
  const chosen = [...peak.entries()].sort((a, b) => b[1] - a[1]).slice(0, MAX_TRACKS).map(([t]) => t).sort((a, b) => a - b);
  const long = rows
    .filter((r) => chosen.includes(r["track"]!))
    .flatMap((r) => [
      { t: r["t_s"]! / unit.seconds, track: `track ${r["track"]}`, quantity: "halo M", mass: r["M_Msun"]! },
      ...(dims === 3 && r["core_resolved"] === 1 ? [{ t: r["t_s"]! / unit.seconds, track: `track ${r["track"]}`, quantity: "core M_c", mass: r["core_mass_Msun"]! }] : []),
    ]);
  const ya = logAxis(long.map((p) => p.mass));
  const names = chosen.map((t) => `track ${t}`);
  const shown = chosen.length < peak.size ? `the ${chosen.length} most massive of ${peak.size} tracks` : `${peak.size} track${peak.size === 1 ? "" : "s"}`;
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: "Halo tracks", subtitle: `${shown}; solid: halo mass, dashed: core mass (resolved cores)` },
    ...PANEL,
    data: { values: long },
    mark: { type: "line", point: { filled: true, size: 14 }, strokeWidth: 1.4 },
    encoding: {
      x: { field: "t", type: "quantitative", title: `t [${unit.name}]`, scale: { nice: false, zero: false } },
      y: { field: "mass", type: "quantitative", title: "mass [Msun]", scale: { type: "log", domain: ya.domain, nice: false }, axis: { values: ya.values } },
      // lines in the legend, as in the plot
      color: { field: "track", type: "nominal", title: null, scale: { domain: names, scheme: "tableau10" }, legend: { orient: "right", symbolType: "stroke", symbolStrokeWidth: 2 } },
      // the subtitle says which is which (a legend of dash patterns draws no symbol in this renderer)
      strokeDash: { field: "quantity", type: "nominal", title: null, scale: { domain: ["halo M", "core M_c"], range: [[1, 0], [5, 3]] }, legend: null },
      detail: { field: "quantity" },
    },
  } as unknown as TopLevelSpec);
}

/** The halo figures of a run (none when it has no halos): "core-halo" (3D) and "tracks". */
export async function haloFigures(tracks: RunTracks, meta: SnapshotMeta): Promise<Record<string, Figure>> {
  const rows = rowsOf(tracks);
  if (rows.length === 0) return {};
  const dims = meta.cells.length;
  const out: Record<string, Figure> = { tracks: await trackPlot(rows, dims) };
  if (dims === 3) out["core-halo"] = await coreHaloPlot(rows, meta, tracks.definition());
  return out;
}
