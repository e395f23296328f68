/**
 * A figure worker (started by raster-pool.ts): draws each figure it is
 * sent (figure-draw.ts: psibox's chart writer, or Vega for the figures
 * still specified for it, and resvg) and sends back the SVG and the PNG's
 * bytes, or the error's message. Vega is loaded only with the first figure
 * that needs it: the figures of `psibox analyze` do not.
 *
 * resvg's rendered pixels and parsed SVG live outside the JavaScript heap,
 * freed only when their JavaScript handles are collected; the worker's heap
 * is small, so without help that happens rarely and every figure's
 * megabytes of pixels are fresh memory (more resident memory, and a page
 * fault per page touched). After each figure the worker collects its young
 * objects and lets the finalizers run before it starts the next figure, so
 * the next figure's drawing reuses the memory the last one freed. resvg's
 * allocator (mimalloc) keeps its default pages: asked for large ones
 * (2 MiB), each first touch of one could cost the kernel tens of
 * milliseconds of compaction on a busy machine, and resident memory grew in
 * 2 MiB steps. It asks fontconfig for the figure font's files as it starts.
 */
import v8 from "node:v8";
import vm from "node:vm";
import { parentPort } from "node:worker_threads";
import { drawFigure, type FigureJob } from "./figure-draw.js";
import { findFigureFont } from "./figure-font.js";
import { resvgClass } from "./resvg-binding.js";

// the figure font's two faces, asked of fontconfig while this thread loads resvg
const fonts = findFigureFont();
const Resvg = resvgClass();

/**
 * This thread's collector of young objects, or nothing where V8 does not give it: resvg's handles are made and
 * dropped within one figure, so a minor collection (a millisecond or two) finds them; a full one cost about 20 ms.
 */
function collector(): (() => void) | undefined {
  try {
    // the flag takes effect for contexts made after it: one made here has the gc function
    v8.setFlagsFromString("--expose-gc");
    const gc: unknown = vm.runInNewContext("gc");
    return typeof gc === "function" ? () => (gc as (o: { type: string }) => void)({ type: "minor" }) : undefined;
  } catch {
    return undefined;
  }
}

const collect = collector();

/** Draw one figure and send it back (figures are drawn one at a time, in the order they came). */
async function draw(id: number, job: FigureJob): Promise<void> {
  try {
    const drawn = await drawFigure(Resvg, job, await fonts);
    // sent by transfer: a buffer of its own as it is, a copy where it is a slice of a shared pool
    const own = drawn.png.buffer instanceof ArrayBuffer && drawn.png.byteOffset === 0 && drawn.png.byteLength === drawn.png.buffer.byteLength;
    const png = own ? (drawn.png as Uint8Array<ArrayBuffer>) : new Uint8Array(drawn.png);
    parentPort!.postMessage({ id, svg: drawn.svg, png, width: drawn.width, height: drawn.height }, [png.buffer]);
  } catch (e) {
    parentPort!.postMessage({ id, error: e instanceof Error ? e.message : String(e) });
  }
  // resvg's memory is given back by the handles' finalizers, queued by the collection and run in a later turn of the
  // event loop: the next figure (queued already as a promise) waits for that turn, so that it reuses the memory
  collect?.();
  await new Promise((settled) => setImmediate(settled));
}

let queue = Promise.resolve();
parentPort!.on("message", ({ id, job }: { id: number; job: FigureJob }) => {
  queue = queue.then(() => draw(id, job));
});
