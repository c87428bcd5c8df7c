//! Rank two on congruent-number curves y² = x³ − n²x whose descent leaves
//! the bounds at [1, 2] (or [0, 2]) with the root number +1: the deep
//! search, aimed at the rank the parity gives, finds the missing points
//! and the rank becomes proven by the descent.
//!
//! The outside checks are computed here, independently of the crate:
//! * Tunnell's counts (Tunnell, Invent. Math. 72 (1983), 323–334;
//!   `tests/common`): A_n = 2B_n, i.e. L(E_n, 1) = 0, as rank 2 needs;
//! * the points lie on the curve (exact rational arithmetic);
//! * independence by the complete 2-descent map of a curve with full
//!   2-torsion, P ↦ (x − e₁, x − e₂) in (Q*/Q*²)², which is an injective
//!   homomorphism on E(Q)/2E(Q) (Silverman, The Arithmetic of Elliptic
//!   Curves, 2nd ed., Prop. X.1.4), evaluated with integer square tests
//!   only: images of the two points and of the 2-torsion spanning a
//!   space of dimension 4 give dim E(Q)/2E(Q) ≥ 4, so rank ≥ 2.

mod common;

use isodescent::curve::{Curve, Point};
use isodescent::descent::{descend, DescentOptions, PointOrigin, RankProof};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, Zero};

/// True iff the rational q > 0 is a square of a rational.
fn is_rational_square(q: &BigRational) -> bool {
    if !q.is_positive() {
        return false;
    }
    let sq = |n: &BigInt| {
        let r = n.sqrt();
        &r * &r == *n
    };
    sq(q.numer()) && sq(q.denom())
}

/// The image of P under the 2-descent map of y² = x(x − n)(x + n) with
/// e₁ = 0, e₂ = n (Silverman, Prop. X.1.4: at x = eᵢ the component is the
/// product of the other two factors).
fn descent_image(p: &Point, n: i64) -> (BigRational, BigRational) {
    let nq = BigRational::from_integer(BigInt::from(n));
    match p {
        Point::Infinity => (
            BigRational::from_integer(1.into()),
            BigRational::from_integer(1.into()),
        ),
        Point::Affine { x, .. } => {
            let first = if x.is_zero() {
                (x - &nq) * (x + &nq)
            } else {
                x.clone()
            };
            let second = if *x == nq { x * (x + &nq) } else { x - &nq };
            (first, second)
        }
    }
}

/// Dimension over F₂ of the span of the images (each a pair of non-zero
/// rationals modulo squares), by testing every non-empty subset product.
fn span_dimension(images: &[(BigRational, BigRational)]) -> usize {
    let k = images.len();
    let mut zero_combinations = 0usize;
    for mask in 1u32..(1 << k) {
        let mut a = BigRational::from_integer(1.into());
        let mut b = BigRational::from_integer(1.into());
        for (i, (u, v)) in images.iter().enumerate() {
            if mask >> i & 1 == 1 {
                a *= u;
                b *= v;
            }
        }
        if is_rational_square(&a) && is_rational_square(&b) {
            zero_combinations += 1;
        }
    }
    // The kernel of F₂^k → span has 2^(k − dim) elements, the zero
    // combination included.
    let kernel = zero_combinations + 1;
    k - kernel.trailing_zeros() as usize
}

fn check_rank_two(n: i64, descent_lower: usize) {
    assert!(common::squarefree(n));
    // L(E_n, 1) = 0 by Tunnell's criterion.
    assert!(common::tunnell_equality(n), "n = {n}");
    let e = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
    // Premise: the descent alone leaves the rank open.
    let alone = descend(&e, &DescentOptions::default().descent_only()).unwrap();
    assert_eq!(
        (alone.rank_bounds().lower(), alone.rank_bounds().upper()),
        (descent_lower, 2),
        "n = {n}"
    );
    let r = descend(&e, &DescentOptions::default()).unwrap();
    assert!(r.completion().is_complete(), "n = {n}");
    assert_eq!(
        r.analytic().and_then(|a| a.root_number()),
        Some(1),
        "n = {n}"
    );
    assert_eq!(
        (r.rank_bounds().lower(), r.rank_bounds().upper()),
        (2, 2),
        "n = {n}"
    );
    assert_eq!(r.rank_settled_by(), Some(RankProof::Descent), "n = {n}");
    assert_eq!(r.points_origin(), &PointOrigin::DeepSearch, "n = {n}");
    assert!(
        r.generators().is_some(),
        "n = {n}: saturation did not prove generation"
    );
    let points = r.points();
    assert_eq!(points.len(), 2);
    assert!(points.iter().all(|p| e.contains(p)), "n = {n}");
    let mut images: Vec<_> = points.iter().map(|p| descent_image(p, n)).collect();
    let zero = BigRational::zero();
    let nq = BigRational::from_integer(BigInt::from(n));
    images.push(descent_image(&Point::new(zero.clone(), zero.clone()), n));
    images.push(descent_image(&Point::new(nq, zero), n));
    assert_eq!(span_dimension(&images), 4, "n = {n}");
}

#[test]
fn the_two_descent_map_sees_torsion_only_for_a_rank_zero_curve() {
    // Control of the independent check: n = 1 has rank 0 (Fermat, from
    // memory; Silverman, AEC X.6), E(Q) = E[2], and the images of the
    // 2-torsion span a plane.
    let zero = BigRational::zero();
    let one = BigRational::from_integer(1.into());
    let images = vec![
        descent_image(&Point::new(zero.clone(), zero.clone()), 1),
        descent_image(&Point::new(one, zero), 1),
    ];
    assert_eq!(span_dimension(&images), 2);
    // ... and a repeated image adds nothing.
    let mut twice = images.clone();
    twice.push(images[0].clone());
    assert_eq!(span_dimension(&twice), 2);
    assert!(!common::tunnell_equality(1));
}

#[test]
fn rank_two_found_at_the_default_rounds() {
    // n = 1858 and 3001: one point from the descent, the second from the
    // deep search at covering height ≤ 4096 (docs/deep_search.md).
    for n in [1858, 3001] {
        check_rank_two(n, 1);
    }
}

#[test]
fn rank_two_with_both_points_missing() {
    // n = 9257: the descent finds no point at all, bounds [0, 2].
    check_rank_two(9257, 0);
}

#[test]
fn rank_two_found_in_a_round_sized_by_the_predicted_regulator() {
    // n = 9841: the second generator has ĥ ≈ 77 by the predicted
    // regulator L''(E,1)/2·|T|²/(Ω·∏c_p) over ĥ of the known point; the
    // default rounds (to 4096) miss it, the sized round (to about 10⁴)
    // finds it.
    check_rank_two(9841, 1);
}
