//! Word-size factoring: 64-bit Montgomery arithmetic, Miller–Rabin,
//! Hart's one-line method, the order of methods for word-size composites
//! (ECM itself is in `super::ecm64`) and Pollard–Brent rho with batched
//! gcds.
//!
//! Everything here works on `u64` without allocation; it backs
//! [`super::factor::factor_u64`] and the word-size cofactors of
//! [`super::factor::factor`].

use super::word::isqrt_u128;

/// Arithmetic modulo an odd `n` in Montgomery form (`R = 2^64`)
/// \[Montgomery85\].
#[derive(Clone, Copy, Debug)]
pub(crate) struct M64 {
    n: u64,
    /// `n⁻¹ mod 2^64`.
    inv: u64,
    /// `R² mod n`.
    r2: u64,
}

impl M64 {
    /// The ring `Z/nZ` for an odd `n > 1`; `None` otherwise.
    pub(crate) fn new(n: u64) -> Option<Self> {
        if n < 3 || n % 2 == 0 {
            return None;
        }
        // Newton's iteration for n⁻¹ mod 2^64: n·n ≡ 1 (mod 8), and each
        // step doubles the number of correct low bits (3 → 6 → … → 96).
        let mut inv = n;
        for _ in 0..5 {
            inv = inv.wrapping_mul(2u64.wrapping_sub(n.wrapping_mul(inv)));
        }
        let r1 = ((1u128 << 64) % n as u128) as u64;
        let r2 = ((r1 as u128 * r1 as u128) % n as u128) as u64;
        Some(M64 { n, inv, r2 })
    }

    /// `t·R⁻¹ mod n` for `t < n·2^64`.
    ///
    /// With `m = t·n⁻¹ mod 2^64`, `m·n` and `t` agree in their low words,
    /// so `(t − m·n)/2^64` is the difference of the high words, which lies
    /// in `(−n, n)`: one correction by `+n` at most, and no carry out of
    /// a 128-bit sum to track.
    #[inline]
    fn redc(&self, t: u128) -> u64 {
        let m = (t as u64).wrapping_mul(self.inv);
        let mn_hi = ((m as u128 * self.n as u128) >> 64) as u64;
        let (r, borrow) = ((t >> 64) as u64).overflowing_sub(mn_hi);
        if borrow {
            r.wrapping_add(self.n)
        } else {
            r
        }
    }

    /// Product of two elements in Montgomery form.
    #[inline]
    pub(crate) fn mul(&self, a: u64, b: u64) -> u64 {
        self.redc(a as u128 * b as u128)
    }

    /// `a + b mod n` for reduced `a`, `b`.
    #[inline]
    pub(crate) fn add(&self, a: u64, b: u64) -> u64 {
        let (s, c) = a.overflowing_add(b);
        if c || s >= self.n {
            s.wrapping_sub(self.n)
        } else {
            s
        }
    }

    /// `a − b mod n` for reduced `a`, `b`.
    #[inline]
    pub(crate) fn sub(&self, a: u64, b: u64) -> u64 {
        if a >= b {
            a - b
        } else {
            a.wrapping_sub(b).wrapping_add(self.n)
        }
    }

    /// The residue of 1 in Montgomery form.
    #[inline]
    pub(crate) fn one(&self) -> u64 {
        self.redc(self.r2 as u128)
    }

    /// The plain residue in `[0, n)` of an element in Montgomery form.
    #[inline]
    pub(crate) fn plain(&self, a: u64) -> u64 {
        self.redc(a as u128)
    }

    /// `x` (any `u64`) in Montgomery form.
    #[inline]
    pub(crate) fn elem(&self, x: u64) -> u64 {
        self.mul(x % self.n, self.r2)
    }

    /// `a^e` for `a` in Montgomery form.
    fn pow(&self, a: u64, mut e: u64) -> u64 {
        let mut result = self.elem(1);
        let mut base = a;
        while e > 0 {
            if e & 1 == 1 {
                result = self.mul(result, base);
            }
            base = self.mul(base, base);
            e >>= 1;
        }
        result
    }
}

/// Binary gcd.
pub(crate) fn gcd_u64(mut a: u64, mut b: u64) -> u64 {
    if a == 0 {
        return b;
    }
    if b == 0 {
        return a;
    }
    let shift = (a | b).trailing_zeros();
    a >>= a.trailing_zeros();
    loop {
        b >>= b.trailing_zeros();
        if a > b {
            std::mem::swap(&mut a, &mut b);
        }
        b -= a;
        if b == 0 {
            return a << shift;
        }
    }
}

/// Strong probable-prime tests of the odd `n > 2` to each base, in 64-bit
/// Montgomery arithmetic; a base `≡ 0 (mod n)` is skipped.
pub(crate) fn miller_rabin_u64(n: u64, bases: &[u64]) -> bool {
    let ring = match M64::new(n) {
        Some(r) => r,
        None => return n == 2,
    };
    let one = ring.elem(1);
    let minus_one = ring.sub(0, one);
    let s = (n - 1).trailing_zeros();
    let d = (n - 1) >> s;
    'bases: for &b in bases {
        if b % n == 0 {
            continue;
        }
        let mut x = ring.pow(ring.elem(b), d);
        if x == one || x == minus_one {
            continue;
        }
        for _ in 1..s {
            x = ring.mul(x, x);
            if x == minus_one {
                continue 'bases;
            }
        }
        return false;
    }
    true
}

/// `Some(√x)` iff `x` is a perfect square (filter by the squares mod 64,
/// then an exact root).
fn is_square_u64(x: u64) -> Option<u64> {
    const MASK: u64 = {
        let mut m = 0u64;
        let mut i = 0u64;
        while i < 64 {
            m |= 1 << (i * i % 64);
            i += 1;
        }
        m
    };
    if (MASK >> (x & 63)) & 1 == 0 {
        return None;
    }
    let r = super::roots::isqrt_u64(x);
    (r * r == x).then_some(r)
}

/// Multiplier of Hart's method: `480 = 2^5·3·5`, so that `4·480·i·n`
/// covers the small square classes (W. B. Hart, "A one line factoring
/// algorithm", J. Aust. Math. Soc. 92 (2012), section 3, the variant
/// with a multiplier).
const HART_MULTIPLIER: u128 = 480;

/// Hart's one-line factoring method on an odd composite `n < 2^42` that
/// is not a perfect square: for `i = 1, 2, …`, `s = ⌈√(480·i·n)⌉`,
/// `m = s² mod n`; when `m = t²` is a square, `gcd(s − t, n)` is a
/// divisor (W. B. Hart, J. Aust. Math. Soc. 92 (2012), Algorithm 1 with
/// a multiplier). Gives up after `max_iter` values of `i`.
///
/// Returns a proper divisor or `None`.
pub(crate) fn hart_olf(n: u64, max_iter: u64) -> Option<u64> {
    if !(4..1 << 42).contains(&n) {
        return None;
    }
    let nn = n as u128 * HART_MULTIPLIER;
    let mut ni = nn;
    for _ in 0..max_iter {
        // s = ⌈√(ni)⌉.
        let r = isqrt_u128(ni);
        let s = if r * r == ni { r } else { r + 1 };
        let m = ((s * s) % n as u128) as u64;
        if let Some(t) = is_square_u64(m) {
            let s_mod = (s % n as u128) as u64;
            let g = gcd_u64(s_mod.wrapping_sub(t % n).wrapping_add(n) % n, n);
            if g > 1 && g < n {
                return Some(g);
            }
        }
        ni += nn;
    }
    None
}

/// Iterations between two gcds in [`rho_brent_u64`].
const RHO_BATCH: u64 = 128;

/// Pollard–Brent rho \[Brent80\] on the odd composite `n` with the map
/// `x ↦ x² + c` in 64-bit Montgomery form, gcds batched over
/// [`RHO_BATCH`] iterations (Brent's product trick) with backtracking
/// when a batch overshoots. Gives up after about `max_iter` iterations.
///
/// Returns a proper divisor or `None` (the cycle closed mod `n`, or the
/// limit was reached: retry with another `c`).
pub(crate) fn rho_brent_u64(n: u64, c: u64, max_iter: u64) -> Option<u64> {
    let ring = M64::new(n)?;
    let cc = ring.elem(c);
    let f = |x: u64| ring.add(ring.mul(x, x), cc);
    let mut y = ring.elem(2);
    let mut x;
    let mut ys = y;
    let mut q = ring.elem(1);
    let mut g = 1u64;
    let mut r = 1u64;
    let mut done = 0u64;
    while g == 1 {
        x = y;
        for _ in 0..r {
            y = f(y);
        }
        let mut k = 0u64;
        while k < r && g == 1 {
            ys = y;
            let steps = RHO_BATCH.min(r - k);
            for _ in 0..steps {
                y = f(y);
                q = ring.mul(q, ring.sub(x, y));
            }
            g = gcd_u64(q, n);
            k += steps;
        }
        done += 2 * r;
        r *= 2;
        if g == 1 && done > max_iter {
            return None;
        }
        if g == n {
            // Step back one iteration at a time from the batch start.
            loop {
                ys = f(ys);
                g = gcd_u64(ring.sub(x, ys), n);
                if g != 1 {
                    break;
                }
            }
        }
    }
    (g != n).then_some(g)
}

/// Below this bound a composite is split by Hart's method first.
const HART_BELOW: u64 = 1 << 34;

/// A proper divisor of the odd composite `n < 2^64` that is not a
/// perfect square and has no prime factor below 7: Hart's method for
/// `n < 2^34` (256 iterations), then ECM curves in 64-bit arithmetic
/// with `B1` chosen by the size of `n` ([`ecm_bound_u64`]), then
/// Pollard–Brent rho with `c = 1, 2, …`.
///
/// Cost: the ECM curves cost at most about `2·10^6` Montgomery
/// multiplications (`ECM_U64_CURVES` curves); rho then needs about `√p`
/// iterations for the least prime `p | n`, so at most about `2^17`
/// Montgomery multiplications.
pub(crate) fn split_u64(n: u64) -> u64 {
    if n < HART_BELOW {
        if let Some(d) = hart_olf(n, 256) {
            return d;
        }
    }
    if let Some(d) = super::ecm64::ecm_u64(n, ecm_bound_u64(n), ECM_U64_CURVES, 11) {
        return d;
    }
    for c in 1..u64::MAX {
        if let Some(d) = rho_brent_u64(n, c, 1 << 24) {
            return d;
        }
    }
    n
}

/// Curves tried by [`split_u64`] before rho.
const ECM_U64_CURVES: u32 = 600;

/// Stage-1 bound of the word-size ECM curves by the size of `n`: the
/// least prime factor of a composite `n < 2^64` without prime factors
/// below 7 has at most `bits/2` bits. Measured on random products of
/// two primes of `bits/2` bits (docs/performance.md).
pub(crate) fn ecm_bound_u64(n: u64) -> u64 {
    match 64 - n.leading_zeros() {
        0..=44 => 47,
        45..=50 => 70,
        51..=54 => 85,
        55..=58 => 105,
        59..=61 => 125,
        _ => 165,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn montgomery_products_match_u128_arithmetic() {
        for &n in &[3u64, 101, 1_000_000_007, (1 << 61) - 1, u64::MAX - 58] {
            let r = M64::new(n).unwrap();
            for &(a, b) in &[(2u64, 3u64), (n - 1, n - 1), (12345, 67890)] {
                let want = ((a as u128 * b as u128) % n as u128) as u64;
                let got = r.mul(r.elem(a), r.elem(b));
                assert_eq!(got, r.elem(want), "n = {n}");
            }
        }
    }

    #[test]
    fn hart_and_rho_split_semiprimes() {
        // Primes from memory, each checked by miller_rabin_u64 below.
        let cases = [(1_000_003u64, 1_000_033u64), (65_537, 4_294_967_311)];
        for (p, q) in cases {
            assert!(miller_rabin_u64(p, &[2, 3, 5, 7, 11, 13]));
            assert!(miller_rabin_u64(q, &[2, 3, 5, 7, 11, 13]));
            let n = p * q;
            let d = split_u64(n);
            assert!(d == p || d == q, "{n}: got {d}");
            let r = rho_brent_u64(n, 1, 1 << 24).unwrap();
            assert!(r == p || r == q);
        }
        let n = 1_000_003u64 * 1_000_033;
        let d = hart_olf(n, 1 << 16).unwrap();
        assert!(d == 1_000_003 || d == 1_000_033);
    }

    #[test]
    fn binary_gcd_matches_euclid() {
        for a in 0..60u64 {
            for b in 0..60u64 {
                let mut x = a;
                let mut y = b;
                while y != 0 {
                    let t = x % y;
                    x = y;
                    y = t;
                }
                assert_eq!(gcd_u64(a, b), x);
            }
        }
    }
}
