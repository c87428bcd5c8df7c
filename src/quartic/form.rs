//! Binary quartic forms `g(x, z)` with integer coefficients and non-zero
//! discriminant, and the curves `y² = g(x, z)` they define.
//!
//! # Conventions
//!
//! A [`Quartic`] stores `[c4, c3, c2, c1, c0]` (leading coefficient first):
//!
//! ```text
//! g(x, z) = c4 x⁴ + c3 x³ z + c2 x² z² + c1 x z³ + c0 z⁴ ,
//! ```
//!
//! and stands for the curve `C: y² = g(x, z)` in the weighted projective
//! plane `P(1, 1, 2)`. A point of `C` over a field `K` is `(x : z : y)` with
//! `(x, z) ≠ (0, 0)` and `y² = g(x, z)`; scaling `(x, z, y) ↦ (λx, λz, λ²y)`
//! gives the same point. So `C(K)` is non-empty iff `g(x, z)` is a square
//! in `K` (possibly `0`) for some `(x, z) ∈ K² \ {0}`.
//!
//! # Invariants
//!
//! With `(a, b, c, d, e) = (c4, c3, c2, c1, c0)` the classical invariants
//! of the binary quartic are ([Cremona01, §2], from memory; the identity
//! below is re-checked symbolically in the tests against sympy's
//! polynomial discriminant)
//!
//! ```text
//! I = 12ae − 3bd + c² ,
//! J = 72ace + 9bcd − 27ad² − 27eb² − 2c³ ,
//! 4I³ − J² = 27 Δ ,
//! ```
//!
//! where `Δ` is the discriminant of the binary form (equal to the
//! discriminant of the polynomial `g(x, 1)` when `c4 ≠ 0`). `Δ = 0` iff
//! `g = 0` or `g` has a repeated linear factor over `Q̄` (a root at
//! infinity counts: `c4 = c3 = 0` is degenerate). A non-degenerate
//! quartic defines a smooth curve of genus one.

use crate::error::{Error, Result};
use num_bigint::BigInt;
use num_integer::Integer;
#[cfg(test)]
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::fmt;

/// A binary quartic form `g(x, z) = c4 x⁴ + c3 x³z + c2 x²z² + c1 xz³ + c0 z⁴`
/// with integer coefficients and non-zero discriminant; it stands for the
/// genus-one curve `y² = g(x, z)`.
///
/// Invariant (enforced by every constructor): the discriminant is non-zero.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct Quartic {
    /// `[c4, c3, c2, c1, c0]`.
    coeffs: [BigInt; 5],
}

impl Quartic {
    /// The quartic with coefficients `[c4, c3, c2, c1, c0]` (coefficient of
    /// `x^(4−i) z^i` at index `i`).
    ///
    /// # Errors
    /// [`Error::Degenerate`] when the discriminant is `0` (this
    /// includes `g = 0`, a repeated factor such as `(x − z)²(x² + z²)`, and a
    /// double root at infinity `c4 = c3 = 0`).
    ///
    /// Cost: a few multiplications of the coefficients.
    ///
    /// Example: `x⁴ − 17 z⁴` has `I = −12·17 = −204`, `J = 0`, so
    /// `Δ = 4·(−204)³/27 = −1257728` and it is accepted;
    /// `x⁴ − 2x²z² + z⁴ = (x² − z²)²` is rejected.
    pub fn new(coeffs: [BigInt; 5]) -> Result<Quartic> {
        let q = Quartic { coeffs };
        if q.discriminant().is_zero() {
            return Err(Error::Degenerate {
                reason: format!(
                    "the quartic {q} has discriminant 0 (zero form or repeated factor)"
                ),
            });
        }
        Ok(q)
    }

    #[cfg(test)]
    /// Convenience constructor from machine integers `[c4, c3, c2, c1, c0]`;
    /// same rules as [`Quartic::new`].
    pub(crate) fn from_i64(coeffs: [i64; 5]) -> Result<Quartic> {
        Quartic::new(coeffs.map(BigInt::from))
    }

    #[cfg(test)]
    /// Clears denominators by an exact square scaling: given rational
    /// coefficients `r_i`, returns `(q, s)` with `s ≥ 1` an integer and
    /// `q = s²·g`, so that `y² = g(x, z)` and `Y² = q(x, z)` are the same
    /// curve under `Y = s·y`. Here `s` is the least common multiple of the
    /// denominators (so `s·r_i`, hence `s²·r_i`, is integral).
    ///
    /// # Errors
    /// [`Error::Degenerate`] as in [`Quartic::new`].
    ///
    /// Example: `[1/4, 0, 0, 0, −17/4]` gives `s = 4` and `16·g =
    /// 4x⁴ − 68z⁴`.
    pub(crate) fn from_rationals(coeffs: &[BigRational; 5]) -> Result<(Quartic, BigInt)> {
        let mut s = BigInt::one();
        for c in coeffs {
            s = s.lcm(c.denom());
        }
        let s2 = BigRational::from_integer(&s * &s);
        let ints = [0, 1, 2, 3, 4].map(|i| (&coeffs[i] * &s2).to_integer());
        Ok((Quartic::new(ints)?, s))
    }

    /// The homogeneous space `C_d` of the 2-isogeny descent on
    /// `E: y² = x³ + a x² + b x` [SilvermanTate92, III.5–6]:
    ///
    /// ```text
    /// C_d:  N² = d M⁴ + a M² e² + (b/d) e⁴ ,
    /// ```
    ///
    /// a solution with `e ≠ 0` giving the point `(d M²/e², d M N/e³)` on `E`.
    /// As an integral form: with `h = gcd(d, b) > 0` and `d₁ = d/h`, multiply
    /// by `d₁²`: `(d₁N)² = d d₁² M⁴ + a d₁² M² e² + (b/h) d₁ e⁴`. So the
    /// returned quartic is `[d·d₁², 0, a·d₁², 0, (b/h)·d₁]` in the variables
    /// `(x, z) = (M, e)`, and `y = d₁·N`. When `d | b`, `d₁ = ±1` and this is
    /// `[d, 0, a, 0, b/d]` exactly.
    ///
    /// Its discriminant is `16·d₁¹²·b·(a² − 4b)²` (computed symbolically
    /// with sympy 1.14: `Δ(dM⁴ + aM² + (b/d)) = 16 b (a² − 4b)²`, and the
    /// integral form likewise), so it is non-degenerate iff
    /// `b(a² − 4b) ≠ 0`, i.e. iff `E` is non-singular; the constructor
    /// checks that condition instead of recomputing `I` and `J`.
    ///
    /// # Errors
    /// [`Error::Zero`] for `d = 0`; [`Error::Degenerate`] when
    /// `b(a² − 4b) = 0`.
    ///
    /// Example: for `E: y² = x³ − 17x` (`a = 0, b = −17`) and `d = −1` the
    /// space is `N² = −M⁴ + 17e⁴`, i.e. `[−1, 0, 0, 0, 17]`; for `d = 2`
    /// (`h = 1`, `d₁ = 2`) it is `[8, 0, 0, 0, −34]`.
    pub fn two_isogeny_space(d: &BigInt, a: &BigInt, b: &BigInt) -> Result<Quartic> {
        if d.is_zero() {
            return Err(Error::Zero {
                what: "the square class representative d of the homogeneous space".into(),
            });
        }
        let disc = b * (a * a - BigInt::from(4) * b);
        if disc.is_zero() {
            return Err(Error::Degenerate {
                reason: format!(
                    "b(a² − 4b) = 0 for a = {a}, b = {b}: the curve y² = x³ + ax² + bx is singular"
                ),
            });
        }
        let h = match (d.to_i64(), b.to_i64()) {
            (Some(ds), Some(bs)) => BigInt::from(ds.unsigned_abs().gcd(&bs.unsigned_abs())),
            _ => d.gcd(b),
        };
        let d1 = d / &h;
        let d1sq = &d1 * &d1;
        let z = BigInt::zero();
        // The discriminant is 16·d₁¹²·b·(a² − 4b)² (above), non-zero here:
        // no need to recompute I and J.
        let q = Quartic {
            coeffs: [d * &d1sq, z.clone(), a * &d1sq, z, (b / &h) * &d1],
        };
        debug_assert!(!q.discriminant().is_zero());
        Ok(q)
    }

    /// The coefficients `[c4, c3, c2, c1, c0]`.
    pub fn coeffs(&self) -> &[BigInt; 5] {
        &self.coeffs
    }

    /// `g(x, z)`, evaluated exactly (Horner in `x` with powers of `z`).
    ///
    /// Example: for `x⁴ − 17z⁴`, `g(2, 1) = −1`.
    pub fn eval(&self, x: &BigInt, z: &BigInt) -> BigInt {
        // g = ((((c4 x + c3 z) x + c2 z²) x + c1 z³) x + c0 z⁴)
        let mut zp = BigInt::one();
        let mut acc = self.coeffs[0].clone();
        for c in &self.coeffs[1..] {
            zp *= z;
            acc = acc * x + c * &zp;
        }
        acc
    }

    /// The invariant `I = 12 c4 c0 − 3 c3 c1 + c2²` [Cremona01, §2] (from memory).
    pub(crate) fn invariant_i(&self) -> BigInt {
        let [a, b, c, d, e] = &self.coeffs;
        BigInt::from(12) * a * e - BigInt::from(3) * b * d + c * c
    }

    /// The invariant `J = 72 c4 c2 c0 + 9 c3 c2 c1 − 27 c4 c1² − 27 c0 c3² − 2 c2³`
    /// [Cremona01, §2] (from memory).
    pub(crate) fn invariant_j(&self) -> BigInt {
        let [a, b, c, d, e] = &self.coeffs;
        BigInt::from(72) * a * c * e + BigInt::from(9) * b * c * d
            - BigInt::from(27) * a * d * d
            - BigInt::from(27) * e * b * b
            - BigInt::from(2) * c * c * c
    }

    /// The discriminant `Δ = (4I³ − J²)/27` (the division is exact).
    ///
    /// Example: for `x⁴ − z⁴`, `I = −12`, `J = 0`, so
    /// `Δ = 4·(−1728)/27 = −256`.
    pub fn discriminant(&self) -> BigInt {
        let i = self.invariant_i();
        let j = self.invariant_j();
        (BigInt::from(4) * &i * &i * &i - &j * &j) / BigInt::from(27)
    }
}

impl fmt::Display for Quartic {
    /// Writes `y^2 = c4*x^4 + c3*x^3*z + c2*x^2*z^2 + c1*x*z^3 + c0*z^4`,
    /// dropping zero terms and unit coefficients.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        const MONO: [&str; 5] = ["x^4", "x^3*z", "x^2*z^2", "x*z^3", "z^4"];
        write!(f, "y^2 = ")?;
        let mut first = true;
        for (c, m) in self.coeffs.iter().zip(MONO) {
            if c.is_zero() {
                continue;
            }
            let mag = c.abs();
            if first {
                if c.is_negative() {
                    write!(f, "-")?;
                }
            } else if c.is_negative() {
                write!(f, " - ")?;
            } else {
                write!(f, " + ")?;
            }
            if mag.is_one() {
                write!(f, "{m}")?;
            } else {
                write!(f, "{mag}*{m}")?;
            }
            first = false;
        }
        if first {
            write!(f, "0")?;
        }
        Ok(())
    }
}
