/** Pictures of the field diagnostics: energy spectra, vortices, granules and the Husimi distribution. */
import { figuresTogether, renderChart, type Figure } from "./render.js";
import { categoryColours } from "./chart/palette.js";
import type { Series } from "./chart/chart.js";
import { colourRange, fieldFigure } from "./field-image.js";
import { powerPlot } from "./plots.js";
import { formatNumber } from "../core/format.js";
import { rangedFigure } from "./phase-space-figure.js";
import type { FieldDiagnosticsResult, PhysicalScales } from "./field-diagnostics.js";
import type { LoadedField } from "../simulation/from-snapshot.js";

/** Named series of one colour scale: each name's colour, and its legend entries in sorted order. */
function named(names: Iterable<string>): { colour: (n: string) => string; entries: { label: string; colour: string }[] } {
  const colours = categoryColours(names);
  return { colour: (n) => colours.get(n)!, entries: [...colours].map(([label, colour]) => ({ label, colour })) };
}

/** Rows grouped by a key into series, in the order the keys first appear. */
function groups<R>(rows: readonly R[], key: (r: R) => string): Map<string, R[]> {
  const out = new Map<string, R[]>();
  for (const r of rows) (out.get(key(r)) ?? out.set(key(r), []).get(key(r))!).push(r);
  return out;
}

/** Shell spectra of the three kinetic parts, log–log. */
function energySpectraPlot(split: NonNullable<FieldDiagnosticsResult["split"]>, s: PhysicalScales, caption: string): Promise<Figure> {
  const parts = ["quantum", "incompressible", "compressible"] as const;
  const rows = split.spectra.flatMap((b) => parts.map((part) => ({ k: b.k / s.kpc, E: b[part] * s.energy, part })));
  const peak = Math.max(...rows.map((r) => r.E));
  const shown = groups(rows.filter((r) => r.E > 1e-12 * peak), (r) => r.part);
  // the parts with something to show, in the legend and in the colours
  const { colour, entries } = named(shown.keys());
  const series: Series[] = [...shown].map(([part, rs]) => ({ name: part, colour: colour(part), x: rs.map((r) => r.k), y: rs.map((r) => r.E), mark: "line-points", size: 12 }));
  return renderChart({
    title: caption,
    panels: [{ width: 420, height: 260, x: { title: "k [1/kpc]", log: true }, y: { title: "energy per shell [Msun (km/s)²]", log: true }, series }],
    legend: { orient: "right", entries, symbol: "circle", outline: true },
  });
}

/** 2D vortex positions coloured by charge, over the box. */
function vortexScatter(points: { x: number; y: number; charge: string }[], box: readonly number[], caption: string): Promise<Figure> {
  const charges = [
    ["+1", "#c0392b"],
    ["−1", "#2471a3"],
  ] as const;
  const series: Series[] = charges.map(([charge, colour]) => {
    const pts = points.filter((p) => p.charge === charge);
    return { name: charge, colour, x: pts.map((p) => p.x), y: pts.map((p) => p.y), mark: "points", size: 14 };
  });
  return renderChart({
    title: caption,
    panels: [{ width: 360, height: Math.round((360 * box[1]!) / box[0]!), x: { title: "x [kpc]", domain: [0, box[0]!], nice: false }, y: { title: "y [kpc]", domain: [0, box[1]!], nice: false }, series }],
    legend: { orient: "right", title: "charge", entries: charges.map(([label, colour]) => ({ label, colour })), symbol: "circle", opacity: 0.7 },
  });
}

/** The density PDF against the exponential and Gamma laws, and ξ(r) against the random-phase law. */
function granulePlot(g: NonNullable<FieldDiagnosticsResult["granules"]>, s: PhysicalScales, caption: string): Promise<Figure> {
  const [measured, exponential, gamma, phase] = ["measured", "exponential (random phase)", `Gamma, shape ${formatNumber(g.gammaShape)}`, "random phase, ħ/(m a σ)"];
  const { colour, entries } = named([measured, exponential, gamma, phase]);
  const pdf = g.pdf.filter((b) => b.pdf > 0);
  // the laws down to two decades below the smallest measured bin: a narrow PDF's Gamma law falls through tens of
  // decades within the bins, and the log axis would flatten the measured points against its top
  const floor = pdf.length ? Math.min(...pdf.map((b) => b.pdf)) / 100 : 0;
  const law = (name: string, rows: { x: number; p: number }[], mark: Series["mark"]): Series => {
    const shown = rows.filter((r) => r.p > 0 && r.p >= floor);
    return { name, colour: colour(name), x: shown.map((r) => r.x), y: shown.map((r) => r.p), mark, size: 20 };
  };
  const reach = 6 * (Number.isFinite(g.correlationLength) ? g.correlationLength : g.predictedLength) * s.kpc;
  const xi = g.correlation.filter((c) => c.r * s.kpc <= reach);
  const xiSeries = (name: string, value: (c: (typeof xi)[number]) => number): Series => ({ name, colour: colour(name), x: xi.map((c) => c.r * s.kpc), y: xi.map(value), mark: "line" });
  return renderChart({
    title: caption,
    panels: [
      {
        width: 420,
        height: 180,
        x: { title: "ρ/ρ̄" },
        y: { title: "PDF", log: true },
        series: [law(measured, pdf.map((b) => ({ x: b.x, p: b.pdf })), "points"), law(exponential, g.pdf.map((b) => ({ x: b.x, p: b.exponential })), "line"), law(gamma, g.pdf.map((b) => ({ x: b.x, p: b.gamma })), "line")],
      },
      { width: 420, height: 180, x: { title: "r [kpc]" }, y: { title: "ξ(r) = ⟨δ(x)δ(x+r)⟩" }, series: [xiSeries(measured, (c) => c.xi), xiSeries(phase, (c) => c.predicted)] },
    ],
    legend: { orient: "right", entries, symbol: "circle", outline: true, opacity: 0.7 },
  });
}

/** Speed distributions of the Husimi function at the chosen points. */
function speedPlot(points: NonNullable<FieldDiagnosticsResult["husimiPoints"]>, d: number, caption: string): Promise<Figure> {
  const peak = Math.max(...points.flatMap((p) => p.speed.map((b) => b.F)));
  const label = (p: (typeof points)[number], i: number) => `${i + 1}: (${p.point.map((x) => formatNumber(x)).join(", ")}) kpc`;
  const { colour, entries } = named(points.map(label));
  const series: Series[] = points.map((p, i) => {
    const shown = p.speed.filter((b) => b.F > 1e-4 * peak);
    return { name: label(p, i), colour: colour(label(p, i)), x: shown.map((b) => b.v), y: shown.map((b) => b.F), mark: "line" };
  });
  return renderChart({
    title: caption,
    panels: [{ width: 420, height: 240, x: { title: "speed |v| [km/s]" }, y: { title: `F(|v|) [Msun/(kpc${d === 2 ? "²" : "³"} km/s)]` }, series }],
    legend: { orient: "right", entries, symbol: "line" },
  });
}

/** The energy split's pictures (energy-spectra, velocity-power): started as soon as the split is measured, before the other diagnostics. */
export function splitFigures(field: LoadedField, split: NonNullable<FieldDiagnosticsResult["split"]>, s: PhysicalScales, caption: string): Record<string, Promise<Figure>> {
  const d = field.grid.dims;
  const vp = split.spectra.map((b) => ({ k: b.k / s.kpc, P: b.velocityPower * s.kms * s.kms * s.kpc ** d }));
  const peak = Math.max(...vp.map((b) => b.P));
  return {
    "energy-spectra": energySpectraPlot(split, s, `kinetic energy spectra, ${caption}`),
    "velocity-power": powerPlot(vp.filter((b) => b.P > 1e-12 * peak), undefined, "k [1/kpc]", `P_u(k) [(km/s)² kpc${d === 1 ? "" : d === 2 ? "²" : "³"}]`, `power of √(ρ/ρ̄) v, ${caption}`),
  };
}

/** The vortices' picture: positions coloured by charge (2D), or the line length projected along x (3D). Started as soon as the census is known (`diagnosticFigures` draws it otherwise). */
export function vortexFigure(field: LoadedField, vortices: NonNullable<FieldDiagnosticsResult["vortices"]>, s: PhysicalScales, caption: string): Promise<Figure> {
  const box = field.grid.lengths.map((l) => l * s.kpc);
  if (field.grid.dims === 2) {
    const pts = vortices.points.map((p) => ({ x: p.position[0]! * s.kpc, y: p.position[1]! * s.kpc, charge: p.charge > 0 ? "+1" : "−1" }));
    return vortexScatter(pts, box, `${vortices.positive + vortices.negative} vortices, ${caption}`);
  }
  const [, n1, n2] = field.grid.shape;
  const area = field.grid.spacing[1] * field.grid.spacing[2] * s.kpc * s.kpc;
  const values = Float64Array.from(vortices.projection, (v) => (v * s.kpc) / area);
  // no line at all: said in the title, on a colour bar from 0 (line length is never negative)
  const none = values.every((v) => v === 0);
  return fieldFigure(
    { nx: n2, ny: n1, values, x0: 0, y0: 0, width: box[2]!, height: box[1]! },
    { xTitle: "z [kpc]", yTitle: "y [kpc]", legend: "line length / area [1/kpc]", title: none ? "No vortex lines (projected along x)" : "Vortex lines projected along x", subtitle: caption, range: none ? [0, 1] : colourRange(values, Infinity), colourMap: "viridis" },
  );
}

/** Every picture of the field diagnostics, keyed by file name (without .png); `started` holds those begun already (`splitFigures`, `vortexFigure`). */
export async function diagnosticFigures(field: LoadedField, r: FieldDiagnosticsResult, s: PhysicalScales, caption: string, started: Record<string, Promise<Figure>> = {}): Promise<Record<string, Figure>> {
  const box = field.grid.lengths.map((l) => l * s.kpc);
  const d = field.grid.dims;
  const figures: Record<string, Promise<Figure>> = { ...(r.split && !started["energy-spectra"] ? splitFigures(field, r.split, s, caption) : {}), ...started };
  if (r.vortices && !started["vortices"]) figures["vortices"] = vortexFigure(field, r.vortices, s, caption);
  if (r.granules) figures["granules"] = granulePlot(r.granules, s, `granules, ${caption}`);
  if (r.husimiImage) {
    const im = r.husimiImage;
    figures["husimi"] = rangedFigure(
      { nx: im.x.length, ny: im.v.length, values: im.log10f, x: [0, box[0]!], y: [im.v[0]!, im.v[im.v.length - 1]!] },
      { xTitle: "x [kpc]", yTitle: "v [km/s]", legend: "log₁₀ f [Msun/(kpc km/s)]", caption: `Husimi f(x, v), η = ${formatNumber(r.eta! * s.kpc)} kpc, ${caption}`, decades: 8 },
    );
  }
  if (r.husimiPoints) figures["husimi-points"] = speedPlot(r.husimiPoints, d, `Husimi speed distribution, η = ${formatNumber(r.eta! * s.kpc)} kpc, ${caption}`);
  return figuresTogether(figures);
}
