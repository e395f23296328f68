#!/usr/bin/env python3
"""NumPy reference of psibox's kick-drift-kick step (static box, periodic gravity, code units
hbar/m = 1, 4 pi G = 1), for scripts/bench.mjs. Reads psi (complex128 .npy, shape n x n x n) and
writes psi after `steps` steps of size `dt`; prints the median time per step in ms.

Usage: python3 numpy_step.py IN.npy OUT.npy STEPS DT
"""
import sys
import time

import numpy as np


def main():
    src, dst, steps, dt = sys.argv[1], sys.argv[2], int(sys.argv[3]), float(sys.argv[4])
    psi = np.load(src)
    shape = psi.shape
    ks = [2 * np.pi * np.fft.fftfreq(n, d=1.0 / n) for n in shape]  # unit box: k = 2 pi m
    k2 = sum(np.meshgrid(*[k * k for k in ks], indexing="ij"))
    kr = [2 * np.pi * np.fft.fftfreq(n, d=1.0 / n) for n in shape[:-1]] + [2 * np.pi * np.fft.rfftfreq(shape[-1], d=1.0 / shape[-1])]
    k2r = sum(np.meshgrid(*[k * k for k in kr], indexing="ij"))
    green = np.zeros_like(k2r)
    green[k2r > 0] = -1.0 / k2r[k2r > 0]
    drift = np.exp(-0.5j * k2 * dt)

    def potential(p):
        rho = (p.real ** 2 + p.imag ** 2)
        return np.fft.irfftn(np.fft.rfftn(rho) * green, s=shape, axes=tuple(range(len(shape))))

    phi = potential(psi)
    times = []
    for _ in range(steps):
        t0 = time.perf_counter()
        psi = psi * np.exp(-1j * phi * (0.5 * dt))
        psi = np.fft.ifftn(np.fft.fftn(psi) * drift)
        phi = potential(psi)
        psi = psi * np.exp(-1j * phi * (0.5 * dt))
        times.append(time.perf_counter() - t0)
    np.save(dst, psi)
    print(f"{1000 * sorted(times)[len(times) // 2]:.3f}")


if __name__ == "__main__":
    main()
