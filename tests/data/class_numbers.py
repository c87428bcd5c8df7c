"""Class numbers h(D) of D = -n, n square-free, n = 7 (mod 8), by the
analytic class number formula h(D) = -(1/|D|) * sum_{a=1}^{|D|-1} (D/a)*a
for fundamental D < -4 (Dirichlet; Cohen, A Course in Computational
Algebraic Number Theory, Prop. 5.3.12, from memory), with the Kronecker
symbol (D/a) = (D/2)^v * jacobi(D, m) for a = 2^v*m, (D/2) = 1 for
D = 1 (mod 8). Library: sympy (version printed in the output header).

Run: python3 tests/data/class_numbers.py > tests/data/class_numbers.txt
"""
import sympy
from sympy.functions.combinatorial.numbers import jacobi_symbol
from sympy import factorint


def kronecker(d, a):
    v = 0
    while a % 2 == 0:
        a //= 2
        v += 1
    return int(jacobi_symbol(d % a, a)) if a > 1 else 1


def h(d):
    s = sum(kronecker(d, a) * a for a in range(1, -d))
    assert s % d == 0
    return s // d


print("# sympy", sympy.__version__, "- D h(D) for D = -n, n square-free, n = 7 mod 8, n < 2000")
for n in range(7, 2000, 8):
    if all(e == 1 for e in factorint(n).values()):
        print(-n, h(-n))
