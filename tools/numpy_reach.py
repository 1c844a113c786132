#!/usr/bin/env python3
"""The single long reach of issue 16 routed by a vectorised NumPy explicit upwind loop, as a
speed reference beside `freshet-bench --long-reach` (run both in the same session).

Rectangular channel 50 m wide, n 0.035, S0 0.001, 20 km in CELLS cells (default 2000); inflow
20 m3/s rising linearly to 500 m3/s at 2 h and falling to 20 m3/s at 6 h; 12 h; time step at
Courant 0.9 of the largest celerity, clipped to the 60 s output times; outlet sampled every
60 s. Manning's law in SI, Q = (1/n) A R^(2/3) sqrt(S0) (Chow 1959, eq. 5-6); the celerity
dQ/dA in closed form. Prints cell updates per second of wall time and the outlet peak.

    /usr/bin/python3 tools/numpy_reach.py [CELLS]

Needs NumPy (Debian: python3-numpy); not used by the tests.
"""
import sys
import time

import numpy as np

WIDTH_M, MANNING_N, SLOPE, LENGTH_M = 50.0, 0.035, 0.001, 20000.0
END_S, OUTPUT_S, COURANT = 12 * 3600.0, 60.0, 0.9
K = np.sqrt(SLOPE) / MANNING_N


def discharge(a):
    p = WIDTH_M + 2.0 * a / WIDTH_M
    return K * a * np.cbrt((a / p) ** 2)


def celerity(a):
    p = WIDTH_M + 2.0 * a / WIDTH_M
    return discharge(a) * ((5.0 / 3.0) / a - (4.0 / 3.0) / (WIDTH_M * p))


def area_for(q):
    a = (q / (K * WIDTH_M ** (-2.0 / 3.0))) ** 0.6  # wide-channel start, then Newton
    for _ in range(60):
        a -= (discharge(a) - q) / celerity(a)
    return a


def inflow(t):
    return float(np.interp(t, [0.0, 7200.0, 21600.0], [20.0, 500.0, 20.0]))


def main():
    cells = int(sys.argv[1]) if len(sys.argv) > 1 else 2000
    dx = LENGTH_M / cells
    a = np.full(cells, area_for(20.0))
    upstream = np.empty(cells)
    t, next_output, steps, peak = 0.0, OUTPUT_S, 0, 0.0
    start = time.perf_counter()
    while t < END_S - 1e-9:
        q = discharge(a)
        dt = min(COURANT * dx / celerity(a).max(), next_output - t)
        upstream[0] = inflow(t + 0.5 * dt)
        upstream[1:] = q[:-1]
        a -= dt / dx * (q - upstream)
        t += dt
        steps += 1
        if t >= next_output - 1e-9:
            next_output += OUTPUT_S
            peak = max(peak, float(discharge(a[-1])))
    wall = time.perf_counter() - start
    print(f"numpy-reach cells={cells} steps={steps} wall={wall:.3f}s "
          f"cell-updates/s={cells * steps / wall:.4g} outlet-peak={peak:.2f}")


if __name__ == "__main__":
    main()
