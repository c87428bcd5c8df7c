//! Modular arithmetic for an odd modulus, in fixed-width Montgomery form.
//!
//! Montgomery's representation \[Montgomery85\] stores a residue `x mod m` as
//! `x·R mod m` with `R = 2^(64N)`; the product of two representatives is
//! reduced by the REDC step without any division, so a modular
//! multiplication costs about `2N²` word multiplications. The routines here
//! use the coarsely integrated operand scanning (CIOS) form of REDC
//! \[KocAcarKaliski96\]. Every `N` from 1 word (the `u64` fast path) up to 16
//! words (1024 bits) is served by the const-generic [`Mont`]; larger moduli
//! fall back to [`BigRing`], which reduces with ordinary big-integer
//! division. The prime tests, Pollard–Brent rho and ECM are written once
//! against the [`Ring`] trait.

use num_bigint::{BigInt, BigUint, Sign};
use num_integer::Integer;
use num_traits::{One, Zero};

/// Arithmetic modulo a fixed odd modulus `m > 1`.
///
/// Elements are opaque representatives; `from_*`/`to_big` convert. All
/// operations take fully reduced representatives and return them.
pub(crate) trait Ring {
    /// A residue class representative.
    type E: Clone + PartialEq + std::fmt::Debug;
    /// The residue of 0.
    fn zero(&self) -> Self::E;
    /// The residue of 1.
    fn one(&self) -> Self::E;
    /// `a + b mod m`.
    fn add(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a - b mod m`.
    fn sub(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a · b mod m`.
    fn mul(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a / 2 mod m` (m is odd).
    fn half(&self, a: &Self::E) -> Self::E;
    /// The residue of a (possibly negative) big integer.
    fn elem_big(&self, x: &BigInt) -> Self::E;
    /// The canonical integer in `[0, m)` of a residue.
    fn to_big(&self, a: &Self::E) -> BigInt;
    /// The modulus.
    fn modulus(&self) -> BigInt;
    /// `a · a mod m`.
    fn sqr(&self, a: &Self::E) -> Self::E {
        self.mul(a, a)
    }
    /// True iff `a ≡ 0`.
    fn is_zero(&self, a: &Self::E) -> bool {
        *a == self.zero()
    }
    /// The residue of a small signed integer.
    fn elem_i64(&self, x: i64) -> Self::E {
        self.elem_big(&BigInt::from(x))
    }
    /// The residue of `x·u` for a unit `u` fixed by the ring (`R⁻¹` in
    /// Montgomery form: the representation is `x` itself, no conversion).
    /// Enough for products whose gcd with the modulus is all that counts.
    fn unit_multiple_u64(&self, x: u64) -> Self::E {
        self.elem_big(&BigInt::from(x))
    }
    /// `a^e mod m` for `e ≥ 0`, left-to-right binary powering.
    fn pow(&self, a: &Self::E, e: &BigUint) -> Self::E {
        let bits = e.bits();
        let mut r = self.one();
        for i in (0..bits).rev() {
            r = self.sqr(&r);
            if e.bit(i) {
                r = self.mul(&r, a);
            }
        }
        r
    }
}

/// Montgomery arithmetic modulo an odd `m < 2^(64N)`, words little-endian.
#[derive(Clone, Debug)]
pub(crate) struct Mont<const N: usize> {
    m: [u64; N],
    /// `-m^{-1} mod 2^64`.
    minv: u64,
    /// `R mod m`: the representative of 1.
    r1: [u64; N],
    /// `R² mod m`: converts a plain residue into Montgomery form by one REDC.
    r2: [u64; N],
}

#[inline(always)]
fn mac(a: u64, b: u64, c: u64, carry: u64) -> (u64, u64) {
    // a + b*c + carry never overflows 128 bits.
    let t = a as u128 + (b as u128) * (c as u128) + carry as u128;
    (t as u64, (t >> 64) as u64)
}

#[inline(always)]
fn ge<const N: usize>(a: &[u64; N], b: &[u64; N]) -> bool {
    for i in (0..N).rev() {
        if a[i] != b[i] {
            return a[i] > b[i];
        }
    }
    true
}

#[inline(always)]
fn sub_in_place<const N: usize>(a: &mut [u64; N], b: &[u64; N]) -> bool {
    let mut borrow = false;
    for i in 0..N {
        let (d1, b1) = a[i].overflowing_sub(b[i]);
        let (d2, b2) = d1.overflowing_sub(borrow as u64);
        a[i] = d2;
        borrow = b1 | b2;
    }
    borrow
}

#[inline(always)]
fn add_in_place<const N: usize>(a: &mut [u64; N], b: &[u64; N]) -> bool {
    let mut carry = false;
    for i in 0..N {
        let (s1, c1) = a[i].overflowing_add(b[i]);
        let (s2, c2) = s1.overflowing_add(carry as u64);
        a[i] = s2;
        carry = c1 | c2;
    }
    carry
}

impl<const N: usize> Mont<N> {
    /// The ring `Z/mZ`, or `None` if `m` is even, `m ≤ 1`, or `m` needs more
    /// than `N` words.
    pub(crate) fn new(m: &BigUint) -> Option<Self> {
        let digits = m.to_u64_digits();
        if digits.len() > N || m.is_even() || m <= &BigUint::one() {
            return None;
        }
        let mut limbs = [0u64; N];
        limbs[..digits.len()].copy_from_slice(&digits);
        Some(Self::from_limbs(limbs))
    }

    /// Same as [`Mont::new`] from words; `m` must be odd and > 1.
    pub(crate) fn from_limbs(m: [u64; N]) -> Self {
        // Newton iteration for m0^{-1} mod 2^64: each step doubles the
        // number of correct low bits (m0 odd gives 3 bits to start).
        let m0 = m[0];
        let mut inv = m0;
        for _ in 0..5 {
            inv = inv.wrapping_mul(2u64.wrapping_sub(m0.wrapping_mul(inv)));
        }
        let minv = inv.wrapping_neg();
        let mut ring = Mont {
            m,
            minv,
            r1: [0; N],
            r2: [0; N],
        };
        // R mod m and R² mod m by repeated doubling from 1 (setup only).
        let mut x = [0u64; N];
        x[0] = 1;
        if N == 1 {
            // 1 < m, so 1 is reduced.
        }
        for i in 0..(128 * N) {
            x = ring.add_raw(&x, &x);
            if i + 1 == 64 * N {
                ring.r1 = x;
            }
        }
        ring.r2 = x;
        ring
    }

    #[inline(always)]
    fn add_raw(&self, a: &[u64; N], b: &[u64; N]) -> [u64; N] {
        let mut r = *a;
        let carry = add_in_place(&mut r, b);
        if carry || ge(&r, &self.m) {
            sub_in_place(&mut r, &self.m);
        }
        r
    }

    /// Montgomery product `a·b·R^{-1} mod m` (CIOS).
    #[inline(always)]
    fn redc_mul(&self, a: &[u64; N], b: &[u64; N]) -> [u64; N] {
        let mut t = [0u64; N];
        let mut t_n: u64 = 0;
        for &bi in b.iter() {
            let mut c = 0u64;
            for j in 0..N {
                let (lo, hi) = mac(t[j], a[j], bi, c);
                t[j] = lo;
                c = hi;
            }
            let s = t_n as u128 + c as u128;
            let t_lo = s as u64;
            let t_hi = (s >> 64) as u64;
            let q = t[0].wrapping_mul(self.minv);
            let (_, mut c) = mac(t[0], q, self.m[0], 0);
            for j in 1..N {
                let (lo, hi) = mac(t[j], q, self.m[j], c);
                t[j - 1] = lo;
                c = hi;
            }
            let s = t_lo as u128 + c as u128;
            t[N - 1] = s as u64;
            t_n = t_hi + (s >> 64) as u64;
        }
        if t_n != 0 || ge(&t, &self.m) {
            sub_in_place(&mut t, &self.m);
        }
        t
    }

    /// The Montgomery form of a plain residue `x < m`.
    #[inline]
    pub(crate) fn to_mont(&self, x: &[u64; N]) -> [u64; N] {
        self.redc_mul(x, &self.r2)
    }

    /// The plain residue of a Montgomery form.
    #[inline]
    pub(crate) fn out_of_mont(&self, x: &[u64; N]) -> [u64; N] {
        let mut one = [0u64; N];
        one[0] = 1;
        self.redc_mul(x, &one)
    }
}

impl<const N: usize> Ring for Mont<N> {
    type E = [u64; N];

    #[inline]
    fn zero(&self) -> [u64; N] {
        [0; N]
    }

    #[inline]
    fn one(&self) -> [u64; N] {
        self.r1
    }

    #[inline]
    fn add(&self, a: &[u64; N], b: &[u64; N]) -> [u64; N] {
        self.add_raw(a, b)
    }

    #[inline]
    fn sub(&self, a: &[u64; N], b: &[u64; N]) -> [u64; N] {
        let mut r = *a;
        if sub_in_place(&mut r, b) {
            add_in_place(&mut r, &self.m);
        }
        r
    }

    #[inline]
    fn mul(&self, a: &[u64; N], b: &[u64; N]) -> [u64; N] {
        self.redc_mul(a, b)
    }

    #[inline]
    fn half(&self, a: &[u64; N]) -> [u64; N] {
        let mut r = *a;
        let mut top = false;
        if r[0] & 1 == 1 {
            top = add_in_place(&mut r, &self.m);
        }
        for i in 0..N {
            let hi = if i + 1 < N { r[i + 1] & 1 } else { top as u64 };
            r[i] = (r[i] >> 1) | (hi << 63);
        }
        r
    }

    fn elem_big(&self, x: &BigInt) -> [u64; N] {
        let m = self.modulus();
        let r = x.mod_floor(&m);
        let digits = r.magnitude().to_u64_digits();
        let mut limbs = [0u64; N];
        limbs[..digits.len()].copy_from_slice(&digits);
        self.to_mont(&limbs)
    }

    fn elem_i64(&self, x: i64) -> [u64; N] {
        if N == 1 {
            let m = self.m[0];
            let r = if x >= 0 {
                (x as u64) % m
            } else {
                let a = x.unsigned_abs() % m;
                if a == 0 {
                    0
                } else {
                    m - a
                }
            };
            let mut limbs = [0u64; N];
            limbs[0] = r;
            return self.to_mont(&limbs);
        }
        self.elem_big(&BigInt::from(x))
    }

    fn unit_multiple_u64(&self, x: u64) -> [u64; N] {
        if N == 1 && x >= self.m[0] {
            return self.elem_big(&BigInt::from(x));
        }
        let mut limbs = [0u64; N];
        limbs[0] = x;
        limbs
    }

    fn to_big(&self, a: &[u64; N]) -> BigInt {
        let plain = self.out_of_mont(a);
        BigInt::from_biguint(Sign::Plus, BigUint::from_slice(&u64s_to_u32s(&plain)))
    }

    fn modulus(&self) -> BigInt {
        BigInt::from_biguint(Sign::Plus, BigUint::from_slice(&u64s_to_u32s(&self.m)))
    }
}

fn u64s_to_u32s(x: &[u64]) -> Vec<u32> {
    x.iter()
        .flat_map(|&w| [w as u32, (w >> 32) as u32])
        .collect()
}

/// Plain big-integer arithmetic modulo an odd `m`, for moduli too large
/// for [`Mont`].
#[derive(Clone, Debug)]
pub(crate) struct BigRing {
    m: BigInt,
}

impl BigRing {
    /// The ring `Z/mZ` for odd `m > 1`.
    pub(crate) fn new(m: &BigUint) -> Option<Self> {
        if m.is_even() || m <= &BigUint::one() {
            return None;
        }
        Some(BigRing {
            m: BigInt::from(m.clone()),
        })
    }
}

impl Ring for BigRing {
    type E = BigInt;
    fn zero(&self) -> BigInt {
        BigInt::zero()
    }
    fn one(&self) -> BigInt {
        BigInt::one()
    }
    fn add(&self, a: &BigInt, b: &BigInt) -> BigInt {
        let s = a + b;
        if s >= self.m {
            s - &self.m
        } else {
            s
        }
    }
    fn sub(&self, a: &BigInt, b: &BigInt) -> BigInt {
        let s = a - b;
        if s < BigInt::zero() {
            s + &self.m
        } else {
            s
        }
    }
    fn mul(&self, a: &BigInt, b: &BigInt) -> BigInt {
        (a * b) % &self.m
    }
    fn half(&self, a: &BigInt) -> BigInt {
        if a.is_odd() {
            (a + &self.m) >> 1u32
        } else {
            a >> 1u32
        }
    }
    fn elem_big(&self, x: &BigInt) -> BigInt {
        x.mod_floor(&self.m)
    }
    fn to_big(&self, a: &BigInt) -> BigInt {
        a.clone()
    }
    fn modulus(&self) -> BigInt {
        self.m.clone()
    }
}

/// Runs `$body` with `$ring` bound to the narrowest ring type that holds
/// the odd modulus `$m: &BigUint` (> 1). Evaluates to `$body`'s value.
macro_rules! with_ring {
    ($m:expr, |$ring:ident| $body:expr) => {{
        let m: &num_bigint::BigUint = $m;
        let words = m.to_u64_digits().len();
        match words {
            0 | 1 => match $crate::arith::mont::Mont::<1>::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
            2 => match $crate::arith::mont::Mont::<2>::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
            3 => match $crate::arith::mont::Mont::<3>::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
            4 => match $crate::arith::mont::Mont::<4>::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
            5 | 6 => match $crate::arith::mont::Mont::<6>::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
            7 | 8 => match $crate::arith::mont::Mont::<8>::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
            9..=16 => match $crate::arith::mont::Mont::<16>::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
            _ => match $crate::arith::mont::BigRing::new(m) {
                Some($ring) => Some($body),
                None => None,
            },
        }
    }};
}
pub(crate) use with_ring;

#[cfg(test)]
mod tests {
    use super::*;

    fn check_ring<R: Ring>(r: &R, a: i64, b: i64) {
        let m = r.modulus();
        let (x, y) = (r.elem_i64(a), r.elem_i64(b));
        let big = |v: i64| BigInt::from(v);
        assert_eq!(r.to_big(&r.mul(&x, &y)), (big(a) * big(b)).mod_floor(&m));
        assert_eq!(r.to_big(&r.add(&x, &y)), (big(a) + big(b)).mod_floor(&m));
        assert_eq!(r.to_big(&r.sub(&x, &y)), (big(a) - big(b)).mod_floor(&m));
        let h = r.half(&x);
        assert_eq!(r.to_big(&r.add(&h, &h)), big(a).mod_floor(&m));
    }

    #[test]
    fn montgomery_arithmetic_agrees_with_big_integer_arithmetic() {
        // Moduli of 1, 2, 3 words, including ones just below a word boundary.
        let moduli = [
            BigUint::from(1_000_000_007u64),
            BigUint::from(u64::MAX),
            (BigUint::one() << 127u32) - 1u32,
            (BigUint::one() << 128u32) - 159u32,
            (BigUint::one() << 190u32) + 1u32,
        ];
        for m in &moduli {
            let r1 = Mont::<1>::new(m);
            let r2 = Mont::<2>::new(m);
            let r3 = Mont::<3>::new(m).expect("every test modulus fits 3 words");
            let rb = BigRing::new(m).expect("every test modulus is odd");
            assert_eq!(r1.is_some(), m.bits() <= 64);
            assert_eq!(r2.is_some(), m.bits() <= 128);
            for &(a, b) in &[(3i64, 5i64), (-7, 11), (i64::MAX, i64::MIN + 1), (0, -1)] {
                if let Some(r) = &r1 {
                    check_ring(r, a, b);
                }
                if let Some(r) = &r2 {
                    check_ring(r, a, b);
                }
                check_ring(&r3, a, b);
                check_ring(&rb, a, b);
            }
        }
    }

    #[test]
    fn even_or_unit_moduli_are_refused() {
        assert!(Mont::<1>::new(&BigUint::from(10u32)).is_none());
        assert!(Mont::<1>::new(&BigUint::from(1u32)).is_none());
        assert!(Mont::<1>::new(&(BigUint::one() << 70u32 | BigUint::one())).is_none());
    }
}
