/** `psibox init TEMPLATE [DIR]` and `psibox init --list`. */
import type { InitFlags } from "../init-command.js";
import type { CommandSpec } from "../options.js";

export const initSpec: CommandSpec<InitFlags, [string | undefined, string]> = {
  name: "init",
  summary: "write a commented starter config from a template",
  arguments: [
    { name: "template", help: "template name (see --list)" },
    { name: "dir", help: "folder to write it into", default: "." },
  ],
  options: {
    list: { flags: "--list", help: "list the templates", default: false },
    force: { flags: "--force", help: "overwrite an existing file", default: false },
  },
  run: async ([template, dir], flags) => (await import("../init-command.js")).initCommand(template, dir, flags),
};
