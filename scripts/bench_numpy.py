#!/usr/bin/env python3
"""numpy timings for scripts/bench.ts (same cases, same algorithms, same sizes).

Usage: python3 scripts/bench_numpy.py <case> [<case> ...]
Prints one JSON line per case: {"case": ..., "numpyMedianMs": ...}.
Data are seeded random complex snapshots of the case's size (timings do not
depend on the values). BLAS threads are left at numpy's default (scripts/bench.ts passes its environment).
"""
import json
import sys
import time

import numpy as np


def pipeline(x):
    n = x.shape[1]
    r = x @ x.conj().T / n
    r = (r + r.conj().T) / 2
    w, v = np.linalg.eigh(r)
    es = v[:, ::-1][:, :2]
    psi = np.linalg.pinv(es[:-1]) @ es[1:]
    mu = np.angle(np.linalg.eigvals(psi))
    return np.sort(np.degrees(np.arcsin(np.clip(mu / np.pi, -1, 1))))


def music(r):
    w, v = np.linalg.eigh(r)
    en = v[:, :-2]  # eigh is ascending: the M−K smallest
    grid = (np.arange(18001) - 9000) / 100.0
    a = np.exp(1j * np.pi * np.arange(r.shape[0])[:, None] * np.sin(np.radians(grid))[None, :])
    return 1.0 / np.sum(np.abs(en.conj().T @ a) ** 2, axis=0)


def root_music(x):
    """Covariance, eigh, the root-MUSIC polynomial and np.roots (companion-matrix eigenvalues);
    roots with |z| <= 1 closest to the circle (the cheap selection; the engine pairs z with 1/z*,
    which costs it more, so this favours numpy)."""
    n = x.shape[1]
    m = x.shape[0]
    r = x @ x.conj().T / n
    r = (r + r.conj().T) / 2
    w, v = np.linalg.eigh(r)
    en = v[:, :-2]
    c = en @ en.conj().T
    idx = np.arange(m)
    off = idx[None, :] - idx[:, None]  # column - row = l
    coeffs = np.bincount((off + m - 1).ravel(), weights=c.real.ravel(), minlength=2 * m - 1) + 1j * np.bincount(
        (off + m - 1).ravel(), weights=c.imag.ravel(), minlength=2 * m - 1)
    roots = np.roots(coeffs[::-1])
    roots = roots[np.abs(roots) <= 1]
    roots = roots[np.argsort(1 - np.abs(roots))][:2]
    return np.sort(np.degrees(np.arcsin(np.clip(np.angle(roots) / np.pi, -1, 1))))


def timed(fn, arg, reps):
    fn(arg)
    times = []
    for _ in range(reps):
        t0 = time.perf_counter()
        fn(arg)
        times.append((time.perf_counter() - t0) * 1000)
    return float(np.median(times))


def main():
    rng = np.random.default_rng(7)
    for case in sys.argv[1:]:
        if case.startswith("pipeline-"):
            # pipeline-pool-MxN (ours with the covariance over worker threads) is timed against the same numpy pipeline
            m, n = (int(v) for v in case.split("-")[-1].split("x"))
            x = (rng.standard_normal((m, n)) + 1j * rng.standard_normal((m, n))) / np.sqrt(2)
            reps = 30 if m * n <= 100000 else 9
            ms = timed(pipeline, x, reps)
        elif case == "music-64-18001":
            x = (rng.standard_normal((64, 1000)) + 1j * rng.standard_normal((64, 1000))) / np.sqrt(2)
            r = x @ x.conj().T / 1000
            ms = timed(music, (r + r.conj().T) / 2, 15)
        elif case == "root-music-64x10000":
            x = (rng.standard_normal((64, 10000)) + 1j * rng.standard_normal((64, 10000))) / np.sqrt(2)
            ms = timed(root_music, x, 9)
        else:
            raise SystemExit(f"unknown case {case}")
        print(json.dumps({"case": case, "numpyMedianMs": round(ms, 3)}), flush=True)


if __name__ == "__main__":
    main()
