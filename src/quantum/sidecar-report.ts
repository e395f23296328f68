/**
 * The sidecar's outputs in physical units: time-series columns and the
 * clocks' verdicts (clocks.json), with each time compared to the run's span
 * and to the age of the universe.
 */
import type { SidecarTracker } from "./tracker.js";
import type { OutflowMeter } from "./outflow.js";
import { formatDuration, type ClockResult } from "./clocks.js";
import type { Background } from "../physics/cosmology/background.js";
import { YEAR_S } from "../physics/constants.js";
import { describeStart, numberSpread } from "./gaussian-start.js";

/** Age of the universe used for comparisons when the run has no cosmology: 13.797 Gyr (Planck 2018, A&A 641, A6). */
export const PLANCK_AGE_S = 13.797e9 * YEAR_S;

/** Column names the sidecar adds to the time series. */
export const SIDECAR_COLUMNS = [
  "particles_N",
  "omega_per_s",
  "chi_per_s",
  "rate_Nchi_per_s",
  "lambda_per_s",
  "theta_rad",
  "chi_integral_rad",
  "squeezing_dB",
  "log10_meanfield_fraction",
  "breakdown_integral",
  "chi_adiabatic_per_s",
  "chi_adiabatic_integral_rad",
];

/** The columns of a run with a contact interaction: the two parts of χ (chi_per_s is their sum). */
export const CONTACT_COLUMNS = ["chi_gravity_per_s", "chi_contact_per_s"];

/** The gravitational and contact parts of χ now [1/s] (both kept in the a-free form χ·a). */
export function contactRow(tracker: SidecarTracker, timeS: number): number[] {
  const a = tracker.a;
  return [(tracker.rates.chiTilde - tracker.chiContact) / a / timeS, tracker.chiContact / a / timeS];
}

/** The columns of a measured outflow region (sidecar.outflow_region). */
export const OUTFLOW_COLUMNS = ["outflow_N", "outflow_loss_rate_per_s"];

/** The region's measured outflow in physical units: the mean loss rate over the run, to feed back as sidecar.loss_rate. */
export function outflowRecord(meter: OutflowMeter, timeS: number) {
  const r = meter.rates();
  const g = r.mean / timeS;
  const finite = (v: number) => (Number.isFinite(v) ? v : null);
  return {
    region: meter.region.kind,
    particles_first_N: r.first?.n ?? null,
    particles_last_N: r.last?.n ?? null,
    loss_rate_per_s: finite(g),
    loss_rate_per_yr: finite(g * YEAR_S),
    loss_integral: r.lossIntegral,
    method: "−ln(N_last/N_first)/(t_last − t_first) of the particles in the region's window at the time-series rows",
  };
}

/** The sidecar's time-series values now. */
export function sidecarRow(tracker: SidecarTracker, a: number, timeS: number): number[] {
  const c = tracker.clocks;
  const st = c.state();
  const r = tracker.rates;
  return [
    c.particles,
    r.omegaTilde / (a * a) / timeS,
    r.chiTilde / a / timeS,
    (c.particles * Math.abs(r.chiTilde)) / a / timeS,
    r.lambda / timeS,
    c.theta,
    c.chiIntegral,
    st.squeezingDb,
    st.logMeanFieldFraction / Math.LN10,
    c.breakdown,
    (r.chiAdiabatic ?? Number.NaN) / timeS,
    c.chiAdiabaticIntegral,
  ];
}

/** One clock in physical units. */
export interface ClockReport {
  readonly name: ClockResult["name"];
  readonly reached: boolean;
  readonly time_s: number | null;
  readonly time: string;
  readonly method: string;
  readonly ratio_to_span: number | null;
  readonly ratio_to_age_of_universe: number | null;
}

/** The clocks' verdicts with physical times. */
export function clockReports(tracker: SidecarTracker, timeS: number, spanS: number, ageS: number): ClockReport[] {
  return tracker.results().map((r) => {
    const t = r.time === undefined ? null : r.time * timeS;
    return {
      name: r.name,
      reached: r.reached,
      time_s: t,
      time: t === null ? "never" : formatDuration(t),
      method: r.method,
      ratio_to_span: t === null ? null : t / spanS,
      ratio_to_age_of_universe: t === null ? null : t / ageS,
    };
  });
}

/** The whole clocks.json record. */
export function clocksRecord(tracker: SidecarTracker, background: Background, timeS: number, spanS: number) {
  const age = background.kind === "lcdm" ? background.time(1) * timeS : PLANCK_AGE_S;
  const st = tracker.clocks.state();
  return {
    particles_N: tracker.clocks.particles,
    squeezing_db_target: tracker.clocks.squeezingDb,
    start: { ...tracker.clocks.model.start, description: describeStart(tracker.clocks.model.start), number_spread: numberSpread(tracker.clocks.particles, tracker.clocks.model.start) },
    loss_rate_per_s: tracker.clocks.model.lossRate / timeS,
    dephasing_rate_per_s: tracker.clocks.model.dephasingRate / timeS,
    age_of_universe_s: age,
    age_of_universe_source: background.kind === "lcdm" ? "the run's own cosmology, t(a = 1)" : "Planck 2018 (13.797 Gyr)",
    clocks: clockReports(tracker, timeS, spanS, age),
    ...(tracker.twin ? { adiabatic_twin: twinRecord(tracker, timeS) } : {}),
    final: {
      theta_rad: tracker.clocks.theta,
      chi_integral_rad: tracker.clocks.chiIntegral,
      chi_adiabatic_integral_rad: tracker.clocks.chiAdiabaticIntegral,
      squeezing_db: st.squeezingDb,
      squeezing_parameter: st.squeezingParameter,
      squeezing_angle_rad: st.squeezingAngle,
      meanfield_fraction: st.meanFieldFraction,
      ln_meanfield_fraction: st.logMeanFieldFraction,
      breakdown_integral: tracker.clocks.breakdown,
      ln_N: Math.log(tracker.clocks.particles),
    },
  };
}

/**
 * The twin field's measurement in physical units: the fitted χ_ad, the stationary-state value
 * 2ω/N + 2χ and the frozen-mode χ at the end for comparison, and the phase integral it gives.
 */
export function twinRecord(tracker: SidecarTracker, timeS: number) {
  const twin = tracker.twin!;
  const fitted = tracker.twinChi();
  const chi = tracker.rates.chiTilde / tracker.a; // the frozen-mode χ now
  return {
    excess: twin.e,
    extra_quanta: twin.deltaN,
    chi_adiabatic_per_s: fitted === undefined ? null : fitted / timeS,
    chi_adiabatic_stationary_per_s: tracker.stationaryChiAdiabatic / timeS,
    chi_frozen_per_s: chi / timeS,
    ratio_to_stationary: fitted === undefined ? null : fitted / tracker.stationaryChiAdiabatic,
    ratio_to_frozen: fitted === undefined ? null : fitted / chi,
    chi_adiabatic_integral_rad: twin.integral,
    samples: twin.samples.t.length,
    method: "−(d/dt) arg∫conj(ψ)ψ₂ dV / ΔN, ΔN = ((1 + e/2)² − 1)N, fitted by a line plus one oscillation over the run",
  };
}
