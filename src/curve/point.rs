//! Rational points and the group law on a general Weierstrass model.
//!
//! E(Q) is an abelian group with identity the point at infinity O
//! [Sil09, III.2]. For P = (x1, y1) the negative is
//! −P = (x1, −y1 − a1x1 − a3). For P1, P2 ≠ O with P2 ≠ −P1 put
//!
//! ```text
//! λ = (y2 − y1)/(x2 − x1)                                   if x1 ≠ x2,
//! λ = (3x1² + 2a2x1 + a4 − a1y1)/(2y1 + a1x1 + a3)          if P1 = P2,
//! ν = y1 − λx1,
//! x3 = λ² + a1λ − a2 − x1 − x2,       y3 = −(λ + a1)x3 − ν − a3,
//! ```
//!
//! and P1 + P2 = (x3, y3) [Sil09, III.2.3]. All arithmetic is exact in Q.
//! Scalar multiples use double-and-add on the binary digits of |n|, with
//! \[−n\]P = −\[n\]P: O(log |n|) group operations.

use std::fmt;

use num_bigint::{BigInt, Sign};
use num_rational::BigRational;
use num_traits::Zero;

use super::weierstrass::Curve;
use crate::error::{Error, Result};

/// A point of E(Q) in affine coordinates, or the point at infinity.
#[derive(Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Point {
    /// The point at infinity O, the identity of the group law.
    Infinity,
    /// An affine point (x, y).
    Affine {
        /// x-coordinate.
        x: BigRational,
        /// y-coordinate.
        y: BigRational,
    },
}

impl Point {
    /// The affine point (x, y) (not checked against any curve).
    pub fn new(x: BigRational, y: BigRational) -> Point {
        Point::Affine { x, y }
    }

    /// The affine point with integer coordinates (x, y).
    pub fn from_ints(x: i64, y: i64) -> Point {
        Point::Affine {
            x: BigRational::from_integer(x.into()),
            y: BigRational::from_integer(y.into()),
        }
    }

    /// True for the point at infinity.
    pub fn is_infinity(&self) -> bool {
        matches!(self, Point::Infinity)
    }

    /// The x-coordinate, `None` at infinity.
    pub fn x(&self) -> Option<&BigRational> {
        match self {
            Point::Infinity => None,
            Point::Affine { x, .. } => Some(x),
        }
    }

    /// The y-coordinate, `None` at infinity.
    pub fn y(&self) -> Option<&BigRational> {
        match self {
            Point::Infinity => None,
            Point::Affine { y, .. } => Some(y),
        }
    }
}

impl fmt::Display for Point {
    /// `O` for the point at infinity, `(x, y)` otherwise.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Point::Infinity => write!(f, "O"),
            Point::Affine { x, y } => write!(f, "({x}, {y})"),
        }
    }
}

impl Curve {
    /// True iff P lies on the curve (O always does).
    pub fn contains(&self, p: &Point) -> bool {
        match p {
            Point::Infinity => true,
            Point::Affine { x, y } => {
                if let Some([a1, a2, a3, a4, a6]) = self.integer_coefficients() {
                    // Integral model: clear the denominators of x and y.
                    // With x = xn/xd, y = yn/yd the equation times xd³yd²
                    // reads yn·xd²·(yn·xd + a1·xn·yd + a3·xd·yd)
                    //   = yd²·(((xn + a2·xd)·xn + a4·xd²)·xn + a6·xd³).
                    let (xn, yn) = (x.numer(), y.numer());
                    if x.is_integer() && y.is_integer() {
                        let lhs = yn * (yn + a1 * xn + a3);
                        let rhs = ((xn + a2) * xn + a4) * xn + a6;
                        return lhs == rhs;
                    }
                    let (xd, yd) = (x.denom(), y.denom());
                    let xd2 = xd * xd;
                    let lhs = yn * &xd2 * (yn * xd + a1 * xn * yd + a3 * xd * yd);
                    let rhs = yd * yd * (((xn + a2 * xd) * xn + a4 * &xd2) * xn + a6 * &xd2 * xd);
                    return lhs == rhs;
                }
                let [a1, a2, a3, a4, a6] = self.coefficients();
                let lhs = y * y + a1 * x * y + a3 * y;
                let rhs = ((x + a2) * x + a4) * x + a6;
                lhs == rhs
            }
        }
    }

    /// The point (x, y), checked to lie on the curve.
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`] if it does not.
    pub fn point(&self, x: BigRational, y: BigRational) -> Result<Point> {
        let p = Point::Affine { x, y };
        if self.contains(&p) {
            Ok(p)
        } else {
            Err(Error::PointNotOnCurve {
                point: p.to_string(),
                curve: self.to_string(),
            })
        }
    }

    /// Checks that P lies on the curve.
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`] otherwise.
    pub(crate) fn check_point(&self, p: &Point) -> Result<()> {
        if self.contains(p) {
            Ok(())
        } else {
            Err(Error::PointNotOnCurve {
                point: p.to_string(),
                curve: self.to_string(),
            })
        }
    }

    /// −P = (x, −y − a1x − a3) [Sil09, III.2.3(a)].
    pub fn neg(&self, p: &Point) -> Point {
        match p {
            Point::Infinity => Point::Infinity,
            Point::Affine { x, y } => Point::Affine {
                x: x.clone(),
                y: -y - self.a1() * x - self.a3(),
            },
        }
    }

    /// P + Q by the chord-and-tangent rule (module docs).
    ///
    /// Both points are assumed to lie on the curve; for points that do not,
    /// the result is some point of Q² or O, without panicking.
    pub fn add(&self, p: &Point, q: &Point) -> Point {
        let (x1, y1, x2, y2) = match (p, q) {
            (Point::Infinity, _) => return q.clone(),
            (_, Point::Infinity) => return p.clone(),
            (Point::Affine { x: x1, y: y1 }, Point::Affine { x: x2, y: y2 }) => (x1, y1, x2, y2),
        };
        let [a1, a2, a3, a4, _] = self.coefficients();
        let lambda = if x1 != x2 {
            (y2 - y1) / (x2 - x1)
        } else {
            // Same x: either Q = −P (sum O) or Q = P (doubling).
            let den = y1 + y2 + a1 * x2 + a3;
            if den.is_zero() {
                return Point::Infinity;
            }
            let den = BigRational::from_integer(2.into()) * y1 + a1 * x1 + a3;
            if den.is_zero() {
                return Point::Infinity;
            }
            (BigRational::from_integer(3.into()) * x1 * x1
                + BigRational::from_integer(2.into()) * a2 * x1
                + a4
                - a1 * y1)
                / den
        };
        let nu = y1 - &lambda * x1;
        let x3 = &lambda * &lambda + a1 * &lambda - a2 - x1 - x2;
        let y3 = -(&lambda + a1) * &x3 - nu - a3;
        Point::Affine { x: x3, y: y3 }
    }

    /// P − Q.
    pub(crate) fn sub(&self, p: &Point, q: &Point) -> Point {
        self.add(p, &self.neg(q))
    }

    /// \[2\]P.
    pub(crate) fn double(&self, p: &Point) -> Point {
        self.add(p, p)
    }

    /// \[n\]P for any integer n (negative n gives −\[|n|\]P), by
    /// double-and-add.
    ///
    /// Example: on y² = x³ − 2, \[2\](3, 5) = (129/100, −383/1000).
    pub fn mul(&self, p: &Point, n: &BigInt) -> Point {
        let mut acc = Point::Infinity;
        let m = n.magnitude();
        let bits = m.bits();
        for i in (0..bits).rev() {
            acc = self.double(&acc);
            if m.bit(i) {
                acc = self.add(&acc, p);
            }
        }
        if n.sign() == Sign::Minus {
            self.neg(&acc)
        } else {
            acc
        }
    }

    /// \[n\]P for a machine integer n.
    pub(crate) fn mul_i64(&self, p: &Point, n: i64) -> Point {
        self.mul(p, &BigInt::from(n))
    }

    /// The order of P if it is at most `limit`, else `None`.
    ///
    /// Computes P, 2P, …, limit·P by repeated addition: O(limit)
    /// group operations.
    pub fn order_up_to(&self, p: &Point, limit: u32) -> Option<u32> {
        let mut acc = p.clone();
        for k in 1..=limit {
            if acc.is_infinity() {
                return Some(k);
            }
            acc = self.add(&acc, p);
        }
        None
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    fn r(n: i64, d: i64) -> BigRational {
        BigRational::new(n.into(), d.into())
    }

    #[test]
    fn doubling_three_five_on_x3_minus_2_gives_the_classical_point() {
        // y^2 = x^3 - 2: 2(3,5) = (129/100, -383/1000) (Silverman–Tate,
        // Rational Points on Elliptic Curves, I.4, worked example; from memory).
        let e = Curve::from_ints([0, 0, 0, 0, -2]).unwrap();
        let p = Point::from_ints(3, 5);
        assert!(e.contains(&p));
        let d = e.double(&p);
        assert_eq!(d, Point::new(r(129, 100), r(-383, 1000)));
        assert!(e.contains(&d));
    }

    #[test]
    fn negative_multiples_are_negatives_of_positive_multiples() {
        let e = Curve::from_ints([1, 0, 1, -1, 0]).unwrap();
        let p = Point::from_ints(0, 0);
        assert!(e.contains(&p));
        assert_eq!(e.mul_i64(&p, -5), e.neg(&e.mul_i64(&p, 5)));
        assert_eq!(
            e.add(&e.mul_i64(&p, 5), &e.mul_i64(&p, -5)),
            Point::Infinity
        );
    }
}
