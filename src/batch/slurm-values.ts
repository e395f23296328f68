/**
 * What may go into a Slurm batch script. Every value from a config that ends
 * up in an `#SBATCH` line is checked against the syntax Slurm's sbatch
 * documents for that option (and bounded), so no value can end a line or
 * start a shell command; everything else (folder and program paths) goes in
 * as hex-encoded data that the script decodes at run time, so no character
 * of a path is ever read as script text.
 */
import { ConfigError } from "../core/errors.js";
import { quoteValue } from "../core/sanitize.js";

/** The [cluster] section after checking. */
export interface ClusterResources {
  readonly partition?: string;
  readonly time: string;
  readonly cpus: number;
  readonly memory: string;
  readonly max_parallel: number;
}

const MAX_CPUS = 100_000;
const MAX_PARALLEL = 1_000_000;

function bad(key: string, value: unknown, valid: string): ConfigError {
  return new ConfigError(`cluster.${key}`, `${valid}; got ${quoteValue(value)}`);
}

/** Slurm partition list: names of letters, digits, `_`, `-`, `.`, separated by commas (sbatch --partition). */
export function checkPartition(value: string): string {
  if (!/^[A-Za-z0-9_.-]{1,64}(,[A-Za-z0-9_.-]{1,64}){0,31}$/.test(value)) {
    throw bad("partition", value, "must be a partition name (letters, digits, _ - .), or several separated by commas");
  }
  return value;
}

/**
 * Slurm time limit (sbatch --time): "M", "M:S", "H:M:S", "D-H", "D-H:M", "D-H:M:S",
 * with minutes and seconds below 60 and hours below 24 after a day count; longer than zero.
 */
export function checkTime(value: string): string {
  const valid = 'must be a Slurm time limit such as "30", "02:00:00" or "1-12:00:00" (minutes, H:M:S, or D-H:M:S), longer than zero';
  const m = /^(?:(\d{1,5})-(\d{1,2})(?::(\d{1,2})(?::(\d{1,2}))?)?|(\d{1,7})(?::(\d{1,2})(?::(\d{1,2}))?)?)$/.exec(value);
  if (!m) throw bad("time", value, valid);
  const n = (i: number) => (m[i] === undefined ? 0 : Number(m[i]));
  let seconds: number;
  if (m[1] !== undefined) {
    if (n(2) > 23 || n(3) > 59 || n(4) > 59) throw bad("time", value, valid);
    seconds = ((n(1) * 24 + n(2)) * 60 + n(3)) * 60 + n(4);
  } else if (m[7] !== undefined) {
    if (n(6) > 59 || n(7) > 59) throw bad("time", value, valid); // H:M:S
    seconds = (n(5) * 60 + n(6)) * 60 + n(7);
  } else if (m[6] !== undefined) {
    if (n(6) > 59) throw bad("time", value, valid); // M:S
    seconds = n(5) * 60 + n(6);
  } else {
    seconds = n(5) * 60; // M
  }
  if (!(seconds > 0)) throw bad("time", value, valid);
  return value;
}

/** Slurm memory per node (sbatch --mem): a whole number with an optional K, M, G or T suffix (default M), above zero. */
export function checkMemory(value: string): string {
  const m = /^(\d{1,12})([KMGTkmgt]?)$/.exec(value);
  if (!m || Number(m[1]) === 0) throw bad("memory", value, 'must be a whole amount above zero with an optional unit K, M, G or T, e.g. "4G" or "500M"');
  return value;
}

function checkCount(key: string, value: number, max: number): number {
  if (!(Number.isInteger(value) && value >= 1 && value <= max)) throw bad(key, value, `must be a whole number from 1 to ${max}`);
  return value;
}

/** Check every [cluster] value; returns them unchanged, or throws a ConfigError naming the key. */
export function checkCluster(c: ClusterResources): ClusterResources {
  return {
    ...(c.partition !== undefined ? { partition: checkPartition(c.partition) } : {}),
    time: checkTime(c.time),
    cpus: checkCount("cpus", c.cpus, MAX_CPUS),
    memory: checkMemory(c.memory),
    max_parallel: checkCount("max_parallel", c.max_parallel, MAX_PARALLEL),
  };
}

/** A Slurm job name made from any text: letters, digits, `_`, `-`, `.` only, at most 64 characters. */
export function jobName(text: string): string {
  const cleaned = text.replace(/[^A-Za-z0-9_.-]+/g, "_").slice(0, 64);
  return cleaned === "" ? "psibox" : cleaned;
}

/**
 * Can `p` appear in an `#SBATCH --output=` line? Only characters that neither
 * end the line, nor split the option, nor are Slurm's filename patterns (%).
 */
export function isPlainPath(p: string): boolean {
  return /^[A-Za-z0-9_./+,@=:~-]+$/.test(p);
}

/** Hex of the UTF-8 bytes of `text`: data with no character a shell would act on. */
export function hexOf(text: string): string {
  return Buffer.from(text, "utf8").toString("hex");
}

/** Bash function that decodes hex data into a variable, with builtins only: `unhex HEX NAME`. */
export const UNHEX_FUNCTION = [
  "unhex() {",
  '  local hex="$1" out="" i',
  '  for ((i = 0; i < ${#hex}; i += 2)); do out+="\\x${hex:i:2}"; done',
  '  printf -v "$2" "%b" "$out"',
  "}",
].join("\n");
