/**
 * Running under an address-space limit (ulimit -v, common on cluster login
 * nodes). V8 reserves several gigabytes of address space for every
 * WebAssembly memory (guard regions for its out-of-bounds trap handler), so
 * under a limit of a few GB the HDF5 library's module cannot even be created,
 * whatever the grid. Node's --disable-wasm-trap-handler makes V8 check bounds
 * explicitly and reserve only what a memory holds; when a limit is set, the
 * CLI runs itself again with that flag (once), passing signals on and
 * stopping its child when its own parent (a sweep) is gone.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";

/** The flag that turns off V8's trap-handler reservations. */
export const NO_TRAP_HANDLER = "--disable-wasm-trap-handler";
const MARK = "PSIBOX_ADDRESS_SPACE_REEXEC";

/** The soft address-space limit of this process in bytes (from /proc/self/limits), or undefined when there is none or it cannot be read. */
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

/** Whether this process should run itself again with the flag. */
export function needsReexec(): boolean {
  return addressSpaceLimit() !== undefined && !process.execArgv.includes(NO_TRAP_HANDLER) && process.env[MARK] !== "1";
}

/** Run the same command in a child Node.js with the flag; resolves to its exit code. */
export function reexec(): Promise<number> {
  const parent = process.ppid;
  const child = spawn(process.execPath, [...process.execArgv, NO_TRAP_HANDLER, ...process.argv.slice(1)], {
    stdio: "inherit",
    env: { ...process.env, [MARK]: "1", ...(process.env["PSIBOX_PARENT_PID"] ? { PSIBOX_PARENT_PID: String(process.pid) } : {}) },
  });
  const forward = (signal: NodeJS.Signals) => () => child.kill(signal);
  const handlers = (["SIGINT", "SIGTERM", "SIGHUP"] as const).map((s) => [s, forward(s)] as const);
  for (const [s, h] of handlers) process.on(s, h);
  // a run under a sweep stops when the sweep is gone: pass that on to the child
  const watch = process.env["PSIBOX_PARENT_PID"] ? setInterval(() => process.ppid !== parent && child.kill("SIGTERM"), 500) : undefined;
  return new Promise((resolve) => {
    child.on("close", (code, signal) => {
      if (watch) clearInterval(watch);
      for (const [s, h] of handlers) process.removeListener(s, h);
      resolve(code ?? (signal === "SIGINT" || signal === "SIGTERM" ? 130 : 1));
    });
  });
}
