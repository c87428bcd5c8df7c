"""Class numbers and fundamental units of Q(sqrt(D)), D square-free,
1 < |D| <= 200, computed independently of the crate:

* class numbers by the analytic class number formula (Dirichlet; Cohen,
  A Course in Computational Algebraic Number Theory, Prop. 5.3.12 for
  D < 0 and Prop. 5.6.9 for D > 0, from memory):
  D < 0: h = -(w / (2|disc|)) * sum_{a=1}^{|disc|-1} (disc/a) * a,
  D > 0: h = -(1 / (2 log eps)) * sum_{a=1}^{disc-1} (disc/a) * log sin(pi a / disc),
  evaluated with mpmath (50 digits) and rounded (the distance to the
  nearest integer is asserted below 1e-20);
* fundamental units eps = (x + y sqrt(D))/2 > 1 from sympy's solver of
  x^2 - D y^2 = N (diop_DN) for N = +-4 and +-1, the least unit > 1.

Output: lines "D h x y" (x y = 0 0 for D < 0).
Run: python3 tests/data/quadratic_fields.py > tests/data/quadratic_fields.txt
"""
import sympy
import mpmath
from sympy import factorint
from sympy.solvers.diophantine.diophantine import diop_DN
from sympy.functions.combinatorial.numbers import jacobi_symbol

mpmath.mp.dps = 50


def kronecker(d, a):
    # Kronecker symbol (d/a) for a >= 1.
    r = 1
    while a % 2 == 0:
        a //= 2
        if d % 2 == 0:
            return 0
        r *= 1 if d % 8 in (1, 7) else -1
    if a == 1:
        return r
    return r * int(jacobi_symbol(d % a, a))


def disc_of(d):
    return d if d % 4 == 1 else 4 * d


def unit(d):
    best = None
    for n, scale in ((4, 1), (-4, 1), (1, 2), (-1, 2)):
        for sol in diop_DN(d, n):
            x, y = abs(sol[0]) * scale, abs(sol[1]) * scale
            if y == 0:
                continue
            if d % 4 != 1 and (x % 2 or y % 2):
                continue
            v = (x + y * mpmath.sqrt(d)) / 2
            if best is None or v < best[0]:
                best = (v, x, y)
    return best


print("# sympy", sympy.__version__, "mpmath", mpmath.__version__, "- D h x y")
for n in range(2, 201):
    if not all(e == 1 for e in factorint(n).values()):
        continue
    for d in (-n, n):
        disc = disc_of(d)
        if d < 0:
            w = {-3: 6, -4: 4}.get(disc, 2)
            s = sum(kronecker(disc, a) * a for a in range(1, -disc))
            h = mpmath.mpf(-w) * s / (2 * (-disc))
            x = y = 0
        else:
            v, x, y = unit(d)
            s = mpmath.fsum(kronecker(disc, a) * mpmath.log(mpmath.sin(mpmath.pi * a / disc))
                            for a in range(1, disc))
            h = -s / (2 * mpmath.log(v))
        hi = int(mpmath.nint(h))
        assert abs(h - hi) < mpmath.mpf(10) ** -20, (d, h)
        print(d, hi, x, y)
print(-1, 1, 0, 0)
