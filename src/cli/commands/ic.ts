/** `psibox ic CONFIG`: the initial conditions only. */
import type { IcFlags } from "../run-command.js";
import { FORCE_OPTION, QUIET_OPTION, SET_OPTION, type CommandSpec } from "../options.js";

export const icSpec: CommandSpec<IcFlags, [string]> = {
  name: "ic",
  summary: "write a config's initial conditions (snapshot 0, and the spectrum table of a cosmological field) without running",
  arguments: [{ name: "config", help: "a TOML config file", required: true }],
  options: {
    set: { ...SET_OPTION, help: "override one config key (repeatable)" },
    force: FORCE_OPTION,
    quiet: QUIET_OPTION,
  },
  run: async ([config], flags) => (await import("../run-command.js")).runCommand(config, { ...flags, initialOnly: true }),
};
