/**
 * Finds a Python interpreter that has the given modules: every `python3` on
 * PATH is tried in order (a PATH may hold several installs, and only one of
 * them may carry the system's packages), or PSIBOX_PYTHON when set.
 */
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

export function pythonWith(modules: readonly string[]): string | undefined {
  const candidates = process.env["PSIBOX_PYTHON"]
    ? [process.env["PSIBOX_PYTHON"]]
    : (process.env["PATH"] ?? "").split(path.delimiter).filter(Boolean).map((d) => path.join(d, "python3"));
  const seen = new Set<string>();
  for (const exe of candidates) {
    if (!fs.existsSync(exe)) continue;
    const real = fs.realpathSync(exe);
    if (seen.has(real)) continue;
    seen.add(real);
    const r = spawnSync(exe, ["-c", `import ${modules.join(", ")}`], { encoding: "utf8" });
    if (r.status === 0) return exe;
  }
  return undefined;
}
