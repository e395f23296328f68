// The CLI's commands come from typed option tables (src/cli/commands/): each table registers with
// commander under its own keys, and parsing delivers the flags the command's type declares.
import { Command } from "commander";
import { describe, expect, it } from "vitest";
import { addCommand, type AnyCommandSpec, type CommandSpec } from "../../src/cli/options.js";
import { COMMANDS } from "../../src/cli/commands/index.js";
import { runSpec } from "../../src/cli/commands/run.js";
import { importSpec } from "../../src/cli/commands/import.js";
import { analyzeSpec } from "../../src/cli/commands/analyze.js";

/** Parse `argv` with one command whose action is replaced by a recorder. */
async function parsed(spec: AnyCommandSpec, argv: string[]): Promise<{ args: unknown[]; flags: Record<string, unknown> }> {
  let got: { args: unknown[]; flags: Record<string, unknown> } | undefined;
  const program = new Command().exitOverride().configureOutput({ writeErr: () => {}, writeOut: () => {} });
  addCommand(program, { ...spec, run: async (args: unknown[], flags: Record<string, unknown>) => ((got = { args, flags }), 7) }, (code) => expect(code).toBe(7));
  await program.parseAsync(argv, { from: "user" });
  return got!;
}

describe("CLI option tables", () => {
  it("every command registers, with distinct names", () => {
    const program = new Command();
    for (const spec of COMMANDS) addCommand(program, spec, () => {});
    expect(program.commands.map((c) => c.name())).toEqual(COMMANDS.map((c) => c.name));
    expect(new Set(COMMANDS.map((c) => c.name)).size).toBe(COMMANDS.length);
  });

  it("a table key that is not the option's own name is refused when the command is registered", () => {
    const bad: CommandSpec<{ outDir?: string }, []> = {
      name: "bad",
      summary: "",
      arguments: [],
      options: { outDir: { flags: "--out <dir>", help: "" } },
      run: async () => 0,
    };
    expect(() => addCommand(new Command(), bad, () => {})).toThrow(/outDir/);
  });

  it("parses repeatable, defaulted and negated options from the tables", async () => {
    const run = await parsed(runSpec, ["run", "a.toml", "--set", "grid.cells=[8]", "--set", "initial.seed=3", "--threads", "2"]);
    expect(run.args).toEqual(["a.toml"]);
    expect(run.flags).toEqual({ set: ["grid.cells=[8]", "initial.seed=3"], threads: "2", force: false, quiet: false });
    const imp = await parsed(importSpec, ["import", "f.npy", "--out", "f.h5", "--box", "1 kpc", "--particle-mass", "1e-22 eV"]);
    expect(imp.flags).toMatchObject({ out: "f.h5", box: "1 kpc", particleMass: "1e-22 eV", densityUnit: "Msun/kpc^3", gravity: "periodic" });
    const analyze = await parsed(analyzeSpec, ["analyze", "r1", "r2", "--no-pictures"]);
    expect(analyze.args).toEqual([["r1", "r2"]]);
    expect(analyze.flags).toEqual({ frames: false, movie: false, pictures: false });
  });

  it("a required option that is missing is a commander error, not a call", async () => {
    await expect(parsed(importSpec, ["import", "f.npy", "--box", "1 kpc", "--particle-mass", "1e-22 eV"])).rejects.toThrow(/--out/);
  });
});
