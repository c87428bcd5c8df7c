#!/usr/bin/env python3
"""Times python-flint's fmpz.factor() on the numbers of benches/arith.rs (groups factor_sizes and
factor) and prints the
ratio of our criterion medians to flint's median.

Usage:
  pip install --user python-flint        # version used: 0.9.0
  cargo bench --bench arith               # writes target/criterion/factor/*/new/estimates.json
  python3 scripts/factor_side_by_side.py [CRITERION_DIR]

CPU-time mode (the figures of docs/performance.md):
  FACTOR_CPU_SECS=1.5 cargo bench --bench arith > ours.txt    # mean CPU time per call
  python3 scripts/factor_side_by_side.py --cpu ours.txt [before.txt]
times flint.fmpz(n).factor() on each number of group factor_sizes for 1.5 s of process CPU
time (time.process_time), right after reading the files, and prints both means and the
ratios ours/flint (and before/flint when a second file is given). With FACTOR_RANDOM_SECS=0.3
also set for the bench, the files hold the sixty products of RANDOM_SMALL; flint is then timed
on each for $FACTOR_RANDOM_SECS seconds (default 0.3) and the means per size are compared.

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

RANDOM_SMALL = {  # RANDOM_SMALL of benches/arith.rs: sympy 1.14.0, random.Random(99)
    8: [3924146792516243, 3333612690708403, 1390717972380949, 1208591874089917, 945003346537753,
        4989587991669037, 1815202498752761, 7093334036969441, 2448715862826427, 8212760321591093,
        2352649843093573, 2392600744862203, 2189703335150021, 3356915797691041, 4775748161661937,
        1711192252943513, 1589266333577641, 3359726082167149, 725818674774881, 935688169246379],
    9: [177426454207736369, 329623373649364229, 111348715947414199, 205404362599075421,
        447711410589554327, 75052263430052429, 79173621877086313, 236645458872292583,
        857707692808824941, 424584911464823267, 186151069355298139, 233801089328447603,
        30459808557936943, 35482698338340481, 507801812636096201, 538985725215428663,
        104200779802504031, 149777100076381529, 109655869132926811, 80934909190192391],
    10: [18998725169633558989, 19437965655894854933, 54972844699175988323, 7237127992559856883,
         14325130763627602159, 3429227387587624507, 14510955564747208051, 10466854515272725781,
         9992824970830911617, 71780013635657658349, 11207355425534828849, 60733640652294213139,
         61111208799570603599, 29577943796146494169, 54075234115210907857, 19695927943473611471,
         28160606081358382757, 46510457332941745499, 90914578340181512911, 59836576158114804011],
}

SIZES = {  # group factor_sizes of benches/arith.rs: p, q random primes of d digits
    8: 1617112384513319,
    9: 418593139362162697,
    10: 6881212980518412671,
    11: 1387963942594134081079,
    12: 80551254091020886344251,
    13: 5786066816834635098394559,
    14: 1912614221021085043121289191,
    15: 283334206502604836738363188807,
    16: 59106137351597839651530909133361,
    17: 1122591703439096732752496344774529,
    18: 115553126415904632093306783016014461,
    19: 8022874210350435847575463436375479729,
    20: 3447453260913698249602873997444564308381,
    21: 571966649857784659082929989519912463753813,
    22: 17778604110573035003702769146759503953219199,
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


def ours(crit_dir, digits, i, group="factor"):
    name = "p%d*q%d #%d" % (digits, digits, i) if group == "factor" else "d%02d" % digits
    # criterion replaces characters that are unsafe in paths
    for cand in (name, name.replace("*", "_").replace("#", "_"), name.replace("*", "_")):
        path = os.path.join(crit_dir, group, cand, "new", "estimates.json")
        if os.path.exists(path):
            with open(path) as fh:
                return json.load(fh)["median"]["point_estimate"] / 1e9
    return None


def flint_cpu(n, secs=1.5):
    """Mean process CPU time of fmpz(n).factor() over at least `secs` seconds."""
    x = flint.fmpz(n)
    start, calls = time.process_time(), 0
    while time.process_time() - start < secs:
        for _ in range(4):
            x.factor()
        calls += 4
    return (time.process_time() - start) / calls


def read_cpu(path):
    """{digits: ms per call} from the output of FACTOR_CPU_SECS=... cargo bench --bench arith,
    and {n: ms per call} from its lines `rDD n ms calls` (FACTOR_RANDOM_SECS)."""
    out, rand = {}, {}
    with open(path) as fh:
        for line in fh:
            parts = line.split()
            if len(parts) == 4 and parts[0].isdigit():
                out[int(parts[0])] = float(parts[2])
            elif len(parts) == 4 and parts[0].startswith("r") and parts[0][1:].isdigit():
                rand[int(parts[1])] = float(parts[2])
    return out, rand


def cpu_main(paths):
    both = [read_cpu(p) for p in paths]
    runs = [b[0] for b in both]
    rands = [b[1] for b in both]
    print("python-flint", flint.__version__, "(CPU time per call, ms)")
    head = "%-6s %-46s %10s" % ("digits", "n", "flint")
    for p in paths:
        head += " %12s %8s" % (os.path.basename(p)[:12], "/flint")
    print(head)
    for digits, n in SIZES.items():
        f = flint_cpu(n) * 1e3
        line = "%-6d %-46d %10.4f" % (digits, n, f)
        for run in runs:
            o = run.get(digits)
            line += " %12s %8s" % (("%.4f" % o, "%.2f" % (o / f)) if o else ("-", "-"))
        print(line)
    if not any(rands):
        return
    secs = float(os.environ.get("FACTOR_RANDOM_SECS", "0.3"))
    print("-- RANDOM_SMALL: mean CPU ms per number, and numbers above 1.2x flint --")
    for digits, ns in RANDOM_SMALL.items():
        fl = {n: flint_cpu(n, secs) * 1e3 for n in ns}
        line = "%-6d flint mean %8.4f" % (digits, statistics.mean(fl.values()))
        for p, rand in zip(paths, rands):
            got = [rand.get(n) for n in ns]
            if None in got:
                continue
            over = sum(1 for n in ns if rand[n] > 1.2 * fl[n])
            m = statistics.mean(got)
            line += " | %s mean %8.4f (/flint %.2f, %d of %d above 1.2x)" % (
                os.path.basename(p)[:12], m, m / statistics.mean(fl.values()), over, len(ns))
        print(line)


def main():
    if len(sys.argv) > 1 and sys.argv[1] == "--cpu":
        cpu_main(sys.argv[2:])
        return
    default = os.path.join(os.environ.get("CARGO_TARGET_DIR", "target"), "criterion")
    crit_dir = sys.argv[1] if len(sys.argv) > 1 else default
    print("python-flint", flint.__version__)
    print("%-6s %-42s %11s %11s %11s %7s" % ("digits", "n", "flint wall", "flint cpu",
                                             "ours (ms)", "ratio"))
    for digits, n in SIZES.items():
        f, fc = flint_median(n, reps=30 if digits <= 12 else 10)
        o = ours(crit_dir, digits, 0, group="factor_sizes")
        ratio = "%.2f" % (o / f) if o else "-"
        print("%-6d %-42d %11.3f %11.3f %11s %7s" % (
            digits, n, f * 1e3, fc * 1e3, "%.3f" % (o * 1e3) if o else "-", ratio))
    print("-- the nine numbers of group factor --")
    for digits, ns in NUMBERS.items():
        for i, n in enumerate(ns):
            f, fc = flint_median(n)
            o = ours(crit_dir, digits, i)
            ratio = "%.1f" % (o / f) if o else "-"
            print("%-6d %-42d %11.3f %11.3f %11s %7s" % (
                digits, n, f * 1e3, fc * 1e3, "%.3f" % (o * 1e3) if o else "-", ratio))


if __name__ == "__main__":
    main()
