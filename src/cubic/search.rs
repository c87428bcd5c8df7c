//! Rational points of bounded height on F(u, v) = c·w³.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{FromPrimitive, One, ToPrimitive, Zero};

use super::local::BinaryCubicCurve;
use crate::budget::Budget;
use crate::error::{Error, Result};

/// An integer point (u : v : w) of a plane cubic F(u, v) = c·w³.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
#[non_exhaustive]
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
    let (reduced, m) = reduce(curve);
    let Some(found) = search_points_on(&reduced, height, budget)? else {
        return Ok(None);
    };
    // (u, v) = M·(u', v'); M is unimodular, so (u : v : w) stays primitive.
    let [[m00, m01], [m10, m11]] = &m;
    let pt = CubicPoint {
        u: m00 * &found.u + m01 * &found.v,
        v: m10 * &found.u + m11 * &found.v,
        w: found.w,
    };
    if !curve.contains(&pt.u, &pt.v, &pt.w) {
        return Err(Error::Internal {
            check: format!("a point of the reduced cubic maps back to {curve:?}"),
        });
    }
    Ok(Some(pt))
}

/// Bits of the largest coefficient of a form.
fn form_bits(f: &[BigInt; 4]) -> u64 {
    f.iter().map(|x| x.bits()).max().unwrap_or(0)
}

/// The coefficients of a form as f64, all scaled by the same power of 2
/// so that the largest is near 2⁶⁰ (the roots do not change).
fn scaled(f: &[BigInt; 4]) -> [f64; 4] {
    let shift = form_bits(f).saturating_sub(60);
    f.clone().map(|x| {
        let y: BigInt = x >> shift;
        y.to_f64().unwrap_or(0.0)
    })
}

/// The three complex roots x of a·x³ + b·x² + c·x + d (a ≠ 0) by the
/// Durand–Kerner iteration (common practice), as (re, im); `None` when
/// they are not finite.
fn cubic_roots(f: [f64; 4]) -> Option<[(f64, f64); 3]> {
    let [a, b, c, d] = f;
    if a == 0.0 {
        return None;
    }
    let (b, c, d) = (b / a, c / a, d / a);
    let bound = 1.0 + b.abs().max(c.abs()).max(d.abs());
    if !bound.is_finite() {
        return None;
    }
    let mul = |(x, y): (f64, f64), (u, v): (f64, f64)| (x * u - y * v, x * v + y * u);
    let sub = |(x, y): (f64, f64), (u, v): (f64, f64)| (x - u, y - v);
    let div = |(x, y): (f64, f64), (u, v): (f64, f64)| {
        let n = u * u + v * v;
        ((x * u + y * v) / n, (y * u - x * v) / n)
    };
    let eval = |z: (f64, f64)| {
        let z2 = mul(z, z);
        let z3 = mul(z2, z);
        (z3.0 + b * z2.0 + c * z.0 + d, z3.1 + b * z2.1 + c * z.1)
    };
    let seed = (0.4 * bound, 0.9 * bound);
    let mut r = [
        seed,
        mul(seed, (0.4, 0.9)),
        mul(mul(seed, (0.4, 0.9)), (0.4, 0.9)),
    ];
    for _ in 0..500 {
        let mut moved = 0.0f64;
        for i in 0..3 {
            let mut den = (1.0, 0.0);
            for j in 0..3 {
                if i != j {
                    den = mul(den, sub(r[i], r[j]));
                }
            }
            let step = div(eval(r[i]), den);
            r[i] = sub(r[i], step);
            moved =
                moved.max(step.0.abs().max(step.1.abs()) / (1.0 + r[i].0.abs().max(r[i].1.abs())));
        }
        if moved < 1e-15 {
            break;
        }
    }
    r.iter()
        .all(|z| z.0.is_finite() && z.1.is_finite())
        .then_some(r)
}

/// A unimodular change (u, v) = M·(u', v') that makes the form small: the
/// positive definite quadratic form Σ|u − α_i v|² over the roots α_i of
/// F(x, 1) is reduced in Gauss's sense (translations and the swap), the
/// steps applied exactly to F (the idea of reducing a binary cubic through
/// a definite quadratic covariant is Hermite's and Julia's; Cremona,
/// "Reduction of binary cubic and quartic forms", LMS J. Comput. Math. 2
/// (1999) — from memory; the unweighted sum used here is common practice
/// for a search and needs no covariance: any unimodular M is valid). The
/// roots are recomputed in f64 from the exact form at each step; the
/// original form is kept when the result is not smaller.
fn reduce(curve: &BinaryCubicCurve) -> (BinaryCubicCurve, [[BigInt; 2]; 2]) {
    let identity = || {
        [
            [BigInt::one(), BigInt::zero()],
            [BigInt::zero(), BigInt::one()],
        ]
    };
    let mut f = curve.form().clone();
    let mut m = identity();
    for _ in 0..200 {
        let swap = |f: &mut [BigInt; 4], m: &mut [[BigInt; 2]; 2]| {
            // (u, v) = (−v', u'): F ↦ (d, −c, b, −a); M ↦ M·[[0, −1], [1, 0]].
            let [a, b, c, d] = f.clone();
            *f = [d, -c, b, -a];
            let [[m00, m01], [m10, m11]] = m.clone();
            *m = [[m01, -m00], [m11, -m10]];
        };
        if f[0].is_zero() {
            swap(&mut f, &mut m);
            continue;
        }
        let Some(roots) = cubic_roots(scaled(&f)) else {
            break;
        };
        let qa = 3.0;
        let qb: f64 = -2.0 * roots.iter().map(|z| z.0).sum::<f64>();
        let qc: f64 = roots.iter().map(|z| z.0 * z.0 + z.1 * z.1).sum();
        let t = (-qb / (2.0 * qa)).round();
        if !t.is_finite() || !qc.is_finite() {
            break;
        }
        if t != 0.0 {
            // (u, v) = (u' + t·v', v'); M ↦ M·[[1, t], [0, 1]].
            let Some(t) = BigInt::from_f64(t) else {
                break;
            };
            let [a, b, c, d] = f.clone();
            let three = BigInt::from(3);
            f = [
                a.clone(),
                &three * &a * &t + &b,
                &three * &a * &t * &t + BigInt::from(2) * &b * &t + &c,
                ((&a * &t + &b) * &t + &c) * &t + &d,
            ];
            let [[m00, m01], [m10, m11]] = m.clone();
            m = [
                [m00.clone(), &m00 * &t + m01],
                [m10.clone(), &m10 * &t + m11],
            ];
            continue;
        }
        if qc < qa * (1.0 - 1e-9) {
            swap(&mut f, &mut m);
            continue;
        }
        break;
    }
    if form_bits(&f) >= form_bits(curve.form()) {
        return (curve.clone(), identity());
    }
    match BinaryCubicCurve::new(f, curve.c().clone()) {
        Ok(r) => (r, m),
        Err(_) => (curve.clone(), identity()),
    }
}

/// [`search_points`] on the form as given, without reduction.
fn search_points_on(
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

#[cfg(test)]
mod tests {
    use super::*;

    /// F(M·(u, v)) for M = [[m00, m01], [m10, m11]].
    fn compose(f: &[BigInt; 4], m: [[i64; 2]; 2]) -> [BigInt; 4] {
        let [[p, q], [r, s]] = m.map(|row| row.map(BigInt::from));
        // u = p·u' + q·v', v = r·u' + s·v'; expand each monomial.
        let [a, b, c, d] = f.clone();
        let lin = |x: &BigInt, y: &BigInt| [x.clone(), y.clone()];
        let mul = |x: &[BigInt], y: &[BigInt]| {
            let mut out = vec![BigInt::zero(); x.len() + y.len() - 1];
            for (i, xi) in x.iter().enumerate() {
                for (j, yj) in y.iter().enumerate() {
                    out[i + j] += xi * yj;
                }
            }
            out
        };
        let (lu, lv) = (lin(&p, &q), lin(&r, &s));
        let terms = [
            (a, mul(&mul(&lu, &lu), &lu)),
            (b, mul(&mul(&lu, &lu), &lv)),
            (c, mul(&mul(&lu, &lv), &lv)),
            (d, mul(&mul(&lv, &lv), &lv)),
        ];
        let mut g = [
            BigInt::zero(),
            BigInt::zero(),
            BigInt::zero(),
            BigInt::zero(),
        ];
        for (k, poly) in terms {
            for (i, x) in poly.iter().enumerate() {
                g[i] += &k * x;
            }
        }
        g
    }

    #[test]
    fn reduction_brings_a_far_point_within_reach() {
        // u³ + 2v³ = 3w³ has the point (1 : 1 : 1). Composed with
        // M = [[F41, F40], [F40, F39]] (Fibonacci numbers, det 1), the same
        // point sits at (u', v') = M⁻¹(1, 1) = (−F38, F39), far beyond height
        // 10, and the coefficients have about 80 bits. Invented data.
        let fib: Vec<i64> = (0..42).fold(vec![0, 1], |mut v, _| {
            let n = v.len();
            v.push(v[n - 1] + v[n - 2]);
            v
        });
        let f0 = [1, 0, 0, 2].map(BigInt::from);
        let m = [[fib[41], fib[40]], [fib[40], fib[39]]];
        let g = compose(&f0, m);
        assert!(form_bits(&g) > 70);
        let curve = BinaryCubicCurve::new(g, BigInt::from(3)).unwrap();
        let plain = search_points_on(&curve, 10, &mut Budget::unlimited()).unwrap();
        assert_eq!(plain, None);
        let (reduced, _) = reduce(&curve);
        assert!(form_bits(reduced.form()) < 8, "{:?}", reduced.form());
        let pt = search_points(&curve, 10, &mut Budget::unlimited())
            .unwrap()
            .expect("a point after reduction");
        assert!(curve.contains(&pt.u, &pt.v, &pt.w));
        assert!(!pt.w.is_zero());
    }
}
