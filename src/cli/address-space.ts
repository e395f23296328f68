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
import v8 from "node:v8";
import { addressSpaceLimit } from "../core/system-limits.js";

/** The flag that turns off V8's trap-handler reservations. */
export const NO_TRAP_HANDLER = "--disable-wasm-trap-handler";
const MARK = "PSIBOX_ADDRESS_SPACE_REEXEC";

export { addressSpaceLimit };

/**
 * HDF5's heap (a WebAssembly memory that can grow to 2 GiB) reserves its
 * whole maximum even with the trap handler off; psibox reads and writes in
 * slabs (io/slabs.ts), so 512 MiB is plenty. Under a limit the CLI caps
 * WebAssembly memories at that size while HDF5 loads, then lifts the cap
 * so that the step's own memory (sized exactly to the grid) can be up to
 * 4 GiB again.
 */
export const HDF5_HEAP_PAGES = 8192;
const WASM_MAX_PAGES = 65536;

/** Load HDF5 with its heap capped at HDF5_HEAP_PAGES (64 KiB each), then lift the cap. */
export async function loadHdf5Capped(): Promise<void> {
  v8.setFlagsFromString(`--wasm-max-mem-pages=${HDF5_HEAP_PAGES}`);
  try {
    await (await import("../io/h5.js")).loadHdf5();
  } finally {
    v8.setFlagsFromString(`--wasm-max-mem-pages=${WASM_MAX_PAGES}`);
  }
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
