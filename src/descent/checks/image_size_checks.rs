//! The local images `W_v` computed by local solvability against the sizes
//! predicted from Tamagawa numbers and minimal models
//! [Schaefer96, Lemma 3.8], [SchaeferStoll04, Lemma 3.1], and Cassels'
//! formula for the ratio of the two Selmer groups [Cassels65] against the
//! computed Selmer groups. Bounded families here; the full families are in
//! `src/descent/checks/image_size_families.rs` (ignored by default).

use super::{b, primes_of_2n, rm, rmb};
use crate::arith::factor_u64;
use crate::curve::ReducedModel;
use crate::curve::{Curve, Point, TwoIsogeny};
use crate::descent::{descend_isogeny, DescentOptions};
use crate::local::{valuation_rational, Place, Prime};
use crate::quartic::local_image;
use crate::selmer::image_size::{
    check_local_images, images_match_prediction, local_images_agree, padic_count_terms,
    predicted_local_image_size, real_count_terms, real_sign_rule, selmer_difference_from_images,
    selmer_difference_from_tamagawa, DUAL_LEADING_COEFFICIENT, ISOGENY_LEADING_COEFFICIENT,
};
use crate::{Budget, Error};
use num_rational::BigRational;

/// Checks E = (a, b) and E′ = (−2a, a² − 4b) at R and every prime of
/// 2b(a² − 4b); returns the number of (curve, place) pairs compared.
fn check_both_sides(a: i64, bb: i64) -> usize {
    let d = a * a - 4 * bb;
    let primes = primes_of_2n(&[bb, d]);
    let mut pairs = 0;
    for (ca, cb) in [(a, bb), (-2 * a, d)] {
        let rows = check_local_images(&rm(ca, cb), &primes, &mut Budget::unlimited()).unwrap();
        for (v, predicted, computed) in rows {
            assert_eq!(
                predicted, computed,
                "y² = x³ + {ca}x² + {cb}x at {v}: predicted {predicted}, computed {computed}"
            );
            pairs += 1;
        }
    }
    pairs
}

/// z = −x/y of an affine point.
fn z_of(p: &Point) -> BigRational {
    let (x, y) = (p.x().unwrap(), p.y().unwrap());
    -(x / y)
}

/// On points R of E′(Q) in the p-adic formal group (v_p(X) < 0), the ratio
/// z(ψR)/z(R) agrees with ψ′(0) = −2 to order ≥ 2·v_p(z(R)): ψ*(z) is an
/// odd power series, −2z + O(z³) (module docs of `selmer::image_size`;
/// the series for φ likewise, with φ′(0) = −1). Points (checked by hand):
/// P = (−4, 6) on y² = x³ − 25x (−64 + 100 = 36) and P = (1, 2) on
/// y² = x³ + x² + 2x (1 + 1 + 2 = 4); Q = φ(P) on E′.
#[test]
fn the_leading_coefficients_of_phi_and_its_dual_are_minus_one_and_minus_two() {
    assert_eq!(ISOGENY_LEADING_COEFFICIENT * DUAL_LEADING_COEFFICIENT, 2);
    let cases = [(0i64, -25i64, (-4i64, 6i64)), (1, 2, (1, 2))];
    for (a, bb, (px, py)) in cases {
        let iso = ReducedModel::new(b(a), b(bb))
            .and_then(|m| TwoIsogeny::from_reduced(&m))
            .unwrap();
        let e = iso.domain().clone();
        let e2 = iso.codomain().clone();
        let p = Point::from_ints(px, py);
        assert!(e.contains(&p));
        let q = iso.image(&p);
        assert!(e2.contains(&q));
        for prime in [2u64, 3, 5, 7] {
            let pr = Prime::small(prime).unwrap();
            let mut seen = 0;
            for m in 1..=12i64 {
                // ψ on E′, near O p-adically.
                for (curve, point, lam, map) in [
                    (&e2, &q, DUAL_LEADING_COEFFICIENT, 0u8),
                    (&e, &p, ISOGENY_LEADING_COEFFICIENT, 1u8),
                ] {
                    let r = curve.mul_i64(point, m);
                    let Some(x) = r.x() else { continue };
                    if valuation_rational(x, &pr).unwrap() >= 0 {
                        continue;
                    }
                    let image = if map == 0 {
                        iso.dual_image(&r)
                    } else {
                        iso.image(&r)
                    };
                    let zr = z_of(&r);
                    let vz = valuation_rational(&zr, &pr).unwrap();
                    assert!(vz >= 1);
                    let ratio = z_of(&image) / &zr;
                    let diff = &ratio - BigRational::from_integer(b(lam));
                    let vd = valuation_rational(&diff, &pr).unwrap_or(i64::MAX);
                    assert!(
                        vd >= 2 * vz,
                        "a={a} b={bb} p={prime} m={m}: v(ratio − {lam}) = {vd} < 2·{vz}"
                    );
                    seen += 1;
                }
            }
            assert!(
                seen > 0,
                "no point in the formal group at {prime} for a={a} b={bb}"
            );
        }
    }
}

/// With z′ = u·z on a minimal model (`x = u²x′ + r`), ψ′(0) on minimal
/// models is −2·u_E/u_E′ (module docs). The correction term k_E − k_E′
/// must be non-zero somewhere in the box at 2, and the prediction still
/// agree there; without it those cases would be off by a factor 2^{±1}.
#[test]
fn the_change_to_minimal_models_matters_at_two_and_is_accounted_for() {
    let mut corrected = 0;
    for a in -15i64..=15 {
        for bb in -15i64..=15 {
            if bb == 0 || a * a == 4 * bb {
                continue;
            }
            let t = padic_count_terms(&rm(a, bb), &Prime::two()).unwrap();
            if t.scaling != t.scaling_dual {
                corrected += 1;
                let w = local_image(
                    &rm(a, bb),
                    &Place::Finite(Prime::two()),
                    &mut Budget::unlimited(),
                )
                .unwrap();
                assert_eq!(t.size().unwrap(), 1 << w.dimension, "a={a} b={bb}: {t:?}");
            }
        }
    }
    assert!(corrected > 0);
}

/// At odd p the given models of E and E′ are minimal or not together, so
/// k_E = k_E′ (module docs).
#[test]
fn at_odd_primes_both_models_need_the_same_scaling() {
    for (a, bb) in [
        (0i64, -81 * 81),
        (9, 81),
        (18, 81 * 2),
        (0, 3),
        (25, 625),
        (-50, 5 * 625),
    ] {
        for p in [3u64, 5] {
            let t = padic_count_terms(&rm(a, bb), &Prime::small(p).unwrap()).unwrap();
            assert_eq!(t.scaling, t.scaling_dual, "a={a} b={bb} p={p}");
            assert_eq!(t.leading_valuation, 0);
        }
    }
    // Non-minimal at 3 on both sides: y² = x³ + 9x² + 81x is
    // y² = x³ + x² + x scaled by u = 3.
    let t = padic_count_terms(&rm(9, 81), &Prime::small(3).unwrap()).unwrap();
    assert_eq!((t.scaling, t.scaling_dual), (1, 1));
}

/// The real count from components agrees with the elementary sign rule
/// and with the real local image from Sturm sequences.
#[test]
fn the_real_count_from_components_is_the_sign_rule_and_the_real_image() {
    for a in -12i64..=12 {
        for bb in -40i64..=40 {
            if bb == 0 || a * a == 4 * bb {
                continue;
            }
            let t = real_count_terms(&rm(a, bb)).unwrap();
            let by_rule = if real_sign_rule(&rm(a, bb)).unwrap() {
                2
            } else {
                1
            };
            assert_eq!(t.size().unwrap(), by_rule, "a={a} b={bb}: {t:?}");
            let w = local_image(&rm(a, bb), &Place::Real, &mut Budget::unlimited()).unwrap();
            assert_eq!(1u64 << w.dimension, by_rule, "a={a} b={bb}");
        }
    }
}

/// |W_v(E)|·|W_v(E′)| = 2 at R, 4 at odd p, 8 at 2: from the exact
/// sequence of the two isogenies and |E(K)/2E(K)| = |E(K)[2]|·|2|_K^{−1}
/// [Schaefer96, Lemma 3.8]; here checked on the predictions alone (the
/// Tamagawa numbers cancel: c(E″) = c(E) since E″ ≅ E).
#[test]
fn predicted_sizes_on_the_two_sides_multiply_to_two_four_or_eight() {
    let places = [
        Place::Real,
        Place::Finite(Prime::two()),
        Place::Finite(Prime::small(3).unwrap()),
        Place::Finite(Prime::small(5).unwrap()),
        Place::Finite(Prime::small(7).unwrap()),
    ];
    for a in -15i64..=15 {
        for bb in -15i64..=15 {
            if bb == 0 || a * a == 4 * bb {
                continue;
            }
            for v in &places {
                let s1 = predicted_local_image_size(&rm(a, bb), v).unwrap();
                let s2 = predicted_local_image_size(&rm(-2 * a, a * a - 4 * bb), v).unwrap();
                let want = match v {
                    Place::Real => 2,
                    Place::Finite(p) if p.is_two() => 8,
                    _ => 4,
                };
                assert_eq!(s1 * s2, want, "a={a} b={bb} at {v}");
            }
        }
    }
}

/// At an odd prime of good reduction W_p = {1, u}: size 2
/// [Silverman09, X.4.1] and the image has order |E′(Q_p)[ψ]| = 2.
#[test]
fn good_odd_primes_predict_two() {
    for (a, bb) in [(0i64, -1i64), (3, 1), (-5, 7), (1, 2)] {
        for p in [101u64, 103, 1009] {
            let v = Place::Finite(Prime::small(p).unwrap());
            assert_eq!(predicted_local_image_size(&rm(a, bb), &v).unwrap(), 2);
        }
    }
}

/// Every bad place of every y² = x³ + ax² + bx with |a|, |b| ≤ 15 and of
/// its isogenous E′ (the full box |a|, |b| ≤ 50 runs in the ignored
/// family test).
#[test]
fn predicted_sizes_match_local_solvability_for_the_box_of_radius_fifteen() {
    let mut pairs = 0;
    for a in -15i64..=15 {
        for bb in -15i64..=15 {
            if bb != 0 && a * a != 4 * bb {
                pairs += check_both_sides(a, bb);
            }
        }
    }
    assert!(pairs > 5000, "{pairs}");
}

/// The congruent-number curves y² = x³ − n²x, square-free n ≤ 300, and
/// their isogenous curves y² = x³ + 4n²x.
#[test]
fn predicted_sizes_match_local_solvability_for_congruent_number_curves_up_to_300() {
    let mut pairs = 0;
    for n in 1i64..=300 {
        if factor_u64(n as u64).iter().any(|&(_, e)| e > 1) {
            continue;
        }
        pairs += check_both_sides(0, -n * n);
    }
    assert!(pairs > 1000, "{pairs}");
}

/// The debug helper sees a wrong image size: a local image whose
/// dimension has been altered no longer matches.
#[test]
fn a_local_image_of_the_wrong_size_is_caught() {
    let (a, bb) = (b(0), b(-25));
    let mut images: Vec<_> = [
        Place::Real,
        Place::Finite(Prime::two()),
        Place::Finite(Prime::small(5).unwrap()),
    ]
    .iter()
    .map(|v| local_image(&rmb(&a, &bb), v, &mut Budget::unlimited()).unwrap())
    .collect();
    assert!(images_match_prediction(&rmb(&a, &bb), &images));
    let primes = primes_of_2n(&[25]);
    assert!(local_images_agree(&rmb(&a, &bb), &primes, &mut Budget::unlimited()).unwrap());
    images[1].dimension -= 1;
    assert!(!images_match_prediction(&rmb(&a, &bb), &images));
}

#[test]
fn singular_models_are_typed_errors() {
    // Singular pairs cannot reach these functions: the checked model
    // refuses them with a typed error.
    for (a, bb) in [(0i64, 0i64), (2, 1), (-4, 4), (5, 0)] {
        let e = ReducedModel::new(b(a), b(bb)).unwrap_err();
        assert!(matches!(e, Error::SingularCurve { .. }), "{e:?}");
    }
    let e = crate::selmer::image_size::odd_prime_count(&rm(0, -1), &Prime::two()).unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }));
}

/// Cassels' formula [Cassels65] (also the Greenberg–Wiles formula
/// [Wiles95, Prop. 1.6], from memory):
/// dim Sel^φ(E) − dim Sel^ψ(E′) = Σ_v (dim W_v(E′) − 1), with the
/// codomain side of the descent holding Sel^φ(E) (local conditions
/// W_v(E′)) and the domain side Sel^ψ(E′). Checked against the computed
/// Selmer groups, from the computed local images and from Tamagawa
/// numbers alone.
fn check_cassels(a: i64, bb: i64) {
    let curve = Curve::from_ints([0, a, 0, bb, 0]).unwrap();
    let t = Point::from_ints(0, 0);
    let d = descend_isogeny(
        &curve,
        &t,
        &DescentOptions::default().local_conditions_only(),
    )
    .unwrap();
    let diff = d.codomain().dimension() as i64 - d.domain().dimension() as i64;
    assert_eq!(
        selmer_difference_from_images(d.codomain().local_images()),
        diff,
        "a={a} b={bb}"
    );
    let primes: Vec<Prime> = d
        .codomain()
        .local_images()
        .iter()
        .filter_map(|w| match &w.place {
            Place::Finite(p) => Some(p.clone()),
            Place::Real => None,
        })
        .collect();
    assert_eq!(
        selmer_difference_from_tamagawa(&rmb(d.domain().a(), d.domain().b()), &primes).unwrap(),
        diff,
        "a={a} b={bb}"
    );
}

#[test]
fn cassels_formula_gives_the_difference_of_the_selmer_dimensions_for_a_small_box() {
    for a in -8i64..=8 {
        for bb in -8i64..=8 {
            if bb != 0 && a * a != 4 * bb {
                check_cassels(a, bb);
            }
        }
    }
}

#[test]
fn cassels_formula_holds_for_congruent_number_curves_up_to_100() {
    for n in 1i64..=100 {
        if factor_u64(n as u64).iter().all(|&(_, e)| e == 1) {
            check_cassels(0, -n * n);
        }
    }
}

/// y² = x³ − x, worked by hand from the module's formulas: the codomain
/// side y² = x³ + 4x has |W_R| = 1 (b > 0, a = 0: sign rule) and
/// |W_2| = 2·c_2(E′)/c_2(E″)·2^{1 + k_E′ − k_E″} = 2·4/2·2^{1+0−1} = 4
/// (Tate's algorithm: c_2 = 4 for y² = x³ + 4x, c_2 = 2 for
/// y² = x³ − 16x, which needs u = 2); so the two Selmer groups have equal
/// dimension, and the descent must agree.
#[test]
fn cassels_formula_on_y2_equals_x3_minus_x() {
    let t = padic_count_terms(&rm(0, 4), &Prime::two()).unwrap();
    assert_eq!(
        (t.tamagawa, t.tamagawa_dual, t.scaling, t.scaling_dual),
        (4, 2, 0, 1)
    );
    assert_eq!(t.size().unwrap(), 4);
    assert_eq!(
        predicted_local_image_size(&rm(0, 4), &Place::Real).unwrap(),
        1
    );
    assert_eq!(
        selmer_difference_from_tamagawa(&rm(0, -1), &[Prime::two()]).unwrap(),
        0
    );
    let d = descend_isogeny(
        &Curve::from_ints([0, 0, 0, -1, 0]).unwrap(),
        &Point::from_ints(0, 0),
        &DescentOptions::default().local_conditions_only(),
    )
    .unwrap();
    assert_eq!(d.domain().dimension(), d.codomain().dimension());
}

/// Models that are not minimal at an odd prime (`(a·p², b·p⁴)`, both E and
/// E′ then need `u = p`) and quadratic twists `(a·d, b·d²)` (additive
/// reduction of types I0*, I_n* at the odd primes of d) — cases the small
/// box misses, since there |b| < 3⁴.
#[test]
fn predicted_sizes_match_for_scaled_models_and_quadratic_twists() {
    let mut pairs = 0;
    let mut scaled = 0;
    for a in -4i64..=4 {
        for bb in -6i64..=6 {
            if bb == 0 || a * a == 4 * bb {
                continue;
            }
            for p in [3i64, 5] {
                let (sa, sb) = (a * p * p, bb * p.pow(4));
                let t = padic_count_terms(&rm(sa, sb), &Prime::small(p as u64).unwrap()).unwrap();
                if t.scaling >= 1 {
                    scaled += 1;
                }
                pairs += check_both_sides(sa, sb);
            }
            for d in [3i64, -5, 7, 15, -21] {
                pairs += check_both_sides(a * d, bb * d * d);
            }
        }
    }
    assert!(scaled > 100, "{scaled}");
    assert!(pairs > 3000, "{pairs}");
}

/// A prime far beyond any table: y² = x³ + x² − p·x with p = 1 000 003
/// (a prime, checked by `Prime::small`), multiplicative at p.
#[test]
fn predicted_sizes_match_at_a_large_prime() {
    let p = 1_000_003i64;
    for (a, bb) in [(1i64, -p), (0, p), (2, 3 * p), (-1, -7 * p)] {
        assert!(Prime::small(p as u64).is_ok());
        check_both_sides(a, bb);
    }
}
