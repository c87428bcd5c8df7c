//! Properties of the canonical height that hold by theorem, checked on
//! thousands of random points (multiples and sums of known points on
//! curves with small coefficients).

use isodescent::arith::Certified;
use isodescent::curve::{torsion, Curve, Point};
use isodescent::height::{difference_bounds, naive_height, HeightContext};
use isodescent::Budget;
use num_bigint::BigInt;
use proptest::prelude::*;
use std::sync::OnceLock;

/// Curves with points on them (checked here by `contains`): among them
/// y² + y = x³ − x, y² + y = x³ + x² − 2x and y² + y = x³ − 7x + 6 with
/// the points whose regulator `tests/data/curve_values.txt` computes
/// (non-zero, so they are independent). Independence is not needed for
/// the identities below.
/// Coefficients `[a1, a2, a3, a4, a6]` and integral points.
type CurveWithPoints = ([i64; 5], &'static [(i64, i64)]);

const CURVES: &[CurveWithPoints] = &[
    ([0, 0, 1, -1, 0], &[(0, 0)]),
    ([0, 1, 1, -2, 0], &[(-1, 1), (0, 0)]),
    ([0, 0, 1, -7, 6], &[(0, 2), (1, 0), (2, 0)]),
    ([0, 0, 0, -36, 0], &[(-3, 9)]),
    ([0, 0, 0, -25, 0], &[(-4, 6)]),
    ([0, 0, 0, 0, -2], &[(3, 5)]),
    ([0, 1, 0, -4, 0], &[(-1, 2)]),
    ([0, -1, 1, -10, -20], &[(5, 5)]),
];

struct Data {
    curve: Curve,
    ctx: HeightContext,
    gens: Vec<Point>,
    torsion: Vec<Point>,
}

fn data() -> &'static Vec<Data> {
    static D: OnceLock<Vec<Data>> = OnceLock::new();
    D.get_or_init(|| {
        CURVES
            .iter()
            .map(|(a, g)| {
                let curve = Curve::from_ints(*a).unwrap();
                let gens: Vec<Point> = g.iter().map(|&(x, y)| Point::from_ints(x, y)).collect();
                for p in &gens {
                    assert!(curve.contains(p), "{a:?} {p}");
                }
                let ctx = HeightContext::new(&curve, &mut Budget::unlimited()).unwrap();
                let torsion = torsion(&curve).points().to_vec();
                Data {
                    curve,
                    ctx,
                    gens,
                    torsion,
                }
            })
            .collect()
    })
}

fn point(d: &Data, coeffs: &[i64], t: usize) -> Point {
    let c: Vec<BigInt> = coeffs
        .iter()
        .take(d.gens.len())
        .map(|&v| BigInt::from(v))
        .collect();
    let p = d.ctx.combination(&d.gens[..c.len()], &c).unwrap();
    d.curve.add(&p, &d.torsion[t % d.torsion.len()])
}

fn h(d: &Data, p: &Point) -> Certified {
    let v = d.ctx.height(p).unwrap();
    // The default target 1e-12, relaxed by the f64 resolution of the
    // value itself for the huge multiples (ĥ up to ~2000).
    assert!(
        v.error() <= 1e-12 + 4e-15 * v.value().abs(),
        "error bound {v} too loose for {p}"
    );
    v
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

fn coeffs() -> impl Strategy<Value = Vec<i64>> {
    proptest::collection::vec(-5i64..=5, 3)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 600, .. ProptestConfig::default() })]

    // ĥ(nP) = n²ĥ(P): Silverman, AEC 2nd ed., Theorem VIII.9.3(b).
    #[test]
    fn height_of_a_multiple_is_n_squared_times_the_height(
        k in 0usize..CURVES.len(), c in coeffs(), t in 0usize..8, n in -7i64..=7
    ) {
        let d = &data()[k];
        let p = point(d, &c, t);
        let np = d.ctx.multiple(&p, &BigInt::from(n)).unwrap();
        prop_assert_eq!(&np, &d.curve.mul(&p, &BigInt::from(n)));
        let (hp, hn) = (h(d, &p), h(d, &np));
        let n2 = (n * n) as f64;
        prop_assert!(close(hn.value(), n2 * hp.value(), hn.error() + n2 * hp.error()),
            "ĥ({n}P) = {hn}, n²ĥ(P) = {}", n2 * hp.value());
    }

    // Parallelogram law ĥ(P+Q) + ĥ(P−Q) = 2ĥ(P) + 2ĥ(Q): Silverman, AEC 2nd
    // ed., Theorem VIII.9.3(a).
    #[test]
    fn parallelogram_law(
        k in 0usize..CURVES.len(), c1 in coeffs(), c2 in coeffs(), t1 in 0usize..8, t2 in 0usize..8
    ) {
        let d = &data()[k];
        let p = point(d, &c1, t1);
        let q = point(d, &c2, t2);
        let s = h(d, &d.curve.add(&p, &q));
        let m = h(d, &d.curve.add(&p, &d.curve.neg(&q)));
        let (hp, hq) = (h(d, &p), h(d, &q));
        let lhs = s.value() + m.value();
        let rhs = 2.0 * hp.value() + 2.0 * hq.value();
        prop_assert!(close(lhs, rhs, s.error() + m.error() + 2.0 * (hp.error() + hq.error())),
            "{lhs} vs {rhs}");
    }

    // ĥ is the quadratic form of the height pairing: ĥ(Σcᵢgᵢ) = cᵀMc with
    // M = (⟨gᵢ, gⱼ⟩) (bilinearity; Silverman, AEC 2nd ed., VIII.9.3(c)),
    // and ĥ(P + T) = ĥ(P) for torsion T (VIII.9.3(e)).
    #[test]
    fn height_is_the_quadratic_form_of_the_pairing(
        k in 0usize..CURVES.len(), c in coeffs(), t in 0usize..8
    ) {
        let d = &data()[k];
        let r = d.gens.len();
        let m = d.ctx.pairing_matrix(&d.gens).unwrap();
        let p = point(d, &c, t);
        let hp = h(d, &p);
        let mut q = 0.0;
        let mut err = hp.error();
        for i in 0..r {
            for j in 0..r {
                let cij = (c[i] * c[j]) as f64;
                q += cij * m[i][j].value();
                err += cij.abs() * m[i][j].error();
            }
        }
        prop_assert!(close(hp.value(), q, err), "ĥ = {hp}, cᵀMc = {q}");
    }

    // The naive and canonical heights differ by at most the proven bounds
    // of naive_vs_canonical::difference_bounds (on the minimal model).
    #[test]
    fn naive_and_canonical_heights_differ_by_at_most_the_bounds(
        k in 0usize..CURVES.len(), c in coeffs(), t in 0usize..8
    ) {
        let d = &data()[k];
        let b = difference_bounds(&d.ctx);
        let p = point(d, &c, t);
        let hp = h(d, &p);
        let nh = naive_height(&d.ctx.to_minimal().to_new(&p));
        prop_assert!(nh.value() - hp.value() <= b.naive_minus_canonical + hp.error() + nh.error());
        prop_assert!(hp.value() - nh.value() <= b.canonical_minus_naive + hp.error() + nh.error());
    }
}

/// ĥ(T) = 0 for every torsion point (Silverman, AEC 2nd ed., Theorem
/// VIII.9.3(e)), on curves with torsion Z/5 (y² + y = x³ − x² − 10x − 20), Z/2 × Z/2, Z/4, Z/2.
#[test]
fn torsion_points_have_height_zero() {
    let mut seen = 0;
    for d in data() {
        for t in &d.torsion {
            let v = d.ctx.height(t).unwrap();
            assert!(v.contains(0.0), "{} on {}: {v}", t, d.curve);
            seen += 1;
        }
    }
    assert!(seen >= 15, "only {seen} torsion points");
}

/// The definition ĥ(P) = lim h(x(2ⁿP))/4ⁿ (Silverman, AEC 2nd ed.,
/// Proposition VIII.9.1), computed a second way with exact arithmetic:
/// |ĥ(P) − h(2ⁿP)/4ⁿ| ≤ max(bounds)/4ⁿ for n ≤ 7 (points with up to ~10⁴
/// digits at n = 7).
#[test]
fn the_limit_definition_agrees_with_the_local_height_sum() {
    for d in data() {
        let b = difference_bounds(&d.ctx);
        let bmax = b.naive_minus_canonical.max(b.canonical_minus_naive);
        for (i, g) in d.gens.iter().enumerate() {
            let p = d.curve.add(g, &d.torsion[i % d.torsion.len()]);
            let hp = d.ctx.height(&p).unwrap();
            for n in 0..=7u32 {
                let q = d.ctx.multiple(&p, &BigInt::from(1u64 << n)).unwrap();
                let nh = naive_height(&d.ctx.to_minimal().to_new(&q));
                let scale = 4f64.powi(n as i32);
                let approx = nh.value() / scale;
                let tol = bmax / scale + hp.error() + nh.error() / scale;
                assert!(
                    close(approx, hp.value(), tol),
                    "{} P={p} n={n}: {approx} vs {hp} (tol {tol})",
                    d.curve
                );
            }
        }
    }
}
