/** `psibox sweep CONFIG`, `--emit slurm`, `--summary DIR`. */
import type { SweepFlags } from "../sweep-command.js";
import { FORCE_OPTION, SET_OPTION, type CommandSpec } from "../options.js";

export const sweepSpec: CommandSpec<SweepFlags, [string | undefined]> = {
  name: "sweep",
  summary: "run a parameter sweep ([sweep] section) with a local worker pool, emit it as a Slurm job array, or rebuild its summary",
  arguments: [{ name: "config", help: "a TOML config with a [sweep] section" }],
  options: {
    set: { ...SET_OPTION, help: "override one config key of the base config (repeatable)" },
    workers: { flags: "--workers <n>", help: "child processes at once (default: the number of cores)" },
    emit: { flags: "--emit <target>", help: "write job scripts instead of running: slurm" },
    summary: { flags: "--summary <dir>", help: "rebuild sweep-summary.csv and .json from a sweep folder" },
    force: { ...FORCE_OPTION, help: "start afresh the entries whose earlier runs used another config (without it such a sweep is refused)" },
  },
  run: async ([config], flags) => (await import("../sweep-command.js")).sweepCommand(config, flags),
};
