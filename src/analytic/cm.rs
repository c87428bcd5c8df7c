//! Closed forms for `a_p` on the curves with `j = 1728` and `j = 0`.
//!
//! Over F_p, `p ≥ 5`, every curve is isomorphic to its short model
//! `y² = x³ + Ax + B` with `A = −27·c4`, `B = −54·c6` [Sil09, III.1]; over Q
//! too, so `a_p` of the short model is `a_p` of `E` at every good
//! `p ≥ 5`. `j = 1728` is `c6 = 0` (`B = 0`) and `j = 0` is `c4 = 0`
//! (`A = 0`): the family is read off the exact invariants, never guessed.
//!
//! * `B = 0`, `p ≡ 3 (mod 4)`: `a_p = 0`. Proof: `f(x) = x³ + Ax` is odd
//!   and `(−1/p) = −1`, so the Legendre symbols of `f(x)` and `f(−x)`
//!   cancel in `a_p = −Σ_x (f(x)/p)`.
//! * `A = 0`, `p ≡ 2 (mod 3)`: `a_p = 0`. Proof: `x ↦ x³` is a bijection
//!   of F_p, so `Σ_x ((x³ + B)/p) = Σ_u ((u + B)/p) = 0`.
//! * `B = 0`, `p ≡ 1 (mod 4)`: write `y² = x³ − Dx` (`D = −A`) and
//!   `p = ππ̄` with `π = a + bi` primary (`a` odd, `b` even,
//!   `a + b ≡ 1 (mod 4)`; Ireland–Rosen, *A Classical Introduction to
//!   Modern Number Theory*, 2nd ed., Ch. 9 §7). With the quartic residue
//!   symbol `χ = (D/π)_4 ≡ D^{(p−1)/4} (mod π)`,
//!   `#E(F_p) = p + 1 − χ̄π − χπ̄`, i.e. `a_p = 2·Re(χ̄π)`
//!   (Ireland–Rosen, Ch. 18 §4, Theorem 5; from memory — the statement
//!   and the conventions used here are fixed by the test against the
//!   crate's own point counts on thousands of pairs, see
//!   `tests/analytic_coefficients.rs`).
//!   `p = a² + b²` comes from Cornacchia's algorithm (Hermite–Serret):
//!   Euclid on `(p, r)` with `r² ≡ −1 (mod p)` stops at the first two
//!   remainders below `√p` [Cohen93, §1.5.2] (common practice); the
//!   result is checked (`a² + b² = p`) and the general path is used
//!   otherwise. In F_p ≅ Z[i]/π, `i ↦ −a·b⁻¹`, so `χ` is read off from
//!   which of `1, −1, i, −i` the power `D^{(p−1)/4}` equals (a value
//!   outside those four, impossible for a prime, sends the caller to the
//!   general path).
//!
//! `j = 0` with `p ≡ 1 (mod 3)` is left to the general path.

use super::bsgs::Mont;
use crate::arith::word::{isqrt_u128, mul_mod, pow_mod};
use crate::local::legendre_u64;

/// The CM family of a curve, from its short model `y² = x³ + Ax + B`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Family {
    /// `B = 0` (`j = 1728`).
    J1728,
    /// `A = 0` (`j = 0`).
    J0,
    /// Neither.
    General,
}

/// `a_p` by a closed form, for a good prime `p ≥ 5`, `p < 2⁶²`, where
/// `a`, `b` are `A mod p`, `B mod p` of the short model. `None` when no
/// closed form applies (then the caller counts).
pub(crate) fn ap_closed_form(family: Family, a: u64, p: u64) -> Option<i64> {
    match family {
        Family::General => None,
        Family::J0 => (p % 3 == 2).then_some(0),
        Family::J1728 => {
            if p % 4 == 3 {
                Some(0)
            } else {
                // D = −A.
                let d = (p - a % p) % p;
                ap_j1728(d, p)
            }
        }
    }
}

/// Powers modulo an odd prime `p`: Montgomery form for `p < 2³¹`
/// ([`super::bsgs`]), 128-bit products above.
enum Field {
    Small(Mont, u64),
    Large(u64),
}

impl Field {
    fn new(p: u64) -> Field {
        if p < (1 << 31) {
            let m = Mont::new(p);
            Field::Small(m, m.to(1))
        } else {
            Field::Large(p)
        }
    }

    /// `b^e mod p` for `b < p`.
    fn pow(&self, b: u64, mut e: u64) -> u64 {
        match *self {
            Field::Small(m, one) => {
                let mut r = one;
                let mut b = m.to(b);
                while e > 0 {
                    if e & 1 == 1 {
                        r = m.mul(r, b);
                    }
                    b = m.mul(b, b);
                    e >>= 1;
                }
                m.from(r)
            }
            Field::Large(p) => pow_mod(b, e, p),
        }
    }
}

/// A square root of −1 modulo a prime `p ≡ 1 (mod 4)`: `c^{(p−1)/4}` for
/// the first quadratic non-residue `c` (Euler's criterion; common
/// practice), checked.
fn sqrt_minus_one(f: &Field, p: u64) -> Option<u64> {
    let c = (2..p.min(1000)).find(|&c| legendre_u64(c, p) == -1)?;
    let r = f.pow(c, (p - 1) / 4);
    (mul_mod(r, r, p) == p - 1).then_some(r)
}

/// `p = a² + b²` with `a` odd, `b` even, both positive (`p ≡ 1 mod 4`).
fn two_squares(f: &Field, p: u64) -> Option<(u64, u64)> {
    let r = sqrt_minus_one(f, p)?;
    let root = isqrt_u128(u128::from(p)) as u64;
    let (mut x, mut y) = (p, r.min(p - r));
    while y > root {
        (x, y) = (y, x % y);
    }
    let a = y;
    let rest = p - a * a;
    let b = isqrt_u128(u128::from(rest)) as u64;
    if b * b != rest {
        return None;
    }
    Some(if a % 2 == 1 { (a, b) } else { (b, a) })
}

/// `a_p` of `y² = x³ − Dx` at a prime `p ≡ 1 (mod 4)`, `p ∤ 2D`.
fn ap_j1728(d: u64, p: u64) -> Option<i64> {
    if d == 0 {
        return None;
    }
    let f = Field::new(p);
    let (a, b) = two_squares(&f, p)?;
    // π = a + bi primary: a + b ≡ 1 (mod 4), b even.
    let (a, b) = (a as i64, b as i64);
    let a = if (a + b).rem_euclid(4) == 1 { a } else { -a };
    let t = f.pow(d, (p - 1) / 4);
    if t == 1 {
        return Some(2 * a);
    }
    if t == p - 1 {
        return Some(-2 * a);
    }
    // i ≡ −a/b (mod π): t = i exactly when t·b ≡ −a, t = −i when t·b ≡ a.
    let tb = mul_mod(t, b as u64, p);
    let am = i128::from(a).rem_euclid(i128::from(p)) as u64;
    if tb == (p - am) % p {
        Some(2 * b)
    } else if tb == am {
        Some(-2 * b)
    } else {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn two_squares_small() {
        for p in [5u64, 13, 17, 29, 37, 41, 1_000_000_009, (1 << 61) - 1] {
            if p % 4 != 1 {
                continue;
            }
            let (a, b) = two_squares(&Field::new(p), p).expect("p ≡ 1 mod 4");
            assert_eq!(
                u128::from(a) * u128::from(a) + u128::from(b) * u128::from(b),
                u128::from(p)
            );
            assert!(a % 2 == 1 && b % 2 == 0);
        }
    }
}
