/**
 * Commands declared as data. Each command of psibox is one `CommandSpec`
 * (in `cli/commands/`): its positional arguments and a typed options table
 * with one entry per property of the command's flags type, so that the
 * parsed flags, the help text and the command's own code cannot drift apart
 * (a flag the type has and the table lacks, or a default of the wrong type,
 * is a compile error; a table key that commander would store under another
 * name is an error when the command is registered). commander does the
 * parsing and writes the help from these tables.
 */
import { Command, Option } from "commander";

/** One option: commander's flag syntax, its help line, and optionally a default, a parser or `required`. */
export interface OptionSpec<T> {
  /** e.g. `"--out <file>"`, `"-q, --quiet"`, `"--no-pictures"` (the table key is the camel-cased long name). */
  readonly flags: string;
  readonly help: string;
  readonly default?: T;
  /** The option must be given. */
  readonly required?: boolean;
  /** Turns the text into the value; `previous` is the value so far (for repeatable options). */
  readonly parse?: (text: string, previous: T) => T;
}

/** The options table of a command whose parsed flags have the type F: one entry per property of F. */
export type OptionTable<F> = { readonly [K in keyof F]-?: OptionSpec<F[K]> };

/** A positional argument. */
export interface ArgumentSpec {
  readonly name: string;
  readonly help: string;
  readonly required?: boolean;
  /** Takes all remaining arguments (a list). */
  readonly variadic?: boolean;
  readonly default?: string;
}

/** One command: name, one-line description, arguments, options table and what it runs (the exit code). */
export interface CommandSpec<F, A extends unknown[]> {
  readonly name: string;
  readonly summary: string;
  readonly arguments: readonly ArgumentSpec[];
  readonly options: OptionTable<F>;
  /** Runs the command; load heavy modules inside (dynamic import), so that other commands start fast. */
  readonly run: (args: A, flags: F) => Promise<number>;
}

/** A command spec of any flags type (for lists of commands). */
export type AnyCommandSpec = CommandSpec<any, any>;

/** Collects a repeatable option's values in order. */
export function collect(text: string, previous: string[]): string[] {
  return [...previous, text];
}

/** The repeatable `--set key=value` of commands that read a config. */
export const SET_OPTION: OptionSpec<string[]> = {
  flags: "--set <key=value>",
  help: "override one config key, e.g. --set grid.cells=[64,64] (repeatable)",
  default: [],
  parse: collect,
};

/** `--force` of commands that write a run folder. */
export const FORCE_OPTION: OptionSpec<boolean> = {
  flags: "--force",
  help: "overwrite the files of an earlier run in the same output folder",
  default: false,
};

/** `-q, --quiet`. */
export const QUIET_OPTION: OptionSpec<boolean> = { flags: "-q, --quiet", help: "no progress output", default: false };

function argumentSyntax(a: ArgumentSpec): string {
  const name = a.variadic ? `${a.name}...` : a.name;
  return a.required ? `<${name}>` : `[${name}]`;
}

/** Add a command to `program`; `exit` receives the command's exit code. */
export function addCommand<F, A extends unknown[]>(program: Command, spec: CommandSpec<F, A>, exit: (code: number) => void): void {
  const command = program.command(spec.name).description(spec.summary);
  for (const a of spec.arguments) command.argument(argumentSyntax(a), a.help, a.default);
  for (const [key, o] of Object.entries(spec.options) as [string, OptionSpec<unknown>][]) {
    const option = new Option(o.flags, o.help);
    if (option.attributeName() !== key) {
      throw new Error(`psibox ${spec.name}: the options table key "${key}" does not match ${o.flags} (${option.attributeName()})`);
    }
    if (o.parse) option.argParser(o.parse);
    if (o.default !== undefined) option.default(o.default);
    if (o.required) option.makeOptionMandatory();
    command.addOption(option);
  }
  command.action(async (...given: unknown[]) => {
    // commander passes the positional arguments, then the parsed options, then the command
    const flags = given[spec.arguments.length] as F;
    exit(await spec.run(given.slice(0, spec.arguments.length) as A, flags));
  });
}
