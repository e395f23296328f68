/**
 * The psibox command line. Each command parses its options, calls the same
 * library functions the tests use, and turns errors into one-line messages
 * with an exit code: 2 for bad input, 3 for a run stopped by a guard rail,
 * 1 for anything unexpected. Stack traces only with --debug.
 */
import { Command, CommanderError } from "commander";
import { PsiboxError } from "../core/errors.js";
import { VERSION } from "../version.js";
import type { RunFlags } from "./run-command.js";
import type { ImportFlags } from "./import-command.js";
import type { ClocksFlags } from "./clocks-command.js";
import type { EstimateFlags } from "./estimate-command.js";
import type { SweepFlags } from "./sweep-command.js";
import type { AnalyzeFlags } from "./analyze-command.js";
// Each command's module is loaded when the command runs, so that `psibox run`
// does not load the plotting libraries (startup time and memory).

function collect(value: string, previous: string[]): string[] {
  return [...previous, value];
}

/** Run the CLI with the given arguments; resolves to the exit code. */
export async function main(argv: readonly string[]): Promise<number> {
  const debug = argv.includes("--debug") || process.env["PSIBOX_DEBUG"] === "1";
  const args = argv.filter((a) => a !== "--debug");
  let exitCode = 0;
  const program = new Command();
  program
    .name("psibox")
    .description("Schrödinger–Poisson simulations of wave (fuzzy) dark matter, in physical units, on a CPU.")
    .version(VERSION, "-V, --version")
    .showHelpAfterError("(psibox --help lists the commands)")
    .exitOverride()
    .configureOutput({ writeErr: (s) => process.stderr.write(s) });

  program
    .command("run")
    .description("advance the field of a config file and write snapshots, the time series and a summary")
    .argument("[config]", "a TOML config file")
    .option("--set <key=value>", "override one config key, e.g. --set grid.cells=[64,64] (repeatable)", collect, [])
    .option("--resume <dir>", "continue a stopped or killed run from its checkpoint")
    .option("--threads <n>", "worker threads for the step (default: the number of cores; 1 below 32³ cells)")
    .option("--force", "overwrite the files of an earlier run in the same output folder", false)
    .option("-q, --quiet", "no progress output", false)
    .action(async (configFile: string | undefined, flags: RunFlags) => {
      exitCode = await (await import("./run-command.js")).runCommand(configFile, flags);
    });

  program
    .command("ic")
    .description("write a config's initial conditions (snapshot 0, and the spectrum table of a cosmological field) without running")
    .argument("<config>", "a TOML config file")
    .option("--set <key=value>", "override one config key (repeatable)", collect, [])
    .option("--force", "overwrite the files of an earlier run in the same output folder", false)
    .option("-q, --quiet", "no progress output", false)
    .action(async (configFile: string, flags: RunFlags) => {
      exitCode = await (await import("./run-command.js")).runCommand(configFile, { ...flags, initialOnly: true });
    });

  program
    .command("init")
    .description("write a commented starter config from a template")
    .argument("[template]", "template name (see --list)")
    .argument("[dir]", "folder to write it into", ".")
    .option("--list", "list the templates", false)
    .option("--force", "overwrite an existing file", false)
    .action(async (template: string | undefined, dir: string, flags: { list: boolean; force: boolean }) => {
      if (flags.list || template === undefined) {
        const list = (await import("./init-command.js")).listTemplates();
        const width = Math.max(...list.map((t) => t.name.length));
        process.stdout.write(list.map((t) => `${t.name.padEnd(width)}  ${t.description}`).join("\n") + "\n");
        if (!flags.list) exitCode = 2;
        return;
      }
      const file = (await import("./init-command.js")).initTemplate(template, dir, flags.force);
      process.stdout.write(`wrote ${file}; run it with: psibox run ${file}\n`);
    });

  program
    .command("inspect")
    .description("print a snapshot's metadata and field statistics")
    .argument("<file>", "a psibox snapshot (.h5)")
    .option("--json", "print JSON for scripts", false)
    .action(async (file: string, flags: { json: boolean }) => {
      exitCode = await (await import("./inspect-command.js")).inspectCommand(file, flags.json);
    });

  program
    .command("import")
    .description("convert a complex field from a .npy or HDF5 file into a psibox snapshot")
    .argument("<source>", "a .npy file, or an HDF5 file with --dataset or --re/--im")
    .requiredOption("--out <file>", "the snapshot to write (.h5)")
    .requiredOption("--box <length>", 'box side(s), e.g. "20 kpc" or "20 kpc, 10 kpc"')
    .requiredOption("--particle-mass <mass>", 'particle mass, e.g. "1e-22 eV"')
    .option("--dataset <path>", "HDF5: a complex dataset, or a real one with a last axis (re, im)")
    .option("--re <path>", "HDF5: dataset of the real part")
    .option("--im <path>", "HDF5: dataset of the imaginary part")
    .option("--density-unit <unit>", "unit of |ψ|² in the source", "Msun/kpc^3")
    .option("--time <time>", 'time of the field, e.g. "1.2 Gyr"')
    .option("--redshift <z>", "redshift of the field (makes the snapshot comoving, flat ΛCDM)")
    .option("--hubble <rate>", "H0 with --redshift", "67.36 km/s/Mpc")
    .option("--omega-matter <value>", "Ω_m with --redshift", "0.3153")
    .option("--gravity <kind>", "periodic, isolated or none", "periodic")
    .option("--force", "overwrite the output file", false)
    .action(async (source: string, flags: ImportFlags) => {
      exitCode = await (await import("./import-command.js")).importCommand(source, flags);
    });

  program
    .command("sweep")
    .description("run a parameter sweep ([sweep] section) with a local worker pool, emit it as a Slurm job array, or rebuild its summary")
    .argument("[config]", "a TOML config with a [sweep] section")
    .option("--set <key=value>", "override one config key of the base config (repeatable)", collect, [])
    .option("--workers <n>", "child processes at once (default: the number of cores)")
    .option("--emit <target>", "write job scripts instead of running: slurm")
    .option("--summary <dir>", "rebuild sweep-summary.csv and .json from a sweep folder")
    .action(async (configFile: string | undefined, flags: SweepFlags) => {
      exitCode = await (await import("./sweep-command.js")).sweepCommand(configFile, flags);
    });

  program
    .command("analyze")
    .description("diagnostics and pictures of run folders or snapshots: P(k), PDF, energies, peaks, profiles, core fits, slices")
    .argument("<paths...>", "run folders or snapshot files")
    .option("--out <dir>", "where to write (default: <run>/analysis)")
    .option("--frames", "also write numbered movie frames (frames/frame_NNNNN.png)", false)
    .option("--no-pictures", "tables only")
    .action(async (paths: string[], flags: AnalyzeFlags) => {
      exitCode = await (await import("./analyze-command.js")).analyzeCommand(paths, flags);
    });

  program
    .command("report")
    .description("write a self-contained HTML report of a run (report.html in the run folder)")
    .argument("<run>", "a run folder")
    .option("--out <file>", "the HTML file to write")
    .action(async (run: string, flags: { out?: string }) => {
      exitCode = await (await import("./analyze-command.js")).reportCommand(run, flags.out);
    });

  program
    .command("clocks")
    .description("the quantum sidecar on saved snapshots: mode coefficients and the squeezing, phase-diffusion and breakdown clocks")
    .argument("<paths...>", "a run folder, snapshot files, or both (imported snapshots too)")
    .option("--region <kind>", "box (whole box), sphere, cube or densest (a sphere around the densest cell)", "box")
    .option("--center <lengths>", 'region centre, one length per axis, e.g. "10 kpc, 10 kpc"')
    .option("--radius <length>", "sphere radius or cube half-width")
    .option("--squeezing-db <dB>", "squeezing level to time", "-10")
    .option("--out <dir>", "where to write snapshot-clocks.csv and .json (default: the run folder, or .)")
    .option("--json", "print the summary as JSON", false)
    .action(async (paths: string[], flags: ClocksFlags) => {
      exitCode = await (await import("./clocks-command.js")).clocksCommand(paths, flags);
    });

  program
    .command("estimate")
    .description("order-of-magnitude squeezing, phase-diffusion and breakdown times from physical inputs alone")
    .requiredOption("--particle-mass <mass>", 'particle mass, e.g. "1e-5 eV"')
    .option("--velocity <v>", 'velocity dispersion, e.g. "200 km/s" or "1e-3 c"')
    .option("--halo-mass <mass>", 'object mass, e.g. "1e12 Msun"')
    .option("--radius <length>", 'object radius, e.g. "100 kpc"')
    .option("--density <density>", 'density for the breakdown rate, e.g. "0.3 GeV/cm^3" or "1e7 Msun/kpc^3"')
    .option("--mode-mass <mass>", "mass in the condensate mode (default: the halo mass)")
    .option("--squeezing-db <dB>", "squeezing level to time", "-10")
    .option("--json", "print JSON", false)
    .action(async (flags: EstimateFlags) => {
      exitCode = (await import("./estimate-command.js")).estimateCommand(flags);
    });

  try {
    await program.parseAsync(args, { from: "user" });
    return exitCode;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === "commander.helpDisplayed" || e.code === "commander.version" || e.code === "commander.help") return 0;
      return 2;
    }
    return reportError(e, debug);
  }
}

function reportError(e: unknown, debug: boolean): number {
  if (e instanceof PsiboxError) {
    process.stderr.write(`psibox: ${e.message}\n`);
    if (debug && e.stack) process.stderr.write(e.stack + "\n");
    return e.exitCode;
  }
  const err = e as Error;
  process.stderr.write(`psibox: unexpected error: ${(err?.message ?? String(e)).split("\n")[0]}\n`);
  if (debug && err?.stack) process.stderr.write(err.stack + "\n");
  else process.stderr.write("(run again with --debug for the stack trace)\n");
  return 1;
}
