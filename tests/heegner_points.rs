//! Heegner points on congruent-number curves y² = x³ − n²x, n ≡ 7 (mod 8).

use isodescent::curve::Curve;
use isodescent::heegner::{heegner_point, HeegnerOptions, HeegnerOutcome};
use isodescent::Budget;

#[test]
fn heegner_points_lie_on_the_curves() {
    for n in [7i64, 15, 23, 31, 39, 47, 55, 71, 79] {
        let e = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
        let out = heegner_point(
            &e,
            None,
            &HeegnerOptions::default(),
            &mut Budget::unlimited(),
        )
        .unwrap();
        match out {
            HeegnerOutcome::Found(h) => {
                assert!(e.contains(&h.point) && e.contains(&h.trace_point));
                println!(
                    "n = {n}: h = {}, trace {:?}, point {:?}, index {}, bits {}, terms {}",
                    h.class_number,
                    h.trace_point.x(),
                    h.point.x(),
                    h.index,
                    h.precision_bits,
                    h.terms
                );
            }
            other => panic!("n = {n}: {other:?}"),
        }
    }
}
