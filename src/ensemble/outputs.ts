/**
 * An ensemble's results in physical units: series.csv (one row per sample
 * time, each observable with its error), occupations.csv (each wavenumber
 * shell's particles at each sample time), fields.h5 (the reduced fields at
 * every sample time) and summary.json, each written atomically so a reader
 * never sees half a file while the ensemble grows.
 */
import path from "node:path";
import { writeFileAtomic } from "../io/atomic.js";
import { writeHdf5Atomic } from "../io/h5.js";
import { chunkedDataset, writeSlabs, writeVector } from "../io/slabs.js";
import { intAttr, numberAttr, textAttr } from "../io/h5-attrs.js";
import type { OutputScales } from "../simulation/scales.js";
import type { EnsembleReduction } from "./reduce.js";
import type { SampleStatistics } from "./observables.js";
import { PC_M } from "../physics/constants.js";
import type { Comparison } from "./comparison.js";
import { comparisonCsv } from "./comparison-output.js";
import { COMPANION_DIR } from "./companion.js";

/** What the reduction and the comparison write besides the store's files (for the folder's manifest). */
export const REDUCTION_FILES = ["occupations.csv", "comparison.csv", `${COMPANION_DIR}/`] as const;

/** The columns of series.csv: each observable is followed by its error column (…_err). */
export const SERIES_COLUMNS = [
  "time", "members", "particles_N", "particles_N_err", "condensate_N0", "condensate_N0_err", "condensate_fraction", "condensate_fraction_err",
  "depletion_N", "depletion_N_err", "b_re", "b_re_err", "b_im", "b_im_err", "coherence", "coherence_err", "vmin", "vmin_err",
  "squeezing_db", "squeezing_db_err", "departure", "departure_err",
] as const;

/** What the outputs need besides the reduction. */
export interface OutputContext {
  readonly dir: string;
  readonly scales: OutputScales;
  /** The grid's cells per axis. */
  readonly cells: readonly number[];
  readonly particleMass: number;
  readonly cellVolume: number;
}

function row(time: number, s: SampleStatistics): number[] {
  const db = 10 * Math.log10(2 * s.vMin.value);
  const dbErr = (10 / Math.LN10) * (s.vMin.error / s.vMin.value);
  const pairs = [s.particles, s.condensate, s.fraction, s.depletion, s.bRe, s.bIm, s.coherence, s.vMin];
  return [time, s.members, ...pairs.flatMap((e) => [e.value, e.error]), db, dbErr, s.departure.value, s.departure.error];
}

/** series.csv as text. */
export function seriesCsv(reduction: EnsembleReduction, scales: OutputScales): string {
  const lines = reduction.samples.map((s, i) => row(scales.time(reduction.times[i] as number), s).map((v) => (Number.isFinite(v) ? String(v) : "")).join(","));
  return [SERIES_COLUMNS.join(","), ...lines].join("\n") + "\n";
}

/** The columns of occupations.csv: one row per sample time and wavenumber shell. */
export const OCCUPATION_COLUMNS = ["time", "k_per_kpc", "modes", "occupation_N", "occupation_N_err"] as const;

/** occupations.csv as text: |k| in 1/kpc (angular), the shell's modes, its particles with the shift removed and their standard error. */
export function occupationsCsv(reduction: EnsembleReduction, scales: OutputScales): string {
  const perKpc = (1e3 * PC_M) / scales.units.lengthM;
  const { shells } = reduction;
  const lines = reduction.occupations.flatMap((row, s) => {
    const time = scales.time(reduction.times[s] as number);
    return row.map((e, i) => [time, (shells.k[i] as number) * perKpc, shells.modes[i] as number, e.value, e.error].map((v) => (Number.isFinite(v) ? String(v) : "")).join(","));
  });
  return [OCCUPATION_COLUMNS.join(","), ...lines].join("\n") + "\n";
}

/** fields.h5: time, the ensemble density (shift removed), the mean field and the classical field, per sample time. */
export function writeFields(reduction: EnsembleReduction, out: OutputContext): void {
  const { scales, cells } = out;
  const perParticle = out.particleMass / out.cellVolume; // code density of one particle per cell
  const psiScale = Math.sqrt(scales.density(perParticle));
  const shape = [reduction.times.length, ...cells];
  writeHdf5Atomic(path.join(out.dir, "fields.h5"), (file) => {
    textAttr(file, "title", "truncated-Wigner ensemble: reduced fields at the sample times");
    intAttr(file, "members", reduction.members.length);
    numberAttr(file, "particles_N", reduction.samples[0]?.particles.value ?? Number.NaN);
    textAttr(writeVector(file, "time", Float64Array.from(reduction.times, (t) => scales.time(t))), "units", scales.timeUnit);
    const density = chunkedDataset(file, "density", shape);
    textAttr(density, "units", "Msun/kpc^3");
    textAttr(density, "meaning", "ensemble mean of psi^dagger psi, the symmetric-ordering shift removed");
    writeSlabs(density, shape, "float64", (r0, r1, o) => {
      for (let s = r0; s < r1; s++) o.set((reduction.samples[s] as SampleStatistics).density.map((n) => scales.density(n * perParticle)), (s - r0) * (o.length / (r1 - r0)));
    });
    for (const [name, pick, meaning] of [
      ["mean_psi", (s: number) => (reduction.samples[s] as SampleStatistics).meanField, "ensemble mean field <psi> (re, im)"],
      ["classical_psi", (s: number) => reduction.reference[s] as Float64Array, "the classical field from the same start without noise (re, im)"],
    ] as const) {
      const complexShape = [...shape, 2];
      const ds = chunkedDataset(file, name, complexShape);
      textAttr(ds, "units", "sqrt(Msun/kpc^3)");
      textAttr(ds, "meaning", meaning);
      writeSlabs(ds, complexShape, "float64", (r0, r1, o) => {
        for (let s = r0; s < r1; s++) o.set(pick(s).map((v) => v * psiScale), (s - r0) * (o.length / (r1 - r0)));
      });
    }
  });
}

/** summary.json of the ensemble. */
export function writeSummary(dir: string, summary: Record<string, unknown>): void {
  writeFileAtomic(path.join(dir, "summary.json"), JSON.stringify(summary, null, 2) + "\n");
}

/** series.csv, occupations.csv, fields.h5, summary.json and, with a comparison, comparison.csv. */
export function writeEnsembleOutputs(reduction: EnsembleReduction, out: OutputContext, summary: Record<string, unknown>, comparison?: Comparison): void {
  if (comparison) writeFileAtomic(path.join(out.dir, "comparison.csv"), comparisonCsv(comparison, out.scales));
  writeFileAtomic(path.join(out.dir, "series.csv"), seriesCsv(reduction, out.scales));
  writeFileAtomic(path.join(out.dir, "occupations.csv"), occupationsCsv(reduction, out.scales));
  writeFields(reduction, out);
  writeSummary(out.dir, summary);
}
