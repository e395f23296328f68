/**
 * The helper thread of shared reads (shared-read.ts): for each job, the
 * slabs it takes from the job's shared counter, read from the file and
 * interleaved into ψ; a slab that fails is marked so (the main thread reads it).
 */
import fs from "node:fs";
import { parentPort } from "node:worker_threads";
import { DONE, FAILED, psiReading, settle, sharedClaims, type ReadJob } from "./shared-read.js";
import { readPieces } from "./row-read.js";

function help(job: ReadJob): void {
  const words = new Int32Array(job.control);
  const slabs = Math.ceil(job.shape[0]! / job.step);
  const { buffers, take } = psiReading(new Float64Array(job.psi, job.psiOffset, job.psiLength), job.wasm, job.psiLength / 2 / job.shape[0]!, job.step, job.size, 1);
  let current = -1;
  const claims = sharedClaims(words, job.step, slabs);
  let fd: number | undefined;
  try {
    fd = fs.openSync(job.file, "r");
    const claim = (): number => (current = claims.claim());
    readPieces(fd, job.file, job.paths, job.pieces, job.shape, job.size, (r0, r1, s) => {
      take(r0, r1, s);
      settle(words, r0 / job.step, DONE);
    }, { step: job.step, claim }, buffers);
  } catch {
    if (current >= 0) settle(words, current, FAILED);
  } finally {
    if (fd !== undefined) fs.closeSync(fd);
  }
}

parentPort?.on("message", help);
