//! Tests of the sieved point search on quartics `y² = g(x, z)`.

use crate::quartic::Quartic;
use crate::quartic::{
    search, search_all, search_all_quartic, search_quartic, search_report, Congruence,
    QuarticPoint, SearchOptions, SearchOutcome, MAX_HEIGHT,
};
use crate::{Budget, Error};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};
use proptest::prelude::*;

fn big(c: [i64; 5]) -> [BigInt; 5] {
    c.map(BigInt::from)
}

fn eval(g: &[BigInt; 5], x: i64, z: i64) -> BigInt {
    let (x, z) = (BigInt::from(x), BigInt::from(z));
    let mut v = BigInt::zero();
    for (i, c) in g.iter().enumerate() {
        v += c * x.pow(4 - i as u32) * z.pow(i as u32);
    }
    v
}

/// The reference: every normalised coprime pair of height ≤ h, one by one,
/// with an exact integer square root; sorted in the documented search order
/// (height, then z, then x).
fn naive(g: &[BigInt; 5], h: i64, keep: impl Fn(i64, i64) -> bool) -> Vec<(i64, i64, BigInt)> {
    let mut pts = Vec::new();
    for z in 0..=h {
        for x in -h..=h {
            if x.gcd(&z) != 1 || (z == 0 && x != 1) || !keep(x, z) {
                continue;
            }
            let v = eval(g, x, z);
            if v.is_negative() {
                continue;
            }
            let r = v.sqrt();
            if &r * &r == v {
                pts.push((x, z, r));
            }
        }
    }
    pts.sort_by_key(|(x, z, _)| (x.abs().max(*z), *z, *x));
    pts
}

fn as_triples(points: &[QuarticPoint]) -> Vec<(i64, i64, BigInt)> {
    points
        .iter()
        .map(|p| {
            (
                i64::try_from(&p.x).unwrap(),
                i64::try_from(&p.z).unwrap(),
                p.y.clone(),
            )
        })
        .collect()
}

/// 27·disc by the invariants I, J (independent copy for filtering inputs).
fn degenerate(g: &[BigInt; 5]) -> bool {
    let [a, b, c, d, e] = g;
    let i = BigInt::from(12) * a * e - BigInt::from(3) * b * d + c * c;
    let j = BigInt::from(72) * a * c * e + BigInt::from(9) * b * c * d
        - BigInt::from(27) * a * d * d
        - BigInt::from(27) * e * b * b
        - BigInt::from(2) * c * c * c;
    (BigInt::from(4) * &i * &i * &i - &j * &j).is_zero()
}

fn all(g: &[BigInt; 5], h: u64) -> Vec<(i64, i64, BigInt)> {
    as_triples(&search_all(g, &SearchOptions::up_to(h), &mut Budget::unlimited()).unwrap())
}

/// g = q(x, z)² + (x·z0 − z·x0)·c(x, z): a quartic with g(x0, z0) = q(x0, z0)².
fn through(q: [i64; 3], c: [i64; 4], x0: i64, z0: i64) -> [BigInt; 5] {
    let q = q.map(BigInt::from);
    let c = c.map(BigInt::from);
    let mut g: [BigInt; 5] = Default::default();
    // q² : coefficients of x^(4-k) z^k.
    for i in 0..3 {
        for j in 0..3 {
            g[i + j] += &q[i] * &q[j];
        }
    }
    // (x z0 − z x0)·(c0 x³ + c1 x²z + c2 xz² + c3 z³)
    for (k, ck) in c.iter().enumerate() {
        g[k] += BigInt::from(z0) * ck;
        g[k + 1] -= BigInt::from(x0) * ck;
    }
    g
}

fn normalise(x: i64, z: i64) -> (i64, i64) {
    if z < 0 || (z == 0 && x < 0) {
        (-x, -z)
    } else {
        (x, z)
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn the_sieve_finds_exactly_the_points_the_naive_loop_finds(
        c in proptest::array::uniform5(-40i64..=40),
        h in 0i64..=24,
    ) {
        let g = big(c);
        prop_assume!(!degenerate(&g));
        prop_assert_eq!(all(&g, h as u64), naive(&g, h, |_, _| true));
    }

    #[test]
    fn the_sieve_agrees_with_the_naive_loop_on_large_coefficients(
        c in proptest::array::uniform5(-(1i64 << 40)..=(1i64 << 40)),
        h in 0i64..=12,
    ) {
        let g = big(c);
        prop_assume!(!degenerate(&g));
        prop_assert_eq!(all(&g, h as u64), naive(&g, h, |_, _| true));
    }

    #[test]
    fn a_quartic_built_through_a_chosen_point_has_that_point_found(
        q in proptest::array::uniform3(-20i64..=20),
        c in proptest::array::uniform4(-20i64..=20),
        x0 in -60i64..=60,
        z0 in -60i64..=60,
    ) {
        prop_assume!(x0.gcd(&z0) == 1);
        let g = through(q, c, x0, z0);
        prop_assume!(!degenerate(&g));
        let (x, z) = normalise(x0, z0);
        let h = x.abs().max(z) as u64;
        let pts = all(&g, h);
        prop_assert!(pts.iter().any(|(px, pz, _)| (*px, *pz) == (x, z)), "{:?} not in {:?}", (x, z), pts);
        // The first point has the least height, and agrees with search_all.
        match search(&g, &SearchOptions::up_to(h), &mut Budget::unlimited()).unwrap() {
            SearchOutcome::Found(p) => {
                prop_assert!(p.lies_on(&g));
                prop_assert_eq!(as_triples(&[p])[0].clone(), pts[0].clone());
            }
            other => prop_assert!(false, "expected a point, got {:?}", other),
        }
    }

    #[test]
    fn a_caller_congruence_keeps_exactly_the_admitted_points(
        c in proptest::array::uniform5(-30i64..=30),
        m in 2u64..=12,
        picks in proptest::collection::vec((0u64..12, 0u64..12), 0..40),
        h in 1i64..=20,
    ) {
        let g = big(c);
        prop_assume!(!degenerate(&g));
        let cong = Congruence::new(m, picks.iter().map(|&(a, b)| (a % m, b % m))).unwrap();
        let opts = SearchOptions::up_to(h as u64).with_congruence(cong.clone());
        let got = as_triples(&search_all(&g, &opts, &mut Budget::unlimited()).unwrap());
        prop_assert_eq!(got, naive(&g, h, |x, z| cong.admits(x, z)));
    }
}

#[test]
fn the_lind_reichardt_quartic_has_no_point_up_to_height_2000() {
    // 2Y² = Z⁴ − 17X⁴ has points over R and every Q_p but none over Q
    // (C.-E. Lind, dissertation, Uppsala 1940; H. Reichardt, J. reine angew.
    // Math. 184 (1942) 12–18; journal details from memory). With X, Z coprime,
    // 2Y² ∈ Z forces Y ∈ Z, and y = 2Y turns it into y² = −34x⁴ + 2z⁴, whose
    // solutions all have y even; so this integral model has the same points.
    let g = big([-34, 0, 0, 0, 2]);
    let out = search(&g, &SearchOptions::up_to(2000), &mut Budget::unlimited()).unwrap();
    assert_eq!(out, SearchOutcome::NoneUpTo { height: 2000 });
    assert!(all(&g, 2000).is_empty());
}

#[test]
fn fermats_quartics_have_only_their_trivial_points() {
    // x⁴ + z⁴ = y² has no solution with xz ≠ 0 (Fermat; G. H. Hardy and
    // E. M. Wright, An Introduction to the Theory of Numbers, Thm. 226 —
    // theorem number from memory).
    let plus = all(&big([1, 0, 0, 0, 1]), 1000);
    let one = BigInt::from(1);
    assert_eq!(plus, vec![(1, 0, one.clone()), (0, 1, one.clone())]);
    // x⁴ − z⁴ = y² has no solution with xyz ≠ 0 (Fermat: 1 is not a
    // congruent number; L. J. Mordell, Diophantine Equations, 1969, ch. 4 —
    // chapter from memory).
    let minus = all(&big([1, 0, 0, 0, -1]), 1000);
    let zero = BigInt::from(0);
    assert_eq!(
        minus,
        vec![(1, 0, one), (-1, 1, zero.clone()), (1, 1, zero)]
    );
}

#[test]
fn a_point_of_height_near_five_thousand_with_huge_values_is_found() {
    // g(x0, z0) = q(x0, z0)² with a coefficient near 10^24, beyond i64, so
    // the exact test must run in BigInt.
    let (x0, z0) = (-4999, 4001);
    let q = [999_999_999_937, -1_000_003, 7];
    let c = [1_000_000_007, 3, -5, 999_999_999_989];
    let g = through(q, c, x0, z0);
    assert!(!degenerate(&g));
    assert!(g.iter().any(|c| i64::try_from(c).is_err()));
    let pts = search_all(&g, &SearchOptions::up_to(5000), &mut Budget::unlimited()).unwrap();
    let p = pts
        .iter()
        .find(|p| p.x == BigInt::from(x0) && p.z == BigInt::from(z0))
        .expect("the chosen point");
    assert!(p.lies_on(&g));
    assert!(p.y.bits() > 64);
}

#[test]
fn every_reported_point_is_normalised_and_on_the_curve() {
    let g = big([1, 2, -3, 4, 9]);
    let pts = search_all(&g, &SearchOptions::up_to(300), &mut Budget::unlimited()).unwrap();
    assert!(!pts.is_empty());
    for p in &pts {
        assert!(p.lies_on(&g));
        assert!(!p.y.is_negative());
        assert!(!p.z.is_negative());
        assert!(p.x.gcd(&p.z) == BigInt::from(1));
        if p.z.is_zero() {
            assert_eq!(p.x, BigInt::from(1));
        }
    }
    let keys: Vec<_> = pts
        .iter()
        .map(|p| (p.height(), p.z.clone(), p.x.clone()))
        .collect();
    assert!(keys.windows(2).all(|w| w[0] < w[1]), "search order");
}

#[test]
fn a_degenerate_quartic_is_refused_with_a_typed_error() {
    let opts = SearchOptions::up_to(10);
    for c in [
        [0, 0, 0, 0, 0],
        [1, 0, 2, 0, 1],
        [0, 0, 1, 0, 0],
        [1, -2, 1, 0, 0],
    ] {
        let err = search(&big(c), &opts, &mut Budget::unlimited()).unwrap_err();
        assert!(matches!(err, Error::Degenerate { .. }), "{c:?}: {err:?}");
    }
}

#[test]
fn bad_heights_and_congruences_are_refused_with_typed_errors() {
    let g = big([1, 0, 0, 0, 3]);
    let err = search_all(
        &g,
        &SearchOptions::up_to(MAX_HEIGHT + 1),
        &mut Budget::unlimited(),
    );
    assert!(matches!(err, Err(Error::InvalidArgument { .. })));
    assert!(matches!(
        Congruence::new(0, []),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(matches!(
        Congruence::new(1 << 20, []),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(matches!(
        Congruence::new(8, [(8, 0)]),
        Err(Error::InvalidArgument { .. })
    ));
    assert!(matches!(
        Congruence::on_x(8, [9]),
        Err(Error::InvalidArgument { .. })
    ));
}

#[test]
fn height_zero_is_an_empty_search() {
    let g = big([1, 0, 0, 0, 3]);
    let out = search(&g, &SearchOptions::up_to(0), &mut Budget::unlimited()).unwrap();
    assert_eq!(out, SearchOutcome::NoneUpTo { height: 0 });
}

#[test]
fn an_exhausted_budget_reports_how_far_the_search_got_and_is_reproducible() {
    let g = big([-34, 0, 0, 0, 2]);
    let opts = SearchOptions::up_to(3000);
    let mut last = 0;
    for units in [0u64, 10, 1_000, 20_000, 60_000] {
        let a = search(&g, &opts, &mut Budget::with_units(units)).unwrap();
        let b = search(&g, &opts, &mut Budget::with_units(units)).unwrap();
        assert_eq!(a, b, "same budget, same outcome");
        match a {
            SearchOutcome::GaveUp { completed_height } => {
                assert!(completed_height < 3000);
                assert!(completed_height >= last, "monotone in the budget");
                last = completed_height;
            }
            other => panic!("{units} units: {other:?}"),
        }
    }
    assert!(last > 0);
    let err = search_all(&g, &opts, &mut Budget::with_units(100)).unwrap_err();
    assert!(matches!(err, Error::BudgetExhausted { .. }));
}

#[test]
fn a_partial_report_holds_every_point_up_to_its_completed_height() {
    let g = big([1, 2, -3, 4, 9]);
    let full = search_all(&g, &SearchOptions::up_to(400), &mut Budget::unlimited()).unwrap();
    let rep = search_report(&g, &SearchOptions::up_to(400), &mut Budget::with_units(800)).unwrap();
    assert!(!rep.finished);
    assert!(rep.completed_height > 0 && rep.completed_height < 400);
    let h = BigInt::from(rep.completed_height);
    let below: Vec<_> = full.iter().filter(|p| p.height() <= h).cloned().collect();
    assert_eq!(rep.points[..below.len()], below[..]);
    assert!(rep.points.iter().all(|p| full.contains(p)));
}

#[test]
fn the_first_point_is_the_least_in_the_search_order() {
    // 2·1⁴ + 7·1⁴ = 9: the pairs (−1, 1) and (1, 1) are points; (1, 0)
    // gives 2 and (0, 1) gives 7.
    let g = big([2, 0, 0, 0, 7]);
    let out = search(&g, &SearchOptions::up_to(50), &mut Budget::unlimited()).unwrap();
    let SearchOutcome::Found(p) = out else {
        panic!("no point found: {out:?}");
    };
    assert_eq!(
        (p.x, p.z, p.y),
        (BigInt::from(-1), BigInt::from(1), BigInt::from(3))
    );
}

#[test]
fn the_quartic_wrappers_search_the_same_form() {
    // y² = x⁴ + z⁴: only (1, 0, 1) and (0, 1, 1) (Fermat, as above).
    let q = Quartic::from_i64([1, 0, 0, 0, 1]).unwrap();
    let opts = SearchOptions::up_to(200);
    let pts = search_all_quartic(&q, &opts, &mut Budget::unlimited()).unwrap();
    assert_eq!(
        pts,
        search_all(q.coeffs(), &opts, &mut Budget::unlimited()).unwrap()
    );
    assert_eq!(pts.len(), 2);
    let first = search_quartic(&q, &opts, &mut Budget::unlimited()).unwrap();
    assert_eq!(first, SearchOutcome::Found(pts[0].clone()));
}
