/**
 * The [breakdown] companion's memory, checked before a run writes anything:
 * the run's estimate (simulation/memory-estimate.ts) with its tangent
 * fields (and twin), against the machine's memory and any address-space
 * limit. A companion that does not fit where the plain run would is
 * refused naming the key, with the number of probes that fit.
 */
import type { ResolvedRun } from "../config/resolve.js";
import { ConfigError } from "../core/errors.js";
import type { FieldKind } from "../integrators/extra-fields.js";
import { estimateMemory, formatBytes, machineLimits, type MemoryLimits } from "../simulation/memory-estimate.js";

/** The extra fields of the companion: the Lyapunov tangent, 2 per probe, and the twin (its own gravity). */
export function breakdownFields(b: ResolvedRun["breakdown"]): FieldKind[] {
  const tangents = (b.tangent ? 1 : 0) + 2 * b.probes;
  return [...Array.from({ length: tangents }, () => ({ kind: "tangent" }) as const), ...(b.twinOffset > 0 ? [{ kind: "own-gravity" } as const] : [])];
}

const fits = (bytes: { total: number; addressSpace: number }, limits: MemoryLimits) =>
  bytes.total <= limits.memory && (limits.addressSpace === undefined || bytes.addressSpace <= limits.addressSpace);

/** Refuse a companion that does not fit this machine (a ConfigError naming breakdown.probes or breakdown.tangent). */
export function checkBreakdownMemory(run: ResolvedRun, limits: MemoryLimits = machineLimits()): void {
  const b = run.breakdown;
  const fields = breakdownFields(b);
  if (fields.length === 0) return;
  const base = { cells: run.grid.cells, gravity: run.grid.gravity, threads: run.integrator.threads, fft: run.integrator.fft };
  const need = estimateMemory({ ...base, fields });
  if (fits(need, limits) || !fits(estimateMemory(base), limits)) return; // a plain run that cannot fit is refused naming grid.cells
  const without = { ...b, probes: 0 };
  if (b.probes === 0 || !fits(estimateMemory({ ...base, fields: breakdownFields(without) }), limits)) {
    throw new ConfigError("breakdown.tangent", `the companion needs about ${formatBytes(need.total)} with the run, more than this machine's ${formatBytes(limits.memory)}: run without it or on a smaller grid`);
  }
  let p = b.probes;
  while (p > 0 && !fits(estimateMemory({ ...base, fields: breakdownFields({ ...b, probes: p }) }), limits)) p--;
  throw new ConfigError("breakdown.probes", `${b.probes} probes need about ${formatBytes(need.total)} with the run, more than this machine's ${formatBytes(limits.memory)}${limits.addressSpace !== undefined ? " or its address-space limit" : ""}; at most ${p} fit`);
}
