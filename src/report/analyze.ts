/**
 * psibox analyze: diagnostics and pictures of snapshots and runs, in
 * physical units. For each snapshot: power.csv, pdf.csv, peaks.csv (with the
 * soliton core fit and the core relation's prediction), profiles.csv,
 * summary.json, and slice.png, projection.png (3D) and power.png. For a run:
 * energies.png and clocks.png from the time series, a space–time image for
 * 1D runs, and optionally numbered frames for a movie.
 */
import fs from "node:fs";
import path from "node:path";
import { readSnapshot, type Snapshot } from "../io/snapshot.js";
import { writeFileAtomic } from "../io/atomic.js";
import { loadField, fieldStats, type LoadedField } from "../simulation/from-snapshot.js";
import { densestPoints, densityPdf, densityPowerSpectrum, fitCoreProfile, kineticSplit, radialProfile } from "../diagnostics/analysis.js";
import { KG_PER_EV, M_SUN_KG, PC_M } from "../physics/constants.js";
import { fieldFigure, type Plane } from "./field-image.js";
import { clocksPlot, powerPlot, seriesPlot } from "./plots.js";
import type { Figure } from "./render.js";
import { csvTable as csv } from "./csv-table.js";
import { checkDiagnostics, type DiagnosticRequest } from "./diagnostic-options.js";
import { fieldDiagnostics, physicalScales } from "./field-diagnostics.js";
import { diagnosticFigures } from "./diagnostic-plots.js";

const KPC = 1e3 * PC_M;

/** What analysing one snapshot produced. */
export interface SnapshotAnalysis {
  readonly file: string;
  readonly dir: string;
  readonly summary: Record<string, unknown>;
  readonly figures: Record<string, Figure>;
}

function caption(snap: Snapshot): string {
  const m = snap.meta;
  return `${path.basename(m.kind === "checkpoint" ? "checkpoint" : "snapshot")} step ${m.step}, t = ${m.time.toPrecision(4)} ${m.timeUnit}${m.redshift !== null ? `, z = ${m.redshift.toFixed(2)}` : ""}`;
}

/** log₁₀ density planes: the middle slice through the densest cell's height and the projection (mean) along the first internal axis. */
function planes(field: LoadedField, kpcPerCode: number, densityUnit: number): { slice: Plane; projection?: Plane; line?: { x: number; rho: number }[] } {
  const { grid, psi } = field;
  const [n0, n1, n2] = grid.shape;
  const rho = (p: number) => (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2) * densityUnit;
  if (grid.dims === 1) {
    return {
      slice: { nx: n2, ny: 1, values: Float64Array.from({ length: n2 }, (_, i) => Math.log10(Math.max(rho(i), 1e-300))), width: grid.lengths[0]! * kpcPerCode, height: 1 },
      line: Array.from({ length: n2 }, (_, i) => ({ x: grid.coordinate(2, i) * kpcPerCode, rho: rho(i) })),
    };
  }
  const width = grid.extent[2] * kpcPerCode;
  const height = grid.extent[1] * kpcPerCode;
  const peak = densestPoints(grid, psi, 1, 1)[0]!;
  const a0 = grid.dims === 3 ? Math.floor(peak.index / (n1 * n2)) : 0;
  const slice = new Float64Array(n1 * n2);
  const proj = new Float64Array(n1 * n2);
  for (let b = 0; b < n1; b++)
    for (let c = 0; c < n2; c++) {
      slice[b * n2 + c] = Math.log10(Math.max(rho((a0 * n1 + b) * n2 + c), 1e-300));
      let s = 0;
      for (let a = 0; a < n0; a++) s += rho((a * n1 + b) * n2 + c);
      proj[b * n2 + c] = Math.log10(Math.max(s / n0, 1e-300));
    }
  const out: { slice: Plane; projection?: Plane } = { slice: { nx: n2, ny: n1, values: slice, width, height } };
  if (grid.dims === 3) out.projection = { nx: n2, ny: n1, values: proj, width, height };
  return out;
}

/** Analyse one snapshot into `outDir` (created), with the field diagnostics of `request`. */
export async function analyzeSnapshot(file: string, outDir: string, withPictures = true, request: DiagnosticRequest = {}): Promise<SnapshotAnalysis> {
  const snap = readSnapshot(file);
  const chosen = checkDiagnostics(request, snap.meta.cells.length, snap.meta.boxSizeKpc, snap.meta.cells, file);
  const field = loadField(snap);
  const { grid, units, psi } = field;
  const a = field.scaleFactor;
  const kpcPerCode = units.lengthM / KPC;
  const densityUnit = (units.massKg / units.lengthM ** 3) / (M_SUN_KG / KPC ** 3);
  const energyUnit = units.energyJ / (M_SUN_KG * 1e6);
  const kms = units.lengthM / units.timeS / 1e3;
  fs.mkdirSync(outDir, { recursive: true });

  const power = densityPowerSpectrum(grid, psi);
  writeFileAtomic(path.join(outDir, "power.csv"), powerTable(power, kpcPerCode, grid.dims, snap.meta.background.kind === "lcdm" ? snap.meta.background.hubbleKmSMpc / 100 : undefined));
  const pdf = densityPdf(psi);
  writeFileAtomic(path.join(outDir, "pdf.csv"), csv(["log10_density_contrast", "volume_fraction", "mass_fraction"], pdf.map((p) => [p.log10Contrast, p.volumeFraction, p.massFraction])));

  const stats = fieldStats(field);
  const split = kineticSplit(grid, psi, a);
  const m22over10 = units.particleMassKg / KG_PER_EV / 1e-23; // m / 1e-23 eV
  const peaks = densestPoints(grid, psi, 5, Math.max(4, grid.cells[0]! / 16));
  const profileRows: (number | string)[][] = [];
  const peakRows = peaks.map((p, i) => {
    const rMax = Math.min(...grid.lengths) / 4;
    const profile = radialProfile(grid, psi, p.coords, rMax);
    for (const q of profile) profileRows.push([i + 1, q.r * kpcPerCode, q.density * densityUnit, q.cells]);
    let fit: { rhoC: number; rC: number; rms: number } | undefined;
    if (grid.dims === 3) {
      try {
        const half = profile.find((q) => q.density < p.density / 2)?.r ?? rMax;
        fit = fitCoreProfile(profile, 2 * half);
      } catch {
        fit = undefined;
      }
    }
    const rcKpc = fit ? fit.rC * kpcPerCode : NaN;
    // Schive, Chiueh & Broadhurst 2014: ρ_c = 1.9 (m/1e-23 eV)^-2 (r_c/kpc)^-4 Msun/pc³
    const predicted = fit ? 1.9e9 * Math.pow(m22over10, -2) * Math.pow(rcKpc, -4) : NaN;
    return [i + 1, ...[0, 1, 2].map((ax) => (p.coords[ax] ?? NaN) * kpcPerCode), p.density * densityUnit, fit ? fit.rhoC * densityUnit : NaN, rcKpc, predicted, fit ? fit.rms : NaN];
  });
  writeFileAtomic(
    path.join(outDir, "peaks.csv"),
    csv(["peak", "x_kpc", "y_kpc", "z_kpc", "density_Msun_kpc3", "core_fit_rho_c_Msun_kpc3", "core_fit_r_c_kpc", "core_relation_rho_c_Msun_kpc3", "core_fit_rms_ln"], peakRows),
  );
  writeFileAtomic(path.join(outDir, "profiles.csv"), csv(["peak", "r_kpc", "density_Msun_kpc3", "cells"], profileRows));
  const summary = {
    file,
    step: snap.meta.step,
    time: snap.meta.time,
    time_unit: snap.meta.timeUnit,
    scale_factor: a,
    redshift: snap.meta.redshift,
    mass_Msun: stats.massMsun,
    density_Msun_kpc3: { min: stats.minDensityMsunKpc3, mean: stats.meanDensityMsunKpc3, max: stats.maxDensityMsunKpc3 },
    energies_Msun_km2_s2: {
      kinetic: split.kinetic * energyUnit,
      kinetic_bulk_flow: split.bulk * energyUnit,
      kinetic_quantum_gradient: split.quantum * energyUnit,
      potential: stats.potentialMsunKm2S2,
      total: split.kinetic * energyUnit + stats.potentialMsunKm2S2,
    },
    virial_ratio: stats.virialRatio,
    velocity_dispersion_km_s: split.velocityDispersion * kms,
    mean_velocity_km_s: split.meanVelocity.map((v) => v * kms),
    densest_points: peakRows.length,
    core_fit: grid.dims === 3 && peakRows[0] ? { rho_c_Msun_kpc3: peakRows[0][5], r_c_kpc: peakRows[0][6], relation_rho_c_Msun_kpc3: peakRows[0][7] } : null,
  };
  const diagnostics = fieldDiagnostics(field, chosen, outDir, request.husimiWindowKpc, request.husimiPointsKpc);
  Object.assign(summary, diagnostics.summary);
  writeFileAtomic(path.join(outDir, "summary.json"), JSON.stringify(summary, null, 2) + "\n");

  const figures: Record<string, Figure> = {};
  if (withPictures) {
    const pl = planes(field, kpcPerCode, densityUnit);
    const legend = "log₁₀ ρ [Msun/kpc³]";
    if (pl.line) {
      figures["slice"] = await seriesPlot(pl.line.map((q) => ({ x: q.x, rho: q.rho })), "x", "x [kpc]", [{ field: "rho", label: "ρ" }], "ρ [Msun/kpc³]", caption(snap));
    } else {
      figures["slice"] = await fieldFigure(pl.slice, { xTitle: "x [kpc]", yTitle: "y [kpc]", legend, caption: `${grid.dims === 3 ? "slice through the densest cell, " : ""}${caption(snap)}` });
      if (pl.projection) figures["projection"] = await fieldFigure(pl.projection, { xTitle: "x [kpc]", yTitle: "y [kpc]", legend: "log₁₀ ⟨ρ⟩ [Msun/kpc³]", caption: `projection, ${caption(snap)}` });
    }
    const linear = linearPrediction(file, field);
    // bins at round-off level (a field with a few modes) would only stretch the log axis
    const maxP = Math.max(...power.map((b) => b.power));
    figures["power"] = await powerPlot(
      power.filter((b) => b.power > 1e-12 * maxP).map((b) => ({ k: b.k / kpcPerCode, P: b.power * kpcPerCode ** grid.dims })),
      linear,
      "k [1/kpc]",
      `P(k) [kpc${["", "", "²", "³"][grid.dims]}]`,
      `density power spectrum, ${caption(snap)}`,
    );
    Object.assign(figures, await diagnosticFigures(field, diagnostics, physicalScales(field), caption(snap)));
    for (const [name, fig] of Object.entries(figures)) writeFileAtomic(path.join(outDir, `${name}.png`), fig.png);
  }
  return { file, dir: outDir, summary, figures };
}

/**
 * power.csv: k [1/kpc], P [kpc^d], modes, and the dimensionless power per ln k,
 * Δ²(k) = k³P/(2π²) in 3D (k²P/(2π) in 2D, kP/π in 1D); for comoving runs also
 * k [h/Mpc] and P [(Mpc/h)^d] (comoving).
 */
function powerTable(power: readonly { k: number; power: number; modes: number }[], kpcPerCode: number, dims: number, littleH: number | undefined): string {
  const delta2 = (k: number, p: number) => (dims === 3 ? (k ** 3 * p) / (2 * Math.PI ** 2) : dims === 2 ? (k ** 2 * p) / (2 * Math.PI) : (k * p) / Math.PI);
  const u = dims === 1 ? "" : String(dims);
  const header = ["k_per_kpc", `P_kpc${u}`, "modes", "Delta2"];
  if (littleH !== undefined) header.push("k_h_per_Mpc", `P_Mpc${u}_per_h${u}`);
  return csv(
    header,
    power.map((b) => {
      const k = b.k / kpcPerCode;
      const p = b.power * kpcPerCode ** dims;
      const row = [k, p, b.modes, delta2(b.k, b.power)];
      if (littleH !== undefined) row.push((k * 1e3) / littleH, p * 1e-3 ** dims * littleH ** dims);
      return row;
    }),
  );
}

/** The linear prediction for a cosmological run: its initial-power.csv (beside snapshots/) scaled by D(a)²/D(1)². */
function linearPrediction(file: string, field: LoadedField): { k: number; P: number }[] | undefined {
  const table = path.join(path.dirname(path.dirname(path.resolve(file))), "initial-power.csv");
  if (!fs.existsSync(table) || field.background.kind !== "lcdm") return undefined;
  const g = field.background.growth(field.scaleFactor) / field.background.growth(1);
  const lines = fs.readFileSync(table, "utf8").trim().split("\n").slice(1);
  // columns: k [h/Mpc], k [1/Mpc], …, P_z0 [Mpc³] (5th): to 1/kpc and kpc³; the suppressed tail (below 1e-8 of the peak) is left out
  const rows = lines.map((l) => {
    const c = l.split(",").map(Number);
    return { k: c[1]! / 1e3, P: c[4]! * 1e9 * g * g };
  });
  const peak = Math.max(...rows.map((r) => r.P));
  return rows.filter((r) => r.P > 1e-8 * peak);
}

/** Analyse a run folder (or a list of snapshots): every snapshot, plus run-level figures. */
export async function analyzeRun(runDir: string, outDir: string, options: { frames?: boolean; pictures?: boolean; diagnostics?: DiagnosticRequest } = {}): Promise<{ snapshots: SnapshotAnalysis[]; figures: Record<string, Figure> }> {
  const snapDir = path.join(runDir, "snapshots");
  const files = fs.readdirSync(snapDir).filter((f) => /^snap_\d{5}\.h5$/.test(f)).sort().map((f) => path.join(snapDir, f));
  const snapshots: SnapshotAnalysis[] = [];
  for (const f of files) snapshots.push(await analyzeSnapshot(f, path.join(outDir, path.basename(f, ".h5")), options.pictures !== false, options.diagnostics));
  const figures: Record<string, Figure> = {};
  const seriesFile = path.join(runDir, "timeseries.csv");
  if (options.pictures !== false && fs.existsSync(seriesFile)) {
    const [header, ...lines] = fs.readFileSync(seriesFile, "utf8").trim().split("\n");
    const cols = header!.split(",");
    const rows = lines.map((l) => Object.fromEntries(l.split(",").map((v, i) => [cols[i]!, cols[i] === "limiter" ? v : Number(v)])));
    const tCol = cols.find((c) => c.startsWith("t_"))!;
    const tTitle = `t [${tCol.slice(2)}]`;
    figures["energies"] = await seriesPlot(
      rows,
      tCol,
      tTitle,
      [
        { field: "kinetic_Msun_km2_s2", label: "kinetic K" },
        { field: "potential_Msun_km2_s2", label: "potential W" },
        { field: "total_Msun_km2_s2", label: "K + W" },
      ],
      "energy [Msun (km/s)²]",
      "energies",
    );
    if (cols.includes("squeezing_dB")) {
      const lnN = Math.log(Number(rows[0]!["particles_N"]));
      figures["clocks"] = await clocksPlot(rows, tCol, tTitle, lnN, "quantum sidecar: squeezing, mean field, breakdown");
    }
    for (const [name, fig] of Object.entries(figures)) writeFileAtomic(path.join(outDir, `${name}.png`), fig.png);
  }
  if (options.frames && files.length > 0) {
    const frameDir = path.join(outDir, "frames");
    fs.mkdirSync(frameDir, { recursive: true });
    snapshots.forEach((s, i) => {
      const slice = s.figures["slice"];
      if (slice) writeFileAtomic(path.join(frameDir, `frame_${String(i).padStart(5, "0")}.png`), slice.png);
      // 1D runs: the Husimi x–v image over the snapshots as a second movie
      const husimi = s.figures["husimi"];
      if (husimi) writeFileAtomic(path.join(frameDir, `husimi_${String(i).padStart(5, "0")}.png`), husimi.png);
    });
  }
  if (options.pictures !== false && files.length > 1) {
    const first = readSnapshot(files[0]!);
    if (first.meta.cells.length === 1) figures["spacetime"] = await spacetime(files);
    if (figures["spacetime"]) writeFileAtomic(path.join(outDir, "spacetime.png"), figures["spacetime"].png);
  }
  return { snapshots, figures };
}

/** A 1D run's density as an image of position (x) against snapshot time (y). */
async function spacetime(files: string[]): Promise<Figure> {
  const snaps = files.map((f) => readSnapshot(f));
  const n = snaps[0]!.meta.cells[0]!;
  const values = new Float64Array(n * snaps.length);
  snaps.forEach((s, row) => {
    for (let i = 0; i < n; i++) values[row * n + i] = Math.log10(Math.max(s.psi[2 * i]! ** 2 + s.psi[2 * i + 1]! ** 2, 1e-300));
  });
  const t0 = snaps[0]!.meta.time;
  const t1 = snaps.at(-1)!.meta.time;
  return fieldFigure(
    { nx: n, ny: snaps.length, values, width: snaps[0]!.meta.boxSizeKpc[0]!, height: t1 - t0 || 1 },
    { xTitle: "x [kpc]", yTitle: `t − t₀ [${snaps[0]!.meta.timeUnit}]`, legend: "log₁₀ ρ [Msun/kpc³]", caption: "space–time density" },
  );
}
