/** One way for the end-to-end tests to run the built CLI (dist/cli/bin.js) and read what it writes. */
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/** The built CLI entry (npm test builds it first). */
export const BIN = path.resolve("dist/cli/bin.js");

/** What a finished command gave. */
export interface Ran {
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

/** A fresh temporary working folder (remove it in afterAll with removeWork). */
export function makeWork(prefix: string): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), `psibox-${prefix}-`));
}

export function removeWork(work: string | undefined): void {
  if (work) fs.rmSync(work, { recursive: true, force: true });
}

/** Run `psibox ARGS...` in `cwd` and wait for it. */
export function runPsibox(cwd: string, args: readonly string[], env: NodeJS.ProcessEnv = process.env): Ran {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: "utf8", env });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Run a Node script (e.g. an example) in `cwd`. */
export function node(cwd: string, args: readonly string[]): Ran {
  const r = spawnSync(process.execPath, [...args], { cwd, encoding: "utf8" });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Write a file into the working folder; returns its path. */
export function writeIn(work: string, name: string, text: string): string {
  const file = path.join(work, name);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  fs.writeFileSync(file, text);
  return file;
}

/** A CSV file as rows of column → text. */
export function readCsv(file: string): Record<string, string>[] {
  const [header, ...rows] = fs.readFileSync(file, "utf8").trim().split("\n");
  const cols = header!.split(",");
  return rows.map((r) => Object.fromEntries(r.split(",").map((v, i) => [cols[i]!, v])));
}

/** A JSON file. */
export function readJson<T = Record<string, unknown>>(file: string): T {
  return JSON.parse(fs.readFileSync(file, "utf8")) as T;
}
