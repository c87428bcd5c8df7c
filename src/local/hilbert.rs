//! Hilbert symbols (a, b)_v at every place of Q.
//!
//! With a = p^α u, b = p^β v (u, v units) ([Serre73, III.1.2, Thm. 1]):
//! - odd p: (a, b)_p = (−1)^(αβ ε(p)) · (u/p)^β · (v/p)^α;
//! - p = 2: (a, b)_2 = (−1)^(ε(u)ε(v) + α ω(v) + β ω(u));
//! - R: (a, b)_∞ = −1 iff a < 0 and b < 0;
//!
//! where ε(u) = (u − 1)/2 mod 2 and ω(u) = (u² − 1)/8 mod 2. In the
//! square-class basis of this layer these are bilinear forms on the bit
//! masks, which is how they are computed here.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::ToPrimitive;

use super::place::Place;
use super::square_class::{square_class, square_class_int};
use crate::error::Result;

/// The Hilbert symbol as a bilinear form on square-class masks at `place`.
pub(crate) fn hilbert_on_classes(x: u8, y: u8, place: &Place) -> i8 {
    let bit = |m: u8, i: u8| (m >> i) & 1;
    let e = match place {
        Place::Real => bit(x, 0) & bit(y, 0),
        Place::Finite(p) if p.is_two() => {
            (bit(x, 1) & bit(y, 1)) ^ (bit(x, 0) & bit(y, 2)) ^ (bit(y, 0) & bit(x, 2))
        }
        Place::Finite(p) => {
            // ε(p) = 1 iff p ≡ 3 mod 4
            let p4 = (p.get() % 4u32).to_u8().unwrap_or(1);
            let eps = u8::from(p4 == 3);
            (bit(x, 0) & bit(y, 0) & eps) ^ (bit(y, 0) & bit(x, 1)) ^ (bit(x, 0) & bit(y, 1))
        }
    };
    if e == 0 {
        1
    } else {
        -1
    }
}

/// (a, b)_v for nonzero rationals a, b: 1 if a X² + b Y² = Z² has a
/// nonzero solution in Q_v, −1 otherwise.
///
/// # Errors
/// [`crate::Error::Zero`] if a or b is 0.
///
/// ```
/// use isodescent::local::{hilbert_symbol_int, Place, Prime};
/// // x² + y² = −z² has no real solution; (−1,−1)_2 = −1 too (Hilbert reciprocity).
/// assert_eq!(hilbert_symbol_int(&(-1).into(), &(-1).into(), &Place::Real).unwrap(), -1);
/// assert_eq!(hilbert_symbol_int(&(-1).into(), &(-1).into(), &Place::Finite(Prime::two())).unwrap(), -1);
/// ```
pub fn hilbert_symbol(a: &BigRational, b: &BigRational, place: &Place) -> Result<i8> {
    let x = square_class(a, place)?;
    let y = square_class(b, place)?;
    Ok(hilbert_on_classes(x, y, place))
}

/// (a, b)_v for nonzero integers.
///
/// # Errors
/// [`crate::Error::Zero`] if a or b is 0.
pub fn hilbert_symbol_int(a: &BigInt, b: &BigInt, place: &Place) -> Result<i8> {
    let x = square_class_int(a, place)?;
    let y = square_class_int(b, place)?;
    Ok(hilbert_on_classes(x, y, place))
}
