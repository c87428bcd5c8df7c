#!/usr/bin/env python3
"""L'(E_n, 1) for the congruent-number curves E_n: y^2 = x^3 - n^2 x with
n = 13 and n = 157 (both = 5 mod 8, root number -1), from first principles
and independently of the crate:

* a_p = p + 1 - #E(F_p) by counting points (Legendre symbols by Euler's
  criterion) at every prime p, a_p = 0 at p | 2n (additive reduction);
  a_n by multiplicativity and a_{p^k} = a_p a_{p^{k-1}} - p a_{p^{k-2}};
* the conductor N = 32 n^2 (odd square-free n);
* L'(E,1) = 2 * sum_n a_n / n * E_1(2 pi n / sqrt(N)) (the series for
  root number -1; Cremona, Algorithms for Modular Elliptic Curves, 2.13),
  summed with mpmath 1.3.0 at 40 digits until the terms, bounded by
  2 n * exp(-2 pi n / sqrt N) / n, drop below 10^-30.

Output: one line "n value" per curve, 25 significant digits.
Run: python3 tests/data/gen_congruent_lprime.py > tests/data/congruent_lprime.txt
"""
import mpmath

mpmath.mp.dps = 40


def primes_upto(m):
    s = bytearray([1]) * (m + 1)
    s[0] = s[1] = 0
    for i in range(2, int(m ** 0.5) + 1):
        if s[i]:
            s[i * i :: i] = bytearray(len(s[i * i :: i]))
    return [i for i in range(m + 1) if s[i]]


def ap(n, p):
    if p == 2 or n % p == 0:
        return 0
    count = 1  # the point at infinity
    for x in range(p):
        f = (x * x * x - n * n * x) % p
        if f == 0:
            count += 1
        elif pow(f, (p - 1) // 2, p) == 1:
            count += 2
    return p + 1 - count


def lprime(n):
    big_n = 32 * n * n
    c = 2 * mpmath.pi / mpmath.sqrt(big_n)
    m = int(80 / c) + 1
    a = [0] * (m + 1)
    a[1] = 1
    ps = primes_upto(m)
    spf = list(range(m + 1))
    for p in ps:
        for j in range(p * p, m + 1, p):
            if spf[j] == j:
                spf[j] = p
    table = {}
    for p in ps:
        table[p] = ap(n, p)
    for k in range(2, m + 1):
        p = spf[k]
        if p == k:
            a[k] = table[p]
            continue
        q, e = k, 0
        while q % p == 0:
            q //= p
            e += 1
        # a_{p^e}
        prev, cur = 1, table[p]
        for _ in range(e - 1):
            if n % p == 0 or p == 2:
                prev, cur = cur, cur * table[p]
            else:
                prev, cur = cur, table[p] * cur - p * prev
        a[k] = cur * a[q]
    s = mpmath.mpf(0)
    for k in range(1, m + 1):
        if a[k]:
            s += mpmath.mpf(a[k]) / k * mpmath.e1(c * k)
    return 2 * s


for n in (13, 157):
    print(n, mpmath.nstr(lprime(n), 25))
