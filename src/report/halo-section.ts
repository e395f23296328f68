/**
 * The report's halo section: the catalogue of the last snapshot (the
 * largest halos, with their cores), the core–halo figure with the published
 * relation as an overlay, and the track histories (figure and a table of
 * each track's start and end).
 */
import fs from "node:fs";
import path from "node:path";
import { formatNumber } from "../core/format.js";
import type { Figure } from "./render.js";
import type { RunTracks } from "./halo-track-table.js";
import { esc, figure, table } from "./report-parts.js";

/** Rows of the report's tables at most. */
const MAX_ROWS = 12;

function readTable(file: string): Record<string, number>[] {
  if (!fs.existsSync(file)) return [];
  const [header, ...lines] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = header!.split(",");
  return lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [cols[i]!, Number(v)])));
}

/** The core's radius as text: the fitted value, or "< upper limit". */
function coreRadius(h: Record<string, number>): string {
  if (h["core_resolved"] === 1) return formatNumber(h["core_r_c_kpc"]!);
  return Number.isFinite(h["core_r_c_upper_kpc"]) ? `< ${formatNumber(h["core_r_c_upper_kpc"]!)}` : "—";
}

function catalogueTable(halos: Record<string, number>[], dims: number): string {
  const axes = ["x", "y", "z"].slice(0, dims);
  const largest = [...halos].sort((a, b) => b["M_Msun"]! - a["M_Msun"]!).slice(0, MAX_ROWS);
  const headers = ["halo", "track", ...axes.map((a) => `${a} [kpc]`), "M [Msun]", "R [kpc]", "R [cells]", "σ [km/s]", ...(dims === 3 ? ["core r_c [kpc]", "core mass [Msun]", "relation's core mass [Msun]"] : [])];
  const rows = largest.map((h) => [
    h["halo"],
    h["track"],
    ...axes.map((a) => h[`${a}_kpc`]),
    h["M_Msun"],
    h["R_kpc"],
    h["R_cells"],
    h["sigma_km_s"],
    ...(dims === 3 ? [coreRadius(h), h["core_resolved"] === 1 ? h["core_mass_Msun"] : undefined, h["core_halo_relation_mass_Msun"]] : []),
  ]);
  return table(headers, rows);
}

function trackTable(tracks: RunTracks): string {
  const names = tracks.header().map((c) => c.name);
  const rows = tracks.sortedRows().map((r) => Object.fromEntries(names.map((n, j) => [n, r[j]!])));
  const byTrack = new Map<number, Record<string, number>[]>();
  for (const r of rows) byTrack.set(r["track"]!, [...(byTrack.get(r["track"]!) ?? []), r]);
  const largest = [...byTrack.values()].sort((a, b) => b.at(-1)!["M_Msun"]! - a.at(-1)!["M_Msun"]!).slice(0, MAX_ROWS);
  const body = largest.map((h) => [h[0]!["track"], `${h[0]!["snapshot"]} – ${h.at(-1)!["snapshot"]}`, h.length, h[0]!["M_Msun"], h.at(-1)!["M_Msun"], h.at(-1)!["core_resolved"] === 1 ? h.at(-1)!["core_mass_Msun"] : undefined]);
  return table(["track", "snapshots", "found in", "first M [Msun]", "last M [Msun]", "last core mass [Msun]"], body);
}

/** The section's HTML. */
export function haloSection(lastDir: string | undefined, tracks: RunTracks, figures: Record<string, Figure | undefined>, dims: number): string {
  const halos = lastDir ? readTable(path.join(lastDir, "halos.csv")) : [];
  const count = new Set(tracks.sortedRows().map((r) => r[0])).size;
  const definition = tracks.definition() || "200m";
  const intro = `<p>Spherical-overdensity halos (${esc(definition)}), followed through the snapshots by their main progenitors: ${count} track${count === 1 ? "" : "s"}; the last snapshot has ${halos.length} halo${halos.length === 1 ? "" : "s"}${halos.length > MAX_ROWS ? ` (the ${MAX_ROWS} most massive are listed)` : ""}. Tables: <code>analysis/tracks.csv</code> and each snapshot's <code>halos.csv</code>.</p>`;
  const note =
    dims === 3
      ? `<p class="note">Cores are fitted only where the half-density radius spans 3 cells or more (else an upper limit on r_c); the core mass is the mass inside the fitted r_c. The relation of Schive et al. (2014) is drawn as published, never fitted; it is contested (other slopes and a large scatter in later work).</p>`
      : "";
  if (count === 0) return `<h2 id="halos">Halos</h2>\n${intro}`;
  return `<h2 id="halos">Halos</h2>
${intro}
${catalogueTable(halos, dims)}${note}
<div class="figs">${figure(figures["core-halo"], "Measured core mass against halo mass for every resolved halo and snapshot, with the published relation (dashed) at each snapshot.")}${figure(figures["tracks"], "Halo and core mass of the most massive tracks against time.")}</div>
<h3>Tracks</h3>
${trackTable(tracks)}`;
}
