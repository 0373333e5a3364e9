#!/usr/bin/python3
"""The SciPy peer in scripts/bench: forward-solve and fit times of the independent reference (thin_film_scipy.py)
on the bench's cases, beside spreadfit's times from the same run (parsed from spreadfit_bench's output), and the
ratio. No thresholds: a benchmark, not a test.

Equal accuracy: the SciPy solves use cells of 0.4 mm, whose error against the converged solution is estimated by
the change when the cells are halved (printed with the full run; a first-order scheme at the front, so the error
is about that change). spreadfit's error against its converged solution (320 cells) is its bench column "error"
of the default settings.

Usage: bench_scipy.py SPREADFIT_BENCH_OUTPUT SPREADFIT_FORWARD_READINGS [--quick]
"""

import os
import subprocess
import sys
import time

import numpy as np

sys.dont_write_bytecode = True  # no __pycache__ in the source tree
sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import thin_film_scipy as ref  # noqa: E402

CELL = 4e-4  # m
TIMES = [4.0 * i for i in range(1, 31)]  # the bench's 120 s test, 30 readings
LAWS = [("newtonian", (0.0, 5.0, 1.0)), ("power-law", (0.0, 10.0, 0.4)), ("bingham", (30.0, 2.0, 1.0)),
        ("herschel-bulkley", (20.0, 10.0, 0.4))]
# The bench's rigs (tests/bench/bench.cpp); domains hold the front at 120 s of the fastest law.
RIGS = [("channel", ref.Channel(0.05, 0.05, 1e-4, 1100.0), 0.34), ("plate", ref.Plate(0.03, 6e-5, 1000.0), 0.12)]


def parse_spreadfit(path):
    forward, fits = {}, {}
    with open(path) as f:
        for line in f:
            tok = line.split()
            # rig law TIME ms STEPS ERROR% ... (the default settings' columns come first)
            if len(tok) >= 6 and tok[0] in ("channel", "plate") and tok[1] in dict(LAWS) and tok[3] == "ms" \
                    and tok[5].endswith("%"):
                forward[(tok[0], tok[1])] = (float(tok[2]), tok[5])
            elif len(tok) == 5 and tok[0] in ("channel", "plate") and tok[2] in ("HB", "HB-point", "auto"):
                fits[(tok[0], tok[2])] = (float(tok[3]), float(tok[4]))
    return forward, fits


def main():
    args = [a for a in sys.argv[1:] if a != "--quick"]
    quick = "--quick" in sys.argv[1:]
    if len(args) != 2:
        print(__doc__.strip().splitlines()[-1], file=sys.stderr)
        return 2
    forward, fits = parse_spreadfit(args[0])
    tool = args[1]

    print("\nSciPy peer (tests/reference/thin_film_scipy.py: finite volumes on a fixed 0.4 mm grid, solve_ivp BDF with "
          "the analytic\ntridiagonal Jacobian, one core), the same 120 s test with 30 readings, one run each"
          + ("" if quick else "; error = change at 0.2 mm cells"))
    print(f"{'rig':9s} {'law':17s} {'SciPy [ms]':>11s} {'f evals':>7s} {'error':>8s} {'spreadfit [ms]':>15s} "
          f"{'error':>8s} {'ratio':>9s}")
    for rig_name, rig, domain in RIGS:
        for law, material in LAWS:
            a = time.perf_counter()
            readings, info = ref.solve(rig, material, TIMES, CELL, domain)
            ms = 1e3 * (time.perf_counter() - a)
            err = "-"
            if not quick:
                fine, _ = ref.solve(rig, material, TIMES, CELL / 2, domain)
                err = f"{100 * np.max(np.abs(readings / fine - 1)):.3f}%"
            ours = forward.get((rig_name, law))
            ratio = f"{ms / ours[0]:8.0f}x" if ours else "-"
            print(f"{rig_name:9s} {law:17s} {ms:11.0f} {info['nfev']:7d} {err:>8s} "
                  f"{(f'{ours[0]:.3f}' if ours else '-'):>15s} {(ours[1] if ours else '-'):>8s} {ratio:>9s}",
                  flush=True)

    # Fit: the bench's synthetic curve (truth 20 Pa, 10 Pa.s^n, 0.4; readings at 2..60 s of a release 0.3 s
    # before the first clock time; 0.5 mm noise, numpy's generator here, so the same construction but another
    # draw), Herschel-Bulkley with a release time, least_squares from a neutral start.
    print("\nFit of a 30-point Herschel-Bulkley curve, 0.5 mm noise: scipy.optimize.least_squares (trust-region "
          "reflective,\n2-point Jacobian, log tau_y, log K, n and the release time; start 10 Pa, 5 Pa.s^n, 0.6, 0 s; "
          "plate rig, 0.4 mm cells)\nbeside spreadfit's single-law fit: HB-point (quadratic intervals, like for like) "
          "and HB (with profile intervals)")
    times = [2.0 * i for i in range(1, 31)]
    shifted = ",".join(repr(t - 0.3) for t in times)
    truth = subprocess.run([tool, "plate", "20", "10", "0.4", "40", "1e-4", shifted], capture_output=True,
                           text=True, check=True).stdout.split()
    values = np.array([float(v) for v in truth]) + np.random.default_rng(1).normal(0.0, 5e-4, len(times))
    rig = ref.Plate(0.03, 6e-5, 1000.0)
    a = time.perf_counter()
    material, t0, result, solves = ref.fit_herschel_bulkley(rig, times, values, ((10.0, 5.0, 0.6), 0.0), CELL, 0.09)
    ms = 1e3 * (time.perf_counter() - a)
    print(f"  SciPy least_squares: {ms:10.0f} ms, {solves} solves, tau_y {material[0]:.2f} Pa, K {material[1]:.2f} "
          f"Pa.s^n, n {material[2]:.3f}, t0 {t0:.2f} s ({result.message})")
    for kind in ("HB-point", "HB"):
        ours = fits.get(("plate", kind))
        if ours:
            print(f"  spreadfit {kind:9s}: {ours[0]:10.1f} ms, {ours[1]:.0f} solves (mean of 8 seeds);"
                  f" SciPy / spreadfit = {ms / ours[0]:.0f}x")
    return 0


if __name__ == "__main__":
    sys.exit(main())
