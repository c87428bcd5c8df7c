//! Helpers shared by the Heegner-point tests (tests/heegner_points.rs and
//! tests/heegner_own_level.rs): the Heegner point with the default
//! options, the generator the descent proves without it, the index read
//! off a ratio of canonical heights, and the descent that needs the
//! Heegner step for its generator.
#![allow(dead_code)]

use isodescent::curve::{Curve, Point};
use isodescent::heegner::{heegner_point, HeegnerOptions, HeegnerOutcome, HeegnerPoint};
use isodescent::height::HeightContext;
use isodescent::{descend, Budget, DescentOptions, DescentReport};

/// The Heegner point of `e` with the default options and no predicted
/// height; panics (naming `what`) when none is found.
pub fn heegner_found(e: &Curve, what: &str) -> HeegnerPoint {
    let out = heegner_point(
        e,
        None,
        &HeegnerOptions::default(),
        &mut Budget::unlimited(),
    )
    .unwrap();
    let HeegnerOutcome::Found(h) = out else {
        panic!("{what}: {out:?}");
    };
    h
}

/// The descent of `e` with the Heegner step off, which must prove its
/// first point a generator (saturation), and that point.
pub fn searched_generator(e: &Curve, what: &str) -> (DescentReport, Point) {
    let mut opts = DescentOptions::default();
    opts.heegner = None;
    let r = descend(e, &opts).unwrap();
    assert!(r.generators().is_some(), "{what}");
    let p = r.points()[0].clone();
    (r, p)
}

/// The height context of `e` and the index m ≥ 1 with
/// ĥ(multiple) = m²·ĥ(p) within 10⁻⁶ relative (the consistency
/// Gross–Zagier's formula implies for a Heegner point and a generator).
pub fn height_index(e: &Curve, multiple: &Point, p: &Point, what: &str) -> (HeightContext, f64) {
    let ctx = HeightContext::new(e, &mut Budget::unlimited()).unwrap();
    let ratio = ctx.height(multiple).unwrap().value() / ctx.height(p).unwrap().value();
    let m = ratio.sqrt().round();
    assert!(
        m >= 1.0 && (ratio - m * m).abs() < 1e-6 * ratio.max(1.0),
        "{what}: height ratio {ratio}"
    );
    (ctx, m)
}

/// The descent of `e` finds no point under `without` (Heegner step off)
/// and, under `with`, takes its generator from the Heegner step: proven a
/// generator, on the curve, and with the Birch–Swinnerton-Dyer ledger
/// within its error of a square. Returns both reports.
pub fn heegner_supplies_the_generator(
    e: &Curve,
    without: &DescentOptions,
    with: &DescentOptions,
    what: &str,
) -> (DescentReport, DescentReport) {
    let r0 = descend(e, without).unwrap();
    assert!(r0.points().is_empty(), "{what}: the search found a point");
    let r = descend(e, with).unwrap();
    assert!(
        matches!(
            r.points_origin(),
            isodescent::descent::PointOrigin::Heegner(_)
        ),
        "{what}: {:?}",
        r.points_origin()
    );
    assert!(r.generators().is_some(), "{what}");
    assert!(e.contains(&r.points()[0]), "{what}");
    let l = r.sha_ledger().expect("ledger");
    assert!(
        l.is_square_within_error && l.nearest_square.is_some(),
        "{what}: {l:?}"
    );
    (r0, r)
}
