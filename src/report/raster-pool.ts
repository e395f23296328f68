/**
 * Drawing figures on worker threads (raster-worker.ts, figure-draw.ts):
 * each worker rasterises with resvg, puts a plane picture's cells in and
 * encodes the PNG itself, so none of it holds the main thread (a 3× figure
 * is several megabytes of pixels). One worker, started on first use (or
 * early, by `prepareFigures` in render.ts): beside the main thread, which
 * computes the numbers and builds the SVGs, and the transforms' thread, it
 * keeps two cores busy, and a second worker cost more CPU time (its start,
 * a second copy of resvg's working memory) and memory than it saved; many
 * figures of the same kind (a movie's frames) ask for a second worker
 * (`rasterPool(2)`, never more than the cores). Idle workers do not keep
 * the process alive. If a worker cannot be started the caller falls back to
 * drawing on this thread (`null` from `rasterPool`).
 */
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import type { FigureJob } from "./figure-draw.js";

/** A drawn figure: the SVG file's text, the PNG file's bytes and its size in pixels. */
export interface Raster {
  readonly svg: string;
  readonly png: Buffer;
  readonly width: number;
  readonly height: number;
}

/** The worker script: the built report/raster-worker.js (from the sources, as under the tests, the one in dist/). */
function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  return here.endsWith(".ts") ? path.resolve(path.dirname(here), "../../dist/report/raster-worker.js") : path.join(path.dirname(here), "raster-worker.js");
}

interface Pending {
  readonly resolve: (r: Raster) => void;
  readonly reject: (e: Error) => void;
}

class Rasteriser {
  private readonly pending = new Map<number, Pending>();
  private readonly worker: Worker;
  private broken: Error | undefined;

  constructor() {
    this.worker = new Worker(workerScript());
    this.worker.on("message", (m: { id: number; svg: string; png?: Uint8Array; width: number; height: number; error?: string }) => {
      const p = this.pending.get(m.id);
      this.settle(m.id);
      if (!p) return;
      if (m.png) p.resolve({ svg: m.svg, png: Buffer.from(m.png.buffer, m.png.byteOffset, m.png.length), width: m.width, height: m.height });
      else p.reject(new Error(`drawing a figure failed: ${m.error}`));
    });
    const fail = (e: Error) => {
      this.broken = e;
      for (const [id, p] of this.pending) {
        this.settle(id);
        p.reject(e);
      }
    };
    this.worker.on("error", fail);
    this.worker.on("exit", (code) => fail(new Error(`the figure worker stopped (exit code ${code})`)));
    // after the listeners: adding a "message" listener refs the worker again
    this.worker.unref();
  }

  get load(): number {
    return this.broken ? Infinity : this.pending.size;
  }

  render(id: number, job: FigureJob): Promise<Raster> {
    if (this.broken) return Promise.reject(this.broken);
    return new Promise((resolve, reject) => {
      if (this.pending.size === 0) this.worker.ref();
      this.pending.set(id, { resolve, reject });
      this.worker.postMessage({ id, job });
    });
  }

  private settle(id: number): void {
    this.pending.delete(id);
    if (this.pending.size === 0) this.worker.unref();
  }
}

/** Workers that draw figures, each taking the next figure when it has the fewest waiting. */
export class RasterPool {
  private readonly workers: Rasteriser[];
  private next = 0;

  constructor(count: number) {
    this.workers = Array.from({ length: count }, () => new Rasteriser());
  }

  /** Start workers up to `count`. */
  widen(count: number): void {
    while (this.workers.length < count) this.workers.push(new Rasteriser());
  }

  render(job: FigureJob): Promise<Raster> {
    const worker = this.workers.reduce((best, w) => (w.load < best.load ? w : best));
    return worker.render(this.next++, job);
  }
}

let pool: RasterPool | null | undefined;

/** The process's figure workers, at least `workers` of them where the machine has the cores (started on first call; null where workers cannot start). */
export function rasterPool(workers = 1): RasterPool | null {
  const count = Math.min(workers, Math.max(1, os.availableParallelism?.() ?? os.cpus().length));
  try {
    if (pool === undefined) pool = new RasterPool(count);
    else pool?.widen(count);
  } catch {
    pool ??= null;
  }
  return pool;
}
