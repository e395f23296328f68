/** A readable tree of a resolved run, printed when a run starts. */
import type { ResolvedRun } from "../config/resolve.js";
import { OutputScales } from "../simulation/scales.js";
import { formatNumber } from "../core/format.js";
import { breakdownFields } from "../app/breakdown-memory.js";
import { estimateMemory } from "../simulation/memory-estimate.js";


/** The header line of the [breakdown] companion: what it measures and what it costs (extra fields, memory from the run's estimate). */
function breakdownLine(run: ResolvedRun, scales: OutputScales): string | undefined {
  const b = run.breakdown;
  const extra = breakdownFields(b);
  if (extra.length === 0) return undefined;
  const base = { cells: run.grid.cells, gravity: run.grid.gravity, threads: run.integrator.threads, fft: run.integrator.fft };
  const mb = (estimateMemory({ ...base, fields: extra }).total - estimateMemory(base).total) / 1e6;
  const every = b.interval === undefined ? "one dynamical time at the start" : scales.formatTime(b.interval);
  const where = b.region.kind === "box" ? "" : ` in the ${b.region.kind} region`;
  const twin = b.twinOffset > 0 ? `, twin run from ψ + ${formatNumber(b.twinOffset)}·u` : "";
  const what = [
    ...(b.tangent ? [`Lyapunov rate${where} (renormalised every ${every}${twin})`] : []),
    ...(b.probes > 0 ? [`depletion (${b.probes} probes, clock at ${formatNumber(b.depletionFraction)} N)`] : []),
  ].join(" and ");
  const n = extra.length;
  const tangents = extra.filter((f) => f.kind === "tangent").length;
  const by = `${tangents} tangent-linear field${tangents > 1 ? "s" : ""}${b.twinOffset > 0 ? " and a nonlinear twin" : ""}`;
  return `├─ breakdown    ${what} by ${by}: ${n} extra field${n > 1 ? "s" : ""}, +${formatNumber(mb)} MB, about ${n + 1} times the work per step; seed ${b.seed}`;
}

/** Describe a run in physical units, headed by the command that does it (`psibox ic`, `psibox extend`, …). */
export function describeRun(run: ResolvedRun, command = "run"): string {
  const c = run.config;
  const scales = new OutputScales(run);
  const cells = run.grid.cells.join("×");
  const box = typeof c.grid.box === "string" ? c.grid.box : c.grid.box.join(" × ");
  const bg = c.background.kind === "lcdm"
    ? `flat ΛCDM, H0 = ${c.background.hubble}, Ω_m = ${c.background.omega_matter}, Ω_r = ${c.background.omega_radiation}`
    : "static (a = 1)";
  const span = c.background.kind === "lcdm"
    ? `z = ${c.span.start_redshift} → ${c.span.end_redshift ?? 0} (${scales.formatTime(run.span.startTime)} → ${scales.formatTime(run.span.endTime)})`
    : `${c.span.duration}`;
  const lines = [
    `psibox ${command} "${run.name}"`,
    `├─ grid         ${run.grid.cells.length}D, ${cells} cells, box ${box}, gravity ${run.grid.gravity}`,
    `├─ particle     ${particleText(c.particle)}`,
    `├─ background   ${bg}`,
    `├─ span         ${span}`,
    `├─ initial      ${c.initial.kind}`,
    ...(c.species ?? []).map((sp) => `├─ species      ${sp.name}: ${particleText({ ...sp, mass: sp.particle_mass })}, initial ${sp.initial?.kind}`),
    `├─ integrator   safety ${run.integrator.safety}${c.integrator.fixed_step ? `, fixed step ${c.integrator.fixed_step}` : ""}, mass tolerance ${run.integrator.massTolerance}`,
    breakdownLine(run, scales),
    `└─ output       ${run.outputDir}`,
  ];
  return lines.filter((l) => l !== undefined).join("\n");
}

/** The particle and its contact interaction, as the config gives them. */
function particleText(p: { mass: string; scattering_length?: string | undefined; decay_constant?: string | undefined }): string {
  const contact = p.scattering_length !== undefined ? `, scattering length ${p.scattering_length}` : p.decay_constant !== undefined ? `, decay constant ${p.decay_constant}` : "";
  return `m = ${p.mass}${contact}`;
}
