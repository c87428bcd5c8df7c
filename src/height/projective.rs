//! Exact group law in Jacobian integer coordinates, for points whose
//! coordinates run to hundreds of digits.
//!
//! An integral model `y² + a1xy + a3y = x³ + a2x² + a4x + a6` is carried to
//! the short model `Y² = X³ − 27·c4·X − 54·c6` by `X = 36x + 3b2`,
//! `Y = 108(2y + a1x + a3)` [Sil09, III.1]. There a point is a triple
//! `(X : Y : Z)` of integers with `X/Z² = x`, `Y/Z³ = y`; the point at
//! infinity has `Z = 0`. Doubling and addition use the textbook Jacobian
//! formulas (common practice; see Cohen, *A Course in Computational
//! Algebraic Number Theory*, §7.1 for the affine law they come from), with
//! no division at all; one gcd at the end returns to lowest terms.
//! Multiplication by `n` is left-to-right double-and-add: `O(log n)`
//! operations on integers whose size grows like `n²` times the height of
//! the point — the size of the answer.

use num_bigint::{BigInt, Sign};
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use crate::arith::sqrt_exact;
use crate::budget::Budget;
use crate::curve::Point;
use crate::error::{Error, Result};

/// A point `(X : Y : Z)` in Jacobian coordinates; `Z = 0` is infinity.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct Jac {
    pub x: BigInt,
    pub y: BigInt,
    pub z: BigInt,
}

impl Jac {
    pub fn infinity() -> Jac {
        Jac {
            x: BigInt::one(),
            y: BigInt::one(),
            z: BigInt::zero(),
        }
    }
    pub fn is_infinity(&self) -> bool {
        self.z.is_zero()
    }
}

/// The integral model, its short companion, and the maps between them.
#[derive(Clone, Debug)]
pub(crate) struct ShortModel {
    /// `[a1, a2, a3, a4, a6]` of the integral model.
    a: [BigInt; 5],
    b2: BigInt,
    /// `A = −27·c4`, `B = −54·c6`.
    pub big_a: BigInt,
    pub big_b: BigInt,
}

impl ShortModel {
    /// The short companion of an integral model.
    pub fn new(a: [BigInt; 5]) -> ShortModel {
        let [a1, a2, a3, a4, a6] = &a;
        let b2 = a1 * a1 + a2 * 4;
        let b4 = a1 * a3 + a4 * 2;
        let b6 = a3 * a3 + a6 * 4;
        let c4 = &b2 * &b2 - &b4 * 24;
        let b2_cubed: BigInt = &b2 * &b2 * &b2;
        let c6: BigInt = &b2 * &b4 * 36 - &b6 * 216 - b2_cubed;
        ShortModel {
            big_a: c4 * -27,
            big_b: c6 * -54,
            b2,
            a: a.clone(),
        }
    }

    /// A point of the integral model in Jacobian form on the short model.
    pub fn to_jac(&self, p: &Point) -> Jac {
        match p {
            Point::Infinity => Jac::infinity(),
            Point::Affine { x, y } => {
                let [a1, _, a3, _, _] = &self.a;
                // Z = lcm of the denominators makes x·Z², y·Z³ integers.
                let z = x.denom().lcm(y.denom());
                let z2 = &z * &z;
                let z3 = &z2 * &z;
                let xi = x.numer() * (&z2 / x.denom());
                let yi = y.numer() * (&z3 / y.denom());
                let big_x = &xi * 36 + &self.b2 * &z2 * 3;
                let big_y = (yi * 2 + a1 * &xi * &z + a3 * &z3) * 108;
                Jac {
                    x: big_x,
                    y: big_y,
                    z,
                }
            }
        }
    }

    /// Back to the integral model, in lowest terms.
    pub fn to_point(&self, j: &Jac) -> Point {
        if j.is_infinity() {
            return Point::Infinity;
        }
        let [a1, _, a3, _, _] = &self.a;
        let z2 = &j.z * &j.z;
        let z3 = &z2 * &j.z;
        let bx = BigRational::new(j.x.clone(), z2);
        let by = BigRational::new(j.y.clone(), z3);
        let x =
            (bx - BigRational::from_integer(&self.b2 * 3)) / BigRational::from_integer(36.into());
        let y = (by / BigRational::from_integer(108.into())
            - BigRational::from_integer(a1.clone()) * &x
            - BigRational::from_integer(a3.clone()))
            / BigRational::from_integer(2.into());
        Point::Affine { x, y }
    }

    /// Lowest terms: `gcd(X, Z) = 1` up to the square-denominator rule.
    /// Falls back to the unreduced triple if the denominator is not a
    /// square (impossible for a point of an integral model).
    pub fn normalise(&self, j: &Jac) -> Jac {
        if j.is_infinity() {
            return Jac::infinity();
        }
        let x = BigRational::new(j.x.clone(), &j.z * &j.z);
        let Some(d) = sqrt_exact(x.denom()) else {
            return j.clone();
        };
        // Y' = Y·(d/Z)³ exactly: (d/Z) = d·Z⁻¹ and Y/Z³ = Y'/d³.
        let z3 = &j.z * &j.z * &j.z;
        let num = &j.y * &d * &d * &d;
        let (q, r) = num.div_rem(&z3);
        if !r.is_zero() {
            return j.clone();
        }
        Jac {
            x: x.numer().clone(),
            y: q,
            z: d,
        }
    }

    pub fn neg(&self, p: &Jac) -> Jac {
        Jac {
            x: p.x.clone(),
            y: -&p.y,
            z: p.z.clone(),
        }
    }

    pub fn double(&self, p: &Jac) -> Jac {
        if p.is_infinity() || p.y.is_zero() {
            return Jac::infinity();
        }
        let y2 = &p.y * &p.y;
        let s = &p.x * &y2 * 4;
        let z2 = &p.z * &p.z;
        let m = &p.x * &p.x * 3 + &self.big_a * &z2 * &z2;
        let x3 = &m * &m - &s * 2;
        let y3 = &m * (&s - &x3) - &y2 * &y2 * 8;
        let z3 = &p.y * &p.z * 2;
        Jac {
            x: x3,
            y: y3,
            z: z3,
        }
    }

    pub fn add(&self, p: &Jac, q: &Jac) -> Jac {
        if p.is_infinity() {
            return q.clone();
        }
        if q.is_infinity() {
            return p.clone();
        }
        let z1s = &p.z * &p.z;
        let z2s = &q.z * &q.z;
        let u1 = &p.x * &z2s;
        let u2 = &q.x * &z1s;
        let s1 = &p.y * &z2s * &q.z;
        let s2 = &q.y * &z1s * &p.z;
        let h = &u2 - &u1;
        let r = &s2 - &s1;
        if h.is_zero() {
            return if r.is_zero() {
                self.double(p)
            } else {
                Jac::infinity()
            };
        }
        let h2 = &h * &h;
        let h3 = &h2 * &h;
        let u1h2 = &u1 * &h2;
        let x3 = &r * &r - &h3 - &u1h2 * 2;
        let y3 = &r * (&u1h2 - &x3) - &s1 * &h3;
        let z3 = &h * &p.z * &q.z;
        Jac {
            x: x3,
            y: y3,
            z: z3,
        }
    }

    /// `[n]P` by double-and-add, normalised at the end.
    pub fn mul(&self, p: &Jac, n: &BigInt) -> Jac {
        let mut acc = Jac::infinity();
        let m = n.magnitude();
        for i in (0..m.bits()).rev() {
            acc = self.double(&acc);
            if m.bit(i) {
                acc = self.add(&acc, p);
            }
        }
        let acc = self.normalise(&acc);
        if n.sign() == Sign::Minus {
            self.neg(&acc)
        } else {
            acc
        }
    }

    /// `[n]P` by double-and-add under `budget`: each doubling or addition
    /// is charged `(w + 1)²` units, `w` the size in 64-bit words of the
    /// largest coordinate so far (the cost of its products), and the
    /// deadline is read at each step; so the size of what is computed,
    /// not only the work, is bounded (`[n]P` has about n² times the
    /// digits of P).
    ///
    /// # Errors
    /// [`Error::BudgetExhausted`] when the budget or its deadline runs out.
    pub fn mul_budgeted(&self, p: &Jac, n: &BigInt, budget: &mut Budget) -> Result<Jac> {
        let mut acc = Jac::infinity();
        let m = n.magnitude();
        for i in (0..m.bits()).rev() {
            charge(&acc, p, budget)?;
            acc = self.double(&acc);
            if m.bit(i) {
                charge(&acc, p, budget)?;
                acc = self.add(&acc, p);
            }
        }
        charge(&acc, p, budget)?;
        let acc = self.normalise(&acc);
        Ok(if n.sign() == Sign::Minus {
            self.neg(&acc)
        } else {
            acc
        })
    }

    /// `Σ nᵢ Pᵢ`, normalised at the end.
    ///
    /// # Errors
    /// As [`Self::combination_budgeted`] (with an unlimited budget).
    pub fn combination(&self, points: &[Jac], coefficients: &[BigInt]) -> Result<Jac> {
        self.combination_budgeted(points, coefficients, &mut Budget::unlimited())
    }

    /// [`ShortModel::combination`] under `budget`, charged as
    /// [`ShortModel::mul_budgeted`].
    ///
    /// # Errors
    /// As [`ShortModel::combination`]; [`Error::BudgetExhausted`] when the
    /// budget or its deadline runs out.
    pub fn combination_budgeted(
        &self,
        points: &[Jac],
        coefficients: &[BigInt],
        budget: &mut Budget,
    ) -> Result<Jac> {
        if points.len() != coefficients.len() {
            return Err(Error::InvalidArgument {
                reason: format!(
                    "{} points but {} coefficients",
                    points.len(),
                    coefficients.len()
                ),
            });
        }
        let mut acc = Jac::infinity();
        for (p, n) in points.iter().zip(coefficients) {
            if n.is_zero() {
                continue;
            }
            let term = if n.abs().is_one() {
                if n.is_negative() {
                    self.neg(p)
                } else {
                    p.clone()
                }
            } else {
                self.mul_budgeted(p, n, budget)?
            };
            charge(&acc, &term, budget)?;
            acc = self.add(&acc, &term);
        }
        charge(&acc, &acc, budget)?;
        Ok(self.normalise(&acc))
    }
}

/// Charges one group-law step on `a` and `b`: `(w + 1)²` units for the
/// largest coordinate of `w` words, and a read of the deadline.
fn charge(a: &Jac, b: &Jac, budget: &mut Budget) -> Result<()> {
    let bits = [&a.x, &a.y, &a.z, &b.x, &b.y, &b.z]
        .iter()
        .map(|c| c.bits())
        .max()
        .unwrap_or(0);
    let w = bits / 64 + 1;
    let stop = |_| Error::BudgetExhausted {
        stage: "exact point arithmetic".into(),
    };
    budget.spend(w.saturating_mul(w)).map_err(stop)?;
    budget.check_deadline().map_err(stop)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use crate::curve::Curve;

    #[test]
    fn jacobian_multiples_agree_with_the_affine_law() {
        // Cross-check against the affine law of src/curve/point.rs
        // (Silverman AEC III.2.3) on y² + y = x³ − x and (0, 0).
        let a: [BigInt; 5] = [0, 0, 1, -1, 0].map(BigInt::from);
        let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
        let s = ShortModel::new(a);
        let p = Point::from_ints(0, 0);
        let j = s.to_jac(&p);
        for n in -12i64..=12 {
            let got = s.to_point(&s.mul(&j, &BigInt::from(n)));
            assert_eq!(got, e.mul_i64(&p, n), "n = {n}");
        }
        let q = e.mul_i64(&p, 3);
        let sum = s.to_point(&s.add(&j, &s.to_jac(&q)));
        assert_eq!(sum, e.mul_i64(&p, 4));
    }
}
