//! The second descent inside the full descent: proofs that classes are not
//! images, points found through 4-coverings, and the decided share.

use isodescent::curve::Curve;
use isodescent::descent::{descend, verify_report, ClassStatus, CoveringVerdict, DescentOptions};

mod common;
use common::squarefree;

/// The first descent alone: neither the 4-coverings nor the lifting pairing
/// (the pairing's bound on the images is part of the second descent, and a
/// report takes every proven bound it has).
fn first_descent_only() -> DescentOptions {
    let mut o = DescentOptions::default().descent_only();
    o.four_coverings = false;
    o.lifting_pairing = false;
    o
}

#[test]
fn lind_reichardt_class_is_proven_not_an_image() {
    // Lind (1940) and Reichardt (1942): 2Y² = 1 − 17X⁴ is everywhere
    // locally soluble but has no rational point. With N = 2Y·e², M = X·e
    // it is N² = 2M⁴ − 34e⁴, the space C_2 of y² = x³ − 68x.
    let c = Curve::from_ints([0, 0, 0, -68, 0]).unwrap();
    let first = descend(&c, &first_descent_only()).unwrap();
    let r = descend(&c, &DescentOptions::default().descent_only()).unwrap();
    assert!(
        first.rank_bounds().upper() > r.rank_bounds().upper(),
        "the second descent must sharpen the bound"
    );
    let side = &r.isogenies()[0].domain();
    let proven: Vec<String> = side
        .elements()
        .iter()
        .filter(|e| matches!(e.status, ClassStatus::ProvenNotImage { .. }))
        .map(|e| e.class.to_string())
        .collect();
    // the class of 2 (or its coset 2·(−17) = −34) is among the proven ones
    assert!(
        side.elements().iter().any(|e| {
            matches!(&e.status, ClassStatus::ProvenNotImage { space, .. }
                if *space == 2.into() || *space == (-34).into())
        }) || side
            .covering_runs()
            .iter()
            .any(|run| (run.class == 2.into() || run.class == (-34).into())
                && run.verdict == CoveringVerdict::ProvenNotImage),
        "proven classes {proven:?}, runs {:?}",
        side.covering_runs()
    );
    assert_eq!((r.rank_bounds().lower(), r.rank_bounds().upper()), (0, 0));
    let v = verify_report(&r, 50_000_000).unwrap();
    assert!(v.all_passed(), "{:?}", v.failures());
}

#[test]
fn a_point_beyond_the_first_search_is_found_through_a_covering() {
    // n = 53 is congruent (Tunnell's equality holds, 53 ≡ 5 mod 8); the
    // generator of y² = x³ − 53²x is too large for the first search at the
    // default height, and a 4-covering finds it.
    let c = Curve::from_ints([0, 0, 0, -53 * 53, 0]).unwrap();
    let first = descend(&c, &first_descent_only()).unwrap();
    let r = descend(&c, &DescentOptions::default().descent_only()).unwrap();
    assert_eq!(first.rank_bounds().lower(), 0);
    assert_eq!((r.rank_bounds().lower(), r.rank_bounds().upper()), (1, 1));
    assert!(c.contains(&r.descent_points()[0]));
    let v = verify_report(&r, 50_000_000).unwrap();
    assert!(v.all_passed(), "{:?}", v.failures());
}

#[test]
fn the_second_descent_decides_clearly_more_congruent_number_curves() {
    let first = first_descent_only();
    let second = DescentOptions::default().descent_only();
    let (mut d1, mut d2, mut total) = (0, 0, 0);
    for n in (1..=300i64).filter(|&n| squarefree(n)) {
        let c = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
        let r1 = descend(&c, &first).unwrap();
        let r2 = descend(&c, &second).unwrap();
        // both are proven intervals, so they must overlap, and the second
        // is at least as sharp
        assert!(
            r2.rank_bounds().lower() >= r1.rank_bounds().lower()
                && r2.rank_bounds().upper() <= r1.rank_bounds().upper(),
            "n = {n}"
        );
        total += 1;
        d1 += usize::from(r1.rank_bounds().is_decided());
        d2 += usize::from(r2.rank_bounds().is_decided());
    }
    eprintln!("n <= 300: decided {d1}/{total} by the first descent, {d2}/{total} with the second");
    assert!(d2 >= d1 + total / 10, "first {d1}, second {d2}, of {total}");
}
