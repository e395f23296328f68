/** `psibox init TEMPLATE [DIR]` and `psibox init --list`: starter configs from the shipped templates. */
import { shorten } from "../core/sanitize.js";
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";

/** The folder of shipped templates (configs/ in the package). */
export function templateDir(): string {
  return path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../configs");
}

/** Template names and their one-line descriptions (the first comment line). */
export function listTemplates(): { name: string; description: string }[] {
  return fs
    .readdirSync(templateDir())
    .filter((f) => f.endsWith(".toml"))
    .sort()
    .map((f) => {
      const first = fs.readFileSync(path.join(templateDir(), f), "utf8").split("\n")[0] ?? "";
      return { name: f.replace(/\.toml$/, ""), description: first.replace(/^#\s*/, "") };
    });
}

/** Write a template into a folder; returns the written path. */
export function initTemplate(name: string, dir: string, force: boolean): string {
  const templates = listTemplates();
  const t = templates.find((x) => x.name === name);
  if (!t) throw new InputError(`unknown template "${shorten(name)}"; choose one of: ${templates.map((x) => x.name).join(", ")}`);
  if (fs.existsSync(dir) && !fs.statSync(dir).isDirectory()) throw new InputError(`${fileName(dir)} exists and is not a folder; psibox init TEMPLATE [DIR] writes DIR/TEMPLATE.toml`);
  fs.mkdirSync(dir, { recursive: true });
  const target = path.join(dir, `${name}.toml`);
  if (fs.existsSync(target) && !force) throw new InputError(`${target} exists; pass --force to overwrite it`);
  fs.copyFileSync(path.join(templateDir(), `${name}.toml`), target);
  return target;
}

export interface InitFlags {
  list: boolean;
  force: boolean;
}

/** `psibox init`: list the templates, or write one; returns the exit code (2 when no template is named). */
export async function initCommand(template: string | undefined, dir: string, flags: InitFlags): Promise<number> {
  if (flags.list || template === undefined) {
    const list = listTemplates();
    const width = Math.max(...list.map((t) => t.name.length));
    process.stdout.write(list.map((t) => `${t.name.padEnd(width)}  ${t.description}`).join("\n") + "\n");
    return flags.list ? 0 : 2;
  }
  const file = initTemplate(template, dir, flags.force);
  process.stdout.write(`wrote ${file}; run it with: psibox run ${file}\n`);
  return 0;
}
