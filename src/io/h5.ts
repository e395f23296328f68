/**
 * The thin HDF5 adapter: loads h5wasm's Node build once, turns on its
 * throwing error handler (otherwise many HDF5 failures are silent), and
 * offers atomic file creation and checked opening. HDF5 error stacks are
 * reduced to their last line for messages.
 */
import fs from "node:fs";
import { commitAtomic, temporaryPathFor } from "./atomic.js";
import h5wasm, { Dataset, Group, Module as loadedModule, type File as H5File, type FileOptions } from "h5wasm/node";
import { InputError } from "../core/errors.js";
import { writeFailure } from "./write-failure.js";

export type { H5File };
export { Dataset, Group };

type Module = Awaited<typeof h5wasm.ready> & { activate_throwing_error_handler(): number };
let ready: Promise<void> | undefined;

/** Load the HDF5 library (once). */
export function loadHdf5(): Promise<void> {
  ready ??= (async () => {
    const module = (await h5wasm.ready) as Module;
    module.activate_throwing_error_handler();
  })();
  return ready;
}

/** The loaded HDF5 module itself (its heap and low-level calls); loadHdf5() first. */
export function h5Module(): typeof loadedModule {
  if (!loadedModule) throw new Error("the HDF5 library is not loaded (call loadHdf5 first)");
  return loadedModule;
}

/** The last informative line of an HDF5 error stack. */
export function hdf5Reason(e: unknown): string {
  const text = (e as Error)?.message ?? String(e);
  const minor = [...text.matchAll(/minor: (.*)/g)].map((m) => m[1]?.trim()).filter(Boolean);
  const last = minor.at(-1);
  if (last) return last;
  return text.split("\n").find((l) => l.trim() !== "")?.trim().slice(0, 200) ?? "unknown HDF5 error";
}

/**
 * Write an HDF5 file atomically: build it as a hidden temporary file in the
 * target folder, close, fsync, rename over the target, fsync the folder (at
 * the end of the writeTogether it is part of, if any).
 * `options.track_order` keeps objects and attributes in creation order. Call loadHdf5() first.
 */
export function writeHdf5Atomic(finalPath: string, fill: (file: H5File) => void, options: FileOptions = {}): void {
  const tmp = temporaryPathFor(finalPath);
  let file: H5File | undefined;
  try {
    file = new h5wasm.File(tmp, "w", options);
    fill(file);
    const status = file.close();
    file = undefined;
    if (status < 0) throw new Error("closing the file failed");
  } catch (e) {
    if (file) {
      try {
        file.close();
      } catch {
        /* already failing */
      }
    }
    try {
      fs.unlinkSync(tmp);
    } catch {
      /* nothing to clean */
    }
    throw writeFailure(finalPath, e, hdf5Reason(e));
  }
  commitAtomic(tmp, finalPath);
}

/** Open an HDF5 file for reading; a missing, truncated or non-HDF5 file is an InputError naming it. */
export function openHdf5(file: string): H5File {
  if (!fs.existsSync(file)) throw new InputError(`${file}: no such file`);
  if (!fs.statSync(file).isFile()) throw new InputError(`${file}: not a file`);
  try {
    return new h5wasm.File(file, "r");
  } catch (e) {
    throw new InputError(`${file}: not a readable HDF5 file (${hdf5Reason(e)})`);
  }
}
