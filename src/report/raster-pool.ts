/**
 * Rasterising SVG to PNG on worker threads: each worker draws with resvg
 * and encodes the PNG itself, so neither step holds the main thread (resvg's
 * asynchronous render runs on libuv's pool, but its PNG encoder runs where it
 * is called, and a 3× figure is several megabytes of pixels). Two workers
 * (one on a single core; each costs memory, and the main thread building the
 * SVGs keeps no more than two busy), started on first use (or early, by
 * `prepareFigures` in render.ts); idle workers do not keep the process alive. If a worker cannot be started
 * the caller falls back to drawing on this thread (`null` from `rasterPool`).
 */
import os from "node:os";
import { createRequire } from "node:module";
import { Worker } from "node:worker_threads";
import type { ResvgRenderOptions } from "@resvg/resvg-js";

/** A drawn picture: the PNG file's bytes and its size in pixels. */
export interface Raster {
  readonly png: Buffer;
  readonly width: number;
  readonly height: number;
}

// the worker: draw, encode, and send the PNG's bytes back (copied into a transferable buffer)
const WORKER = `
const { parentPort, workerData } = require("node:worker_threads");
const { Resvg } = require(workerData.resvg);
parentPort.on("message", ({ id, svg, options }) => {
  try {
    const image = new Resvg(svg, options).render();
    const png = Uint8Array.from(image.asPng());
    parentPort.postMessage({ id, png, width: image.width, height: image.height }, [png.buffer]);
  } catch (e) {
    parentPort.postMessage({ id, error: String(e && e.message ? e.message : e) });
  }
});
`;

interface Pending {
  readonly resolve: (r: Raster) => void;
  readonly reject: (e: Error) => void;
}

class Rasteriser {
  private readonly pending = new Map<number, Pending>();
  private readonly worker: Worker;
  private broken: Error | undefined;

  constructor(resvg: string) {
    this.worker = new Worker(WORKER, { eval: true, workerData: { resvg } });
    this.worker.on("message", (m: { id: number; png?: Uint8Array; width: number; height: number; error?: string }) => {
      const p = this.pending.get(m.id);
      this.settle(m.id);
      if (!p) return;
      if (m.png) p.resolve({ png: Buffer.from(m.png.buffer, m.png.byteOffset, m.png.length), width: m.width, height: m.height });
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

  render(id: number, svg: string, options: ResvgRenderOptions): Promise<Raster> {
    if (this.broken) return Promise.reject(this.broken);
    return new Promise((resolve, reject) => {
      if (this.pending.size === 0) this.worker.ref();
      this.pending.set(id, { resolve, reject });
      this.worker.postMessage({ id, svg, options });
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
    const resvg = createRequire(import.meta.url).resolve("@resvg/resvg-js");
    this.workers = Array.from({ length: count }, () => new Rasteriser(resvg));
  }

  render(svg: string, options: ResvgRenderOptions): Promise<Raster> {
    const worker = this.workers.reduce((best, w) => (w.load < best.load ? w : best));
    return worker.render(this.next++, svg, options);
  }
}

let pool: RasterPool | null | undefined;

/** The process's figure workers (started on first call; null where workers cannot start). */
export function rasterPool(): RasterPool | null {
  if (pool !== undefined) return pool;
  try {
    pool = new RasterPool(Math.min(2, Math.max(1, os.availableParallelism?.() ?? os.cpus().length)));
  } catch {
    pool = null;
  }
  return pool;
}
