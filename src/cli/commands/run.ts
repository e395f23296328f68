/** `psibox run CONFIG` and `psibox run --resume DIR`. */
import type { RunFlags } from "../run-command.js";
import { FORCE_OPTION, QUIET_OPTION, SET_OPTION, type CommandSpec } from "../options.js";

export const runSpec: CommandSpec<RunFlags, [string | undefined]> = {
  name: "run",
  summary: "advance the field of a config file and write snapshots, the time series and a summary",
  arguments: [{ name: "config", help: "a TOML config file" }],
  options: {
    set: SET_OPTION,
    resume: { flags: "--resume <dir>", help: "continue a stopped or killed run from its checkpoint" },
    threads: { flags: "--threads <n>", help: "worker threads for the step (default: the number of cores; 1 below 2^17 cells in 1D and 2D, 2^18 in 3D)" },
    force: FORCE_OPTION,
    quiet: QUIET_OPTION,
  },
  run: async ([config], flags) => (await import("../run-command.js")).runCommand(config, flags),
};
