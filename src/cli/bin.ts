#!/usr/bin/env node
import { addressSpaceLimit, loadHdf5Capped, needsReexec, reexec } from "./address-space.js";

// under an address-space limit, run again with V8's WebAssembly reservations off, and HDF5's heap capped (see address-space.ts)
if (needsReexec()) process.exitCode = await reexec();
else {
  if (addressSpaceLimit() !== undefined) await loadHdf5Capped();
  process.exitCode = await (await import("./main.js")).main(process.argv.slice(2));
}
