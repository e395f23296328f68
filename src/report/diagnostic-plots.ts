/** Pictures of the field diagnostics: energy spectra, vortices, granules and the Husimi distribution. */
import type { TopLevelSpec } from "vega-lite";
import { figuresTogether, renderVegaLite, type Figure } from "./render.js";
import { colourRange, fieldFigure } from "./field-image.js";
import { powerPlot } from "./plots.js";
import { rangedFigure } from "./phase-space-figure.js";
import type { FieldDiagnosticsResult, PhysicalScales } from "./field-diagnostics.js";
import type { LoadedField } from "../simulation/from-snapshot.js";

const SCHEMA = "https://vega.github.io/schema/vega-lite/v5.json";

/** Shell spectra of the three kinetic parts, log–log. */
function energySpectraPlot(split: NonNullable<FieldDiagnosticsResult["split"]>, s: PhysicalScales, caption: string): Promise<Figure> {
  const rows = split.spectra.flatMap((b) =>
    (
      [
        ["quantum", b.quantum],
        ["incompressible", b.incompressible],
        ["compressible", b.compressible],
      ] as const
    ).map(([part, e]) => ({ k: b.k / s.kpc, E: e * s.energy, part })),
  );
  const peak = Math.max(...rows.map((r) => r.E));
  return renderVegaLite({
    $schema: SCHEMA,
    title: caption,
    width: 420,
    height: 260,
    data: { values: rows.filter((r) => r.E > 1e-12 * peak) },
    mark: { type: "line", point: { size: 12 } },
    encoding: {
      x: { field: "k", type: "quantitative", scale: { type: "log" }, title: "k [1/kpc]" },
      y: { field: "E", type: "quantitative", scale: { type: "log" }, title: "energy per shell [Msun (km/s)²]" },
      color: { field: "part", type: "nominal", title: null },
    },
  } as TopLevelSpec);
}

/** 2D vortex positions coloured by charge, over the box. */
function vortexScatter(points: { x: number; y: number; charge: string }[], box: readonly number[], caption: string): Promise<Figure> {
  return renderVegaLite({
    $schema: SCHEMA,
    title: caption,
    width: 360,
    height: Math.round((360 * box[1]!) / box[0]!),
    data: { values: points },
    mark: { type: "point", filled: true, size: 14 },
    encoding: {
      x: { field: "x", type: "quantitative", scale: { domain: [0, box[0]!], nice: false }, title: "x [kpc]" },
      y: { field: "y", type: "quantitative", scale: { domain: [0, box[1]!], nice: false }, title: "y [kpc]" },
      color: { field: "charge", type: "nominal", scale: { domain: ["+1", "−1"], range: ["#c0392b", "#2471a3"] }, title: "charge" },
    },
  } as TopLevelSpec);
}

/** The density PDF against the exponential and Gamma laws, and ξ(r) against the random-phase law. */
function granulePlot(g: NonNullable<FieldDiagnosticsResult["granules"]>, s: PhysicalScales, caption: string): Promise<Figure> {
  const pdf = g.pdf.flatMap((b) => [
    { x: b.x, p: b.pdf, law: "measured" },
    { x: b.x, p: b.exponential, law: "exponential (random phase)" },
    { x: b.x, p: b.gamma, law: `Gamma, shape ${g.gammaShape.toPrecision(3)}` },
  ]);
  const xi = g.correlation.flatMap((c) => [
    { r: c.r * s.kpc, xi: c.xi, law: "measured" },
    { r: c.r * s.kpc, xi: c.predicted, law: "random phase, ħ/(m a σ)" },
  ]);
  return renderVegaLite({
    $schema: SCHEMA,
    title: caption,
    vconcat: [
      {
        width: 420,
        height: 180,
        data: { values: pdf.filter((r) => r.p > 0) },
        encoding: {
          x: { field: "x", type: "quantitative", title: "ρ/ρ̄" },
          y: { field: "p", type: "quantitative", scale: { type: "log" }, title: "PDF" },
          color: { field: "law", type: "nominal", title: null, legend: { labelLimit: 400 } },
        },
        layer: [
          { transform: [{ filter: "datum.law === 'measured'" }], mark: { type: "point", filled: true, size: 20 } },
          { transform: [{ filter: "datum.law !== 'measured'" }], mark: { type: "line" } },
        ],
      },
      {
        width: 420,
        height: 180,
        data: { values: xi.filter((r) => r.r <= 6 * (Number.isFinite(g.correlationLength) ? g.correlationLength : g.predictedLength) * s.kpc) },
        mark: { type: "line" },
        encoding: {
          x: { field: "r", type: "quantitative", title: "r [kpc]" },
          y: { field: "xi", type: "quantitative", title: "ξ(r) = ⟨δ(x)δ(x+r)⟩" },
          color: { field: "law", type: "nominal", title: null, legend: { labelLimit: 400 } },
        },
      },
    ],
  } as TopLevelSpec);
}

/** Speed distributions of the Husimi function at the chosen points. */
function speedPlot(points: NonNullable<FieldDiagnosticsResult["husimiPoints"]>, d: number, caption: string): Promise<Figure> {
  const peak = Math.max(...points.flatMap((p) => p.speed.map((b) => b.F)));
  const rows = points.flatMap((p, i) => p.speed.filter((b) => b.F > 1e-4 * peak).map((b) => ({ v: b.v, F: b.F, point: `${i + 1}: (${p.point.map((x) => x.toPrecision(3)).join(", ")}) kpc` })));
  return renderVegaLite({
    $schema: SCHEMA,
    title: caption,
    width: 420,
    height: 240,
    data: { values: rows },
    mark: { type: "line" },
    encoding: {
      x: { field: "v", type: "quantitative", title: "speed |v| [km/s]" },
      y: { field: "F", type: "quantitative", title: `F(|v|) [Msun/(kpc${d === 2 ? "²" : "³"} km/s)]` },
      color: { field: "point", type: "nominal", title: null, legend: { labelLimit: 400 } },
    },
  } as TopLevelSpec);
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

/** Every picture of the field diagnostics, keyed by file name (without .png); `started` holds those begun already (`splitFigures`). */
export async function diagnosticFigures(field: LoadedField, r: FieldDiagnosticsResult, s: PhysicalScales, caption: string, started: Record<string, Promise<Figure>> = {}): Promise<Record<string, Figure>> {
  const box = field.grid.lengths.map((l) => l * s.kpc);
  const d = field.grid.dims;
  const figures: Record<string, Promise<Figure>> = { ...(r.split && !started["energy-spectra"] ? splitFigures(field, r.split, s, caption) : {}), ...started };
  if (r.vortices && d === 2) {
    const pts = r.vortices.points.map((p) => ({ x: p.position[0]! * s.kpc, y: p.position[1]! * s.kpc, charge: p.charge > 0 ? "+1" : "−1" }));
    figures["vortices"] = vortexScatter(pts, box, `${r.vortices.positive + r.vortices.negative} vortices, ${caption}`);
  } else if (r.vortices) {
    const [, n1, n2] = field.grid.shape;
    const area = field.grid.spacing[1] * field.grid.spacing[2] * s.kpc * s.kpc;
    const values = Float64Array.from(r.vortices.projection, (v) => (v * s.kpc) / area);
    figures["vortices"] = fieldFigure(
      { nx: n2, ny: n1, values, x0: 0, y0: 0, width: box[2]!, height: box[1]! },
      { xTitle: "z [kpc]", yTitle: "y [kpc]", legend: "line length / area [1/kpc]", title: "Vortex lines projected along x", subtitle: caption, range: colourRange(values, Infinity), colourMap: "viridis" },
    );
  }
  if (r.granules) figures["granules"] = granulePlot(r.granules, s, `granules, ${caption}`);
  if (r.husimiImage) {
    const im = r.husimiImage;
    figures["husimi"] = rangedFigure(
      { nx: im.x.length, ny: im.v.length, values: im.log10f, x: [0, box[0]!], y: [im.v[0]!, im.v[im.v.length - 1]!] },
      { xTitle: "x [kpc]", yTitle: "v [km/s]", legend: "log₁₀ f [Msun/(kpc km/s)]", caption: `Husimi f(x, v), η = ${(r.eta! * s.kpc).toPrecision(3)} kpc, ${caption}`, decades: 8 },
    );
  }
  if (r.husimiPoints) figures["husimi-points"] = speedPlot(r.husimiPoints, d, `Husimi speed distribution, η = ${(r.eta! * s.kpc).toPrecision(3)} kpc, ${caption}`);
  return figuresTogether(figures);
}
