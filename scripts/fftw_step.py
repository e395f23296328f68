#!/usr/bin/env python3
"""FFTW reference for psibox's 3D step (pyFFTW, FFTW_MEASURE), for scripts/bench.mjs.

Reads psi (complex128 .npy, 3D) and plans, once and before any timing, the
four transforms of a periodic kick-drift-kick step: an in-place complex
forward and backward transform of psi, and a real forward transform of the
density into its half spectrum and the real backward transform of the
potential. It then answers commands, one per line on stdin, so that the
caller can interleave its own timings with these in one run:

  transforms K   time the four transforms alone, K times (on copies of the field)
  step K         K full steps: the same step as scripts/numpy_step.py (static box,
                 periodic gravity, code units hbar/m = 1, 4 pi G = 1), on these transforms
  save PATH      write the stepped field (complex128 .npy)
  quit

Each timing command prints one line: K pairs "wall_ms,cpu_ms" (CPU time of the
whole process, all FFTW threads). The normalisation 1/N of the backward
transforms is folded into the drift's phase and the Poisson kernel.

Usage: python3 fftw_step.py IN.npy DT [--threads N]
"""
import sys
import time

import numpy as np
import pyfftw


def plan(shape, threads):
    """The four FFTW plans (FFTW_MEASURE) and their arrays."""
    axes = tuple(range(len(shape)))
    flags = ("FFTW_MEASURE",)
    half = shape[:-1] + (shape[-1] // 2 + 1,)
    psi = pyfftw.empty_aligned(shape, "complex128")
    real = pyfftw.empty_aligned(shape, "float64")
    spec = pyfftw.empty_aligned(half, "complex128")
    fwd = pyfftw.FFTW(psi, psi, axes=axes, direction="FFTW_FORWARD", flags=flags, threads=threads)
    bwd = pyfftw.FFTW(psi, psi, axes=axes, direction="FFTW_BACKWARD", flags=flags, threads=threads)
    rfwd = pyfftw.FFTW(real, spec, axes=axes, direction="FFTW_FORWARD", flags=flags, threads=threads)
    rbwd = pyfftw.FFTW(spec, real, axes=axes, direction="FFTW_BACKWARD", flags=flags + ("FFTW_DESTROY_INPUT",), threads=threads)
    return psi, real, spec, (fwd, bwd, rfwd, rbwd)


def kernels(shape, dt):
    """The drift's phase e^{-i k^2 dt/2} and the Poisson kernel -1/k^2 (0 at k = 0), each divided by N."""
    cells = float(np.prod(shape))
    ks = [2 * np.pi * np.fft.fftfreq(n, d=1.0 / n) for n in shape]  # unit box: k = 2 pi m
    k2 = sum(np.meshgrid(*[k * k for k in ks], indexing="ij"))
    kr = ks[:-1] + [2 * np.pi * np.fft.rfftfreq(shape[-1], d=1.0 / shape[-1])]
    k2r = sum(np.meshgrid(*[k * k for k in kr], indexing="ij"))
    green = np.zeros_like(k2r)
    green[k2r > 0] = -1.0 / k2r[k2r > 0]
    return np.exp(-0.5j * k2 * dt) / cells, green / cells


class Step:
    """The kick-drift-kick step of numpy_step.py on the FFTW plans; the potential stays in `real`."""

    def __init__(self, psi0, dt, threads):
        self.psi, self.real, self.spec, self.plans = plan(psi0.shape, threads)
        self.drift, self.green = kernels(psi0.shape, dt)
        self.dt = dt
        self.psi[...] = psi0
        self.potential()

    def potential(self):
        _, _, rfwd, rbwd = self.plans
        np.square(self.psi.real, out=self.real)
        self.real += np.square(self.psi.imag)
        rfwd.execute()
        self.spec *= self.green
        rbwd.execute()

    def kick(self):
        self.psi *= np.exp((-0.5j * self.dt) * self.real)

    def __call__(self):
        fwd, bwd, _, _ = self.plans
        self.kick()
        fwd.execute()
        self.psi *= self.drift
        bwd.execute()
        self.potential()
        self.kick()


def timed(run, count, prepare=None):
    out = []
    for _ in range(count):
        if prepare:
            prepare()
        w0, c0 = time.perf_counter(), time.process_time()
        run()
        out.append(f"{1000 * (time.perf_counter() - w0):.3f},{1000 * (time.process_time() - c0):.3f}")
    return " ".join(out)


def main():
    args = sys.argv[1:]
    threads = 2
    if "--threads" in args:
        i = args.index("--threads")
        threads = int(args[i + 1])
        del args[i : i + 2]
    src, dt = args[0], float(args[1])
    psi0 = np.load(src)
    step = Step(psi0, dt, threads)
    # the four transforms alone, on their own arrays (the stepped field stays untouched)
    t_psi, t_real, t_spec, t_plans = plan(psi0.shape, threads)

    def reset():  # unnormalised transforms would grow the values by N per round
        t_psi[...] = psi0
        np.square(np.abs(psi0), out=t_real)

    def four():
        for p in t_plans:
            p.execute()

    print("ready", flush=True)
    for line in sys.stdin:
        words = line.split()
        if not words or words[0] == "quit":
            break
        if words[0] == "transforms":
            print(timed(four, int(words[1]), reset), flush=True)
        elif words[0] == "step":
            print(timed(step, int(words[1])), flush=True)
        elif words[0] == "save":
            np.save(words[1], step.psi)
            print("saved", flush=True)


if __name__ == "__main__":
    main()
