#!/usr/bin/env python3
# Input lines for `descend --json` (used by scripts/same_outputs.sh): the
# congruent-number curves n <= 300, a slice of the box y^2 = x^3 + ax^2 + bx,
# and curves with coefficients near the 64- and 128-bit boundaries. Fixed
# seed; the curves are test inputs only, no expected values.
import random
from sympy import factorint
out = []
for n in range(1, 301):
    if all(e == 1 for e in factorint(n).values()):
        out.append(f"0 0 0 {-n*n} 0")
for a in range(-6, 7):
    for b in range(-6, 7):
        if b != 0 and a*a - 4*b != 0:
            out.append(f"0 {a} 0 {b} 0")
r = random.Random(5)
for bits in (20, 31, 32, 40, 60, 62, 63, 64, 65, 70, 100, 126, 127, 128, 130):
    for _ in range(3):
        a = r.randrange(-2**bits, 2**bits)
        b = r.randrange(-2**bits, 2**bits) or 1
        if a*a - 4*b != 0:
            out.append(f"0 {a} 0 {b} 0")
# curves with full 2-torsion and mixed sizes
for _ in range(20):
    e1, e2 = r.randrange(-10**6, 10**6), r.randrange(-10**6, 10**6)
    if e1 and e2 and e1 != e2:
        out.append(f"0 {-(e1+e2)} 0 {e1*e2} 0")
print("\n".join(out))
