//! The square-class groups Q_v*/Q_v*^2 with a fixed basis.
//!
//! A class is an F2 vector stored as a `u8` bit mask (see the table in the
//! [module docs of `local`](super)). The map x ↦ class(x) is a group
//! homomorphism Q* → Q_v*/Q_v*^2, i.e. class(xy) = class(x) XOR class(y).
//!
//! Facts used ([Serre73, II.3.3]): for odd p, x = p^v u is a square in Q_p
//! iff v is even and u is a square mod p, so the group is F2^2; in Q_2,
//! x = 2^v u is a square iff v is even and u ≡ 1 mod 8, so it is F2^3 with
//! basis {2, −1, 5}; in R it is {±1}.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};

use super::place::{Place, Prime};
use super::symbols::legendre;
use super::valuation::split_valuation;
use crate::error::{Error, Result};

/// dim_F2 Q_v*/Q_v*^2: 1 at R, 2 at odd p, 3 at 2.
pub fn class_dimension(place: &Place) -> usize {
    match place {
        Place::Real => 1,
        Place::Finite(p) if p.is_two() => 3,
        Place::Finite(_) => 2,
    }
}

/// Bits of a p-adic unit given as an integer prime to p.
fn unit_bits(u: &BigInt, p: &Prime) -> u8 {
    if p.is_two() {
        let r = u.mod_floor(&BigInt::from(8)).to_u8().unwrap_or(1);
        let minus = u8::from(r % 4 == 3);
        let five = u8::from(r == 3 || r == 5);
        (minus << 1) | (five << 2)
    } else {
        // p ∤ u, so the symbol is ±1 and p is odd.
        let nonres = legendre(u, p).map(|s| s == -1).unwrap_or(false);
        u8::from(nonres) << 1
    }
}

/// The class of a nonzero integer in Q_v*/Q_v*^2 as a bit mask.
///
/// # Errors
/// [`Error::Zero`] for x = 0, which has no square class.
///
/// ```
/// use isodescent::local::{square_class_int, Place, Prime};
/// let two = Place::Finite(Prime::two());
/// assert_eq!(square_class_int(&(-5).into(), &two).unwrap(), 0b110);
/// assert_eq!(square_class_int(&17.into(), &two).unwrap(), 0);  // 17 ≡ 1 mod 8
/// ```
pub fn square_class_int(x: &BigInt, place: &Place) -> Result<u8> {
    if x.is_zero() {
        return Err(Error::Zero {
            what: "argument of a square class".into(),
        });
    }
    Ok(match place {
        Place::Real => u8::from(x.is_negative()),
        Place::Finite(p) => {
            let (v, u) = split_valuation(x, p).ok_or(Error::Zero {
                what: "argument of a square class".into(),
            })?;
            u8::from(v % 2 == 1) | unit_bits(&u, p)
        }
    })
}

/// The class of a nonzero rational in Q_v*/Q_v*^2 as a bit mask.
///
/// x = r/s has the class of r·s, since s² is a square.
///
/// # Errors
/// [`Error::Zero`] for x = 0.
pub fn square_class(x: &BigRational, place: &Place) -> Result<u8> {
    let n = square_class_int(x.numer(), place)?;
    let d = square_class_int(x.denom(), place)?;
    Ok(n ^ d)
}

/// True iff x is a square in Q_v (0 counts as a square).
///
/// ```
/// use isodescent::local::{is_square_in, Place, Prime};
/// use num_rational::BigRational;
/// let q = |n: i64| BigRational::from_integer(n.into());
/// assert!(is_square_in(&q(-7), &Place::Finite(Prime::two())));  // −7 ≡ 1 mod 8
/// assert!(!is_square_in(&q(-7), &Place::Real));
/// ```
pub fn is_square_in(x: &BigRational, place: &Place) -> bool {
    if x.is_zero() {
        return true;
    }
    square_class(x, place).map(|c| c == 0).unwrap_or(false)
}

/// The least positive quadratic non-residue modulo an odd prime p.
pub(crate) fn least_nonresidue(p: &Prime) -> BigInt {
    let mut n = BigInt::from(2);
    while legendre(&n, p).map(|s| s != -1).unwrap_or(false) {
        n += 1u32;
    }
    n
}

/// One integer in each class: entry i lies in the class with mask i.
///
/// R: [1, −1]; odd p: [1, p, n, p·n] with n the least positive
/// non-residue; 2: [1, 2, −1, −2, 5, 10, −5, −10].
pub fn class_representatives(place: &Place) -> Vec<BigInt> {
    match place {
        Place::Real => vec![BigInt::from(1), BigInt::from(-1)],
        Place::Finite(p) if p.is_two() => [1, 2, -1, -2, 5, 10, -5, -10]
            .iter()
            .map(|&r| BigInt::from(r))
            .collect(),
        Place::Finite(p) => {
            let n = least_nonresidue(p);
            let pn = p.get() * &n;
            vec![BigInt::from(1), p.get().clone(), n, pn]
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn representatives_land_in_their_own_classes() {
        let places = [
            Place::Real,
            Place::Finite(Prime::two()),
            Place::Finite(Prime::small(3).unwrap()),
            Place::Finite(Prime::small(17).unwrap()),
            Place::Finite(Prime::small(1_000_000_007).unwrap()),
        ];
        for v in &places {
            let reps = class_representatives(v);
            assert_eq!(reps.len(), 1 << class_dimension(v));
            for (i, r) in reps.iter().enumerate() {
                assert_eq!(square_class_int(r, v).unwrap() as usize, i, "{v} {r}");
            }
        }
    }

    #[test]
    fn zero_has_no_class() {
        assert!(square_class_int(&BigInt::zero(), &Place::Real).is_err());
    }
}
