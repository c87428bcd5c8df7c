//! The Eisenstein integers Z\[ω\], ω = (−1 + √−3)/2: the ring of integers
//! of K = Q(√−3). Class number 1; units ±1, ±ω, ±ω² (common practice;
//! Ireland–Rosen, "A Classical Introduction to Modern Number Theory",
//! ch. 9, §1). A prime p ≡ 1 mod 3 splits as ππ̄ with N(π) = p, p = 3
//! ramifies (3 = −ω²(1 − ω)²), a prime p ≡ 2 mod 3 stays inert.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};

use crate::error::{Error, Result};
use crate::local::{sqrt_mod_prime, Prime};

/// An element (A + B√−3)/2 of Z\[ω\] (A ≡ B mod 2).
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct Eisenstein {
    a: BigInt,
    b: BigInt,
}

impl Eisenstein {
    /// (A + B√−3)/2.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] when A and B differ in parity (the
    /// number is then not integral).
    pub fn new(a: BigInt, b: BigInt) -> Result<Eisenstein> {
        if (&a - &b).is_odd() {
            return Err(Error::InvalidArgument {
                reason: format!("({a} + {b}·√−3)/2 is not an Eisenstein integer"),
            });
        }
        Ok(Eisenstein { a, b })
    }

    /// The rational integer n.
    pub fn from_int(n: BigInt) -> Eisenstein {
        Eisenstein {
            a: n * 2,
            b: BigInt::zero(),
        }
    }

    /// x + y√−3.
    pub fn from_parts(x: BigInt, y: BigInt) -> Eisenstein {
        Eisenstein { a: x * 2, b: y * 2 }
    }

    /// ω = (−1 + √−3)/2.
    pub fn omega() -> Eisenstein {
        Eisenstein {
            a: BigInt::from(-1),
            b: BigInt::one(),
        }
    }

    /// 1.
    pub fn one() -> Eisenstein {
        Eisenstein::from_int(BigInt::one())
    }

    /// A, twice the rational part.
    pub fn twice_real(&self) -> &BigInt {
        &self.a
    }

    /// B, twice the coefficient of √−3.
    pub fn twice_imag(&self) -> &BigInt {
        &self.b
    }

    /// The product.
    pub fn mul(&self, o: &Eisenstein) -> Eisenstein {
        // ((A1 + B1 s)(A2 + B2 s))/4 with s² = −3.
        let a = (&self.a * &o.a - BigInt::from(3) * &self.b * &o.b) / 2;
        let b = (&self.a * &o.b + &self.b * &o.a) / 2;
        Eisenstein { a, b }
    }

    /// The power `e`.
    pub fn pow(&self, e: u32) -> Eisenstein {
        let mut r = Eisenstein::one();
        for _ in 0..e {
            r = r.mul(self);
        }
        r
    }

    /// The conjugate (A − B√−3)/2.
    pub fn conj(&self) -> Eisenstein {
        Eisenstein {
            a: self.a.clone(),
            b: -&self.b,
        }
    }

    /// The norm (A² + 3B²)/4.
    pub fn norm(&self) -> BigInt {
        (&self.a * &self.a + BigInt::from(3) * &self.b * &self.b) / 4
    }

    /// True for 0.
    pub fn is_zero(&self) -> bool {
        self.a.is_zero() && self.b.is_zero()
    }

    /// `self / n` when the rational integer n divides `self` in Z\[ω\].
    pub fn div_int(&self, n: &BigInt) -> Option<Eisenstein> {
        if n.is_zero() {
            return None;
        }
        let (qa, ra) = self.a.div_rem(n);
        let (qb, rb) = self.b.div_rem(n);
        if !ra.is_zero() || !rb.is_zero() || (&qa - &qb).is_odd() {
            return None;
        }
        Some(Eisenstein { a: qa, b: qb })
    }

    /// `self / π` when the prime element π (of prime norm p) divides it.
    pub fn div_prime(&self, pi: &Eisenstein) -> Option<Eisenstein> {
        self.mul(&pi.conj()).div_int(&pi.norm())
    }

    /// The largest e with π^e | self (self ≠ 0), for π of prime norm.
    pub fn valuation_at(&self, pi: &Eisenstein) -> u32 {
        if self.is_zero() {
            return u32::MAX;
        }
        let mut e = 0;
        let mut x = self.clone();
        while let Some(y) = x.div_prime(pi) {
            x = y;
            e += 1;
        }
        e
    }
}

impl std::fmt::Display for Eisenstein {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "({} + {}√−3)/2", self.a, self.b)
    }
}

/// A prime π = x + y√−3 of Z\[ω\] with N(π) = p, for a prime p ≡ 1 mod 3,
/// found by Cornacchia's algorithm for x² + 3y² = p (Cohen, "A Course in
/// Computational Algebraic Number Theory", Algorithm 1.5.2; from memory).
/// `None` when p is not ≡ 1 mod 3.
pub fn prime_above(p: &Prime) -> Option<Eisenstein> {
    let pv = p.get();
    if (pv % 3u32) != BigInt::one() {
        return None;
    }
    let s = sqrt_mod_prime(&BigInt::from(-3).mod_floor(pv), p)?;
    let limit = pv.sqrt();
    for start in [s.clone(), pv - &s] {
        let (mut a, mut b) = (pv.clone(), start);
        while b > limit {
            let r = &a % &b;
            a = b;
            b = r;
        }
        let rest = pv - &b * &b;
        if rest.is_negative() || !(&rest % 3u32).is_zero() {
            continue;
        }
        let y2: BigInt = rest / 3;
        let y = y2.sqrt();
        if &y * &y == y2 {
            return Some(Eisenstein::from_parts(b, y));
        }
    }
    None
}

/// The image of α in F_p = Z\[ω\]/π for a prime π = x + y√−3 of prime
/// norm p (≠ 3): √−3 ↦ −x/y mod p.
pub fn reduce_mod(alpha: &Eisenstein, pi: &Eisenstein) -> Option<BigInt> {
    let p = pi.norm();
    let x: BigInt = &pi.a / 2;
    let y: BigInt = &pi.b / 2;
    let yinv = crate::cubic::local::inverse_mod(&y, &p)?;
    let s = (-x * yinv).mod_floor(&p);
    let inv2 = crate::cubic::local::inverse_mod(&BigInt::from(2), &p)?;
    Some(((&alpha.a + &alpha.b * s) * inv2).mod_floor(&p))
}
