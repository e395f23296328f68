// A fuzz of hostile configs, in-process and fast, beyond the corrupted-config test: every dimensional
// value of every shipped template given a unit of each wrong dimension, tables and lists nested
// thousands of levels deep (in the file and through --set), multi-megabyte strings, control
// characters in keys and values, and random --set overrides. The rule checked for every case: the
// config either resolves, or fails with a psibox error (never a RangeError, TypeError or stack
// overflow) whose message is one line, free of control characters, echoes no value longer than
// about 60 characters, and names the key that was changed when a single key was.
import fs from "node:fs";
import path from "node:path";
import { stringify } from "smol-toml";
import { describe, expect, it } from "vitest";
import { PsiboxError } from "../../src/core/errors.js";
import { applyOverrides, checkConfig, checkDepth, parseTomlText } from "../../src/config/load.js";
import { resolveRun } from "../../src/config/resolve.js";
import { parseQuantity } from "../../src/physics/units.js";

type Table = Record<string, unknown>;
const TEMPLATES = fs.readdirSync("configs").filter((f) => f.endsWith(".toml")).sort();
const template = (name: string): Table => parseTomlText(fs.readFileSync(path.join("configs", name), "utf8"), name);

/** mulberry32: a small seeded generator of numbers in [0, 1) (computed independently of psibox's own). */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Run a raw config (and overrides) through what psibox run does before it writes anything. */
function attempt(raw: Table, overrides: readonly string[] = []): { ok: true } | { ok: false; error: PsiboxError } {
  try {
    checkDepth(raw, "config");
    resolveRun(checkConfig(applyOverrides(raw, overrides)), "fuzz", "/nonexistent-fuzz-cwd");
    return { ok: true };
  } catch (e) {
    if (!(e instanceof PsiboxError)) throw new Error(`not a psibox error: ${(e as Error)?.name}: ${String((e as Error)?.message).slice(0, 200)}`);
    return { ok: false, error: e };
  }
}

/** The message rules: one line, no control characters, every quoted echo at most ~60 characters plus the cut note. */
function checkMessage(message: string): void {
  expect(message).not.toMatch(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/);
  expect(message.length).toBeLessThan(600);
  for (const m of message.matchAll(/"((?:[^"\\]|\\.)*)"/g)) expect(m[1]!.replace(/… \(\d+ characters\)$/, "").length).toBeLessThanOrEqual(60 * 6);
}

/** Every string leaf of a table that reads as "number unit": its dotted path and value. */
function quantityLeaves(t: unknown, prefix = ""): [string[], string][] {
  if (typeof t === "string") {
    try {
      const q = parseQuantity(t, { littleH: 0.7 });
      return q.dim.L !== 0 || q.dim.M !== 0 || q.dim.T !== 0 ? [[prefix.split("\u0000"), t]] : [];
    } catch {
      return [];
    }
  }
  if (typeof t !== "object" || t === null) return [];
  return Object.entries(t).flatMap(([k, v]) => quantityLeaves(v, prefix === "" ? k : `${prefix}\u0000${k}`));
}

function setPath(t: Table, p: readonly string[], value: unknown): Table {
  const out = structuredClone(t);
  let node: Record<string, unknown> = out;
  for (const k of p.slice(0, -1)) node = node[k] as Record<string, unknown>;
  node[p.at(-1)!] = value;
  return out;
}

const WRONG_UNITS = ["kpc", "Msun", "Myr", "km/s", "Msun/kpc^3", "1/Gyr", "kpc^2", "Msun*kpc"];
const sameDim = (a: string, b: string) => {
  const qa = parseQuantity(`1 ${a}`, { littleH: 0.7 }).dim;
  const qb = parseQuantity(`1 ${b}`, { littleH: 0.7 }).dim;
  return qa.L === qb.L && qa.M === qb.M && qa.T === qb.T;
};

describe("hostile configs", () => {
  it("refuses every dimensional value of every template in every wrong dimension, naming its key", () => {
    let cases = 0;
    for (const name of TEMPLATES) {
      const raw = template(name);
      expect(attempt(raw).ok, name).toBe(true);
      for (const [p, value] of quantityLeaves(raw)) {
        const unit = value.replace(/^\s*[-+]?[\d.]+(?:[eE][-+]?\d+)?\s*/, "");
        for (const wrong of WRONG_UNITS.filter((u) => !sameDim(u, unit))) {
          const r = attempt(setPath(raw, p, `1.5 ${wrong}`));
          cases++;
          expect(r.ok, `${name}: ${p.join(".")} = "1.5 ${wrong}" was accepted`).toBe(false);
          if (r.ok) continue;
          checkMessage(r.error.message);
          const key = p.filter((k) => !/^\d+$/.test(k)).join(".");
          expect(r.error.message.replace(/\[\d+\]/g, ""), name).toMatch(new RegExp(`^${key.replace(/\./g, "\\.").replace(/\u0000/g, "\\.")}`));
        }
      }
    }
    expect(cases).toBeGreaterThan(300);
  });

  it("refuses nesting thousands of levels deep, in the file and through --set, without overflowing the stack", () => {
    for (const depth of [20, 1000, 100_000]) {
      const text = `[${Array(depth).fill("a").join(".")}]\nx = 1\n`;
      let error: unknown;
      try {
        checkDepth(parseTomlText(text, "deep.toml"), "deep.toml");
      } catch (e) {
        error = e;
      }
      expect(error, `depth ${depth}`).toBeInstanceOf(PsiboxError);
      checkMessage((error as Error).message);
      expect((error as Error).message).toMatch(/deep\.toml nests tables or lists more than 16 levels deep/);
      const r = attempt(template("packet-free-1d.toml"), [`${Array(depth).fill("b").join(".")}=1`]);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error.message).toMatch(/--set nests tables or lists more than 16 levels deep/);
    }
    const inline = attempt(template("packet-free-1d.toml"), [`output.dir=${"[".repeat(40)}1${"]".repeat(40)}`]);
    expect(inline.ok).toBe(false);
    if (!inline.ok) checkMessage(inline.error.message);
  });

  it("keeps messages one line and short for huge strings and control characters in any value or key", () => {
    const random = rng(20261202);
    const nasty = ["\n", "\r\n", "\u0000", "\u001b[2J", "\u0007", "\u007f", "\u0085", "\u2028", "\u202e", "\t"];
    let refused = 0;
    for (let i = 0; i < 400; i++) {
      const raw = template(TEMPLATES[Math.floor(random() * TEMPLATES.length)]!);
      const leaves = quantityLeaves(raw);
      const [p] = leaves[Math.floor(random() * leaves.length)]!;
      const junk = nasty[Math.floor(random() * nasty.length)]!;
      const huge = random() < 0.05 ? "x".repeat(2_000_000) : "";
      const value = random() < 0.5 ? `1${junk}kpc${huge}` : `${junk}${huge}1e9 Msun`;
      const target = random() < 0.25 ? setPath(raw, [...p.slice(0, -1), `${p.at(-1)}${junk}`], value) : setPath(raw, p, value);
      const r = attempt(target);
      if (r.ok) continue; // white space around a number and its unit is allowed
      refused++;
      checkMessage(r.error.message);
    }
    expect(refused).toBeGreaterThan(300);
  });

  it("survives random --set overrides: every outcome is a resolved run or one clean line", () => {
    const random = rng(7);
    const keys = ["grid.cells", "grid.box", "particle.mass", "span.duration", "initial.kind", "integrator.safety", "integrator.fixed_step", "output.dir", "output.snapshot_interval", "sidecar.enabled", "cluster.time", "sweep", "grid", "a.b.c", "grid.box.x"];
    const values = ["1", "-1", "0", "1e400", "nan", "inf", '"1 kpc"', '"-0.5 kpc"', "[64, 64, 64, 64]", "[]", "{a = 1}", "true", '"x"', '"1e-22 eV"', '"5 Myr"', '""', "[[1]]", "'\\n'", `"${"z".repeat(5000)}"`];
    let resolved = 0;
    for (let i = 0; i < 600; i++) {
      const n = 1 + Math.floor(random() * 3);
      const sets = Array.from({ length: n }, () => `${keys[Math.floor(random() * keys.length)]}=${values[Math.floor(random() * values.length)]}`);
      const r = attempt(template(TEMPLATES[Math.floor(random() * TEMPLATES.length)]!), sets);
      if (r.ok) resolved++;
      else checkMessage(r.error.message);
    }
    expect(resolved).toBeGreaterThan(0);
  });

  it("refuses a config file of hostile text with one clean line", () => {
    const random = rng(99);
    const base = stringify(template("jeans-collapse-2d.toml"));
    for (let i = 0; i < 200; i++) {
      const at = Math.floor(random() * base.length);
      const insert = ["\u0000", "[[", "]]", '"""', "=", "\n[grid]\n", "\u001b", "x".repeat(100_000), "\ud800"][Math.floor(random() * 9)]!;
      let error: unknown;
      try {
        const raw = parseTomlText(base.slice(0, at) + insert + base.slice(at), "mutated.toml");
        checkDepth(raw, "mutated.toml");
        resolveRun(checkConfig(raw), "fuzz", "/nonexistent-fuzz-cwd");
      } catch (e) {
        error = e;
      }
      if (error === undefined) continue;
      expect(error, String(error)).toBeInstanceOf(PsiboxError);
      checkMessage((error as Error).message);
    }
  });
});
