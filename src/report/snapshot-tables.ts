/**
 * The tables of one snapshot, in physical units: power.csv, pdf.csv,
 * peaks.csv (with the soliton core fit and the core relation's
 * prediction), profiles.csv and summary.json.
 */
import fs from "node:fs";
import path from "node:path";
import type { Snapshot } from "../io/snapshot.js";
import type { FieldTransforms } from "../fields/field-transforms.js";
import { writeFileAtomic } from "../io/atomic.js";
import { fieldStats, type LoadedField } from "../simulation/from-snapshot.js";
import { blockTablesOf } from "../diagnostics/block-tables.js";
import { densestPoints, densityPdf, densityPowerSpectrum, fitCoreProfile, kineticSplit, meanDensity, radialProfile, type KineticSplit } from "../diagnostics/analysis.js";
import { kineticFromGradient, periodicPotentialFromContrast } from "../diagnostics/energies.js";
import type { SpectrumMoments } from "../diagnostics/spectrum-moments.js";
import { KG_PER_EV, M_SUN_KG, PC_M } from "../physics/constants.js";
import { csvTable as csv } from "./csv-table.js";
import { coreRelationDensity } from "../diagnostics/halo-core.js";
import { runnerOf } from "../diagnostics/block-tasks.js";

const KPC = 1e3 * PC_M;

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

/** What the energy split measured already: the kinetic split, the moments of ψ's spectrum and ρ̄. */
export interface MeasuredKinetics {
  readonly kinetic: KineticSplit;
  readonly moments: SpectrumMoments;
  readonly meanDensity: number;
}

/**
 * Write one snapshot's tables into `outDir` (created), with the kinetic split when it was measured already;
 * returns its summary (for summary.json, written by the caller) and P(k) in kpc^d. `withContrast` is handed
 * the spectrum of the density contrast in work grid 0 of `fft` right after P(k), before the grids are
 * reused (the granules' input); the densest points take the first half of work grid 1 as their scratch, the
 * part the energy split uses (energy-split.ts), so that a grid's other half is never touched when the split
 * was measured.
 */
export function snapshotTables(
  file: string,
  snap: Snapshot,
  field: LoadedField,
  outDir: string,
  fft: FieldTransforms,
  measured?: MeasuredKinetics,
  withContrast?: (spectrum: Float64Array) => void,
): { summary: Record<string, unknown>; power: { k: number; P: number }[] } {
  const { grid, units, psi } = field;
  const a = field.scaleFactor;
  const kpcPerCode = units.lengthM / KPC;
  const densityUnit = (units.massKg / units.lengthM ** 3) / (M_SUN_KG / KPC ** 3);
  const energyUnit = units.energyJ / (M_SUN_KG * 1e6);
  const kms = units.lengthM / units.timeS / 1e3;
  fs.mkdirSync(outDir, { recursive: true });

  const mean = measured?.meanDensity ?? meanDensity(psi);
  const power = densityPowerSpectrum(grid, psi, fft, 0, mean);
  writeFileAtomic(path.join(outDir, "power.csv"), powerTable(power, kpcPerCode, grid.dims, snap.meta.background.kind === "lcdm" ? snap.meta.background.hubbleKmSMpc / 100 : undefined));
  const tables = blockTablesOf(fft, grid, psi);
  const pdf = densityPdf(psi, 40, runnerOf(fft, psi), tables);
  writeFileAtomic(path.join(outDir, "pdf.csv"), csv(["log10_density_contrast", "volume_fraction", "mass_fraction"], pdf.map((p) => [p.log10Contrast, p.volumeFraction, p.massFraction])));

  // K from ψ's spectrum and the periodic W from δ's, both at hand: no transform of their own
  const known = measured ? { kinetic: kineticFromGradient(grid, measured.moments.k2, a), periodicPotential: periodicPotentialFromContrast(grid, fft.work(0), mean, a, tables) } : undefined;
  withContrast?.(fft.work(0));
  const stats = fieldStats(field, fft, known);
  const split = measured?.kinetic ?? kineticSplit(grid, psi, a, fft);
  const peaks = densestPoints(grid, psi, 5, Math.max(4, grid.cells[0]! / 16), fft.work(1), tables);
  const profileRows: (number | string)[][] = [];
  const peakRows = peaks.map((p, i) => {
    const rMax = Math.min(...grid.lengths) / 4;
    const profile = radialProfile(grid, psi, p.coords, rMax, tables);
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
    // the core relation in this table's comoving units: ρ_c,comoving = a³ ρ_c(r_c proper = a r_c)
    const predicted = fit ? a ** 3 * coreRelationDensity(a * rcKpc, units.particleMassKg / KG_PER_EV) : NaN;
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
      ...(stats.contactMsunKm2S2 !== 0 ? { contact: stats.contactMsunKm2S2 } : {}),
      total: split.kinetic * energyUnit + stats.potentialMsunKm2S2 + stats.contactMsunKm2S2,
    },
    virial_ratio: stats.virialRatio,
    velocity_dispersion_km_s: split.velocityDispersion * kms,
    mean_velocity_km_s: split.meanVelocity.map((v) => v * kms),
    densest_points: peakRows.length,
    core_fit: grid.dims === 3 && peakRows[0] ? { rho_c_Msun_kpc3: peakRows[0][5], r_c_kpc: peakRows[0][6], relation_rho_c_Msun_kpc3: peakRows[0][7] } : null,
  };
  return { summary, power: power.map((b) => ({ k: b.k / kpcPerCode, P: b.power * kpcPerCode ** grid.dims })) };
}
