//! The analytic side at large conductors: the streamed route against the
//! stored one, the root numbers of congruent-number curves, and curves with
//! `n ≈ 10⁵` (conductor about 3·10¹¹) decided under the default options.

mod common;

use isodescent::analytic::{
    analyse, AnalyticData, AnalyticOptions, RankTheorem, SeriesRoute, Skip,
};
use isodescent::curve::Curve;
use isodescent::Budget;

fn congruent(n: i64, options: &AnalyticOptions) -> AnalyticData {
    let e = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
    let mut b = Budget::unlimited();
    let l = e.tate_data(&mut b).unwrap();
    analyse(&e, &l, options, &mut b).unwrap()
}

#[test]
fn both_routes_agree_within_their_bounds() {
    // Where both apply, the two routes compute the same L^{(r)}(E_n, 1):
    // the enclosures must overlap, and the streamed bounds stay small.
    let stored = AnalyticOptions::default().with_streamed_above(u64::MAX);
    let streamed = AnalyticOptions::default().with_streamed_above(0);
    for n in [5i64, 6, 7, 34, 41, 157, 1767, 17683] {
        let a = congruent(n, &stored);
        let b = congruent(n, &streamed);
        assert_eq!(a.series_route(), Some(SeriesRoute::Stored));
        assert_eq!(b.series_route(), Some(SeriesRoute::StreamedTwist));
        assert_eq!(a.root_number(), b.root_number(), "n = {n}");
        assert_eq!(a.rank_proven(), b.rank_proven(), "n = {n}");
        assert_eq!(a.analytic_rank(), b.analytic_rank(), "n = {n}");
        assert!(b.split_check().unwrap().passed, "n = {n}");
        assert_eq!(a.l_values().len(), b.l_values().len(), "n = {n}");
        for ((r, x), (s, y)) in a.l_values().iter().zip(b.l_values()) {
            assert_eq!(r, s);
            assert!(x.overlaps(y), "n = {n}, r = {r}: {x} vs {y}");
            if *r <= 1 {
                assert!(y.error() < 1e-9, "n = {n}, r = {r}: {y}");
            }
        }
    }
    // A curve without complex multiplication takes the streamed route with
    // a_p prime by prime: y² + y = x³ − x (conductor 37).
    let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
    let mut b = Budget::unlimited();
    let l = e.tate_data(&mut b).unwrap();
    let x = analyse(&e, &l, &stored, &mut b).unwrap();
    let y = analyse(&e, &l, &streamed, &mut b).unwrap();
    assert_eq!(y.series_route(), Some(SeriesRoute::Streamed));
    assert!(x.l_value(1).unwrap().overlaps(&y.l_value(1).unwrap()));
    assert_eq!(
        y.rank_proven(),
        Some((1, RankTheorem::GrossZagierKolyvagin))
    );
}

#[test]
fn twists_switch_to_the_streamed_route_above_their_own_threshold() {
    // Under the default options the twists of y² = x³ − x take the
    // streamed twist route above the default twist_streamed_above (10⁶), and
    // the stored route below; a curve without the twist route keeps the
    // stored route up to streamed_above. The values of the two routes
    // overlap on both sides of the threshold.
    let options = AnalyticOptions::default();
    assert_eq!(AnalyticOptions::default().twist_streamed_above, 1_000_000);
    // n = 173 (odd): N = 32·173² = 957 728; n = 179: N = 1 025 312;
    // n = 254 (even): N = 16·254² = 1 032 256.
    for (n, route) in [
        (173i64, SeriesRoute::Stored),
        (179, SeriesRoute::StreamedTwist),
        (254, SeriesRoute::StreamedTwist),
        (9997, SeriesRoute::StreamedTwist),
    ] {
        let d = congruent(n, &options);
        let conductor: u64 = d.conductor().to_string().parse().unwrap();
        assert_eq!(
            conductor > AnalyticOptions::default().twist_streamed_above,
            route == SeriesRoute::StreamedTwist,
            "n = {n}, N = {conductor}"
        );
        assert_eq!(d.series_route(), Some(route), "n = {n}");
        let stored = congruent(n, &options.clone().with_streamed_above(u64::MAX));
        assert_eq!(stored.series_route(), Some(SeriesRoute::Stored));
        assert_eq!(d.rank_proven(), stored.rank_proven(), "n = {n}");
        for ((r, x), (s, y)) in d.l_values().iter().zip(stored.l_values()) {
            assert_eq!(r, s);
            assert!(x.overlaps(y), "n = {n}, r = {r}: {x} vs {y}");
        }
    }
    // y² + y = x³ − x: no twist route, stored under the defaults.
    let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
    let mut b = Budget::unlimited();
    let l = e.tate_data(&mut b).unwrap();
    let d = analyse(&e, &l, &options, &mut b).unwrap();
    assert_eq!(d.series_route(), Some(SeriesRoute::Stored));
}

#[test]
fn congruent_root_numbers_follow_the_residue_of_n_mod_8() {
    // w(E_n) = +1 for square-free n ≡ 1, 2, 3 (mod 8) and −1 for n ≡ 5, 6,
    // 7 (mod 8) (Koblitz, Introduction to Elliptic Curves and Modular
    // Forms, Ch. II; Tunnell 1983; from memory). Here w comes from the
    // certified functional-equation test of the streamed route, which must
    // also agree with the local formulas.
    let streamed = AnalyticOptions::default().with_streamed_above(0);
    let mut checked = 0;
    for n in (1..400i64).chain([99_989, 100_003]) {
        if !common::squarefree(n) {
            continue;
        }
        let d = congruent(n, &streamed);
        let expected = if matches!(n % 8, 1..=3) { 1 } else { -1 };
        assert_eq!(d.root_number_by_test(), Some(expected), "n = {n}");
        assert_eq!(d.root_number(), Some(expected), "n = {n}");
        checked += 1;
    }
    assert!(checked > 240);
}

#[test]
fn curves_with_n_near_10_to_the_5_are_decided_by_default() {
    // Conductors 32n² ≈ 3.2·10¹¹, above the stored route's limit 10¹⁰: the
    // default options take the streamed route for these twists of
    // y² = x³ − x and settle the rank when L or L' is certified non-zero.
    // For n = 100 003 (w = +1), Tunnell's criterion (tests/common) says
    // whether L(E_n, 1) ≠ 0, i.e. whether rank 0 can be proven.
    let options = AnalyticOptions::default();
    assert!(!common::tunnell_equality(100_003));
    for (n, rank) in [(100_005i64, 1usize), (100_003, 0)] {
        let d = congruent(n, &options);
        assert_eq!(d.skipped(), None, "n = {n}");
        assert_eq!(d.series_route(), Some(SeriesRoute::StreamedTwist));
        assert_eq!(d.conductor().to_string(), (32 * n * n).to_string());
        assert!(d.split_check().unwrap().passed);
        let proven = d.rank_proven().expect("rank settled").0;
        assert_eq!(proven, rank, "n = {n}: {:?}", d.l_values());
    }
    // Above both limits nothing is computed; a curve without the twist
    // route keeps the lower limit.
    let d = congruent(600_001, &{
        let mut o = options.clone();
        o.twist_conductor_limit = AnalyticOptions::default().twist_conductor_limit / 1000;
        o
    });
    assert_eq!(d.skipped(), Some(Skip::ConductorAboveLimit));
    assert!(options.conductor_limit_for(false) < options.conductor_limit_for(true));
}

#[test]
fn l_prime_agrees_with_an_independent_mpmath_sum() {
    // tests/data/congruent_lprime.txt: L'(E_n, 1) from the script
    // gen_congruent_lprime.py beside it (own point counts, mpmath 1.3.0 at
    // 40 digits, 25 digits printed). Both routes must enclose it.
    let data = include_str!("data/congruent_lprime.txt");
    let mut seen = 0;
    for line in data.lines() {
        let mut it = line.split_whitespace();
        let n: i64 = it.next().unwrap().parse().unwrap();
        let v: f64 = it.next().unwrap().parse().unwrap();
        for above in [0, u64::MAX] {
            let d = congruent(n, &AnalyticOptions::default().with_streamed_above(above));
            let l = d.l_value(1).unwrap();
            // 4·10⁻¹⁶·|v| covers the rounding of the printed value to binary64.
            assert!(
                (l.value() - v).abs() <= l.error() + 4e-16 * v.abs(),
                "n = {n}: {l} vs {v}"
            );
            assert!(l.error() < 1e-11);
        }
        seen += 1;
    }
    assert_eq!(seen, 2);
}

#[test]
fn j_zero_curves_above_10_to_the_10_are_analysed_by_default() {
    // y² = x³ + k has j = 0 and its a_p come from the sextic residue symbol
    // (module cm), so the default options analyse it up to the conductor
    // 10¹³ of the closed-form families. The curves of x³ + y³ = p,
    // y² = x³ − 432p², for primes p just above 4·10⁴ (conductor above
    // 10¹⁰): p ≡ 2, 5 (mod 9) have rank 0 (Sylvester, Pépin, Lucas — from
    // memory) and root number +1, p ≡ 4, 7, 8 (mod 9) root number −1 (from
    // memory; Dasgupta–Voight).
    let options = AnalyticOptions::default();
    let mut seen = [0usize; 2];
    for p in (40_000i64..60_000).filter(|&p| isodescent::arith::is_prime_u64(p as u64)) {
        if seen[0] >= 3 && seen[1] >= 3 {
            break;
        }
        let kind = usize::from(matches!(p % 9, 4 | 7 | 8));
        if p % 9 == 1 || seen[kind] >= 3 {
            continue;
        }
        let e = Curve::from_ints([0, 0, 0, 0, -432 * p * p]).unwrap();
        let mut b = Budget::unlimited();
        let l = e.tate_data(&mut b).unwrap();
        let d = analyse(&e, &l, &options, &mut b).unwrap();
        assert!(d.conductor() > &10_000_000_000u64.into(), "p = {p}");
        assert_eq!(d.skipped(), None, "p = {p}");
        assert!(d.split_check().unwrap().passed, "p = {p}");
        match p % 9 {
            2 | 5 => {
                assert_eq!(d.root_number(), Some(1), "p = {p}");
                if let Some((r, _)) = d.rank_proven() {
                    assert_eq!(r, 0, "p = {p}");
                }
                seen[0] += 1;
            }
            4 | 7 | 8 => {
                assert_eq!(d.root_number(), Some(-1), "p = {p}");
                seen[1] += 1;
            }
            _ => {}
        }
    }
    assert_eq!(seen, [3, 3]);
    // A curve without closed forms keeps the lower limit.
    assert!(options.conductor_limit_for(false) < options.conductor_limit_for(true));
}
