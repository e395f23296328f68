/** `psibox extend DIR --to END`: a completed run continued to a later end. */
import { QUIET_OPTION, type CommandSpec } from "../options.js";

export interface ExtendFlags {
  to: string;
  threads?: string;
  quiet: boolean;
}

export const extendSpec: CommandSpec<ExtendFlags, [string]> = {
  name: "extend",
  summary: "continue a completed run to a later end, bit for bit as if it had that end from the start",
  arguments: [{ name: "dir", help: "the run folder", required: true }],
  options: {
    to: { flags: "--to <end>", help: 'the new end: a duration of the whole run for static runs ("2 Gyr"), a redshift for expanding runs (0)', required: true },
    threads: { flags: "--threads <n>", help: "worker threads for the step (default: the number of cores; 1 below 2^17 cells in 1D and 2D, 2^18 in 3D)" },
    quiet: QUIET_OPTION,
  },
  run: async ([dir], flags) =>
    (await import("../run-command.js")).runCommand(undefined, {
      set: [],
      force: false,
      quiet: flags.quiet,
      resume: dir,
      extend: flags.to,
      ...(flags.threads !== undefined ? { threads: flags.threads } : {}),
    }),
};
