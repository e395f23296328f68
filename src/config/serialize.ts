/**
 * The resolved config as TOML text: every default filled in and the output
 * folder written out, so `psibox run` on it repeats the run exactly. Stored
 * as `config.toml` in the run folder and inside every snapshot.
 */
import { createHash } from "node:crypto";
import path from "node:path";
import { stringify } from "smol-toml";
import type { ResolvedRun } from "./resolve.js";

/** TOML text of a run's config with defaults and the output folder (relative to `cwd`). */
export function resolvedConfigToml(run: ResolvedRun, cwd: string): string {
  const plain = JSON.parse(JSON.stringify(run.config)) as Record<string, Record<string, unknown>>;
  const rel = path.relative(cwd, run.outputDir);
  plain["output"] = { ...plain["output"], dir: rel === "" ? "." : rel.split(path.sep).join("/") };
  return `# psibox resolved config (every default filled in)\n${stringify(plain)}\n`;
}

/** SHA-256 of a text, hex. */
export function sha256(text: string): string {
  return createHash("sha256").update(text).digest("hex");
}
