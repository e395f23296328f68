/**
 * A sweep's plan: the [sweep] section expanded into entries, each a full
 * config (the base with the swept keys set) with a stable, readable name and
 * its own folder. Every entry is validated before anything runs.
 */
import { shorten } from "../core/sanitize.js";
import path from "node:path";
import { ConfigError } from "../core/errors.js";
import { checkConfig } from "../config/load.js";
import { resolveRun, type ResolvedRun } from "../config/resolve.js";
import type { CheckedConfig } from "../config/schema.js";
import { DEFAULT_CLUSTER } from "./slurm-script.js";

type Table = Record<string, unknown>;
type Value = number | string | boolean | (number | string)[];

/** One run of a sweep. */
export interface SweepEntry {
  /** Folder name, e.g. "mass=2e-22eV_seed=3". */
  readonly name: string;
  /** The swept values, by key. */
  readonly values: Readonly<Record<string, Value>>;
  /** The entry's config as plain data (no [sweep] or [cluster]), with output.dir set. */
  readonly config: Table;
  readonly resolved: ResolvedRun;
}

/** A whole sweep. */
export interface SweepPlan {
  readonly name: string;
  /** Absolute folder holding one folder per entry. */
  readonly dir: string;
  readonly keys: readonly string[];
  readonly combine: "product" | "zip";
  readonly entries: readonly SweepEntry[];
  readonly cluster: NonNullable<CheckedConfig["cluster"]>;
}

const NUMBER_UNIT = /^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*)$/;

function expandRange(key: string, r: { from: number | string; to: number | string; count: number; scale: "linear" | "log" }): Value[] {
  if (!(r.count >= 2 && r.count <= 10000)) throw new ConfigError(`sweep.values."${key}".count`, `must be from 2 to 10000, got ${r.count}`);
  const split = (v: number | string, which: string): [number, string] => {
    if (typeof v === "number") return [v, ""];
    const m = NUMBER_UNIT.exec(v);
    if (!m) throw new ConfigError(`sweep.values."${key}".${which}`, `"${shorten(v)}" does not start with a number`);
    return [Number(m[1]), (m[2] ?? "").trim()];
  };
  const [a, ua] = split(r.from, "from");
  const [b, ub] = split(r.to, "to");
  if (ua !== ub) throw new ConfigError(`sweep.values."${key}".to`, `must use the unit of "from" ("${shorten(ua)}"), got "${shorten(ub)}"`);
  if (r.scale === "log" && !(a > 0 && b > 0)) throw new ConfigError(`sweep.values."${key}".from`, "log ranges need positive ends");
  const out: Value[] = [];
  for (let i = 0; i < r.count; i++) {
    const t = i / (r.count - 1);
    let v = r.scale === "log" ? a * Math.pow(b / a, t) : a + (b - a) * t;
    v = Number(v.toPrecision(12));
    out.push(ua === "" ? v : `${v} ${ua}`);
  }
  return out;
}

function setKey(config: Table, key: string, value: Value): void {
  const parts = key.split(".");
  let node = config;
  for (const p of parts.slice(0, -1)) {
    const next = node[p];
    if (next === undefined) node[p] = {};
    else if (typeof next !== "object" || Array.isArray(next)) throw new ConfigError(`sweep.values."${key}"`, `"${shorten(p)}" is not a section`);
    node = node[p] as Table;
  }
  node[parts.at(-1) as string] = value;
}

function label(key: string, keys: readonly string[]): string {
  const last = key.split(".").at(-1) as string;
  return keys.filter((k) => k.split(".").at(-1) === last).length > 1 ? key : last;
}

/** A value as a folder name's part, its numbers to `digits` significant digits (2.15443469003e-22 eV → 2.154e-22eV at 4). */
function slug(v: Value, digits = 12): string {
  const text = (Array.isArray(v) ? v.join("x") : String(v)).replace(/\d+(?:\.\d+)?(?:e[-+]?\d+)?/g, (n) => String(Number(Number(n).toPrecision(digits))));
  return text.replace(/\s+/g, "").replace(/\//g, "per").replace(/[^A-Za-z0-9.+\-x^]/g, "").replace(/\^/g, "");
}

/** The fewest significant digits (4 to 12) at which a key's values keep the names they have at 12. */
function nameDigits(values: readonly Value[]): number {
  const distinct = new Set(values.map((v) => slug(v))).size;
  for (let digits = 4; digits < 12; digits++) if (new Set(values.map((v) => slug(v, digits))).size === distinct) return digits;
  return 12;
}

/**
 * Expand a config with a [sweep] section.
 * @param raw the parsed TOML (overrides applied)
 * @param name the sweep's name (the config file's base name)
 * @param cwd folder relative paths are taken from
 */
export function planSweep(raw: Table, name: string, cwd: string): SweepPlan {
  const base = checkConfig(raw);
  if (!base.sweep) throw new ConfigError("sweep", "missing: psibox sweep needs a [sweep] section with [sweep.values]");
  const spec = base.sweep;
  const keys = Object.keys(spec.values);
  if (keys.length === 0) throw new ConfigError("sweep.values", 'is empty: list at least one key, e.g. "particle.mass" = ["1e-22 eV", "2e-22 eV"]');
  for (const k of keys) if (k.startsWith("sweep.") || k.startsWith("cluster.")) throw new ConfigError(`sweep.values."${k}"`, "cannot sweep the sweep or cluster sections");
  const lists = keys.map((k) => {
    const v = spec.values[k] as Value[] | Parameters<typeof expandRange>[1];
    const list = Array.isArray(v) ? v : expandRange(k, v);
    if (list.length === 0) throw new ConfigError(`sweep.values."${k}"`, "is an empty list");
    return list;
  });
  let combos: Value[][];
  if (spec.combine === "zip") {
    const n = lists[0]!.length;
    lists.forEach((l, i) => {
      if (l.length !== n) throw new ConfigError(`sweep.values."${keys[i]}"`, `has ${l.length} values; combine = "zip" needs every list to have ${n}`);
    });
    combos = Array.from({ length: n }, (_, i) => lists.map((l) => l[i] as Value));
  } else {
    combos = [[]];
    for (const l of lists) combos = combos.flatMap((c) => l.map((v) => [...c, v]));
  }
  if (combos.length > 10000) throw new ConfigError("sweep.values", `expands to ${combos.length} entries; at most 10000`);
  const baseDir = path.resolve(cwd, base.output.dir ?? path.join("output", name));
  const seen = new Map<string, number>();
  const digits = lists.map(nameDigits);
  const entries: SweepEntry[] = combos.map((combo, index) => {
    const entryName = combo.map((v, i) => `${label(keys[i] as string, keys)}=${slug(v, digits[i])}`).join("_");
    if (seen.has(entryName)) {
      throw new ConfigError("sweep.values", `entries ${seen.get(entryName)! + 1} and ${index + 1} would share the folder "${entryName}"; make the values distinct`);
    }
    seen.set(entryName, index);
    const config = structuredClone(raw) as Table;
    delete config["sweep"];
    delete config["cluster"];
    const values: Record<string, Value> = {};
    combo.forEach((v, i) => {
      setKey(config, keys[i] as string, v);
      values[keys[i] as string] = v;
    });
    const dir = path.join(baseDir, entryName);
    setKey(config, "output.dir", dir);
    let resolved: ResolvedRun;
    try {
      resolved = resolveRun(checkConfig(config), entryName, cwd);
    } catch (e) {
      if (e instanceof ConfigError) throw new ConfigError(e.key, `${e.message.slice(e.key.length + 2)} (in sweep entry "${entryName}")`);
      throw e;
    }
    return { name: entryName, values, config, resolved };
  });
  return { name, dir: baseDir, keys, combine: spec.combine, entries, cluster: base.cluster ?? DEFAULT_CLUSTER };
}
