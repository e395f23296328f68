#!/usr/bin/env node
import { needsReexec, reexec } from "./address-space.js";

// under an address-space limit, run again with V8's WebAssembly reservations off (see address-space.ts)
process.exitCode = needsReexec() ? await reexec() : await (await import("./main.js")).main(process.argv.slice(2));
