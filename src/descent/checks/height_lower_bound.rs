//! The Cremona–Siksek lower bound for ĥ (`src/height/lower_bound.rs`, crate-private):
//! unit checks that run whole descents, so they live above the height layer;
//! cross-checks against the points the descent finds and against the
//! search bound, and independently computed heights.

use num_bigint::BigInt;

use crate::curve::{Curve, Point};
use crate::descent::{descend, DescentOptions};
use crate::height::lower_bound::cremona_siksek_bound;
use crate::height::{
    height_lower_bound, saturate, HeightContext, LowerBoundSource, SaturationOptions,
};
use crate::Budget;

// The reference values the integration tests and src/analytic/tests read too.
#[allow(clippy::duplicate_mod)]
#[path = "../../../tests/values/mod.rs"]
mod values;

fn context(a: [i64; 5]) -> HeightContext {
    HeightContext::new(&Curve::from_ints(a).unwrap(), &mut Budget::unlimited()).unwrap()
}

/// Both the Cremona–Siksek bound and the search bound are lower bounds of
/// the least ĥ of a non-torsion point, so neither exceeds the ĥ of any
/// point the descent returns (Cremona–Siksek, ANTS VII (2006)). Over the
/// box |a|, |b| ≤ 10 of y² = x³ + ax² + bx and the congruent-number curves
/// n ≤ 120; also: the bound exists on every one of these curves.
#[test]
fn the_bound_never_exceeds_the_height_of_a_point_found() {
    let mut curves: Vec<[i64; 5]> = Vec::new();
    for a in -10i64..=10 {
        for b in -10i64..=10 {
            if b != 0 && a * a != 4 * b {
                curves.push([0, a, 0, b, 0]);
            }
        }
    }
    for n in 1i64..=120 {
        if (2..=n).take_while(|p| p * p <= n).all(|p| n % (p * p) != 0) {
            curves.push([0, 0, 0, -n * n, 0]);
        }
    }
    let opts = DescentOptions::default().descent_only();
    let mut compared = 0;
    for a in curves {
        let e = Curve::from_ints(a).unwrap();
        let ctx = context(a);
        let cs = cremona_siksek_bound(&ctx).unwrap_or_else(|| panic!("{a:?}: no bound"));
        assert!(
            cs.bound > 0.0 && cs.bound * (cs.exponent * cs.exponent) as f64 <= cs.mu * 1.000001
        );
        let report = descend(&e, &opts).unwrap();
        for p in report.points() {
            let h = ctx.height(p).unwrap();
            assert!(cs.bound <= h.upper(), "{a:?} {p:?}: {} > {h}", cs.bound);
            compared += 1;
        }
        if let Some(lb) = height_lower_bound(&ctx, 5.0, &mut Budget::unlimited()).unwrap() {
            if let Some((_, h)) = lb.smallest {
                assert!(cs.bound <= h.upper(), "{a:?}: {} > {h}", cs.bound);
            }
        }
    }
    assert!(compared > 150, "{compared}");
}

/// A lower bound for ĥ on non-torsion points lies below ĥ of every
/// non-torsion point: ĥ(0, 0) on y² + y = x³ − x and ĥ(−4, 6) on
/// y² = x³ − 25x, computed independently by `tests/data/gen_curve_values.py`
/// (mpmath). On the congruent-number curves the bound grows like log n
/// (the archimedean height on E⁰(R) scales by log n): at n = 997 it
/// exceeds 1.7, where the search bound of height 10 proves nothing.
#[test]
fn reference_heights_and_large_conductors() {
    let h1 = values::real("height", &["rank1_small_conductor", "0", "0"]);
    let b1 = cremona_siksek_bound(&context(values::curve("rank1_small_conductor"))).unwrap();
    assert!(b1.bound <= h1 && b1.bound > 0.005, "{b1:?}");
    let h5 = values::real("height", &["congruent5", "-4", "6"]);
    let b5 = cremona_siksek_bound(&context(values::curve("congruent5"))).unwrap();
    assert!(b5.bound <= h5 && b5.bound > 0.3, "{b5:?}");
    let b997 = cremona_siksek_bound(&context([0, 0, 0, -997 * 997, 0])).unwrap();
    assert!(b997.bound > 1.7, "{b997:?}");
    let ctx = context([0, 0, 0, -997 * 997, 0]);
    assert!(height_lower_bound(&ctx, 10.0, &mut Budget::unlimited())
        .unwrap()
        .is_none());
}

/// Saturation with the Cremona–Siksek bound: on y² = x³ − 41²x with
/// P = (−9, 120), the search bound needs naive height above its default
/// reach, the Cremona–Siksek bound does not; from 3P saturation divides by
/// 3 and proves that P generates modulo torsion (index 3, regulator ĥ(P)).
#[test]
fn saturation_uses_the_cremona_siksek_bound() {
    let e = Curve::from_ints([0, 0, 0, -41 * 41, 0]).unwrap();
    let p = Point::from_ints(-9, 120);
    let p3 = e.mul(&p, &BigInt::from(3));
    let hp = crate::height::canonical_height(&e, &p).unwrap();
    for (input, index) in [(p.clone(), 1), (p3, 3)] {
        let s = saturate(
            &e,
            &[input],
            &SaturationOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap();
        assert!(s.proven_saturated, "{s:?}");
        assert_eq!(s.index_found, index);
        assert!(s.regulator.overlaps(&hp), "{} vs {hp}", s.regulator);
        assert_eq!(
            s.height_lower_bound_source,
            Some(LowerBoundSource::CremonaSiksek)
        );
    }
}

/// The whole box |a|, |b| ≤ 30 and the congruent-number curves n ≤ 1000
/// (ignored: about a minute): the bound exists on every curve and never
/// exceeds the ĥ of a point the default descent (with the deep search)
/// returns. Run with
/// `cargo test --release --lib height_lower_bound -- --ignored --nocapture`.
#[test]
#[ignore]
fn the_bound_over_the_box_and_the_congruent_curves() {
    let mut curves: Vec<[i64; 5]> = Vec::new();
    for a in -30i64..=30 {
        for b in -30i64..=30 {
            if b != 0 && a * a != 4 * b {
                curves.push([0, a, 0, b, 0]);
            }
        }
    }
    for n in 1i64..=1000 {
        if (2..=n).take_while(|p| p * p <= n).all(|p| n % (p * p) != 0) {
            curves.push([0, 0, 0, -n * n, 0]);
        }
    }
    let opts = DescentOptions {
        saturation: None,
        ..DescentOptions::default()
    };
    let (mut compared, mut none, mut worst) = (0, 0, f64::INFINITY);
    for a in &curves {
        let e = Curve::from_ints(*a).unwrap();
        let ctx = context(*a);
        let Some(cs) = cremona_siksek_bound(&ctx) else {
            none += 1;
            println!("{a:?}: no bound");
            continue;
        };
        let report = descend(&e, &opts).unwrap();
        for p in report.points() {
            let h = ctx.height(p).unwrap();
            assert!(cs.bound <= h.upper(), "{a:?} {p:?}: {} > {h}", cs.bound);
            worst = worst.min(h.value() / cs.bound);
            compared += 1;
        }
    }
    println!(
        "{} curves, {none} without a bound, {compared} points compared, least ĥ/bound {worst:.3}",
        curves.len()
    );
    assert_eq!(none, 0);
}
