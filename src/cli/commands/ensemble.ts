/** `psibox ensemble CONFIG`: a truncated-Wigner ensemble of a run ([ensemble] section). */
import type { EnsembleFlags } from "../ensemble-command.js";
import { QUIET_OPTION, SET_OPTION, type CommandSpec } from "../options.js";

export const ensembleSpec: CommandSpec<EnsembleFlags, [string]> = {
  name: "ensemble",
  summary: "advance a truncated-Wigner ensemble of a config (classical start plus vacuum noise) and reduce it to means, the condensate number and their errors",
  arguments: [{ name: "config", help: "a TOML config file (its [ensemble] section, or the defaults)", required: true }],
  options: {
    set: SET_OPTION,
    workers: { flags: "--workers <n>", help: "worker threads, each advancing whole members (default: the number of cores)" },
    force: { flags: "--force", help: "replace an ensemble of other settings in the folder (the same ensemble is always continued)", default: false },
    quiet: QUIET_OPTION,
    emit: { flags: "--emit <target>", help: "set the ensemble folder up and write job scripts instead of running: slurm (an array whose tasks share the members, and a collect job that reduces them; resources from [cluster])" },
    tasks: { flags: "--tasks <n>", help: "array tasks sharing the members (default with --emit slurm: cluster.max_parallel, at most the members)" },
    task: { flags: "--task <i>", help: "advance only array task i's share (members j with j mod tasks = i; task 0 also the classical reference) into a folder set up by --emit slurm; no reduction" },
    reduce: { flags: "--reduce", help: "advance nothing: reduce the members the folder holds (the collect step; exit 3 when some are missing)", default: false },
  },
  run: async ([config], flags) => (await import("../ensemble-command.js")).ensembleCommand(config, flags),
};
