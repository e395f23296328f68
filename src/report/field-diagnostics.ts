/**
 * The field diagnostics of one snapshot in physical units: the kinetic
 * energy split and its spectra, vortices, granules and the Husimi
 * distribution, each written as a CSV table and returned for the pictures
 * and summary.json. Lengths are comoving kpc in comoving runs.
 */
import path from "node:path";
import { writeFileAtomic } from "../io/atomic.js";
import type { LoadedField } from "../simulation/from-snapshot.js";
import type { FieldTransforms } from "../fields/field-transforms.js";
import { energySplit, type EnergySplit } from "../diagnostics/energy-split.js";
import { vortexTable, type VortexReport, type VortexTable } from "./vortex-table.js";
import { granuleStats, type GranuleStats } from "../diagnostics/granules.js";
import { defaultHusimiWindow, husimiImage1D, HusimiSampler, internalPoint, wehrlEntropy } from "../diagnostics/husimi.js";
import { densestPoints } from "../diagnostics/analysis.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import type { FieldDiagnostic } from "./diagnostic-options.js";
import { csvTable } from "./csv-table.js";
import { PooledTransforms } from "../integrators/pooled-transforms.js";
import { Grid } from "../grid/grid.js";

const KPC = 1e3 * PC_M;

/** Code → physical factors of a loaded field. */
export interface PhysicalScales {
  readonly kpc: number; // kpc per code length
  readonly kms: number; // km/s per code velocity
  readonly energy: number; // Msun (km/s)² per code energy
  readonly mass: number; // Msun per code mass
}

export function physicalScales(field: LoadedField): PhysicalScales {
  const u = field.units;
  return { kpc: u.lengthM / KPC, kms: u.lengthM / u.timeS / 1e3, energy: u.energyJ / (M_SUN_KG * 1e6), mass: u.massKg / M_SUN_KG };
}

/** What the field diagnostics produced, for the summary and the pictures. */
export interface FieldDiagnosticsResult {
  readonly summary: Record<string, unknown>;
  readonly split?: ReturnType<typeof energySplit>;
  readonly vortices?: VortexReport;
  readonly granules?: GranuleStats;
  /** 1D: the x–v image (log₁₀ f over x and v); 2D/3D: speed distributions at the points. */
  readonly husimiImage?: { x: Float64Array; v: Float64Array; log10f: Float64Array; vMax: number };
  readonly husimiPoints?: { point: number[]; speed: { v: number; F: number }[] }[];
  readonly eta?: number;
}

/**
 * Compute the chosen diagnostics of `field` (the energy split given when measured already) and write their
 * tables into `outDir`; `granules` and `vortices` are those measured already (the granules from the density
 * contrast's spectrum that P(k) leaves, the census on a worker thread: vortex-table.ts).
 */
export function fieldDiagnostics(
  field: LoadedField,
  chosen: Set<FieldDiagnostic>,
  outDir: string,
  fft: FieldTransforms,
  windowKpc?: number,
  pointsKpc?: readonly (readonly number[])[],
  measuredSplit?: EnergySplit,
  granules?: GranuleStats,
  vortices?: VortexTable,
): FieldDiagnosticsResult {
  const s = physicalScales(field);
  const summary: Record<string, unknown> = {};
  const out: { -readonly [K in keyof FieldDiagnosticsResult]: FieldDiagnosticsResult[K] } = { summary };
  if (chosen.has("energy-split")) out.split = writeEnergySplit(field, s, outDir, summary, measuredSplit ?? energySplit(field.grid, field.psi, field.scaleFactor, fft));
  if (chosen.has("vortices")) out.vortices = writeVortices(field, s, outDir, summary, vortices ?? vortexTable(field.grid, field.psi, s.kpc));
  if (chosen.has("granules")) out.granules = writeGranules(s, outDir, summary, granules ?? granuleStats(field.grid, field.psi, field.scaleFactor, fft));
  if (chosen.has("husimi")) Object.assign(out, writeHusimi(field, s, outDir, summary, windowKpc, pointsKpc));
  return out;
}

function writeEnergySplit(field: LoadedField, s: PhysicalScales, outDir: string, summary: Record<string, unknown>, split: EnergySplit): EnergySplit {
  const d = field.grid.dims;
  writeFileAtomic(
    path.join(outDir, "energy-spectra.csv"),
    csvTable(
      ["k_per_kpc", "quantum_Msun_km2_s2", "incompressible_Msun_km2_s2", "compressible_Msun_km2_s2", `velocity_power_km2_s2_kpc${d}`, "modes"],
      split.spectra.map((b) => [b.k / s.kpc, b.quantum * s.energy, b.incompressible * s.energy, b.compressible * s.energy, b.velocityPower * s.kms * s.kms * s.kpc ** d, b.modes]),
    ),
  );
  summary["energy_split_Msun_km2_s2"] = {
    kinetic: split.kinetic * s.energy,
    quantum: split.quantum * s.energy,
    incompressible: split.incompressible * s.energy,
    compressible: split.compressible * s.energy,
    unresolved_nyquist: split.unresolved * s.energy,
    uniform_flow: split.uniformFlow * s.energy,
  };
  return split;
}

function writeVortices(field: LoadedField, s: PhysicalScales, outDir: string, summary: Record<string, unknown>, table: VortexTable): VortexReport {
  const census = table.report;
  writeFileAtomic(path.join(outDir, "vortices.csv"), table.csv);
  summary["vortices"] =
    field.grid.dims === 3
      ? { piercings: census.piercings, net_charge: census.netCharge, line_length_kpc: census.lineLength * s.kpc, line_length_per_volume_per_kpc2: census.density / s.kpc ** 2 }
      : { count: census.positive + census.negative, positive: census.positive, negative: census.negative, net_charge: census.netCharge, per_area_per_kpc2: census.density / s.kpc ** 2 };
  return census;
}

function writeGranules(s: PhysicalScales, outDir: string, summary: Record<string, unknown>, g: GranuleStats): GranuleStats {
  writeFileAtomic(path.join(outDir, "granule-pdf.csv"), csvTable(["density_contrast", "pdf", "exponential", "gamma"], g.pdf.map((b) => [b.x, b.pdf, b.exponential, b.gamma])));
  writeFileAtomic(path.join(outDir, "granule-correlation.csv"), csvTable(["r_kpc", "xi", "random_phase_xi", "cells"], g.correlation.map((c) => [c.r * s.kpc, c.xi, c.predicted, c.cells])));
  summary["granules"] = {
    density_variance: g.variance,
    gamma_shape: g.gammaShape,
    velocity_dispersion_1d_km_s: g.velocityDispersion * s.kms,
    correlation_length_kpc: g.correlationLength * s.kpc,
    random_phase_length_kpc: g.predictedLength * s.kpc,
    quasi_particle_mass_Msun: g.quasiParticleMass * s.mass,
    random_phase_quasi_particle_mass_Msun: g.predictedQuasiParticleMass * s.mass,
  };
  return g;
}

/** f [code] → Msun/(kpc · km/s)^d, with v = k/a. */
function husimiUnit(field: LoadedField, s: PhysicalScales): number {
  const d = field.grid.dims;
  return (s.mass * Math.pow(field.scaleFactor / s.kms, d)) / Math.pow(s.kpc, d);
}

function writeHusimi(field: LoadedField, s: PhysicalScales, outDir: string, summary: Record<string, unknown>, windowKpc?: number, pointsKpc?: readonly (readonly number[])[]) {
  const { grid, psi } = field;
  const a = field.scaleFactor;
  const eta = windowKpc !== undefined ? windowKpc / s.kpc : defaultHusimiWindow(grid);
  const unit = husimiUnit(field, s);
  const vPerK = s.kms / a;
  if (grid.dims === 1) {
    const img = husimiImage1D(grid, psi, eta);
    const m = img.k.length;
    // the velocity range that holds the distribution: where the marginal exceeds 1e-6 of its peak
    const marginal = new Float64Array(m);
    for (let i = 0; i < img.x.length; i++) for (let q = 0; q < m; q++) marginal[q] = marginal[q]! + img.f[i * m + q]!;
    const peak = Math.max(...marginal);
    let kMax = 0;
    for (let q = 0; q < m; q++) if (marginal[q]! > 1e-6 * peak) kMax = Math.max(kMax, Math.abs(img.k[q]!));
    const order = Array.from({ length: m }, (_, j) => (j + m / 2) % m).filter((q) => Math.abs(img.k[q]!) <= kMax);
    const v = Float64Array.from(order, (q) => img.k[q]! * vPerK);
    const log10f = new Float64Array(img.x.length * order.length);
    const rows: number[][] = [];
    for (let i = 0; i < img.x.length; i++) {
      order.forEach((q, j) => {
        const f = img.f[i * m + q]! * unit;
        log10f[j * img.x.length + i] = Math.log10(Math.max(f, 1e-300));
        rows.push([img.x[i]! * s.kpc, img.k[q]! * vPerK, f]);
      });
    }
    writeFileAtomic(path.join(outDir, "husimi.csv"), csvTable(["x_kpc", "v_km_s", "f_Msun_per_kpc_km_s"], rows));
    summary["husimi"] = { window_kpc: eta * s.kpc, wehrl_entropy: wehrlEntropy(grid, psi, eta) };
    return { eta, husimiImage: { x: Float64Array.from(img.x, (x) => x * s.kpc), v, log10f, vMax: kMax * vPerK } };
  }
  const points = pointsKpc?.map((p) => p.map((x) => x / s.kpc)) ?? [densestPoints(grid, psi, 1, 1)[0]!.coords];
  const rows: number[][] = [];
  // one sampler and one buffer for all points; the sub-box transformed by the step's kernels on this thread
  const sampler = new HusimiSampler(grid, eta, (cells) => new PooledTransforms(new Grid(cells, cells.map(() => 1)), 1, { threads: 1 }));
  const f = new Float64Array(sampler.size);
  const husimiPoints = points.map((point, index) => {
    sampler.sample(psi, internalPoint(grid, point), f);
    const speed = speedDistribution(sampler.cells, sampler.dk, f);
    for (const b of speed) rows.push([index + 1, ...point.map((x) => x * s.kpc), b.v * vPerK, (b.F * unit * Math.pow(vPerK, grid.dims)) / vPerK]);
    return { point: point.map((x) => x * s.kpc), speed: speed.map((b) => ({ v: b.v * vPerK, F: (b.F * unit * Math.pow(vPerK, grid.dims)) / vPerK })) };
  });
  const axes = ["x_kpc", "y_kpc", "z_kpc"].slice(0, grid.dims);
  writeFileAtomic(path.join(outDir, "husimi-points.csv"), csvTable(["point", ...axes, "speed_km_s", `F_Msun_per_kpc${grid.dims}_km_s`], rows));
  const wehrl = grid.dims === 2 ? wehrlEntropy(grid, psi, eta, Math.max(1, Math.floor(eta / Math.max(grid.spacing[1], grid.spacing[2])))) : null;
  summary["husimi"] = { window_kpc: eta * s.kpc, points: husimiPoints.map((p) => p.point), wehrl_entropy: wehrl };
  return { eta, husimiPoints };
}

/** ∫ over directions of f(x, k) at fixed |k|: shells of width Δk, as Σ f Δᵈk / Δk per shell. */
function speedDistribution(cells: number[], dk: number[], f: Float64Array): { v: number; F: number }[] {
  const width = Math.min(...dk);
  const cell = dk.reduce((p, v) => p * v, 1);
  // three axes, absent leading ones of one cell and no wavenumber; k along each axis in FFT order
  const [m0, m1, m2] = [...Array<number>(3 - cells.length).fill(1), ...cells] as [number, number, number];
  const step = [...Array<number>(3 - dk.length).fill(0), ...dk];
  const ks = [m0, m1, m2].map((m, ax) => Float64Array.from({ length: m }, (_, q) => (q < m / 2 ? q : q - m) * step[ax]!));
  const kMax = Math.sqrt(ks.reduce((t, k) => t + Math.max(...k.map(Math.abs)) ** 2, 0));
  const shells = Math.round(kMax / width) + 2;
  const sums = { k: new Float64Array(shells), f: new Float64Array(shells), n: new Float64Array(shells) };
  for (let a = 0, i = 0; a < m0; a++) for (let b = 0; b < m1; b++, i += m2) speedRow(f, i, ks[2]!, ks[1]![b]! ** 2, ks[0]![a]! ** 2, width, cell, sums);
  const out: { v: number; F: number }[] = [];
  for (let b = 0; b < shells; b++) if (sums.n[b]! > 0) out.push({ v: sums.k[b]! / sums.n[b]!, F: sums.f[b]! / width });
  return out;
}

/** One row of speedDistribution: cells [i, i + m2) at squared wavenumbers k1² and k0² along the first two axes. */
function speedRow(f: Float64Array, i: number, k2: Float64Array, k1sq: number, k0sq: number, width: number, cell: number, sums: { k: Float64Array; f: Float64Array; n: Float64Array }): void {
  for (let c = 0; c < k2.length; c++, i++) {
    // |k|² added from the last axis to the first
    const k = Math.sqrt(k2[c]! * k2[c]! + k1sq + k0sq);
    const b = Math.round(k / width);
    sums.k[b] = sums.k[b]! + k;
    sums.f[b] = sums.f[b]! + f[i]! * cell;
    sums.n[b] = sums.n[b]! + 1;
  }
}
