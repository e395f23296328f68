/**
 * The resolved config as TOML text: every default filled in and the output
 * folder written out, so `psibox run` on it repeats the run exactly. Stored
 * as `config.toml` in the run folder and inside every snapshot.
 */
import { createHash } from "node:crypto";
import path from "node:path";
import { stringify } from "smol-toml";
import type { ResolvedRun } from "./resolve.js";

/**
 * TOML text of a run's config with defaults and the output folder as a full
 * path, so that running it again from any working folder writes to the same
 * place.
 */
export function resolvedConfigToml(run: ResolvedRun): string {
  const plain = JSON.parse(JSON.stringify(run.config)) as Record<string, Record<string, unknown>>;
  // the time unit too, so a later end in another unit (psibox extend) keeps the run's unit; both last,
  // so that the text of this text's own run is the same (an ensemble's Slurm tasks compare its hash)
  const { time_unit: _given, dir: _dir, ...output } = plain["output"] ?? {};
  plain["output"] = { ...output, time_unit: run.output.timeUnit, dir: path.resolve(run.outputDir).split(path.sep).join("/") };
  return `# psibox resolved config (every default filled in)\n${stringify(plain)}\n`;
}

/** SHA-256 of a text, hex. */
export function sha256(text: string): string {
  return createHash("sha256").update(text).digest("hex");
}
