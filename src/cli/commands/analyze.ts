/** `psibox analyze PATH...` and `psibox report RUN_DIR`. */
import type { AnalyzeFlags } from "../analyze-command.js";
import type { CommandSpec } from "../options.js";

export const analyzeSpec: CommandSpec<AnalyzeFlags, [string[]]> = {
  name: "analyze",
  summary: "diagnostics and pictures of run folders or snapshots: P(k), PDF, energies, peaks, core fits, slices, energy split, vortices, granules, Husimi",
  arguments: [{ name: "paths", help: "run folders or snapshot files", required: true, variadic: true }],
  options: {
    out: { flags: "--out <dir>", help: "where to write (default: <run>/analysis)" },
    frames: { flags: "--frames", help: "also write numbered movie frames (frames/frame_NNNNN.png)", default: false },
    pictures: { flags: "--no-pictures", help: "tables only" },
    diagnostics: { flags: "--diagnostics <list>", help: "field diagnostics, comma-separated: energy-split, vortices, granules, husimi, or none (default: all that apply)" },
    husimiWindow: { flags: "--husimi-window <length>", help: 'Husimi window η, e.g. "0.5 kpc" (default: √(L Δx/4π))' },
    husimiPoints: { flags: "--husimi-points <points>", help: '2D/3D: points for the Husimi momentum distribution, "x,y[,z];…" in kpc (default: the densest point)' },
  },
  run: async ([paths], flags) => (await import("../analyze-command.js")).analyzeCommand(paths, flags),
};

export interface ReportFlags {
  out?: string;
}

export const reportSpec: CommandSpec<ReportFlags, [string]> = {
  name: "report",
  summary: "write a self-contained HTML report of a run (report.html in the run folder)",
  arguments: [{ name: "run", help: "a run folder", required: true }],
  options: { out: { flags: "--out <file>", help: "the HTML file to write" } },
  run: async ([run], flags) => (await import("../analyze-command.js")).reportCommand(run, flags.out),
};
