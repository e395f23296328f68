/**
 * Reading a config: TOML text → overrides from `--set key=value` →
 * schema validation. Every failure is a ConfigError (exit code 2) whose
 * one-line message names the file or key and what would be valid.
 */
import fs from "node:fs";
import { parse as parseToml } from "smol-toml";
import type { z } from "zod";
import { ConfigError, InputError } from "../core/errors.js";
import { userConfigSchema, type CheckedConfig } from "./schema.js";
import { fileName, quoteValue, shorten } from "../core/sanitize.js";

/** Deepest nesting of tables and lists a config may have (psibox's own configs use at most 4). */
export const MAX_DEPTH = 16;

/** Refuse values nested deeper than MAX_DEPTH (checked without recursion, so any depth is safe to check). */
export function checkDepth(value: unknown, origin: string): void {
  const stack: [unknown, number, string][] = [[value, 0, ""]];
  while (stack.length > 0) {
    const [node, depth, key] = stack.pop()!;
    if (typeof node !== "object" || node === null) continue;
    if (depth > MAX_DEPTH) {
      throw new ConfigError(shorten(key), `${origin} nests tables or lists more than ${MAX_DEPTH} levels deep; a psibox config needs at most 4`);
    }
    for (const [k, v] of Object.entries(node)) stack.push([v, depth + 1, key === "" ? k : `${key}.${k}`]);
  }
}

type Table = Record<string, unknown>;

/** Read and parse a TOML file into a plain object. */
export function readTomlFile(file: string): Table {
  let text: string;
  try {
    text = fs.readFileSync(file, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(`cannot read config file ${fileName(file)}${code === "ENOENT" ? ": no such file" : `: ${code ?? (e as Error).message}`}`);
  }
  const table = parseTomlText(text, fileName(file));
  checkDepth(table, fileName(file));
  return table;
}

/** Parse TOML text; `origin` names the source in messages. */
export function parseTomlText(text: string, origin: string): Table {
  try {
    return parseToml(text) as Table;
  } catch (e) {
    const err = e as Error & { line?: number; column?: number };
    const firstLine = shorten(err.message.split("\n")[0] ?? "invalid TOML", 120);
    const where = err.line !== undefined ? ` at line ${err.line}, column ${err.column ?? 0}` : "";
    throw new ConfigError("", `${origin}: not valid TOML${where} (${firstLine.replace(/^Invalid TOML document: /, "")})`);
  }
}

/**
 * Apply `section.key=value` overrides. The value is read as a TOML value
 * (numbers, strings in quotes, arrays); anything else is taken as a string,
 * so `--set particle.mass="1e-21 eV"` and `--set particle.mass=1e-21\ eV` both work.
 */
export function applyOverrides(config: Table, overrides: readonly string[]): Table {
  const out = structuredClone(config);
  for (const item of overrides) {
    const eq = item.indexOf("=");
    if (eq <= 0) throw new ConfigError("--set", `"${shorten(item)}" is not of the form section.key=value`);
    const path = item.slice(0, eq).trim().split(".");
    if (path.some((p) => !/^[A-Za-z_][A-Za-z0-9_]*$/.test(p))) {
      throw new ConfigError("--set", `"${shorten(item.slice(0, eq))}" is not a dotted key such as grid.cells`);
    }
    const raw = item.slice(eq + 1).trim();
    let value: unknown;
    try {
      value = (parseToml(`v = ${raw}`) as Table)["v"];
    } catch {
      // not a TOML value: the text itself (without the quotes of a string TOML could not read)
      value = raw.length >= 2 && raw.startsWith('"') && raw.endsWith('"') ? raw.slice(1, -1) : raw;
    }
    checkDepth(value, `--set ${shorten(path.join("."))}`);
    let node: Table = out;
    for (const part of path.slice(0, -1)) {
      const next = node[part];
      if (next === undefined) node[part] = {};
      else if (typeof next !== "object" || next === null || Array.isArray(next)) {
        throw new ConfigError(shorten(path.join(".")), `cannot set a key inside "${shorten(part)}", which is not a section`);
      }
      node = node[part] as Table;
    }
    node[path.at(-1) as string] = value;
  }
  checkDepth(out, "--set");
  return out;
}

/** Validate a parsed config against the schema and fill defaults. */
export function checkConfig(raw: unknown): CheckedConfig {
  const result = userConfigSchema.safeParse(raw);
  if (result.success) return result.data;
  throw issueToError(result.error.issues[0] as z.core.$ZodIssue, raw);
}

function issueToError(issue: z.core.$ZodIssue, raw: unknown): ConfigError {
  const path = issue.path.map(String);
  const key = shorten(issue.path.map((p, i) => (typeof p === "number" ? `[${p}]` : `${i > 0 ? "." : ""}${String(p)}`)).join(""));
  switch (issue.code) {
    case "unrecognized_keys": {
      const section = key === "" ? "" : `${key}.`;
      const valid = validKeys(path, raw);
      return new ConfigError(
        shorten(`${section}${issue.keys[0]}`),
        `unknown key${valid ? `; valid keys here: ${valid}` : ""}`,
      );
    }
    case "invalid_union":
      if ("discriminator" in issue && issue.discriminator) {
        const options = (issue as unknown as { options: unknown[] }).options.map((o) => `"${String(o)}"`).join(", ");
        return new ConfigError(key, `must be one of ${options}`);
      }
      if (path[0] === "sweep" && path[1] === "values" && path.length >= 3) {
        return new ConfigError(
          shorten(`sweep.values."${path[2]}"`),
          'expected a list of values (numbers, quantities such as "2 kpc", true or false, or lists of them for a vector key such as initial.center) or a range { from = …, to = …, count = … }',
        );
      }
      return new ConfigError(key, issue.message);
    case "invalid_type": {
      const got = lookup(raw, path);
      if (got === undefined) return new ConfigError(key, `missing; expected ${describeExpected(issue.expected)}`);
      return new ConfigError(key, `expected ${describeExpected(issue.expected)}, got ${quoteValue(got)}`);
    }
    case "invalid_value":
      return new ConfigError(key, `must be one of ${issue.values.map((v) => quoteValue(v)).join(", ")}`);
    case "too_small":
    case "too_big": {
      const bound = Number((issue as unknown as { minimum?: number; maximum?: number }).minimum ?? (issue as unknown as { maximum?: number }).maximum);
      const what = issue.origin === "array" ? `${bound} item${bound === 1 ? "" : "s"}` : String(bound);
      return new ConfigError(key, `expected ${issue.code === "too_small" ? "at least" : "at most"} ${what}`);
    }
    default:
      return new ConfigError(key, issue.message);
  }
}

function describeExpected(expected: string): string {
  if (expected === "string") return 'a quoted value with a unit, e.g. "10 kpc"';
  if (expected === "int") return "a whole number";
  if (expected === "object") return "a [section]";
  if (expected === "array") return "a list such as [1, 0]";
  return `a ${expected}`;
}

function lookup(raw: unknown, path: readonly string[]): unknown {
  let node = raw;
  for (const p of path) {
    if (typeof node !== "object" || node === null) return undefined;
    node = (node as Table)[p];
  }
  return node;
}

function validKeys(path: readonly string[], raw: unknown): string {
  // Walk the schema's shape to list the keys of the section that was wrong;
  // for a section with a `kind`, list the keys of the kind that was given.
  type Node = { shape?: unknown; def?: { innerType?: { shape?: unknown }; options?: { shape: Record<string, unknown> }[] } };
  let shape: unknown = userConfigSchema.shape;
  for (let i = 0; i < path.length; i++) {
    const next = (shape as Record<string, Node>)[path[i] as string];
    if (!next) return "";
    const options = next.def?.options ?? (next.def?.innerType as Node | undefined)?.def?.options;
    if (options) {
      const kind = (lookup(raw, path.slice(0, i + 1)) as Table | undefined)?.["kind"];
      const match = options.find((o) => (o.shape["kind"] as { def?: { values?: unknown[] } }).def?.values?.includes(kind));
      shape = match?.shape;
    } else {
      shape = next.shape ?? next.def?.innerType?.shape;
    }
    if (!shape) return "";
  }
  return Object.keys(shape as object).join(", ");
}

/** Read, override and validate a config file. */
export function loadConfig(file: string, overrides: readonly string[] = []): CheckedConfig {
  return checkConfig(applyOverrides(readTomlFile(file), overrides));
}
