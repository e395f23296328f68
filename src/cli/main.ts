/**
 * The psibox command line. Each command parses its options, calls the same
 * library functions the tests use, and turns errors into one-line messages
 * with an exit code: 2 for bad input, 3 for a run stopped by a guard rail,
 * 1 for anything unexpected. Stack traces only with --debug.
 */
import path from "node:path";
import { Command, CommanderError } from "commander";
import { PsiboxError } from "../core/errors.js";
import { loadConfig } from "../config/load.js";
import { resolveRun } from "../config/resolve.js";
import { prepareOutputDir, runSimulation, silentReporter } from "../simulation/run.js";
import { TextReporter } from "./progress.js";
import { describeRun } from "./describe.js";
import { VERSION } from "../version.js";

interface RunFlags {
  set: string[];
  force: boolean;
  quiet: boolean;
}

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
    .description("advance the field of a config file and write the time series and a summary")
    .argument("<config>", "a TOML config file")
    .option("--set <key=value>", "override one config key, e.g. --set grid.cells=[64,64] (repeatable)", collect, [])
    .option("--force", "overwrite the files of an earlier run in the same output folder", false)
    .option("-q, --quiet", "no progress output", false)
    .action((configFile: string, flags: RunFlags) => {
      exitCode = runCommand(configFile, flags);
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

function runCommand(configFile: string, flags: RunFlags): number {
  const config = loadConfig(configFile, flags.set);
  const name = path.basename(configFile).replace(/\.[^.]*$/, "");
  const run = resolveRun(config, name, process.cwd());
  prepareOutputDir(run.outputDir, flags.force);
  const reporter = flags.quiet ? silentReporter : new TextReporter();
  if (!flags.quiet) process.stderr.write(describeRun(run) + "\n");
  let interrupted: string | undefined;
  const onSignal = (signal: string) => () => {
    interrupted = `interrupted (${signal})`;
  };
  const sigint = onSignal("SIGINT");
  const sigterm = onSignal("SIGTERM");
  process.once("SIGINT", sigint);
  process.once("SIGTERM", sigterm);
  try {
    const summary = runSimulation(run, { reporter, stopRequested: () => interrupted });
    const where = path.relative(process.cwd(), run.outputDir) || ".";
    if (summary.status === "completed") {
      process.stdout.write(`completed ${summary.steps} steps in ${summary.wall_time_s.toFixed(1)} s; outputs in ${where}\n`);
      return 0;
    }
    process.stderr.write(`psibox: run stopped: ${summary.reason}; outputs up to the last good step in ${where}\n`);
    return interrupted ? 130 : 3;
  } finally {
    process.removeListener("SIGINT", sigint);
    process.removeListener("SIGTERM", sigterm);
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
