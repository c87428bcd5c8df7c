//! Local images `W_v` of the 2-isogeny descent and the relevant places.

use crate::curve::ReducedModel;
use crate::local::{Place, Prime};
use crate::quartic::{local_image, relevant_places, Quartic};
use crate::{Budget, Error};
use num_bigint::BigInt;

fn b(n: i64) -> BigInt {
    BigInt::from(n)
}

/// The checked model y² = x³ + ax² + bx of a test curve (non-singular by choice).
fn rm(a: i64, bb: i64) -> ReducedModel {
    ReducedModel::new(b(a), b(bb)).expect("a non-singular test curve")
}

fn places() -> Vec<Place> {
    let mut v = vec![Place::Real];
    for p in [2u64, 3, 5, 7, 11, 13] {
        v.push(Place::Finite(Prime::small(p).unwrap()));
    }
    v
}

fn curves() -> Vec<(i64, i64)> {
    let mut v = Vec::new();
    for a in -6i64..=6 {
        for bb in -12i64..=12 {
            if bb != 0 && a * a != 4 * bb {
                v.push((a, bb));
            }
        }
    }
    v
}

/// `W_v` is the image of a homomorphism `E(Q_v) → Q_v*/Q_v*²`
/// [SilvermanTate92, III.5], so a subgroup; every witness re-checks.
#[test]
fn every_local_image_is_a_subgroup_with_checkable_evidence() {
    for (a, bb) in curves().into_iter().step_by(3) {
        for pl in places() {
            let w = local_image(&rm(a, bb), &pl, &mut Budget::unlimited()).unwrap();
            assert!(w.is_subgroup(), "a={a} b={bb} at {pl}: {:?}", w.members);
            assert_eq!(w.members.len(), 1 << w.dimension);
            for ev in &w.evidence {
                let q = Quartic::two_isogeny_space(&ev.representative, &b(a), &b(bb)).unwrap();
                if let Some(pt) = ev.solubility.point() {
                    assert!(pt.verify(&q));
                }
                assert_eq!(w.contains(ev.mask), ev.solubility.is_soluble());
            }
        }
    }
}

/// `|W_v(E)|·|W_v(E')| = 2` at R, 4 at odd p, 8 at 2, with
/// `E': y² = x³ − 2ax² + (a² − 4b)x`: from the exact sequence
/// `0 → E'[ψ]/φ(E[2]) → E'/φE → E/2E → E/ψE' → 0` and
/// `|E(K)/2E(K)| = |E(K)[2]|·|2|_K^{−1}` (`|E(R)[2]|/2` at R)
/// [Schaefer96, Lemma 3.8]; derivation in the `image` module docs.
#[test]
fn the_images_on_both_sides_multiply_to_the_expected_size() {
    for (a, bb) in curves().into_iter().step_by(2) {
        let (a2, b2) = (-2 * a, a * a - 4 * bb);
        for pl in places() {
            let w = local_image(&rm(a, bb), &pl, &mut Budget::unlimited()).unwrap();
            let w2 = local_image(&rm(a2, b2), &pl, &mut Budget::unlimited()).unwrap();
            let expected = match &pl {
                Place::Real => 2,
                Place::Finite(p) if p.is_two() => 8,
                Place::Finite(_) => 4,
            };
            assert_eq!(
                w.members.len() * w2.members.len(),
                expected,
                "a={a} b={bb} at {pl}: {:?} and {:?}",
                w.members,
                w2.members
            );
        }
    }
}

/// At odd p of good reduction the image is the unramified classes {1, u}
/// [Silverman09, X.4.1] (masks 0 and 2 in the basis {p, u}).
#[test]
fn at_odd_primes_of_good_reduction_the_image_is_the_unramified_classes() {
    for (a, bb) in curves() {
        let disc = bb * (a * a - 4 * bb);
        for p in [3u64, 5, 7, 11, 13, 101] {
            if disc % p as i64 == 0 {
                continue;
            }
            let pl = Place::Finite(Prime::small(p).unwrap());
            let w = local_image(&rm(a, bb), &pl, &mut Budget::unlimited()).unwrap();
            assert_eq!(w.members, vec![0, 2], "a={a} b={bb} p={p}");
        }
    }
}

/// Elementary: `C_{−1}: N² = −M⁴ + aM²e² − be⁴` has a real point iff
/// `−t² + at − b ≥ 0` for some `t ≥ 0`, iff `b < 0` or (`a > 0` and `a² > 4b`).
#[test]
fn the_real_image_follows_the_sign_conditions() {
    for (a, bb) in curves() {
        let w = local_image(&rm(a, bb), &Place::Real, &mut Budget::unlimited()).unwrap();
        let minus_one = bb < 0 || (a > 0 && a * a > 4 * bb);
        let expected = if minus_one { vec![0, 1] } else { vec![0] };
        assert_eq!(w.members, expected, "a={a} b={bb}");
    }
}

#[test]
fn relevant_places_are_r_two_and_the_bad_primes() {
    let two = Prime::two();
    let p17 = Prime::small(17).unwrap();
    // y² = x³ − 17x: b(a² − 4b) = −17·68 = −2²·17².
    let m = ReducedModel::new(b(0), b(-17)).unwrap();
    let got = relevant_places(&m, &b(-1), &[two.clone(), p17.clone()]).unwrap();
    assert_eq!(
        got,
        vec![
            Place::Real,
            Place::Finite(two.clone()),
            Place::Finite(p17.clone())
        ]
    );
    // Missing 17: the cofactor is reported.
    assert!(matches!(
        relevant_places(&m, &b(-1), std::slice::from_ref(&two)),
        Err(Error::InvalidArgument { .. })
    ));
    // d with a new prime (d ∤ b) must be covered too.
    let p3 = Prime::small(3).unwrap();
    assert!(relevant_places(&m, &b(3), &[two.clone(), p17.clone()]).is_err());
    let got = relevant_places(&m, &b(3), &[two.clone(), p17.clone(), p3.clone()]).unwrap();
    assert_eq!(got.len(), 4);
    assert!(matches!(
        relevant_places(&m, &b(0), &[]),
        Err(Error::Zero { .. })
    ));
    // The singular model y² = x³ + 2x² + x is refused before any local test.
    assert!(matches!(
        ReducedModel::new(b(2), b(1)),
        Err(Error::SingularCurve { .. })
    ));
}

/// Places outside the relevant list never obstruct: for odd good p, every
/// d with `v_p(d)` even is soluble (Hasse–Weil + Hensel, `image` docs).
#[test]
fn spaces_are_soluble_at_places_that_cannot_obstruct() {
    use crate::quartic::locally_soluble;
    for (a, bb) in curves().into_iter().step_by(5) {
        let disc = bb * (a * a - 4 * bb);
        for d in [-6i64, -3, -2, -1, 1, 2, 3, 6] {
            let q = Quartic::two_isogeny_space(&b(d), &b(a), &b(bb)).unwrap();
            for p in [5u64, 7, 11, 13, 17, 19, 23, 1_000_003] {
                if (disc * d) % p as i64 == 0 {
                    continue;
                }
                let pl = Place::Finite(Prime::small(p).unwrap());
                assert!(locally_soluble(&q, &pl, &mut Budget::unlimited())
                    .unwrap()
                    .is_soluble());
            }
        }
    }
}
