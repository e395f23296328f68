/**
 * A figure worker (started by raster-pool.ts): draws each figure it is
 * sent with Vega and resvg (figure-draw.ts) and sends back the SVG and the
 * PNG's bytes, or the error's message. Vega is loaded as the worker starts
 * (while the main thread reads a snapshot), not with the first figure.
 *
 * resvg's rendered pixels and parsed SVG live outside the JavaScript heap,
 * freed only when their JavaScript handles are collected; the worker's heap
 * is small, so without help that happens rarely and every figure's
 * megabytes of pixels are fresh memory (more resident memory, and a page
 * fault per page touched). After each figure the worker collects its own
 * heap (a few milliseconds), so the next figure's drawing reuses the memory
 * the last one freed.
 */
import { createRequire } from "node:module";
import v8 from "node:v8";
import vm from "node:vm";
import { parentPort } from "node:worker_threads";
import { drawFigure, type FigureJob, type ResvgClass } from "./figure-draw.js";

const { Resvg } = createRequire(import.meta.url)("@resvg/resvg-js") as { Resvg: ResvgClass };
await import("./vega-svg.js");

/** This thread's garbage collector, or nothing where V8 does not give it. */
function collector(): (() => void) | undefined {
  try {
    // the flag takes effect for contexts made after it: one made here has the gc function
    v8.setFlagsFromString("--expose-gc");
    const gc: unknown = vm.runInNewContext("gc");
    return typeof gc === "function" ? (gc as () => void) : undefined;
  } catch {
    return undefined;
  }
}

const collect = collector();

/** Draw one figure and send it back (figures are drawn one at a time, in the order they came). */
async function draw(id: number, job: FigureJob): Promise<void> {
  try {
    const drawn = await drawFigure(Resvg, job);
    // a copy of its own: the encoder's buffer may be a slice of a shared pool
    const png = Uint8Array.from(drawn.png);
    parentPort!.postMessage({ id, svg: drawn.svg, png, width: drawn.width, height: drawn.height }, [png.buffer]);
  } catch (e) {
    parentPort!.postMessage({ id, error: e instanceof Error ? e.message : String(e) });
  }
  // resvg's memory is given back by the handles' finalizers, which run after this turn
  collect?.();
}

let queue = Promise.resolve();
parentPort!.on("message", ({ id, job }: { id: number; job: FigureJob }) => {
  queue = queue.then(() => draw(id, job));
});
