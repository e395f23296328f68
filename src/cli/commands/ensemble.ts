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
  },
  run: async ([config], flags) => (await import("../ensemble-command.js")).ensembleCommand(config, flags),
};
