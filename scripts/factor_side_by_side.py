#!/usr/bin/env python3
"""Times python-flint's fmpz.factor() on the numbers of benches/arith.rs and prints the
ratio of our criterion medians to flint's median.

Usage:
  pip install --user python-flint        # version used: 0.9.0
  cargo bench --bench arith               # writes target/criterion/factor/*/new/estimates.json
  python3 scripts/factor_side_by_side.py [CRITERION_DIR]

CRITERION_DIR defaults to $CARGO_TARGET_DIR/criterion or target/criterion. Numbers whose
criterion result is missing are timed for flint only. Flint is timed both by wall clock (the
ratio column, comparable with criterion's wall-clock medians) and by process CPU time (less
sensitive to other jobs on a loaded machine).
"""
import json
import os
import statistics
import sys
import time

import flint

NUMBERS = {  # same list, same order, as benches/arith.rs
    10: [22557563476733397557, 10497159103228211209, 8310118173378612839],
    15: [267248347801212327008981166599, 122690208393211359883019535107,
         612697093380257235542637128011],
    20: [1470739766636828256728566343556768576353, 623422361556630915541682356015766385943,
         3109898323645415535574981604728249868779],
}


def flint_median(n, reps=10):
    """Median wall-clock and median CPU (process) time of fmpz(n).factor()."""
    wall, cpu = [], []
    for _ in range(reps):
        t, c = time.perf_counter(), time.process_time()
        flint.fmpz(n).factor()
        cpu.append(time.process_time() - c)
        wall.append(time.perf_counter() - t)
    return statistics.median(wall), statistics.median(cpu)


def ours(crit_dir, digits, i):
    name = "p%d*q%d #%d" % (digits, digits, i)
    # criterion replaces characters that are unsafe in paths
    for cand in (name, name.replace("*", "_").replace("#", "_"), name.replace("*", "_")):
        path = os.path.join(crit_dir, "factor", cand, "new", "estimates.json")
        if os.path.exists(path):
            with open(path) as fh:
                return json.load(fh)["median"]["point_estimate"] / 1e9
    return None


def main():
    default = os.path.join(os.environ.get("CARGO_TARGET_DIR", "target"), "criterion")
    crit_dir = sys.argv[1] if len(sys.argv) > 1 else default
    print("python-flint", flint.__version__)
    print("%-6s %-42s %11s %11s %11s %7s" % ("digits", "n", "flint wall", "flint cpu",
                                             "ours (ms)", "ratio"))
    for digits, ns in NUMBERS.items():
        for i, n in enumerate(ns):
            f, fc = flint_median(n)
            o = ours(crit_dir, digits, i)
            ratio = "%.1f" % (o / f) if o else "-"
            print("%-6d %-42d %11.3f %11.3f %11s %7s" % (
                digits, n, f * 1e3, fc * 1e3, "%.3f" % (o * 1e3) if o else "-", ratio))


if __name__ == "__main__":
    main()
