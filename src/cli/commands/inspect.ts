/** `psibox inspect FILE`. */
import type { CommandSpec } from "../options.js";

export interface InspectFlags {
  json: boolean;
}

export const inspectSpec: CommandSpec<InspectFlags, [string]> = {
  name: "inspect",
  summary: "print a snapshot's metadata and field statistics",
  arguments: [{ name: "file", help: "a psibox snapshot (.h5)", required: true }],
  options: { json: { flags: "--json", help: "print JSON for scripts", default: false } },
  run: async ([file], flags) => (await import("../inspect-command.js")).inspectCommand(file, flags.json),
};
