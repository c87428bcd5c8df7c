#!/usr/bin/env python3
"""Writes tests/data/factor_easy_parts.txt: numbers whose factorisation must succeed under a given
(small or zero) factoring budget, with their factorisations computed by python-flint 0.9.0
(fmpz.factor; sympy 1.14.0 factorint for the perfect powers) and checked with sympy 1.14.0
(isprime on every factor, and the product).

Line format: `label budget_units n p1^e1*p2^e2*...`. The budget `descent(bits)` cases use
50_000_000 * 128^2 / bits^2 (integer division), the descent's default factoring budget for a
number of `bits` > 128 bits (src/descent/options.rs, `factor_budget`), so the test checks the
factorisations the descent asks for under its defaults.

Usage: python3 tests/data/gen_factor_easy_parts.py > tests/data/factor_easy_parts.txt
"""
import random

import flint
import sympy

rng = random.Random(17)


def prime(digits):
    return int(sympy.nextprime(rng.randrange(10 ** (digits - 1), 10 ** digits)))


def descent_budget(n):
    bits = n.bit_length()
    return 50_000_000 if bits <= 128 else 50_000_000 * 128 * 128 // (bits * bits)


a2 = 15172737118322249941572073081813580686222403877575
a4 = 133755489096113475297196275045671436418591897502573
cases = []
# The curve y^2 = x^3 + a2 x^2 + a4 x: a4, a2^2 - 4 a4, and the discriminant 16 a4^2 (a2^2 - 4 a4)
# (the descent charges bits(numerator) + bits(denominator) = bits + 1 for the discriminant).
d = a2 * a2 - 4 * a4
disc = 16 * a4 * a4 * d
cases.append(("curve_b", descent_budget(a4), a4))
cases.append(("curve_a2_minus_4b", descent_budget(d), d))
cases.append(("curve_discriminant", 50_000_000 * 128 * 128 // ((disc.bit_length() + 1) ** 2), disc))
cofactor = 45817 * 954115302844137807157 * 28246544893332023187442823
cases.append(("left_cofactor", descent_budget(cofactor), cofactor))
# 25-digit factors under the descent's default budget for their size.
for a, b in [(25, 25), (25, 22), (25, 12)]:
    n = prime(a) * prime(b)
    cases.append(("p%d_q%d" % (a, b), descent_budget(n), n))
# The cheap steps alone (zero budget): trial division below 2^16, perfect powers, primality,
# word-size cofactors.
p47 = prime(47)
cases.append(("small_times_p47", 0, 45817 * p47))
smooth = 2 ** 5 * 3 ** 4 * 65521 ** 3 * 40009 * 7
cases.append(("smooth_times_p40", 0, smooth * prime(40)))
p40 = prime(40)
p30 = prime(30)
cases.append(("square_of_p40", 0, p40 ** 2))
cases.append(("cube_of_p30_times_smooth", 0, prime(30) ** 3 * smooth))
cases.append(("p20_power_7", 0, prime(20) ** 7))
w = int(sympy.nextprime(2 ** 31 + rng.randrange(2 ** 30))) * int(sympy.nextprime(2 ** 31 + rng.randrange(2 ** 30)))
cases.append(("smooth_times_word_semiprime", 0, smooth * w))
cases.append(("word_semiprime_squared_times_p30", descent_budget(w ** 2 * p30), w ** 2 * p30))

print("# python-flint %s, sympy %s; written by tests/data/gen_factor_easy_parts.py"
      % (flint.__version__, sympy.__version__))
for label, budget, n in cases:
    if "power" in label or "square" in label or "cube" in label:
        # flint's fmpz.factor does not look for perfect powers first (it sieves the whole
        # number); sympy's factorint does.
        f = sorted((int(p), int(e)) for p, e in sympy.factorint(n).items())
    else:
        f = sorted((int(p), int(e)) for p, e in flint.fmpz(n).factor())
    # independent check: sympy's primality test on every factor, and the product
    assert all(sympy.isprime(p) for p, _ in f), label
    prod = 1
    for p, e in f:
        prod *= p ** e
    assert prod == n, label
    print(label, budget, n, "*".join("%d^%d" % pe for pe in f))
