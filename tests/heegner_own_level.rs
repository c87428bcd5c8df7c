//! Heegner points of a curve at its own level (`src/heegner/own_level.rs`).
//!
//! Outside facts: every point is checked on the curve in exact rational
//! arithmetic; the curves are rank-one curves y² = x³ + ax² + bx of this
//! crate's own scan (`descend --json` on small boxes), whose generators the
//! crate's search found and whose saturation proved generation; the
//! Heegner point must be a multiple of that generator up to torsion, with
//! the index read off the ratio of canonical heights (a perfect square,
//! the consistency Gross–Zagier's formula implies: ĥ(trace) = index²·ĥ(P);
//! Gross–Zagier, Invent. Math. 84 (1986), from memory).

use isodescent::curve::{global_local_data, Curve};
use isodescent::descent::PointOrigin;
use isodescent::heegner::{heegner_point, HeegnerOptions, HeegnerOutcome};
use isodescent::height::{saturate, HeightContext, SaturationOptions};
use isodescent::{descend, Budget, DescentOptions};
use num_bigint::BigInt;

fn curve(a: i64, b: i64) -> Curve {
    Curve::from_ints([0, a, 0, b, 0]).unwrap()
}

#[test]
fn own_level_heegner_points_are_multiples_of_the_searched_generators() {
    // (a, b): conductors 128 to 22816, generators of height up to 15.
    for (a, b) in [
        (4i64, -4i64),
        (1, -4),
        (5, 3),
        (-1, 4),
        (0, 3),
        (-1, -3),
        (-18, -1),
        (-30, -1),
        (-30, -23),
    ] {
        let e = curve(a, b);
        let mut opts = DescentOptions::default();
        opts.heegner = None;
        let r = descend(&e, &opts).unwrap();
        assert!(r.generators().is_some(), "({a}, {b})");
        let p = r.points()[0].clone();
        let HeegnerOutcome::Found(h) = heegner_point(
            &e,
            None,
            &HeegnerOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap() else {
            panic!("({a}, {b}): no Heegner point");
        };
        let local = global_local_data(e.coefficients(), &mut Budget::unlimited()).unwrap();
        assert_eq!(BigInt::from(h.level), local.conductor, "({a}, {b})");
        assert!(e.contains(&h.point) && e.contains(&h.trace_point));
        assert_eq!(
            e.mul(&h.point, &BigInt::from(h.index)),
            h.trace_point,
            "({a}, {b})"
        );
        // Fundamental D < 0 with every prime of N split: D ≡ 1 (mod 8)
        // here (2 | N for every curve of this shape).
        assert_eq!(h.discriminant.rem_euclid(8), 1, "({a}, {b})");
        let ctx = HeightContext::new(&e, &mut Budget::unlimited()).unwrap();
        let ratio = ctx.height(&h.point).unwrap().value() / ctx.height(&p).unwrap().value();
        let m = ratio.sqrt().round();
        assert!(
            m >= 1.0 && (ratio - m * m).abs() < 1e-6 * ratio.max(1.0),
            "({a}, {b}): height ratio {ratio}"
        );
        // Saturation of the Heegner point alone gives a generator of the
        // same height as the searched one.
        let s = saturate(
            &e,
            std::slice::from_ref(&h.point),
            &SaturationOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap();
        assert!(s.proven_saturated, "({a}, {b})");
        assert_eq!(s.index_found as f64, m, "({a}, {b})");
    }
}

#[test]
fn the_descent_takes_a_generator_from_an_own_level_heegner_point() {
    // y² = x³ − 30x² − x: conductor 14464, rank 1 (w = −1, L'(E,1) ≠ 0
    // certified), generator of height about 15. With the searches cut
    // short no point is found; the Heegner step supplies it, saturation
    // proves it a generator, and the Birch–Swinnerton-Dyer ledger with its
    // regulator is within its error of a square.
    let e = curve(-30, -1);
    let mut opts = DescentOptions::default();
    opts.search_height = 4;
    opts.four_coverings = false;
    opts.deep_search = None;
    opts.heegner = None;
    let without = descend(&e, &opts).unwrap();
    assert!(
        without.points().is_empty(),
        "the short search found a point"
    );
    assert_eq!(
        (without.rank_bounds().lower(), without.rank_bounds().upper()),
        (1, 1)
    );
    opts.heegner = Some(HeegnerOptions::default());
    let r = descend(&e, &opts).unwrap();
    let PointOrigin::Heegner(h) = r.points_origin() else {
        panic!("{:?}", r.points_origin());
    };
    assert_eq!(h.level, 14464);
    assert!(r.generators().is_some());
    assert!(e.contains(&r.points()[0]));
    let l = r.sha_ledger().expect("ledger");
    assert!(
        l.is_square_within_error && l.nearest_square.is_some(),
        "{l:?}"
    );
}

#[test]
fn own_level_route_is_declined_above_its_term_limit() {
    let mut o = HeegnerOptions::default();
    o.max_own_level_terms = 1000;
    match heegner_point(&curve(-30, -1), None, &o, &mut Budget::unlimited()).unwrap() {
        HeegnerOutcome::NotApplicable(why) => assert!(why.contains("series terms"), "{why}"),
        other => panic!("{other:?}"),
    }
}
