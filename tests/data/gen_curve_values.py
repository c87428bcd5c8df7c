#!/usr/bin/env python3
"""Reference values for the analytic and height tests, computed from first
principles with mpmath (general-purpose arbitrary-precision library; the
version is written into the output) and Python's exact integers/fractions.

Nothing here is recalled or copied from a table: every number is computed
below from the Weierstrass coefficients.

* a_p by counting points of the reduction mod p of the given integral model
  (minimal at every prime for the curves used; checked: v_p(Delta) < 12);
  a_p = p + 1 - #E~(F_p) holds at good and bad primes alike (the singular
  point counted once: split node p points, non-split p + 2, cusp p + 1;
  Silverman, AEC, III.2.5 and Exercise 3.5).  a_n by multiplicativity and
  a_{p^{k+1}} = a_p a_{p^k} - p a_{p^{k-1}} (good p), a_{p^k} = a_p^k (bad p).
* Conductor N and root number w: for primes with multiplicative reduction
  (p | Delta, p does not divide c4) the exponent is 1, for additive
  reduction at p >= 5 it is 2 (Silverman, Advanced Topics, IV.10); at 2
  and 3 with additive reduction every exponent 2..8 (resp. 2..5) is tried.
  The candidate kept is the unique (N, w) for which the theta relation
  F(1/t) = w t^2 F(t), F(t) = sum a_n exp(-2 pi n t / sqrt(N)), holds at
  t = 1.1 to 1e-20 (the Mellin transform of Lambda(s) = w Lambda(2 - s);
  Cremona, Algorithms for Modular Elliptic Curves, 2nd ed., section 2.11).
* L^(r)(E, 1) for r = the order forced at s = 1: with c = 2 pi / sqrt(N),
  Lambda(s) = int_1^inf F(t) (t^(s-1) + w t^(1-s)) dt, so when w = (-1)^r
  and L^(k)(E, 1) = 0 for k < r,
  L^(r)(E, 1) = 2 r! sum a_n / n G_r(c n),
  G_r(x) = 1/(r-1)! int_1^inf exp(-x t) (log t)^(r-1) dt / t (G_0(x) = exp(-x))
  (derived by integrating by parts; the formula of Cremona, op. cit.,
  section 2.13).  The sums for the lower orders are printed too and must
  be 0 to the working precision.
* Real periods by Gauss's arithmetic-geometric mean: with f(x) = 4x^3 +
  b2 x^2 + 2 b4 x + b6 and e1 its largest real root, the least real period
  is omega = pi / AGM(sqrt(e1 - e3), sqrt(e1 - e2)) when Delta > 0 and
  omega = 2 pi / AGM(2 sqrt(beta), sqrt(2 beta + alpha)) with
  beta = sqrt(f'(e1)/4), alpha = 3 e1 + b2/4 when Delta < 0; each is checked
  against the direct quadrature omega = 2 int_{e1}^inf dx / sqrt(f(x)).
  Omega = omega times the number of real components (2 iff Delta > 0).
* Canonical heights in the normalisation h^(P) = lim h(x(2^k P)) / 4^k,
  h(a/b) = log max(|a|, |b|).  With mu_v(Q) = 1/2 log max(|x(Q)|_v, 1) and
  x(2Q) = phi(x)/psi2(x), phi = x^4 - b4 x^2 - 2 b6 x - b8,
  psi2 = 4x^3 + b2 x^2 + 2 b4 x + b6, the product formula gives
  h^(P)/2 = sum_v [mu_v(P) + sum_k 4^(-k-1) Phi_v(2^k P)] with the bounded
  Phi_v(Q) = 1/2 log(max(|phi|_v, |psi2|_v) / max(|x|_v, 1)^4).  At a prime
  p where Q reduces to a non-singular point of the integral model,
  Phi_p(Q) = 0: for v_p(x) < 0 the x^4 term dominates; otherwise psi2 and
  phi both vanish mod p only if F_y and F_x do, since
  phi = F_x^2 + a1 F_x F_y - (a2 + 2x) F_y^2 and psi2 = F_y^2.  So for a
  multiple Q = mP that is non-singular mod every bad prime (found by trying
  m = 1, 2, ...), h^(P) = (log den x(Q) + 2 lambda_inf(Q)) / m^2, with the
  archimedean series summed in high precision.  Checks: h^(2P) = 4 h^(P),
  agreement of m and 2m, and the crude limit h(x(2^6 P))/4^6.
* Regulators: det <P_i, P_j>, <P, Q> = (h^(P + Q) - h^(P) - h^(Q)) / 2.

Run:  python3 tests/data/gen_curve_values.py > tests/data/curve_values.txt
"""

import sys
from fractions import Fraction

import mpmath
from mpmath import mp, mpf

mp.dps = 50
DIGITS = 22


def invariants(a):
    a1, a2, a3, a4, a6 = a
    b2 = a1 * a1 + 4 * a2
    b4 = 2 * a4 + a1 * a3
    b6 = a3 * a3 + 4 * a6
    b8 = a1 * a1 * a6 + 4 * a2 * a6 - a1 * a3 * a4 + a2 * a3 * a3 - a4 * a4
    c4 = b2 * b2 - 24 * b4
    disc = -b2 * b2 * b8 - 8 * b4 ** 3 - 27 * b6 * b6 + 9 * b2 * b4 * b6
    return b2, b4, b6, b8, c4, disc


def primes_upto(n):
    s = bytearray([1]) * (n + 1)
    s[0:2] = b"\x00\x00"
    for i in range(2, int(n ** 0.5) + 1):
        if s[i]:
            s[i * i :: i] = bytearray(len(s[i * i :: i]))
    return [i for i in range(n + 1) if s[i]]


def vp(n, p):
    k = 0
    while n % p == 0:
        n //= p
        k += 1
    return k


def count_points(a, p):
    a1, a2, a3, a4, a6 = a
    if p == 2:
        c = 1
        for x in range(2):
            for y in range(2):
                if (y * y + a1 * x * y + a3 * y - x ** 3 - a2 * x * x - a4 * x - a6) % 2 == 0:
                    c += 1
        return c
    b2, b4, b6, _, _, _ = invariants(a)
    c = 1
    h = (p - 1) // 2
    for x in range(p):
        f = (4 * x ** 3 + b2 * x * x + 2 * b4 * x + b6) % p
        if f == 0:
            c += 1
        elif pow(f, h, p) == 1:
            c += 2
    return c


def coefficients(a, n_max):
    """a_1..a_{n_max} (index 0 unused)."""
    disc = invariants(a)[5]
    an = [0] * (n_max + 1)
    an[1] = 1
    ps = primes_upto(n_max)
    pk = {}
    for p in ps:
        ap = p + 1 - count_points(a, p)
        good = disc % p != 0
        powers = [1, ap]
        q = p
        while q * p <= n_max:
            nxt = ap * powers[-1] - (p * powers[-2] if good else 0)
            powers.append(nxt)
            q *= p
        pk[p] = powers
    # multiplicative sieve via smallest prime factor
    spf = list(range(n_max + 1))
    for p in ps:
        for m in range(p * p, n_max + 1, p):
            if spf[m] == m:
                spf[m] = p
    for n in range(2, n_max + 1):
        p = spf[n]
        m, k = n, 0
        while m % p == 0:
            m //= p
            k += 1
        an[n] = pk[p][k] * an[m]
    return an


def theta(an, N, t, terms):
    c = 2 * mp.pi * t / mp.sqrt(N)
    return mpmath.fsum(an[n] * mp.exp(-c * n) for n in range(1, terms + 1))


def terms_needed(N, t):
    return int(80 * float(mp.sqrt(N)) / (2 * float(mp.pi) * t)) + 2


def conductor_and_sign(a):
    b2, b4, b6, b8, c4, disc = invariants(a)
    bad = [p for p in primes_upto(abs(disc)) if disc % p == 0] if abs(disc) < 10 ** 7 else None
    assert bad is not None, "discriminant too large for this script"
    choices = []
    for p in bad:
        assert vp(abs(disc), p) < 12 or vp(abs(c4), p) < 4, "model not minimal"
        if c4 % p != 0:
            choices.append([p])
        elif p >= 5:
            choices.append([p * p])
        else:
            top = 8 if p == 2 else 5
            choices.append([p ** e for e in range(2, top + 1)])
    cands = [1]
    for ch in choices:
        cands = [c * q for c in cands for q in ch]
    t = mpf("1.1")
    n_max = max(terms_needed(N, 1 / t) for N in cands)
    an = coefficients(a, n_max)
    found = []
    for N in cands:
        n = terms_needed(N, 1 / t)
        lhs = theta(an, N, 1 / t, n)
        rhs = t * t * theta(an, N, t, n)
        for w in (1, -1):
            if abs(lhs - w * rhs) < mpf(10) ** -20 * (1 + abs(lhs)):
                found.append((N, w))
    assert len(found) == 1, (a, found)
    return found[0][0], found[0][1], an


def g(r, x):
    if r == 0:
        return mp.exp(-x)
    if r == 1:
        return mpmath.e1(x)
    f = mpmath.factorial(r - 1)
    return mpmath.quad(lambda t: mp.exp(-x * t) * mp.log(t) ** (r - 1) / t, [1, 1 + 1 / x, 1 + 8 / x, mp.inf]) / f


def l_derivative(an, N, r):
    c = 2 * mp.pi / mp.sqrt(N)
    n_max = int(70 / float(c)) + 2
    assert n_max < len(an)
    s = mpmath.fsum(an[n] / mpf(n) * g(r, c * n) for n in range(1, n_max + 1))
    return 2 * mpmath.factorial(r) * s


def cubic_roots(a):
    b2, b4, b6, _, _, disc = invariants(a)
    roots = mpmath.polyroots([4, b2, 2 * b4, b6], maxsteps=200, extraprec=200)
    real = sorted([mpmath.re(z) for z in roots if abs(mpmath.im(z)) < mpf(10) ** -40], reverse=True)
    return roots, real, disc


def periods(a):
    b2, b4, b6, _, _, disc = invariants(a)
    roots, real, _ = cubic_roots(a)
    e1 = real[0]
    if disc > 0:
        e2, e3 = real[1], real[2]
        least = mp.pi / mpmath.agm(mp.sqrt(e1 - e3), mp.sqrt(e1 - e2))
        comps = 2
    else:
        beta = mp.sqrt((12 * e1 * e1 + 2 * b2 * e1 + 2 * b4) / 4)
        alpha = 3 * e1 + mpf(b2) / 4
        least = 2 * mp.pi / mpmath.agm(2 * mp.sqrt(beta), mp.sqrt(2 * beta + alpha))
        comps = 1
    # x = e1 + u^2: dx / sqrt(f) = 2 du / sqrt(g(u)) with g(u) = f(e1 + u^2) / u^2
    # = 4u^4 + f''(e1)/2 u^2 + f'(e1) (Taylor at the root e1)
    d1 = 12 * e1 * e1 + 2 * b2 * e1 + 2 * b4
    d2 = (24 * e1 + 2 * b2) / 2
    direct = 2 * mpmath.quad(lambda u: 2 / mp.sqrt(4 * u ** 4 + d2 * u * u + d1), [0, 1, 10, mp.inf])
    assert abs(direct - least) < mpf(10) ** -20, (a, direct, least)
    return least, comps * least, comps


# exact group law on y^2 + a1 xy + a3 y = x^3 + a2 x^2 + a4 x + a6
def neg(a, P):
    if P is None:
        return None
    x, y = P
    return (x, -y - a[0] * x - a[2])


def add(a, P, Q):
    a1, a2, a3, a4, a6 = [Fraction(c) for c in a]
    if P is None:
        return Q
    if Q is None:
        return P
    (x1, y1), (x2, y2) = P, Q
    if x1 == x2:
        if y1 + y2 + a1 * x2 + a3 == 0:
            return None
        lam = (3 * x1 * x1 + 2 * a2 * x1 + a4 - a1 * y1) / (2 * y1 + a1 * x1 + a3)
    else:
        lam = (y2 - y1) / (x2 - x1)
    nu = y1 - lam * x1
    x3 = lam * lam + a1 * lam - a2 - x1 - x2
    y3 = -(lam + a1) * x3 - nu - a3
    return (x3, y3)


def mul(a, m, P):
    R, Q = None, P
    if m < 0:
        m, Q = -m, neg(a, P)
    while m:
        if m & 1:
            R = add(a, R, Q)
        Q = add(a, Q, Q)
        m >>= 1
    return R


def singular_mod(a, P, p):
    x, y = P
    if x.denominator % p == 0:
        return False
    a1, a2, a3, a4, a6 = a
    X = x.numerator * pow(x.denominator, -1, p) % p
    Y = y.numerator * pow(y.denominator, -1, p) % p
    fx = (3 * X * X + 2 * a2 * X + a4 - a1 * Y) % p
    fy = (2 * Y + a1 * X + a3) % p
    return fx == 0 and fy == 0


def lambda_inf(a, x):
    b2, b4, b6, b8, _, _ = invariants(a)
    x = mpf(x.numerator) / x.denominator
    total = mp.log(max(abs(x), 1)) / 2
    w = mpf(1)
    for _ in range(60):
        phi = x ** 4 - b4 * x * x - 2 * b6 * x - b8
        psi2 = 4 * x ** 3 + b2 * x * x + 2 * b4 * x + b6
        big = max(abs(x), 1)
        w /= 4
        total += w * mp.log(max(abs(phi), abs(psi2)) / big ** 4) / 2
        x = phi / psi2
    return total


def height(a, P, start=1):
    disc = invariants(a)[5]
    bad = [p for p in primes_upto(abs(disc)) if disc % p == 0]
    m = start
    while True:
        Q = mul(a, m, P)
        if Q is not None and not any(singular_mod(a, Q, p) for p in bad):
            break
        m += 1
        assert m < 100
    x = Q[0]
    return (mp.log(x.denominator) + 2 * lambda_inf(a, x)) / (m * m), m


def checked_height(a, P):
    P = (Fraction(P[0]), Fraction(P[1]))
    h, m = height(a, P)
    h2, _ = height(a, P, start=2 * m)
    assert abs(h - h2) < mpf(10) ** -30, (a, P, h, h2)
    d, _ = height(a, add(a, P, P))
    assert abs(d - 4 * h) < mpf(10) ** -30, (a, P, h, d)
    Q = P
    for _ in range(6):
        Q = add(a, Q, Q)
    x = Q[0]
    crude = mp.log(max(abs(x.numerator), x.denominator)) / 4 ** 6
    assert abs(crude - h) < mpf("0.01") * (1 + h), (a, P, h, crude)
    return h


def regulator(a, pts):
    pts = [(Fraction(x), Fraction(y)) for x, y in pts]
    n = len(pts)
    hs = [checked_height(a, p) for p in pts]
    M = mpmath.matrix(n, n)
    for i in range(n):
        M[i, i] = hs[i]
        for j in range(i + 1, n):
            s = checked_height(a, add(a, pts[i], pts[j]))
            M[i, j] = M[j, i] = (s - hs[i] - hs[j]) / 2
    return mpmath.det(M)


def fmt(x):
    return mpmath.nstr(x, DIGITS, min_fixed=-30, max_fixed=30)


def curve_line(tag, a):
    return "curve %s %s" % (tag, " ".join(str(c) for c in a))


ANALYTIC = [
    # tag, coefficients, order of vanishing at s = 1 used for the L-value
    ("five_torsion", [0, -1, 1, -10, -20], 0),
    ("rank1_small_conductor", [0, 0, 1, -1, 0], 1),
    ("rank2_small_conductor", [0, 1, 1, -2, 0], 2),
    ("rank3_small_conductor", [0, 0, 1, -7, 6], 3),
    ("lemniscatic", [0, 0, 0, -1, 0], 0),
]

HEIGHTS = [
    ("rank1_small_conductor", [0, 0, 1, -1, 0], [(0, 0)]),
    ("congruent5", [0, 0, 0, -25, 0], [(-4, 6)]),
    ("rank2_small_conductor", [0, 1, 1, -2, 0], [(-1, 1), (0, 0)]),
    ("rank3_small_conductor", [0, 0, 1, -7, 6], [(0, 2), (1, 0), (2, 0)]),
]

# Curves of our own choosing for the conductor tests of Tate's algorithm:
# small coefficients, every kind of reduction at 2 and 3 among them.
CONDUCTORS = [
    ("own_a", [1, 0, 1, -3, 2]),
    ("own_b", [0, 1, 0, -2, 1]),
    ("own_c", [1, -1, 0, 2, -3]),
    ("own_d", [0, 0, 1, 3, -2]),
    ("own_e", [1, 1, 1, 1, 1]),
    ("own_g", [0, 0, 0, 4, -6]),
    ("own_i", [1, 0, 0, -2, 3]),
    ("own_j", [0, 2, 1, -1, 0]),
    ("own_k", [0, 0, 0, 0, 2]),
    ("own_l", [0, 0, 0, -2, 0]),
    ("x3_plus_1", [0, 0, 0, 0, 1]),
    ("five_torsion", [0, -1, 1, -10, -20]),
    ("lemniscatic", [0, 0, 0, -1, 0]),
    ("rank1_small_conductor", [0, 0, 1, -1, 0]),
]


def main():
    out = sys.stdout
    out.write("# Generated by tests/data/gen_curve_values.py with mpmath %s, Python %d.%d "
              "(mp.dps = %d); values to %d significant digits.\n"
              % (mpmath.__version__, sys.version_info[0], sys.version_info[1], mp.dps, DIGITS))
    out.write("# Lines: curve TAG a1 a2 a3 a4 a6 | conductor TAG N | root_number TAG w |\n"
              "# least_period TAG x | real_period TAG x | components TAG n |\n"
              "# l_derivative TAG r x | height TAG X Y x | regulator TAG X,Y;X,Y;... x\n")
    seen = set()
    for tag, a, r in ANALYTIC:
        out.write(curve_line(tag, a) + "\n")
        seen.add(tag)
        N, w, an = conductor_and_sign(a)
        assert w == (-1) ** r
        out.write("conductor %s %d\nroot_number %s %d\n" % (tag, N, tag, w))
        least, omega, comps = periods(a)
        out.write("least_period %s %s\nreal_period %s %s\ncomponents %s %d\n"
                  % (tag, fmt(least), tag, fmt(omega), tag, comps))
        for k in range(r % 2, r, 2):
            low = l_derivative(an, N, k)
            assert abs(low) < mpf(10) ** -25, (tag, k, low)
        out.write("l_derivative %s %d %s\n" % (tag, r, fmt(l_derivative(an, N, r))))
    for tag, a, pts in HEIGHTS:
        if tag not in seen:
            out.write(curve_line(tag, a) + "\n")
            seen.add(tag)
        for (x, y) in pts:
            h = checked_height(a, (Fraction(x), Fraction(y)))
            out.write("height %s %d %d %s\n" % (tag, x, y, fmt(h)))
        if len(pts) > 1:
            key = ";".join("%d,%d" % p for p in pts)
            out.write("regulator %s %s %s\n" % (tag, key, fmt(regulator(a, pts))))
    for tag, a in CONDUCTORS:
        if tag in seen:
            continue
        disc = invariants(a)[5]
        assert disc != 0, tag
        out.write(curve_line(tag, a) + "\n")
        seen.add(tag)
        N, w, _ = conductor_and_sign(a)
        out.write("conductor %s %d\nroot_number %s %d\n" % (tag, N, tag, w))


if __name__ == "__main__":
    main()
