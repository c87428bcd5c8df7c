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
use super::symbols::{legendre, legendre_u64};
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
        unit_bits_mod8(u.mod_floor(&BigInt::from(8)).to_u64().unwrap_or(1))
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
/// Example (a unit test in `src/local/tests/layer.rs`): at 2, −5 has the
/// mask 0b110 and 17 ≡ 1 mod 8 the mask 0.
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

/// The class in Q_v*/Q_v*^2 of a basis element of Q(S, 2): −1 (`q = None`)
/// or a prime `q`, as a bit mask; the same value as [`square_class_int`]
/// on that integer.
///
/// At R: −1 ↦ 1, q ↦ 0. At p = q: v = 1 with unit 1, so bit 0 alone. At
/// q ≠ p the element is a unit: at 2 its residue mod 8 gives the bits, at
/// odd p the Legendre symbol (q | p), or (−1 | p), gives bit 1
/// ([Serre73, II.3.3]). When p and q fit in a `u64` this runs in words
/// (the Jacobi routine of [`legendre_u64`]); otherwise on `BigInt`.
pub(crate) fn basis_class(q: Option<&Prime>, place: &Place) -> u8 {
    let p = match place {
        Place::Real => return u8::from(q.is_none()),
        Place::Finite(p) => p,
    };
    if q == Some(p) {
        return 1;
    }
    let word = match q {
        None => p.to_u64().map(|pw| (pw, pw - 1)),
        Some(q) => p.to_u64().zip(q.to_u64()),
    };
    match word {
        // The unit is −1 or q, given by its residue mod 8 (p = 2) or mod p.
        Some((2, u)) => unit_bits_mod8(if q.is_none() { 7 } else { u % 8 }),
        Some((pw, u)) => u8::from(legendre_u64(u % pw, pw) == -1) << 1,
        None => {
            let x = q.map_or_else(|| BigInt::from(-1), |q| q.get().clone());
            unit_bits(&x, p)
        }
    }
}

/// The bits of a 2-adic unit from its residue r mod 8 (r odd).
fn unit_bits_mod8(r: u64) -> u8 {
    let minus = u8::from(r % 4 == 3);
    let five = u8::from(r == 3 || r == 5);
    (minus << 1) | (five << 2)
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

    /// The word route of `basis_class` against `square_class_int` on the
    /// integers −1 and q, at R, at 2, at small odd primes, at primes just
    /// below 2^63 and 2^64, and at primes above 2^64 (the `BigInt` route).
    #[test]
    fn basis_classes_agree_with_the_integer_classes() {
        let mut primes: Vec<Prime> = Vec::new();
        let push_from = |start: u64, count: usize, out: &mut Vec<Prime>| {
            let mut q = start;
            let mut got = 0;
            while got < count {
                if crate::arith::is_prime_u64(q) {
                    out.push(Prime::small(q).unwrap());
                    got += 1;
                }
                q = q.wrapping_add(1);
            }
        };
        push_from(2, 60, &mut primes);
        push_from((1 << 63) - 300, 5, &mut primes);
        push_from(u64::MAX - 400, 5, &mut primes);
        // 2^64 + 13 and 2^128 + 51, prime (sympy 1.14 isprime).
        for s in [
            "18446744073709551629",
            "340282366920938463463374607431768211507",
        ] {
            primes.push(Prime::new(s.parse().unwrap()).unwrap());
        }
        let mut places = vec![Place::Real];
        places.extend(primes.iter().cloned().map(Place::Finite));
        for v in &places {
            assert_eq!(
                basis_class(None, v),
                square_class_int(&BigInt::from(-1), v).unwrap(),
                "-1 at {v}"
            );
            for q in &primes {
                assert_eq!(
                    basis_class(Some(q), v),
                    square_class_int(q.get(), v).unwrap(),
                    "{q} at {v}"
                );
            }
        }
    }

    #[test]
    fn zero_has_no_class() {
        assert!(square_class_int(&BigInt::zero(), &Place::Real).is_err());
    }
}
