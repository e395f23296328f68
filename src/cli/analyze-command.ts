/** `psibox analyze PATH...` and `psibox report RUN_DIR`. */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { loadHdf5 } from "../io/h5.js";
import { analyzeRun, analyzeSnapshot } from "../report/analyze.js";
import { writeReport } from "../report/html.js";
import { formatDuration } from "../core/format.js";
import { parseDiagnosticList, parseHusimiPoints, type DiagnosticRequest } from "../report/diagnostic-options.js";
import { parseAs } from "../physics/units.js";
import { PC_M } from "../physics/constants.js";

export interface AnalyzeFlags {
  out?: string;
  frames: boolean;
  pictures: boolean;
  /** Comma-separated field diagnostics (energy-split, vortices, granules, husimi) or "none". */
  diagnostics?: string;
  /** Husimi window η, a length such as "0.5 kpc". */
  husimiWindow?: string;
  /** Points for the Husimi momentum distribution, "x,y[,z];…" in kpc. */
  husimiPoints?: string;
}

/** The field-diagnostics request of the flags (one-line errors naming the option). */
export function diagnosticRequest(flags: AnalyzeFlags): DiagnosticRequest {
  let husimiWindowKpc: number | undefined;
  if (flags.husimiWindow !== undefined) {
    try {
      husimiWindowKpc = parseAs(flags.husimiWindow, "length") / (1e3 * PC_M);
    } catch (e) {
      throw new InputError(`--husimi-window: ${(e as Error).message}`);
    }
  }
  return {
    ...(flags.diagnostics !== undefined ? { only: parseDiagnosticList(flags.diagnostics) } : {}),
    ...(husimiWindowKpc !== undefined ? { husimiWindowKpc } : {}),
    ...(flags.husimiPoints !== undefined ? { husimiPointsKpc: parseHusimiPoints(flags.husimiPoints) } : {}),
  };
}

const what = (flags: AnalyzeFlags): string => (flags.pictures ? "tables and pictures" : "tables (no pictures)");

/** Analyse run folders and snapshot files; returns the exit code. */
export async function analyzeCommand(paths: readonly string[], flags: AnalyzeFlags): Promise<number> {
  await loadHdf5();
  const diagnostics = diagnosticRequest(flags);
  for (const p of paths) {
    if (!fs.existsSync(p)) throw new InputError(`${p}: no such file or folder`);
    const started = performance.now();
    if (fs.statSync(p).isDirectory()) {
      if (!fs.existsSync(path.join(p, "snapshots"))) throw new InputError(`${p}: not a psibox run folder (no snapshots/)`);
      const out = flags.out ?? path.join(p, "analysis");
      const r = await analyzeRun(p, out, { frames: flags.frames, pictures: flags.pictures, diagnostics });
      process.stdout.write(`${p}: ${r.snapshots.length} snapshots analysed in ${formatDuration((performance.now() - started) / 1000)}; ${what(flags)} in ${out}\n`);
    } else {
      const out = flags.out ?? path.join(path.dirname(p), "..", "analysis", path.basename(p, ".h5"));
      await analyzeSnapshot(p, out, flags.pictures, diagnostics);
      process.stdout.write(`${p}: analysed in ${formatDuration((performance.now() - started) / 1000)}; ${what(flags)} in ${out}\n`);
    }
  }
  return 0;
}

/** Write a run's HTML report; returns the exit code. */
export async function reportCommand(runDir: string, out?: string): Promise<number> {
  await loadHdf5();
  const file = await writeReport(runDir, out);
  process.stdout.write(`wrote ${file}\n`);
  return 0;
}
