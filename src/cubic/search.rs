//! Rational points of bounded height on F(u, v) = c·w³.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

use super::local::BinaryCubicCurve;
use crate::budget::Budget;
use crate::error::{Error, Result};

/// An integer point (u : v : w) of a plane cubic F(u, v) = c·w³.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct CubicPoint {
    /// u.
    pub u: BigInt,
    /// v.
    pub v: BigInt,
    /// w.
    pub w: BigInt,
}

/// The first rational point found on `curve` among the coprime (u, v)
/// with max(|u|, |v|) ≤ `height`, in order of increasing max(|u|, |v|);
/// `None` when there is none of that height. A pair qualifies when
/// F(u, v)·c² is an integer cube r³; the point is then
/// (u·c : v·c : r), divided by the gcd. One budget unit per pair.
///
/// # Errors
/// [`Error::BudgetExhausted`] when `budget` runs out.
pub fn search_points(
    curve: &BinaryCubicCurve,
    height: u64,
    budget: &mut Budget,
) -> Result<Option<CubicPoint>> {
    let c = curve.c();
    let c2 = c * c;
    // Sieve: F(u, v)·c² must be a cube (or 0) modulo each prime q ≡ 1 mod 3
    // below (a third of the units are cubes there).
    let sieve: Vec<(i64, [i64; 4], Vec<bool>)> = [7i64, 13, 19, 31, 37, 43, 61, 67]
        .iter()
        .map(|&q| {
            let qb = BigInt::from(q);
            let coeffs = curve.form().clone().map(|f| {
                let r = (f * &c2).mod_floor(&qb);
                i64::try_from(r).unwrap_or(0)
            });
            let mut cube = vec![false; q as usize];
            for x in 0..q {
                cube[(x * x % q * x % q) as usize] = true;
            }
            (q, coeffs, cube)
        })
        .collect();
    let passes = |u: i64, v: i64| -> bool {
        sieve.iter().all(|(q, f, cube)| {
            let (a, b) = (u.rem_euclid(*q), v.rem_euclid(*q));
            let val = (((f[0] * a % q + f[1] * b) % q * a % q + f[2] * b % q * b) % q * a % q
                + f[3] * b % q * b % q * b)
                % q;
            cube[val as usize]
        })
    };
    let try_pair = |u: i64, v: i64| -> Option<CubicPoint> {
        let (bu, bv) = (BigInt::from(u), BigInt::from(v));
        let z = curve.eval_form(&bu, &bv) * &c2;
        let r = z.cbrt();
        if &r * &r * &r != z {
            return None;
        }
        let (mut pu, mut pv, mut pw) = (bu * c, bv * c, r);
        let g = pu.gcd(&pv).gcd(&pw);
        if !g.is_zero() && !g.is_one() {
            pu /= &g;
            pv /= &g;
            pw /= &g;
        }
        Some(CubicPoint {
            u: pu,
            v: pv,
            w: pw,
        })
    };
    let h = i64::try_from(height).unwrap_or(i64::MAX / 4);
    for m in 0..=h {
        // Pairs with max(|u|, |v|) = m, one per projective class (v > 0, or v = 0 and u = 1).
        let mut pairs: Vec<(i64, i64)> = Vec::new();
        if m == 0 {
            continue;
        }
        if m == 1 {
            pairs.push((1, 0));
        }
        for u in -m..=m {
            pairs.push((u, m));
        }
        for v in 1..m {
            pairs.push((m, v));
            pairs.push((-m, v));
        }
        for (u, v) in pairs {
            if u.gcd(&v) != 1 {
                continue;
            }
            budget.spend(1).map_err(|_| Error::BudgetExhausted {
                stage: "point search on a plane cubic".into(),
            })?;
            if !passes(u, v) {
                continue;
            }
            if let Some(pt) = try_pair(u, v) {
                debug_assert!(curve.contains(&pt.u, &pt.v, &pt.w));
                return Ok(Some(pt));
            }
        }
    }
    Ok(None)
}
