/**
 * resvg's class, loaded from its native package for this platform where
 * that package loads. resvg-js's own loader first asks whether Linux's C
 * library is musl through process.report.getReport(), a full diagnostic
 * report of the process (several milliseconds of CPU in each thread that
 * loads it); on Linux psibox tries the glibc build directly, with the
 * small wrapper resvg-js puts around it (the native class takes its
 * options as JSON text), and anything else (another system, a musl system
 * where that build does not load) goes through resvg-js's loader as before.
 */
import { createRequire } from "node:module";
import type { ResvgRenderOptions } from "@resvg/resvg-js";
import type { ResvgClass } from "./figure-draw.js";

const require = createRequire(import.meta.url);

/** The native package resvg-js would pick on this machine when its C library is glibc, or undefined off Linux. */
export function glibcPackage(platform: string = process.platform, arch: string = process.arch): string | undefined {
  return platform === "linux" && ["x64", "arm64", "riscv64"].includes(arch) ? `@resvg/resvg-js-linux-${arch}-gnu` : undefined;
}

let loaded: ResvgClass | undefined;

/** resvg's Resvg class (loaded once per thread). */
export function resvgClass(): ResvgClass {
  if (loaded) return loaded;
  const direct = glibcPackage();
  if (direct) {
    try {
      const Native = (require(direct) as { Resvg: new (svg: string, options: string) => InstanceType<ResvgClass> }).Resvg;
      loaded = class extends Native {
        constructor(svg: string, options?: ResvgRenderOptions) {
          super(svg, JSON.stringify(options));
        }
      };
    } catch {
      // not installed, or not loadable here (musl): resvg-js's loader below
    }
  }
  loaded ??= (require("@resvg/resvg-js") as { Resvg: ResvgClass }).Resvg;
  return loaded;
}
