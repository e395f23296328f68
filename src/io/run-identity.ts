/**
 * Which run a snapshot belongs to. Every snapshot carries its run's resolved
 * config; the sections that define the field's history (grid, particle,
 * background, initial) are the same in every snapshot of one run, however
 * often it was resumed or extended (which change only the span), and differ
 * between runs. A snapshot without a readable config (written by an older
 * or another program) is identified by its whole config text.
 */
import { createHash } from "node:crypto";
import { parse as parseToml } from "smol-toml";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import type { SnapshotMeta } from "./snapshot.js";

const DEFINING = ["grid", "particle", "background", "initial"] as const;

/** A short fingerprint of the run a snapshot belongs to. */
export function runIdentity(meta: SnapshotMeta): string {
  let text: string;
  try {
    const table = parseToml(meta.config) as Record<string, unknown>;
    text = JSON.stringify(DEFINING.map((k) => table[k] ?? null));
  } catch {
    text = meta.config;
  }
  return createHash("sha256").update(text).digest("hex").slice(0, 16);
}

/** Refuse snapshots of more than one run in one series (one-line error naming the first stranger). */
export function checkOneRun(files: readonly string[], metas: readonly SnapshotMeta[], what: string): string {
  const identity = runIdentity(metas[0]!);
  metas.forEach((m, i) => {
    if (runIdentity(m) !== identity) {
      throw new InputError(`${fileName(files[i]!)}: a snapshot of another run than ${fileName(files[0]!)} (its grid, particle, background or initial config differ); ${what} needs the snapshots of one run`);
    }
  });
  return identity;
}
