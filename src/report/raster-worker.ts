/**
 * A figure worker (started by raster-pool.ts): draws each figure it is
 * sent with resvg (figure-draw.ts) and sends back the SVG and the PNG's
 * bytes, or the error's message.
 */
import { createRequire } from "node:module";
import { parentPort } from "node:worker_threads";
import { drawFigure, type FigureJob, type ResvgClass } from "./figure-draw.js";

const { Resvg } = createRequire(import.meta.url)("@resvg/resvg-js") as { Resvg: ResvgClass };

parentPort!.on("message", ({ id, job }: { id: number; job: FigureJob }) => {
  try {
    const drawn = drawFigure(Resvg, job);
    // a copy of its own: the encoder's buffer may be a slice of a shared pool
    const png = Uint8Array.from(drawn.png);
    parentPort!.postMessage({ id, svg: drawn.svg, png, width: drawn.width, height: drawn.height }, [png.buffer]);
  } catch (e) {
    parentPort!.postMessage({ id, error: e instanceof Error ? e.message : String(e) });
  }
});
