/**
 * The parts every psibox Slurm script shares (a sweep's array, an
 * ensemble's array and their collect jobs): the #SBATCH header of the
 * checked [cluster] resources, the decoding of the paths the script needs
 * (hex data, never script text), the redirection of its output into the
 * folder's logs when the folder cannot go in an #SBATCH line, and writing
 * the scripts atomically as executables.
 */
import fs from "node:fs";
import { clusterSchema } from "../config/schema.js";
import { writeFileAtomic } from "../io/atomic.js";
import { UNHEX_FUNCTION, hexOf, jobName, type ClusterResources } from "./slurm-values.js";

/** The resources when a config has no [cluster] section (the section's defaults). */
export const DEFAULT_CLUSTER: ClusterResources = clusterSchema.parse({});

/** `#!/bin/bash` and the #SBATCH lines of job `name` with the (checked) resources `c`, plus `extra` lines. */
export function sbatchHeader(name: string, c: ClusterResources, extra: readonly string[]): string {
  return [
    "#!/bin/bash",
    `#SBATCH --job-name=${jobName(name)}`,
    ...(c.partition ? [`#SBATCH --partition=${c.partition}`] : []),
    `#SBATCH --time=${c.time}`,
    `#SBATCH --cpus-per-task=${c.cpus}`,
    `#SBATCH --mem=${c.memory}`,
    ...extra,
  ].join("\n");
}

/** Lines that send the script's output to `$DIRVAR/logs/NAME` when the folder could not go in an #SBATCH line. */
export function logRedirect(plain: boolean, dirVar: string, name: string): string {
  return plain ? "" : `mkdir -p "$${dirVar}/logs" && exec >>"$${dirVar}/logs/${name}.out" 2>>"$${dirVar}/logs/${name}.err"\n`;
}

/** The lines that decode the folder (into `dirVar`), node (NODE) and psibox (PSIBOX) from hex data. */
export function decodePaths(dirVar: string, what: string, dir: string, bin: string): string {
  return (
    `${UNHEX_FUNCTION}\n` +
    `# the ${what} folder, node and psibox, as hex-encoded data\n` +
    `unhex ${hexOf(dir)} ${dirVar}\n` +
    `unhex ${hexOf(process.execPath)} NODE\n` +
    `unhex ${hexOf(bin)} PSIBOX\n`
  );
}

/** Write `text` to each path atomically and make the scripts executable. */
export function writeScripts(files: ReadonlyArray<{ path: string; text: string; executable: boolean }>): void {
  for (const f of files) {
    writeFileAtomic(f.path, f.text);
    if (f.executable) fs.chmodSync(f.path, 0o755);
  }
}
