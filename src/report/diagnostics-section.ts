/** The report's field-diagnostics section: the energy split, vortices, granules and the Husimi distribution of the last snapshot. */
import type { SnapshotAnalysis } from "./analyze.js";
import type { Figure } from "./render.js";
import { formatNumber } from "../core/format.js";

/** The report's own picture and escaping helpers, so the section looks like the rest of the page. */
export interface HtmlParts {
  img(fig: Figure | undefined, alt: string): string;
  esc(s: string): string;
}

const num = (v: unknown) => (typeof v === "number" ? formatNumber(v) : "—");

/** One sentence per diagnostic from a snapshot's summary.json. */
function sentences(summary: Record<string, unknown>): string[] {
  const out: string[] = [];
  const e = summary["energy_split_Msun_km2_s2"] as Record<string, number> | undefined;
  if (e) {
    const share = (x: number) => `${((100 * x) / e["kinetic"]!).toFixed(1)}%`;
    out.push(`Kinetic energy ${num(e["kinetic"])} Msun (km/s)²: quantum ${share(e["quantum"]!)}, incompressible ${share(e["incompressible"]!)}, compressible ${share(e["compressible"]!)}, unresolved (Nyquist) ${share(e["unresolved_nyquist"]!)}.`);
  }
  const v = summary["vortices"] as Record<string, number> | undefined;
  if (v) {
    out.push(
      v["line_length_kpc"] !== undefined
        ? `Vortex lines: ${num(v["line_length_kpc"])} kpc in all, ${num(v["line_length_per_volume_per_kpc2"])} kpc per kpc³.`
        : `Vortices: ${v["count"]} (${v["positive"]} positive, ${v["negative"]} negative), ${num(v["per_area_per_kpc2"])} per kpc².`,
    );
  }
  const g = summary["granules"] as Record<string, number> | undefined;
  if (g) {
    out.push(
      `Granules: density variance ${num(g["density_variance"])} (1 for a random-phase field), correlation length ${num(g["correlation_length_kpc"])} kpc against ħ/(m a σ) = ${num(g["random_phase_length_kpc"])} kpc for σ = ${num(g["velocity_dispersion_1d_km_s"])} km/s; ` +
        (typeof g["quasi_particle_mass_Msun"] === "number"
          ? `quasi-particle mass ${num(g["quasi_particle_mass_Msun"])} Msun.`
          : `quasi-particle mass not measured (no correlation length, or three of them exceed half the box).`),
    );
  }
  const h = summary["husimi"] as Record<string, unknown> | undefined;
  if (h) out.push(`Husimi window η = ${num(h["window_kpc"])} kpc${typeof h["wehrl_entropy"] === "number" ? `, Wehrl entropy ${num(h["wehrl_entropy"])} (at least the dimension; equal for a coherent state)` : ""}.`);
  return out;
}

/** The section's HTML (empty when no field diagnostic ran). */
export function diagnosticsSection(first: SnapshotAnalysis | undefined, last: SnapshotAnalysis | undefined, { img, esc }: HtmlParts): string {
  if (!last) return "";
  const f = last.figures;
  const lines = sentences(last.summary);
  if (lines.length === 0) return "";
  return `<h2 id="diagnostics">Field diagnostics at the end</h2>
<ul>${lines.map((l) => `<li>${esc(l)}</li>`).join("")}</ul>
${img(f["energy-spectra"], "kinetic energy spectra: quantum, incompressible, compressible")}${img(f["velocity-power"], "power spectrum of the density-weighted velocity")}
${img(f["vortices"], "vortices")}${img(f["granules"], "granules: density PDF and correlation")}
${img(first?.figures["husimi"], "Husimi phase space at the start")}${img(f["husimi"], "Husimi phase space at the end")}${img(f["husimi-points"], "Husimi speed distribution")}`;
}
