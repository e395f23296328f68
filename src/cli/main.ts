/**
 * The psibox command line. The commands are declared as typed tables in
 * `commands/` (see options.ts); each parses its options, calls the same
 * library functions the tests use, and returns an exit code. Errors become
 * one-line messages: 2 for bad input, 3 for a run stopped by a guard rail,
 * 1 for anything unexpected. Stack traces only with --debug.
 */
import { Command, CommanderError } from "commander";
import { PsiboxError } from "../core/errors.js";
import { oneLine } from "../core/sanitize.js";
import { systemErrorMessage } from "../core/system-errors.js";
import { VERSION } from "../version.js";
import { addCommand } from "./options.js";
import { COMMANDS } from "./commands/index.js";

/** Run the CLI with the given arguments; resolves to the exit code. */
export async function main(argv: readonly string[]): Promise<number> {
  const debug = argv.includes("--debug") || process.env["PSIBOX_DEBUG"] === "1";
  const args = argv.filter((a) => a !== "--debug");
  let exitCode = 0;
  const program = new Command()
    .name("psibox")
    .description("Schrödinger–Poisson simulations of wave (fuzzy) dark matter, in physical units, on a CPU.")
    .version(VERSION, "-V, --version")
    .exitOverride()
    .configureOutput({ writeErr: (s) => process.stderr.write(s), outputError: (s, write) => write(usageError(s, args)) });
  for (const spec of COMMANDS) addCommand(program, spec, (code) => (exitCode = code));
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

/** Commander's usage errors ("error: unknown option '--x'") as psibox's one line, pointing to the right help. */
function usageError(text: string, args: readonly string[]): string {
  const command = COMMANDS.find((c) => c.name === args[0]);
  const help = command ? `psibox ${command.name} --help` : "psibox --help";
  return `psibox: ${oneLine(text.trim().replace(/^error: /, ""))} (${help} lists the ${command ? "options" : "commands"})\n`;
}

function reportError(e: unknown, debug: boolean): number {
  if (e instanceof PsiboxError) {
    process.stderr.write(`psibox: ${oneLine(e.message)}\n`);
    if (debug && e.stack) process.stderr.write(e.stack + "\n");
    return e.exitCode;
  }
  const system = systemErrorMessage(e);
  if (system) {
    process.stderr.write(`psibox: ${oneLine(system)}\n`);
    if (debug && (e as Error).stack) process.stderr.write((e as Error).stack + "\n");
    return 2;
  }
  const err = e as Error;
  process.stderr.write(`psibox: unexpected error: ${oneLine((err?.message ?? String(e)).split("\n")[0] ?? "")}\n`);
  if (debug && err?.stack) process.stderr.write(err.stack + "\n");
  else process.stderr.write("(run again with --debug for the stack trace)\n");
  return 1;
}
