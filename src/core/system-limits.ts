/** Limits the operating system sets on this process. */
import fs from "node:fs";

/** The soft address-space limit of this process in bytes (ulimit -v, from /proc/self/limits), or undefined when there is none or it cannot be read. */
export function addressSpaceLimit(): number | undefined {
  let text: string;
  try {
    text = fs.readFileSync("/proc/self/limits", "utf8");
  } catch {
    return undefined;
  }
  const line = text.split("\n").find((l) => l.startsWith("Max address space"));
  const soft = line?.slice("Max address space".length).trim().split(/\s+/)[0];
  const bytes = Number(soft);
  return soft === undefined || soft === "unlimited" || !Number.isFinite(bytes) ? undefined : bytes;
}
