/**
 * The run's plug-ins as one object the run loop calls: checks their names and
 * columns, hands each its hooks in order, gathers the measured sums they
 * declared, merges their parts of summary.json, and keeps their versioned
 * states for checkpoints (JSON text per plug-in: {"version": n, "state": …}).
 */
import { fileName } from "../core/sanitize.js";
import { InputError } from "../core/errors.js";
import type { ExtraField, MeasuredSum, MeasuredSums, OutputFacts, PluginFields, RunContext, RunPlugin, StartFacts, StepFacts, StopFacts } from "./plugin.js";

const NAME = /^[A-Za-z][A-Za-z0-9_-]*$/;

/** The plug-ins of one run. */
export class PluginSet {
  readonly plugins: readonly RunPlugin[];
  /** Every plug-in column, in order. */
  readonly columns: readonly string[];

  /** The stepper's extra fields before the plug-ins' (a run's later species). */
  readonly base: number;

  /** `base`: how many of the stepper's extra fields come before the plug-ins' (their fields are base + 1 …). */
  constructor(plugins: readonly RunPlugin[], base = 0) {
    this.base = base;
    const names = new Set<string>();
    for (const p of plugins) {
      if (!NAME.test(p.name)) throw new InputError(`plug-in "${p.name}": a name is a letter followed by letters, digits, "-" or "_"`);
      if (names.has(p.name)) throw new InputError(`plug-in "${p.name}" is given twice; each plug-in of a run needs its own name`);
      const version = p.stateVersion;
      if ((p.save || version !== undefined) && !(version !== undefined && Number.isInteger(version) && version >= 0)) {
        throw new InputError(`plug-in "${p.name}": a plug-in that saves state needs a stateVersion, a whole number ≥ 0 (got ${version})`);
      }
      const kinds = (p.fields ?? []).map((f) => f.kind);
      if (kinds.some((k) => k !== "tangent" && k !== "own-gravity")) throw new InputError(`plug-in "${p.name}": a field's kind is "tangent" or "own-gravity"`);
      if (Boolean(p.save) !== Boolean(p.restore)) throw new InputError(`plug-in "${p.name}": give both save() and restore(), or neither`);
      names.add(p.name);
    }
    this.plugins = plugins;
    this.columns = plugins.flatMap((p) => p.columns ?? []);
    this.fields = plugins.flatMap((p) => p.fields ?? []);
    if (this.fields.length > 64) throw new InputError(`the plug-ins ask for ${this.fields.length} extra fields; a run advances at most 64`);
  }

  /** Every plug-in's extra fields, in the plug-ins' order (the stepper's extra fields base + 1 … base + n). */
  readonly fields: readonly ExtraField[];

  /** The stepper's number of plug-in p's first field, less one. */
  private offset(p: RunPlugin): number {
    return this.plugins.slice(0, this.plugins.indexOf(p)).reduce((n, q) => n + (q.fields?.length ?? 0), 0);
  }

  /** Whether the plug-ins' field i (1 …, the stepper's base + i) belongs to a plug-in that measures "overlaps". */
  overlapWanted(i: number): boolean {
    const p = this.plugins.find((q) => this.offset(q) < i && i <= this.offset(q) + (q.fields?.length ?? 0));
    return p?.measures?.includes("overlaps") ?? false;
  }

  /** The sums as plug-in p sees them: its own fields' overlaps only. */
  private sumsFor(p: RunPlugin, sums: MeasuredSums): MeasuredSums {
    if (!sums.overlaps) return sums;
    const before = this.offset(p);
    return { ...sums, overlaps: sums.overlaps.slice(before, before + (p.fields?.length ?? 0)) };
  }

  /** Give each plug-in with fields its own: `make(first, count)` for the stepper's fields first … first + count − 1. */
  attach(make: (first: number, count: number) => PluginFields): void {
    for (const p of this.plugins) {
      const n = p.fields?.length ?? 0;
      if (n > 0) p.attach?.(make(this.base + this.offset(p) + 1, n));
    }
  }

  /** Whether any plug-in asked for a sum. */
  measures(sum: MeasuredSum): boolean {
    return this.plugins.some((p) => p.measures?.includes(sum));
  }

  start(context: RunContext, facts: StartFacts): void {
    for (const p of this.plugins) p.start?.(context, { ...facts, sums: this.sumsFor(p, facts.sums) });
  }

  afterStep(facts: StepFacts): void {
    for (const p of this.plugins) p.afterStep?.({ ...facts, sums: this.sumsFor(p, facts.sums) });
  }

  /** The plug-ins' values for a time-series row; `field` gives ψ to those that measure "field", `species` every species' field to those that measure "species". */
  row(facts: Omit<OutputFacts, "kind" | "file" | "psi" | "species">, field?: () => Float64Array, species?: () => readonly Float64Array[]): (number | string)[] {
    return this.plugins.flatMap((p) => {
      const expected = p.columns?.length ?? 0;
      const psi = field && p.measures?.includes("field") ? { psi: field() } : {};
      const all = species && p.measures?.includes("species") ? { species: species() } : {};
      const values = p.output?.({ kind: "row", ...facts, ...psi, ...all }) ?? [];
      if (values.length !== expected) {
        throw new InputError(`plug-in "${p.name}": output() gave ${values.length} values for its ${expected} time-series columns`);
      }
      return [...values];
    });
  }

  /** Tell the plug-ins a snapshot was written; `field` gives ψ to those that measure "field". */
  snapshot(facts: Omit<OutputFacts, "kind" | "psi">, field?: () => Float64Array): void {
    for (const p of this.plugins) {
      const psi = field && p.measures?.includes("field") ? { psi: field() } : {};
      p.output?.({ kind: "snapshot", ...facts, ...psi });
    }
  }

  /** Stop every plug-in; their parts of summary.json, refusing keys the run itself writes (`taken`). */
  stop(facts: StopFacts, taken: readonly string[]): Record<string, unknown> {
    const parts: Record<string, unknown> = {};
    for (const p of this.plugins) {
      for (const [key, value] of Object.entries(p.stop?.(facts) ?? {})) {
        if (taken.includes(key) || key in parts) throw new InputError(`plug-in "${p.name}": summary.json already has a key "${key}"`);
        parts[key] = value;
      }
    }
    return parts;
  }

  /** Each plug-in's state as JSON text, for a checkpoint. */
  save(): Record<string, string> {
    const out: Record<string, string> = {};
    for (const p of this.plugins) if (p.save) out[p.name] = JSON.stringify({ version: p.stateVersion, state: p.save() });
    return out;
  }

  /** Restore every plug-in that saves state from a checkpoint's states (`file` names the checkpoint in errors). */
  /** Check the plug-ins' saved states of a checkpoint before anything is restored or written; throws an InputError naming the file and the state. */
  check(saved: Readonly<Record<string, string>>, file: string): void {
    for (const p of this.plugins) {
      const text = saved[p.name];
      if (!p.save || text === undefined) continue;
      let parsed: { version?: unknown; state?: unknown };
      try {
        parsed = JSON.parse(text) as { version?: unknown; state?: unknown };
      } catch {
        throw new InputError(`${fileName(file)}: state/plugins/${p.name} is not readable JSON; the checkpoint cannot be resumed`);
      }
      if (typeof parsed !== "object" || parsed === null || parsed.version !== p.stateVersion) continue; // restore() says which version
      const reason = p.checkState?.(parsed.state);
      if (reason) throw new InputError(`${fileName(file)}: state/plugins/${p.name} ${reason}; the checkpoint cannot be resumed`);
    }
  }

  restore(saved: Readonly<Record<string, string>>, file: string): void {
    for (const p of this.plugins) {
      if (!p.save) continue;
      const text = saved[p.name];
      if (text === undefined) {
        throw new InputError(`${file}: has no state for the plug-in "${p.name}" (it was not on when the run started); resume without it or start the run afresh`);
      }
      const { version, state } = JSON.parse(text) as { version: number; state: unknown };
      if (version !== p.stateVersion) {
        throw new InputError(`${file}: the plug-in "${p.name}" saved state version ${version}, this one reads version ${p.stateVersion}; start the run afresh`);
      }
      p.restore?.(state);
    }
  }
}
