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
//! * `A = 0`, `p ≡ 1 (mod 3)`, `p ∤ 6B`: write `p = ππ̄` in `Z[ω]`,
//!   `ω² + ω + 1 = 0`, with `π = a + bω` primary (`π ≡ 2 (mod 3)`: `a ≡ 2`,
//!   `b ≡ 0 (mod 3)`), and let `χ = (4B/π)_6 ≡ (4B)^{(p−1)/6} (mod π)` be
//!   the sextic residue symbol. Then `#E(F_p) = p + 1 + χ̄π + χπ̄`, i.e.
//!   `a_p = −Tr(χ̄π)` (Ireland–Rosen, Ch. 18 §3, Theorem 4; from memory —
//!   as for `j = 1728`, the statement and the conventions are fixed by the
//!   tests against the crate's own point counts, in
//!   `tests/analytic_coefficients.rs` and below). `p = x² + 3y²` comes
//!   from Cornacchia's algorithm with `√−3 ≡ 2ζ + 1 (mod p)`, `ζ` a
//!   primitive cube root of unity (`ζ = c^{(p−1)/3}` for the first `c`
//!   with `c^{(p−1)/3} ≠ 1`); then `π = x + y√−3 = (x + y) + 2yω`, made
//!   primary among its six associates. In `F_p ≅ Z[ω]/π`,
//!   `ω ↦ −a·b⁻¹`, so `χ` is read off from which of the six units
//!   `±1, ±ω, ±ω²` the power `(4B)^{(p−1)/6}` equals (anything else,
//!   impossible for a prime, sends the caller to the general path).

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

/// True when the minimal model of the local data has `j = 0` (`c4 = 0`),
/// so that every `a_p` at a good `p ≥ 5` has a closed form here.
pub(crate) fn has_j_zero(local: &crate::curve::tate::GlobalLocalData) -> bool {
    use num_traits::Zero;
    crate::curve::weierstrass_invariants(&local.minimal_model)
        .c4
        .is_zero()
}

/// `a_p` by a closed form, for a good prime `p ≥ 5`, `p < 2⁶²`, where
/// `a`, `b` are `A mod p`, `B mod p` of the short model. `None` when no
/// closed form applies (then the caller counts).
pub(crate) fn ap_closed_form(family: Family, a: u64, b: u64, p: u64) -> Option<i64> {
    match family {
        Family::General => None,
        Family::J0 => {
            if p % 3 == 2 {
                Some(0)
            } else {
                ap_j0(b % p, p)
            }
        }
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

/// `x, y > 0` with `p = x² + 3y²`, for a prime `p ≡ 1 (mod 3)`, `p ≥ 7`:
/// Cornacchia's algorithm (Cohen, "A Course in Computational Algebraic
/// Number Theory", Algorithm 1.5.2, from memory), the result checked.
fn x2_plus_3y2(f: &Field, p: u64) -> Option<(u64, u64)> {
    // A primitive cube root of unity ζ, and √−3 = 2ζ + 1.
    let zeta = (2..p.min(1000))
        .map(|c| f.pow(c, (p - 1) / 3))
        .find(|&z| z != 1)?;
    let r = (2 * zeta + 1) % p;
    if mul_mod(r, r, p) != p - 3 {
        return None;
    }
    let root = isqrt_u128(u128::from(p)) as u64;
    for start in [r, p - r] {
        let (mut x, mut y) = (p, start);
        while y > root {
            (x, y) = (y, x % y);
        }
        let rest = p - y * y;
        if rest % 3 != 0 {
            continue;
        }
        let z = isqrt_u128(u128::from(rest / 3)) as u64;
        if z > 0 && z * z == rest / 3 {
            return Some((y, z));
        }
    }
    None
}

/// `ω·(a + bω) = −b + (a − b)ω`.
fn times_omega((a, b): (i64, i64)) -> (i64, i64) {
    (-b, a - b)
}

/// `(a + bω)(c + dω) = (ac − bd) + (ad + bc − bd)ω`.
fn eisenstein_mul((a, b): (i64, i64), (c, d): (i64, i64)) -> (i64, i64) {
    (a * c - b * d, a * d + b * c - b * d)
}

/// `a_p` of `y² = x³ + B` at a prime `p ≡ 1 (mod 3)`, `p ∤ 6B` (module
/// docs).
fn ap_j0(b: u64, p: u64) -> Option<i64> {
    if b == 0 || !(7..1 << 62).contains(&p) {
        return None;
    }
    let f = Field::new(p);
    let (x, y) = x2_plus_3y2(&f, p)?;
    // |x|, |y| < 2^31, so the products below fit i64.
    let (x, y) = (x as i64, y as i64);
    let mut pi = (x + y, 2 * y);
    let mut primary = None;
    for _ in 0..3 {
        for s in [1, -1] {
            let (a, bb) = (s * pi.0, s * pi.1);
            if a.rem_euclid(3) == 2 && bb.rem_euclid(3) == 0 {
                primary = Some((a, bb));
            }
        }
        pi = times_omega(pi);
    }
    let (a, bb) = primary?;
    // ω ≡ −a/b (mod π) in F_p.
    let bm = bb.rem_euclid(p as i64) as u64;
    let am = a.rem_euclid(p as i64) as u64;
    let w = mul_mod((p - am) % p, f.pow(bm, p - 2), p);
    if (mul_mod(w, w, p) + w + 1) % p != 0 {
        return None;
    }
    let four_b = mul_mod(4, b, p);
    let t = f.pow(four_b, (p - 1) / 6);
    let units: [(i64, i64); 6] = [(1, 0), (0, 1), (-1, -1), (-1, 0), (0, -1), (1, 1)];
    let chi = units.into_iter().find(|&(c, d)| {
        let v = (c.rem_euclid(p as i64) as u64 + mul_mod(d.rem_euclid(p as i64) as u64, w, p)) % p;
        v == t
    })?;
    // χ̄ = c + dω̄ = (c − d) − dω.
    let chi_bar = (chi.0 - chi.1, -chi.1);
    let (u, v) = eisenstein_mul(chi_bar, (a, bb));
    // Tr(u + vω) = 2u − v.
    Some(-(2 * u - v))
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

    #[test]
    fn x2_plus_3y2_small_and_large() {
        // Every prime p ≡ 1 (mod 3) is x² + 3y² (Fermat; Cox, "Primes of
        // the Form x² + ny²", §1 — from memory).
        for p in [7u64, 13, 19, 31, 37, 43, 1_000_003, (1 << 61) - 1] {
            if p % 3 != 1 || !crate::arith::is_prime_u64(p) {
                continue;
            }
            let (x, y) = x2_plus_3y2(&Field::new(p), p).expect("p ≡ 1 mod 3");
            assert_eq!(
                u128::from(x) * u128::from(x) + 3 * u128::from(y) * u128::from(y),
                u128::from(p)
            );
        }
    }
}
