/**
 * `psibox clocks PATH...`: the sidecar on saved snapshots. For each snapshot
 * the mode's coefficients come from the field and its own potential; the
 * integrals Θ = ∫ω dt, X = ∫χ dt and B = ∫λ dt are taken by the trapezoid
 * rule over the snapshot times, and the clocks ring as in a run.
 */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { loadHdf5 } from "../io/h5.js";
import { readSnapshot, readSnapshotMeta } from "../io/snapshot.js";
import { writeFileAtomic } from "../io/atomic.js";
import { recordIfInside } from "../simulation/run-manifest.js";
import { fileName, quoteValue } from "../core/sanitize.js";
import { loadField } from "../simulation/from-snapshot.js";
import { modeCoefficients, type ModeRegion } from "../quantum/mode.js";
import { ClockAccumulator, formatDuration } from "../quantum/clocks.js";
import { parseAs, parseUnit, UnitSyntaxError } from "../physics/units.js";
import { PLANCK_AGE_S } from "../quantum/sidecar-report.js";
import { formatClocks } from "./run-command.js";
import { formatNumber, formatQuantity } from "../core/format.js";
import type { ClockReport } from "../quantum/sidecar-report.js";
import { parseRegion, REGION_KINDS } from "../config/region.js";
import { gravityRate } from "../quantum/gravity-rate.js";
import { readModeState, type ModeState, type ModeStateFlags } from "./mode-state-options.js";
import { describeStart, numberSpread } from "../quantum/gaussian-start.js";
import { stationaryAdiabaticChi } from "../quantum/adiabatic.js";
import { constantToRoundOff, outflowRates, type OutflowRates } from "../quantum/outflow.js";
import { YEAR_S } from "../physics/constants.js";
import { trackedRegions, type TrackedRegions } from "./track-region.js";

export interface ClocksFlags extends ModeStateFlags {
  region: string;
  /** A track id of the run's track table: the region follows that halo. */
  track?: string;
  /** The track table (default: <run>/analysis/tracks.h5). */
  trackTable?: string;
  center?: string;
  radius?: string;
  squeezingDb: string;
  out?: string;
  json: boolean;
}

/** The --region, --center and --radius options in a field's code units (the one region parser, config/region.ts). */
function regionOf(flags: ClocksFlags, field: ReturnType<typeof loadField>): ModeRegion {
  const { units, grid } = field;
  const text = { kind: flags.region, center: flags.center?.split(","), radius: flags.radius, names: { kind: "--region", center: "--center", radius: "--radius" } };
  return parseRegion(text, { lengths: grid.lengths.slice(0, grid.dims), lengthM: units.lengthM }, (key, message) => new InputError(`${key}: ${message}`));
}

/** The snapshot files a list of paths names (run folders expand to their snapshots, in order). */
export function snapshotFiles(paths: readonly string[]): string[] {
  const files: string[] = [];
  for (const p of paths) {
    if (!fs.existsSync(p)) throw new InputError(`${p}: no such file or folder`);
    if (fs.statSync(p).isDirectory()) {
      const dir = fs.existsSync(path.join(p, "snapshots")) ? path.join(p, "snapshots") : p;
      const found = fs.readdirSync(dir).filter((f) => /\.h5$/.test(f) && !f.startsWith(".")).sort();
      if (found.length === 0) throw new InputError(`${p}: no snapshots (.h5 files) found`);
      files.push(...found.map((f) => path.join(dir, f)));
    } else files.push(p);
  }
  return files;
}

function length(name: string, text: string): number {
  try {
    return parseAs(text, "length");
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new InputError(`--${name}: ${e.message}`);
    throw e;
  }
}

/** The region that follows a tracked halo (--track), or undefined; refuses --track with another --region. */
function trackOf(paths: readonly string[], files: readonly string[], flags: ClocksFlags): TrackedRegions | undefined {
  if (flags.track === undefined) {
    if (flags.trackTable !== undefined) throw new InputError("--track-table: only with --track ID");
    return undefined;
  }
  if (flags.region !== "box") throw new InputError(`--track: the region follows the tracked halo; leave out --region ${quoteValue(flags.region)}`);
  if (flags.center !== undefined) throw new InputError("--center: the tracked halo gives the centre; leave it out with --track");
  return trackedRegions(paths, files, flags.track, flags.trackTable, flags.radius === undefined ? undefined : length("radius", flags.radius));
}

/** Run the sidecar over snapshots; returns the exit code. */
export async function clocksCommand(paths: readonly string[], flags: ClocksFlags): Promise<number> {
  await loadHdf5();
  const given = snapshotFiles(paths);
  const db = Number(flags.squeezingDb);
  if (!(db < 0)) throw new InputError(`--squeezing-db: must be a negative number of dB, got ${flags.squeezingDb}`);
  if (!(REGION_KINDS as readonly string[]).includes(flags.region)) throw new InputError(`--region: must be box, sphere, cube or densest, got ${quoteValue(flags.region)}`);
  const tracked = trackOf(paths, given, flags);
  const files = tracked?.files ?? given;
  const regionName = tracked ? `track ${flags.track} (a sphere of ${formatNumber(tracked.radiusKpc, 4)}${snapComoving(files[0]!)} kpc following it)` : flags.region;
  const rows: (string | number)[][] = [];
  let acc: ClockAccumulator | undefined;
  let t0S = 0;
  let lastS = 0;
  let ageS = PLANCK_AGE_S;
  let state: ModeState | undefined;
  for (const file of files) {
    const snap = readSnapshot(file);
    const field = loadField(snap);
    const { units, grid } = field;
    const region = tracked ? tracked.region(file, field) : regionOf(flags, field);
    const m = modeCoefficients({ grid, psi: field.psi, scaleFactor: field.scaleFactor, particleMass: units.particleMassKg / units.massKg, gravity: field.gravity, region, contact: field.contact });
    if (!(m.particles >= 1)) throw new InputError(`${file}: the mode holds N = ${formatNumber(m.particles)} particles (< 1); choose a larger region`);
    const tS = snap.meta.time * snapshotTimeUnit(file, snap.meta.timeUnit);
    const toS = 1 / units.timeS;
    // χ_ad = (1/ħ) dμ/dN of a stationary state (quantum/adiabatic.ts: 2μ/(ħN) for self-gravity alone, with a contact term its dilation estimate)
    const chiAd = stationaryAdiabaticChi(m) * toS;
    // the breakdown estimate's rate: √(4πGρ_eff), f H in expanding boxes, 0 without gravity (quantum/gravity-rate.ts)
    const estimate = gravityRate(snap.meta.gravity !== "none", field.background);
    const rates = { omegaTilde: m.omega * toS, chiTilde: m.chi * toS, lambda: estimate.rate(m.lambda ** 2, field.scaleFactor) * toS, chiAdiabatic: chiAd };
    if (!acc) {
      state = readModeState(flags, m.particles);
      acc = new ClockAccumulator(m.particles, db, tS, rates, { start: state.start, lossRate: state.lossRatePerS, dephasingRate: state.dephasingRatePerS });
      acc.breakdownLabel = estimate.label;
      t0S = tS;
      if (snap.meta.background.kind === "lcdm") ageS = field.background.time(1) * units.timeS;
    } else {
      if (!(tS > lastS)) throw new InputError(`${file}: its time is not after the previous snapshot's; give snapshots of one run in time order`);
      acc.advance(tS, tS - lastS, tS - lastS, rates);
    }
    lastS = tS;
    const st = acc.state();
    rows.push([path.basename(file), tS, field.scaleFactor, m.particles, rates.omegaTilde, rates.chiTilde, m.particles * Math.abs(rates.chiTilde), rates.lambda, m.virialRatio, acc.theta, acc.chiIntegral, st.squeezingDb, st.logMeanFieldFraction / Math.LN10, acc.breakdown, chiAd, acc.chiAdiabaticIntegral, st.squeezingParameter]);
  }
  const a = acc as ClockAccumulator;
  const spanS = lastS - t0S;
  const outflow = outflowRates(rows.map((r) => r[1] as number), rows.map((r) => r[3] as number));
  rows.forEach((r, j) => r.push(outflow.perInterval[j] as number));
  const clocks: ClockReport[] = a.results().map((r) => {
    const t = r.time;
    return {
      name: r.name,
      reached: r.reached,
      time_s: t === undefined ? null : t,
      time: t === undefined ? "never" : formatDuration(t),
      method: `${r.method}; trapezoid over ${files.length} snapshot times`,
      ratio_to_span: t === undefined || spanS === 0 ? null : t / spanS,
      ratio_to_age_of_universe: t === undefined ? null : t / ageS,
    };
  });
  const outDir = clocksOutDir(paths, flags);
  const summary = writeClockFiles(paths, flags, files.length, rows, clocks, a, state as ModeState, db, outflow, tracked);
  if (flags.json) {
    process.stdout.write(JSON.stringify(summary, null, 2) + "\n");
    return 0;
  }
  const table = rows.map(
    (r) =>
      `  ${String(r[0]).padEnd(16)} t − t₀ = ${formatDuration((r[1] as number) - t0S).padEnd(11)} N|χ| = ${formatQuantity(r[6] as number, "/s").padEnd(17)} λ = ${formatQuantity(r[7] as number, "/s").padEnd(17)} squeezing ${formatQuantity(r[11] as number, "dB")}`,
  );
  const clockText = formatClocks(clocks, db).replace("(whole-box mode):", `(${tracked ? `track ${flags.track}` : flags.region} mode, from snapshots; times counted from the first snapshot, t₀):`);
  const skipped = tracked && given.length > files.length ? ` (the track exists in ${files.length} of the ${given.length} given)` : "";
  process.stdout.write(`${files.length} snapshots${skipped}, mode: ${regionName}, N = ${formatNumber(a.particles, 5)}\n${table.join("\n")}\n${clockText}${outflowLine(outflow, rows.map((r) => r[3] as number))}`);
  process.stdout.write(`wrote ${path.relative(process.cwd(), path.join(outDir, "snapshot-clocks.csv")) || "snapshot-clocks.csv"} and snapshot-clocks.json\n`);
  return 0;
}

/** Write snapshot-clocks.csv and snapshot-clocks.json; returns the JSON record. */
function writeClockFiles(
  paths: readonly string[],
  flags: ClocksFlags,
  snapshots: number,
  rows: (string | number)[][],
  clocks: ClockReport[],
  a: ClockAccumulator,
  state: ModeState,
  db: number,
  outflow: OutflowRates,
  tracked: TrackedRegions | undefined,
): Record<string, unknown> {
  const outDir = clocksOutDir(paths, flags);
  fs.mkdirSync(outDir, { recursive: true });
  recordIfInside(outDir, path.join(outDir, "snapshot-clocks.csv"));
  recordIfInside(outDir, path.join(outDir, "snapshot-clocks.json"));
  const header =
    "snapshot,t_s,a,particles_N,omega_per_s,chi_per_s,rate_Nchi_per_s,lambda_per_s,virial_ratio,theta_rad,chi_integral_rad,squeezing_dB,log10_meanfield_fraction,breakdown_integral,chi_adiabatic_per_s,chi_adiabatic_integral_rad,squeezing_parameter,outflow_loss_rate_per_s";
  const csv = [header, ...rows.map((r) => r.map((v) => (typeof v === "number" ? v.toPrecision(12) : v)).join(","))].join("\n") + "\n";
  writeFileAtomic(path.join(outDir, "snapshot-clocks.csv"), csv);
  const cols = header.split(",");
  const st = state;
  const final = a.state();
  const summary = {
    snapshots,
    region: tracked ? "track" : flags.region,
    ...(tracked ? { track: { id: Number(flags.track), radius_kpc: tracked.radiusKpc, radius_frame: "comoving in comoving runs", table: tracked.table } } : {}),
    particles_N: a.particles,
    squeezing_db_target: db,
    start: { ...st.start, description: describeStart(st.start), number_spread: numberSpread(a.particles, st.start) },
    loss_rate_per_s: st.lossRatePerS,
    dephasing_rate_per_s: st.dephasingRatePerS,
    // the region's measured mass outflow as a loss rate, −ln(N_last/N_first)/(t_last − t_first); 0 for a closed box
    outflow_loss_rate_per_s: nullIfNaN(outflow.mean),
    outflow_loss_rate_per_yr: nullIfNaN(outflow.mean * YEAR_S),
    outflow_loss_integral: outflow.lossIntegral,
    clocks,
    final: {
      theta_rad: a.theta,
      chi_integral_rad: a.chiIntegral,
      chi_adiabatic_integral_rad: a.chiAdiabaticIntegral,
      squeezing_db: final.squeezingDb,
      squeezing_parameter: final.squeezingParameter,
      squeezing_angle_rad: final.squeezingAngle,
      meanfield_fraction: final.meanFieldFraction,
      ln_meanfield_fraction: final.logMeanFieldFraction,
      breakdown_integral: a.breakdown,
      ln_N: Math.log(a.particles),
    },
    // the numbers of every snapshot (the CSV's rows)
    rows: rows.map((r) => Object.fromEntries(r.map((v, i) => [cols[i] as string, v]))),
  };
  writeFileAtomic(path.join(outDir, "snapshot-clocks.json"), JSON.stringify(summary, null, 2) + "\n");
  return summary;
}

const nullIfNaN = (v: number): number | null => (Number.isNaN(v) ? null : v);

/** The screen line of the region's measured outflow, the loss rate to feed back; `particles` is N at each snapshot. */
function outflowLine(outflow: OutflowRates, particles: readonly number[]): string {
  if (Number.isNaN(outflow.mean)) return "";
  const change = constantToRoundOff(particles);
  if (change !== undefined) return `  N is the same at every snapshot to round-off (|ΔN|/N ≤ ${formatNumber(change)}): no outflow to measure\n`;
  const g = outflow.mean;
  const what = g >= 0 ? "mass outflow" : "mass inflow (a negative loss rate)";
  const hint = g > 0 ? `; as a loss rate: --loss-rate "${g.toPrecision(4)}/s" or sidecar.loss_rate = "${g.toPrecision(4)}/s"` : "";
  return `  ${what} of the region, mean over the snapshots: ${formatQuantity(g, "/s")} = ${formatQuantity(g * YEAR_S, "/yr")}${hint}\n`;
}

/** " comoving" for a snapshot of a comoving run. */
function snapComoving(file: string): string {
  return readSnapshotMeta(file).background.kind === "lcdm" ? " comoving" : "";
}

/** Where the clock files go: --out, else the one folder given, else the working folder. */
function clocksOutDir(paths: readonly string[], flags: ClocksFlags): string {
  return path.resolve(flags.out ?? (paths.length === 1 && fs.statSync(paths[0] as string).isDirectory() ? (paths[0] as string) : "."));
}

/** Seconds per unit of a snapshot's time_units attribute; an unknown unit is an InputError naming the file. */
function snapshotTimeUnit(file: string, unit: string): number {
  let seconds: number;
  try {
    const q = parseUnit(unit);
    seconds = q.dim.T === 1 && q.dim.L === 0 && q.dim.M === 0 ? q.si : NaN;
  } catch {
    seconds = NaN;
  }
  if (!(seconds > 0) || !Number.isFinite(seconds)) throw new InputError(`${fileName(file)}: attribute "time_units" is ${quoteValue(unit)}, not a time unit psibox knows (s, yr, kyr, Myr, Gyr, ...)`);
  return seconds;
}
