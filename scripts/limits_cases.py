#!/usr/bin/env python3
"""The inputs of the limits measurement in docs/performance.md (issue 27,
limits): one curve per line on stdout, as "tag<TAB>line". Invented curves
(fixed seeds); standard library only.

  item4-*   y^2 = x^3 + a x^2 + b x, a of 24-32 digits, |b| <= 4
  item5-*   y^2 = x^3 - 30x^2 + 3x moved by (u, r, s, t) with huge
            numerators and denominators (coefficients of 250-780 digits)
  item6     y^2 = x^3 - 69169x
  item10    y^2 = x^3 - n^2 x, n the product of the first 349 primes
"""
import random
from fractions import Fraction as F


def primes(k):
    out, n = [], 2
    while len(out) < k:
        if all(n % p for p in out if p * p <= n):
            out.append(n)
        n += 1
    return out


def moved(u, r, s, t, a=(0, -30, 0, 3, 0)):
    a1, a2, a3, a4, a6 = map(F, a)
    return [
        (a1 + 2 * s) / u,
        (a2 - s * a1 + 3 * r - s * s) / u**2,
        (a3 + r * a1 + 2 * t) / u**3,
        (a4 - s * a3 + 2 * r * a2 - (t + r * s) * a1 + 3 * r * r - 2 * s * t) / u**4,
        (a6 + r * a4 + r * r * a2 + r**3 - t * a3 - t * t - r * t * a1) / u**6,
    ]


def main():
    print("item4-a\t0 28578968146050458675118783668447 0 1 0")
    rng = random.Random(27)
    for i, digits in enumerate([24, 28, 32]):
        a = rng.randrange(10 ** (digits - 1), 10**digits)
        b = rng.choice([-4, -3, -2, -1, 1, 2, 3, 4])
        print(f"item4-{'bcd'[i]}\t0 {a} 0 {b} 0")
    for tag, (e2, e5) in [("item5-a", (60, 40)), ("item5-b", (150, 100))]:
        u = F(2**e2 * 3**7, 5**e5)
        r, s, t = F(7**50, 11**40), F(13**30, 17**20), F(19**90, 23**80)
        print(tag + "\t" + " ".join(str(c) for c in moved(u, r, s, t)))
    print("item6\t0 0 0 -69169 0")
    n = 1
    for p in primes(349):
        n *= p
    print(f"item10\t0 0 0 {-n * n} 0")


if __name__ == "__main__":
    main()
