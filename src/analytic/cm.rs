//! Closed forms for `a_p` on the curves with `j = 1728` and `j = 0`.
//!
//! Over F_p, `p ≥ 5`, every curve is isomorphic to its short model
//! `y² = x³ + Ax + B` with `A = −27c4`, `B = −54c6` [Sil09, III.1]; over Q
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
//!   which of `1, −1, i, −i` the power `D^{(p−1)/4}` equals.
//!
//! `j = 0` with `p ≡ 1 (mod 3)` is left to the general path.

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

fn mulmod(a: u64, b: u64, p: u64) -> u64 {
    if p < (1 << 32) {
        return (a * b) % p;
    }
    ((u128::from(a) * u128::from(b)) % u128::from(p)) as u64
}

fn powmod(mut b: u64, mut e: u64, p: u64) -> u64 {
    let mut r = 1 % p;
    b %= p;
    while e > 0 {
        if e & 1 == 1 {
            r = mulmod(r, b, p);
        }
        b = mulmod(b, b, p);
        e >>= 1;
    }
    r
}

/// `⌊√n⌋` exactly.
fn isqrt(n: u64) -> u64 {
    let n = u128::from(n);
    let mut r = (n as f64).sqrt() as u128;
    while r * r > n {
        r -= 1;
    }
    while (r + 1) * (r + 1) <= n {
        r += 1;
    }
    r as u64
}

/// A square root of −1 modulo a prime `p ≡ 1 (mod 4)`: `c^{(p−1)/4}` for
/// the first quadratic non-residue `c` (Euler's criterion; common
/// practice).
fn sqrt_minus_one(p: u64) -> Option<u64> {
    let e = (p - 1) / 4;
    for c in 2..p.min(1000) {
        let r = powmod(c, e, p);
        // r² = c^{(p−1)/2} = −1 exactly when c is a non-residue.
        if mulmod(r, r, p) == p - 1 {
            return Some(r);
        }
    }
    None
}

/// `p = a² + b²` with `a` odd, `b` even, both positive (`p ≡ 1 mod 4`).
fn two_squares(p: u64) -> Option<(u64, u64)> {
    let r = sqrt_minus_one(p)?;
    let root = isqrt(p);
    let (mut x, mut y) = (p, r.min(p - r));
    while y > root {
        (x, y) = (y, x % y);
    }
    let _ = x;
    let a = y;
    let rest = p - a * a;
    let b = isqrt(rest);
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
    let (a, b) = two_squares(p)?;
    // π = a + bi primary: a + b ≡ 1 (mod 4), b even.
    let (a, b) = (a as i64, b as i64);
    let a = if (a + b).rem_euclid(4) == 1 { a } else { -a };
    // i ≡ −a/b (mod π).
    let pi = p as i128;
    let am = (i128::from(a)).rem_euclid(pi) as u64;
    let binv = invmod(b as u64 % p, p)?;
    let i_mod = mulmod((p - am) % p, binv, p);
    let t = powmod(d, (p - 1) / 4, p);
    if t == 1 {
        Some(2 * a)
    } else if t == p - 1 {
        Some(-2 * a)
    } else if t == i_mod {
        Some(2 * b)
    } else if t == p - i_mod {
        Some(-2 * b)
    } else {
        None
    }
}

fn invmod(a: u64, p: u64) -> Option<u64> {
    if a == 0 {
        return None;
    }
    let (mut r0, mut r1) = (i128::from(p), i128::from(a));
    let (mut t0, mut t1) = (0i128, 1i128);
    while r1 != 0 {
        let q = r0 / r1;
        (r0, r1) = (r1, r0 - q * r1);
        (t0, t1) = (t1, t0 - q * t1);
    }
    (r0 == 1).then(|| t0.rem_euclid(i128::from(p)) as u64)
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
            let (a, b) = two_squares(p).expect("p ≡ 1 mod 4");
            assert_eq!(u128::from(a) * u128::from(a) + u128::from(b) * u128::from(b), u128::from(p));
            assert!(a % 2 == 1 && b % 2 == 0);
        }
    }
}
