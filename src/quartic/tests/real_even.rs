//! The even-form fast path of real solubility against the Sturm count:
//! y² = g(x, z) has a real point iff c4 > 0, or c0 > 0, or g has a real
//! root (common practice: a real form of even degree changes sign only at a
//! real root).

use crate::quartic::{real_root_count, real_soluble, Quartic};
use crate::Budget;
use num_bigint::BigInt;
use proptest::prelude::*;

proptest! {
    #![proptest_config(ProptestConfig { cases: 2000, ..ProptestConfig::default() })]
    #[test]
    fn even_forms_are_real_soluble_exactly_when_the_sturm_criterion_says_so(
        c4 in -60i64..60, c2 in -200i64..200, c0 in -60i64..60,
    ) {
        let Ok(q) = Quartic::new([c4.into(), BigInt::from(0), c2.into(), BigInt::from(0), c0.into()]) else {
            return Ok(());
        };
        let expected = c4 > 0 || c0 > 0 || real_root_count(&q) > 0;
        let got = real_soluble(&q, &mut Budget::unlimited()).unwrap();
        prop_assert_eq!(got.is_soluble(), expected);
        if let Some(pt) = got.point() {
            prop_assert!(pt.verify(&q));
        }
    }
}
