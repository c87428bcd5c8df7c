//! The coefficients a_p of the L-series against independent counts and
//! known identities.

use isodescent::analytic::{dirichlet_coefficients, frobenius_trace, ApTable};
use isodescent::curve::GlobalLocalData;
use isodescent::curve::{Curve, ReducedModel, TwoIsogeny};
use isodescent::{Budget, Error};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::ToPrimitive;

fn local(a: [i64; 5]) -> GlobalLocalData {
    Curve::from_ints(a)
        .unwrap()
        .tate_data(&mut Budget::unlimited())
        .unwrap()
}

fn primes_below(n: u64) -> Vec<u64> {
    (2..n)
        .filter(|&p| (2..p).take_while(|d| d * d <= p).all(|d| p % d != 0))
        .collect()
}

/// p + 1 − #Ẽ(F_p) for the reduction of an integral model, all points of
/// the (possibly singular) cubic counted, by a table of squares: for odd p
/// the number of y with y² + (a1x + a3)y = x³ + a2x² + a4x + a6 is the
/// number of square roots of the discriminant (a1x + a3)² + 4(x³ + …);
/// for p = 2 every (x, y) is tried.
fn brute_ap(m: &[BigInt; 5], p: u64) -> i64 {
    let r: Vec<i64> = m
        .iter()
        .map(|c| c.mod_floor(&BigInt::from(p)).to_i64().unwrap())
        .collect();
    let p_i = p as i64;
    let mut count = 1i64; // the point at infinity
    if p == 2 {
        for x in 0..p_i {
            for y in 0..p_i {
                let l = (y * y + r[0] * x * y + r[2] * y) % p_i;
                let rr = (x * x * x + r[1] * x * x + r[3] * x + r[4]) % p_i;
                count += i64::from(l == rr);
            }
        }
        return p_i + 1 - count;
    }
    let mut roots = vec![0i64; p as usize];
    for y in 0..p_i {
        roots[(y * y % p_i) as usize] += 1;
    }
    for x in 0..p_i {
        let u = (r[0] * x + r[2]) % p_i;
        let rhs = ((x * x % p_i) * x + r[1] * x % p_i * x + r[3] * x + r[4]) % p_i;
        let d = (u * u + 4 * rhs) % p_i;
        count += roots[d as usize];
    }
    p_i + 1 - count
}

/// Curves for the comparisons: y² = x³ + ax² + bx over a small box and
/// general models with small coefficients (invented data, nothing assumed).
fn test_curves() -> Vec<[i64; 5]> {
    let mut v = Vec::new();
    for a in -4i64..=4 {
        for b in [-9i64, -7, -5, -3, -2, -1, 1, 2, 3, 6, 8, 11, 14] {
            if a * a - 4 * b != 0 {
                v.push([0, a, 0, b, 0]);
            }
        }
    }
    let mut s = 12345u64;
    while v.len() < 260 {
        s = s
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        let c = |k: u32| (((s >> (8 * k)) & 0xff) % 41) as i64 - 20;
        let m = [c(1) & 1, (c(2) % 2), c(3) & 1, c(4), c(5) * 3 + 1];
        if Curve::from_ints(m).is_ok() {
            v.push(m);
        }
    }
    v
}

#[test]
fn a_p_equals_point_counts_for_every_prime_below_2000() {
    // Definition a_p = p + 1 − #Ẽ(F_p) on a minimal model, at good and at
    // bad primes alike (bad: +1 split, −1 non-split, 0 additive)
    // [Silverman, AEC, 2nd ed., V.2 and VII.5; C.16].
    let ps = primes_below(2000);
    let curves = test_curves();
    assert!(curves.len() >= 250);
    for a in &curves {
        let l = local(*a);
        let t = ApTable::new(&l);
        for &p in &ps {
            assert_eq!(
                t.frobenius_trace(p).unwrap(),
                brute_ap(&l.minimal_model, p),
                "curve {a:?}, p = {p}"
            );
        }
    }
}

#[test]
fn a_p_satisfies_the_hasse_bound() {
    // |a_p| ≤ 2√p (Hasse 1933; Silverman, AEC, V.1.1), primes up to 2·10^5.
    let ps = primes_below(200_000);
    for a in [
        [0, 0, 1, -1, 0],
        [0, 1, 1, -2, 0],
        [1, -1, 0, -37, 81],
        [0, 0, 0, -1767 * 1767, 0],
    ] {
        let t = ApTable::new(&local(a));
        for &p in &ps {
            let v = t.frobenius_trace(p).unwrap();
            assert!(v * v <= 4 * p as i64, "curve {a:?}, p = {p}, a_p = {v}");
        }
    }
}

#[test]
fn two_isogenous_curves_have_the_same_a_p() {
    // Isogenous curves have the same number of points over every F_p of
    // good reduction, hence the same a_p (Silverman, AEC, V, Exercise
    // 5.4; Tate's isogeny theorem for the converse), primes up to 30000.
    let ps = primes_below(30_000);
    for (a, b) in [(0i64, -1i64), (1, 3), (-3, 5), (7, -11), (2, -48), (0, -36)] {
        let iso = ReducedModel::new(a.into(), b.into())
            .and_then(|m| TwoIsogeny::from_reduced(&m))
            .unwrap();
        let l1 = iso.domain().tate_data(&mut Budget::unlimited()).unwrap();
        let l2 = iso.codomain().tate_data(&mut Budget::unlimited()).unwrap();
        assert_eq!(
            l1.conductor, l2.conductor,
            "conductors differ for ({a}, {b})"
        );
        let (t1, t2) = (ApTable::new(&l1), ApTable::new(&l2));
        for &p in &ps {
            assert_eq!(
                t1.frobenius_trace(p).unwrap(),
                t2.frobenius_trace(p).unwrap(),
                "({a}, {b}), p = {p}"
            );
        }
    }
}

#[test]
fn quadratic_twists_multiply_a_p_by_the_character() {
    // E^d: y² = x³ + d·a·x² + d²·b·x is the twist of y² = x³ + ax² + bx by
    // Q(√d); a_p(E^d) = (d/p)·a_p(E) for p ∤ 2dΔ (Silverman, AEC, X.2 and
    // Exercise 10.16; common practice), primes up to 30000.
    let ps = primes_below(30_000);
    for (a, b) in [(0i64, -1i64), (1, 3), (-3, 5)] {
        let base = ApTable::new(&local([0, a, 0, b, 0]));
        for d in [-1i64, 2, -3, 5, 6, -7, 13] {
            let tw = ApTable::new(&local([0, d * a, 0, d * d * b, 0]));
            let disc = 16 * b * b * (a * a - 4 * b);
            for &p in &ps {
                if (2 * d * disc) % p as i64 == 0 {
                    continue;
                }
                let chi = jacobi(d, p);
                assert_eq!(
                    tw.frobenius_trace(p).unwrap(),
                    chi * base.frobenius_trace(p).unwrap(),
                    "({a}, {b}) by {d}, p = {p}"
                );
            }
        }
    }
}

/// (d/p) by Euler's criterion (common practice).
fn jacobi(d: i64, p: u64) -> i64 {
    let m = d.rem_euclid(p as i64) as u128;
    let mut r = 1u128;
    let mut b = m;
    let mut e = (p - 1) / 2;
    while e > 0 {
        if e & 1 == 1 {
            r = r * b % p as u128;
        }
        b = b * b % p as u128;
        e >>= 1;
    }
    if r == 1 {
        1
    } else if r == 0 {
        0
    } else {
        -1
    }
}

#[test]
fn a_n_is_multiplicative_with_the_hecke_relation_at_prime_powers() {
    // a_{mn} = a_m a_n for coprime m, n; a_{p^2} = a_p² − p at good p and
    // a_p² at bad p (Silverman, AEC, C.16; Cremona, Algorithms, §2.8).
    // Checked against the values of a_p computed one prime at a time.
    let l = local([0, 0, 1, -1, 0]); // conductor 37
    let an = dirichlet_coefficients(&l, 5000, &mut Budget::unlimited()).unwrap();
    for p in [2u64, 3, 5, 7, 37, 41, 67] {
        let v = frobenius_trace(&l, p).unwrap();
        assert_eq!(an[p as usize], v);
        let eps = if p == 37 { 0 } else { p as i64 };
        assert_eq!(an[(p * p) as usize], v * v - eps, "p = {p}");
    }
    assert_eq!(an[6], an[2] * an[3]);
    assert_eq!(an[37 * 41], an[37] * an[41]);
    assert_eq!(an[1], 1);
}

#[test]
fn bad_input_is_a_typed_error() {
    let l = local([0, 0, 1, -1, 0]);
    assert!(matches!(
        frobenius_trace(&l, 91),
        Err(Error::NotPrime { .. })
    ));
    assert!(matches!(
        frobenius_trace(&l, 1),
        Err(Error::NotPrime { .. })
    ));
    assert!(matches!(
        ApTable::new(&l).frobenius_trace(1 << 62),
        Err(Error::InvalidArgument { .. })
    ));
    // A prime above 2^32 (2^61 − 1, a Mersenne prime; common practice):
    // a value within the Hasse bound comes back, promptly.
    let v = ApTable::new(&l).frobenius_trace((1 << 61) - 1).unwrap();
    assert!((v as f64).abs() <= 2.0 * 2f64.powf(30.5) + 1.0);
    assert!(matches!(
        dirichlet_coefficients(&l, 1 << 40, &mut Budget::unlimited()),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(matches!(
        dirichlet_coefficients(&l, 100_000, &mut Budget::with_units(1000)),
        Err(Error::BudgetExhausted { .. })
    ));
}

/// Curves with `j = 1728` and `j = 0` in several models (short models
/// y² = x³ + Ax and y² = x³ + B, non-minimal ones among them, and models
/// with a1, a3 ≠ 0 such as y² + y = x³ and y² + xy = x³ − … shapes with
/// c6 = 0 or c4 = 0). Invented data.
fn cm_curves() -> Vec<[i64; 5]> {
    let mut v = Vec::new();
    for a in -45i64..=45 {
        if a != 0 {
            v.push([0, 0, 0, a, 0]); // j = 1728
        }
    }
    for n in [
        1i64, 2, 3, 5, 6, 7, 10, 14, 15, 21, 30, 34, 41, 101, 210, 997,
    ] {
        v.push([0, 0, 0, -n * n, 0]); // congruent-number curves
        v.push([0, 0, 0, n * n, 0]);
        v.push([0, 0, 0, 4 * n, 0]); // quartic twists
    }
    for b in -40i64..=40 {
        if b != 0 {
            v.push([0, 0, 0, 0, b]); // j = 0
        }
    }
    // j = 0 with larger k (many primes of bad reduction, fields with class
    // groups and units on the descent's side).
    for b in [
        9146i64,
        -9149,
        7777,
        -432 * 49,
        1_000_000_007,
        -123_456_789_012,
    ] {
        v.push([0, 0, 0, 0, b]);
    }
    // j = 0 and j = 1728 in models with a1 or a3 ≠ 0: y² + y = x³,
    // y² + y = x³ − 7, y² = x³ + x² + … reached by x ↦ x + r from the short
    // models (c4, c6 unchanged).
    v.push([0, 0, 1, 0, 0]);
    v.push([0, 0, 1, 0, -7]);
    v.push([0, 3, 0, 3 + 2, 1 + 2]); // (x+1)³ + 2(x+1) = x³ + 3x² + 5x + 3
    v.push([0, -3, 0, 3, 4]); // (x−1)³ + 5 = x³ − 3x² + 3x + 4
    v
}

#[test]
fn closed_forms_for_j_0_and_j_1728_equal_point_counts() {
    // The closed forms used for j = 1728 (a_p = 0 for p ≡ 3 mod 4; the
    // quartic-character formula of Ireland–Rosen, A Classical Introduction
    // to Modern Number Theory, 2nd ed., Ch. 18 §4, Thm. 5, for p ≡ 1 mod 4)
    // and j = 0 (a_p = 0 for p ≡ 2 mod 3; the sextic-character formula of
    // ibid. Ch. 18 §3, Thm. 4, for p ≡ 1 mod 3 — from memory) against the
    // definition a_p = p + 1 − #Ẽ(F_p) counted point by point, at every
    // prime below 1500 (tens of thousands of (curve, p) pairs).
    let ps = primes_below(1500);
    let curves = cm_curves();
    let mut pairs = 0usize;
    let mut nonzero_1728 = 0usize;
    for a in &curves {
        let e = Curve::from_ints(*a).unwrap();
        let j = e.j_invariant();
        assert!(
            *j.numer() == BigInt::from(1728) * j.denom() || *j.numer() == BigInt::from(0),
            "{a:?} is not a j = 0 or j = 1728 curve"
        );
        let l = local(*a);
        let t = ApTable::new(&l);
        for &p in &ps {
            let want = brute_ap(&l.minimal_model, p);
            assert_eq!(t.frobenius_trace(p).unwrap(), want, "curve {a:?}, p = {p}");
            pairs += 1;
            if p % 4 == 1 && want != 0 {
                nonzero_1728 += 1;
            }
        }
    }
    assert!(pairs > 40_000, "{pairs}");
    assert!(nonzero_1728 > 10_000, "{nonzero_1728}");
}

#[test]
fn closed_form_for_j_1728_equals_point_counts_at_larger_primes() {
    // As above at primes near 10^6, where the general path would use
    // baby-step giant-step: the count is still the definition.
    let ps: Vec<u64> = (1_000_000u64..)
        .filter(|&p| (2..p).take_while(|d| d * d <= p).all(|d| p % d != 0))
        .take(12)
        .collect();
    for a in [
        [0, 0, 0, -1, 0],
        [0, 0, 0, -25, 0],
        [0, 0, 0, 3, 0],
        [0, 0, 0, 0, 17],
    ] {
        let l = local(a);
        let t = ApTable::new(&l);
        for &p in &ps {
            assert_eq!(
                t.frobenius_trace(p).unwrap(),
                brute_ap(&l.minimal_model, p),
                "{a:?}, p = {p}"
            );
        }
    }
}
