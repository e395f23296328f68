/** `psibox analyze PATH...` and `psibox report RUN_DIR`. */
import type { AnalyzeFlags } from "../analyze-command.js";
import type { PictureFlags } from "../../report/picture-options.js";
import type { CommandSpec, OptionTable } from "../options.js";

/** The options that choose how density pictures are drawn (analyze and report). */
const PICTURE_OPTIONS: OptionTable<PictureFlags> = {
  colormap: { flags: "--colormap <name>", help: "colour map of density pictures: viridis, magma, inferno, plasma or cividis (perceptually uniform); default viridis" },
  decades: { flags: "--decades <n>", help: "default colour range: this many decades below the maximum (default 5)" },
  range: { flags: "--range <lo,hi>", help: "fixed colour range of slices, frames and the space–time diagram: log₁₀ ρ [Msun/kpc³], e.g. 4,8" },
  columnRange: { flags: "--column-range <lo,hi>", help: "fixed colour range of projections and 3D frames: log₁₀ Σ [Msun/kpc²]" },
  sliceAxis: { flags: "--slice-axis <axis>", help: "3D: the axis normal to slices and projections: x, y or z (default z)" },
  sliceIndex: { flags: "--slice-index <i>", help: "3D: the slice's cell along that axis (default: through the densest cell)" },
};

/** The halo catalogue's options (analyze and report). */
const HALO_OPTIONS: OptionTable<{ overdensity?: string; haloMinMass?: string }> = {
  overdensity: { flags: "--overdensity <definition>", help: "halo definition: Δ times the critical density (e.g. 200c) or the mean matter density (e.g. 200m; in static boxes the box mean), or vir (Bryan & Norman 1998); default 200m" },
  haloMinMass: { flags: "--halo-min-mass <mass>", help: 'smallest halo in the catalogue, e.g. "1e8 Msun" (default: a halo of 2 cells\' radius at the threshold)' },
};

export const analyzeSpec: CommandSpec<AnalyzeFlags, [string[]]> = {
  name: "analyze",
  summary: "diagnostics and pictures of run folders or snapshots: P(k), PDF, energies, peaks, profiles, core fits, slices, projections, a movie, energy split, vortices, granules, Husimi",
  arguments: [{ name: "paths", help: "run folders or snapshot files", required: true, variadic: true }],
  options: {
    out: { flags: "--out <dir>", help: "where to write (default: <run>/analysis)" },
    frames: { flags: "--frames", help: "also write numbered movie frames on one colour range (frames/frame_NNNNN.png)", default: false },
    movie: { flags: "--movie", help: "also encode the frames into movie.mp4 (or .webm) with ffmpeg when it is installed; else keep the frames", default: false },
    pictures: { flags: "--no-pictures", help: "tables only" },
    diagnostics: { flags: "--diagnostics <list>", help: "field diagnostics, comma-separated: energy-split, vortices, granules, husimi, or none (default: all that apply)" },
    husimiWindow: { flags: "--husimi-window <length>", help: 'Husimi window η, e.g. "0.5 kpc" (default: √(L Δx/4π))' },
    husimiPoints: { flags: "--husimi-points <points>", help: '2D/3D: points for the Husimi momentum distribution, "x,y[,z];…" in kpc (default: the densest point)' },
    ...HALO_OPTIONS,
    ...PICTURE_OPTIONS,
  },
  run: async ([paths], flags) => (await import("../analyze-command.js")).analyzeCommand(paths, flags),
};

export interface ReportFlags extends PictureFlags {
  out?: string;
  overdensity?: string;
  haloMinMass?: string;
}

export const reportSpec: CommandSpec<ReportFlags, [string]> = {
  name: "report",
  summary: "write a self-contained HTML report of a run, an ensemble folder or a sweep's folder (report.html in the folder)",
  arguments: [{ name: "run", help: "a run folder, an ensemble folder or a sweep's folder", required: true }],
  options: { out: { flags: "--out <file>", help: "the HTML file to write" }, ...HALO_OPTIONS, ...PICTURE_OPTIONS },
  run: async ([run], flags) => (await import("../analyze-command.js")).reportCommand(run, flags),
};
