//! Rational 3-isogenies of general Weierstrass models (`curve::isogeny3`):
//! detection from ψ₃, Vélu's formulas, the dual, and the model
//! y² = x³ + D(αx + β)².

use isodescent::arith::squarefree_part;
use isodescent::curve::{rational_3_isogenies, Isogeny3, ModelChange};
use isodescent::descent3::{descend_3isogeny, Isogeny3Options};
use isodescent::{Budget, Curve, Point};
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

fn isogenies(e: &Curve) -> Vec<Isogeny3> {
    rational_3_isogenies(e, &mut Budget::unlimited()).expect("detection")
}

/// y² = x³ + D(αx + β)², as a1..a6.
fn flex_curve(d: i64, a: i64, b: i64) -> Option<Curve> {
    Curve::from_ints([0, d * a * a, 0, 2 * d * a * b, d * b * b]).ok()
}

/// Points with integer x in [−bound, bound] on an integral model.
fn small_points(e: &Curve, bound: i64) -> Vec<Point> {
    let c: Vec<BigInt> = e.coefficients().iter().map(|c| c.to_integer()).collect();
    let mut out = Vec::new();
    for x in -bound..=bound {
        let x = BigInt::from(x);
        // y² + (a1x + a3)y − (x³ + a2x² + a4x + a6) = 0.
        let l = &c[0] * &x + &c[2];
        let r = &x * &x * &x + &c[1] * &x * &x + &c[3] * &x + &c[4];
        let disc = &l * &l + BigInt::from(4) * &r;
        if disc.is_negative() {
            continue;
        }
        let s = disc.sqrt();
        if &s * &s != disc {
            continue;
        }
        for sg in [1, -1] {
            let y = BigRational::new(-&l + &s * sg, BigInt::from(2));
            let p = Point::new(BigRational::from_integer(x.clone()), y);
            if e.contains(&p) && !out.contains(&p) {
                out.push(p);
            }
        }
    }
    out
}

/// #E(F_p) by counting (x, y) mod p, for a model whose coefficients have
/// denominators prime to p; None when p divides a denominator or Δ.
fn count_mod(e: &Curve, p: i64) -> Option<i64> {
    let pb = BigInt::from(p);
    let red = |c: &BigRational| -> Option<i64> {
        if (c.denom() % &pb).is_zero() {
            return None;
        }
        let inv = c.denom().modpow(&(&pb - 2), &pb);
        (c.numer() * inv).mod_floor(&pb).to_i64()
    };
    let d = e.discriminant();
    if (d.numer() % &pb).is_zero() || (d.denom() % &pb).is_zero() {
        return None;
    }
    let a: Vec<i64> = e
        .coefficients()
        .iter()
        .map(red)
        .collect::<Option<Vec<_>>>()?;
    let mut n = 1;
    for x in 0..p {
        for y in 0..p {
            let l = (y * y + a[0] * x * y + a[2] * y).rem_euclid(p);
            let r = (x * x * x + a[1] * x * x + a[3] * x + a[4]).rem_euclid(p);
            if l == r {
                n += 1;
            }
        }
    }
    Some(n)
}

/// Every check that a point-level test can make on one isogeny.
fn check_isogeny(e: &Curve, iso: &Isogeny3, pts: &[Point]) {
    let e1 = iso.codomain();
    for p in pts {
        let img = iso.image(p).unwrap();
        assert!(e1.contains(&img), "φ({p}) on {e1}");
        // φ̂∘φ = [3] (Vélu; Washington §12.3, from memory).
        assert_eq!(
            iso.dual_image(&img).unwrap(),
            e.mul(p, &BigInt::from(3)),
            "on {e}"
        );
    }
    // Isogenous curves over F_p have equally many points (Silverman, "The
    // Arithmetic of Elliptic Curves", V, Exercise 5.4 — from memory): an
    // independent check of Vélu's codomain.
    let mut compared = 0;
    for p in [5i64, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43] {
        if let (Some(a), Some(b)) = (count_mod(e, p), count_mod(e1, p)) {
            assert_eq!(a, b, "#E(F_{p}) for {e} and {e1}");
            compared += 1;
        }
    }
    assert!(compared >= 6, "enough good primes for {e}");
    // The model reached by the recorded change.
    let m = iso.model();
    assert_eq!(m.change.apply_to_curve(e), m.curve().unwrap());
    // Cohen–Pazuki (from memory): the isogenous curve has D′ = −3D up to
    // squares.
    let mc = iso.codomain_model();
    assert_eq!(
        mc.d,
        squarefree_part(&(BigInt::from(-3) * &m.d), &mut Budget::unlimited()).unwrap()
    );
    assert_eq!(mc.change.apply_to_curve(e1), mc.curve().unwrap());
    // ψ₃ = 3x⁴ + b₂x³ + 3b₄x² + 3b₆x + b₈ of the given model vanishes at
    // the kernel's x (Silverman, III, Exercise 3.7; b₂..b₈ as in III.1).
    let x = iso.kernel_x();
    let [a1, a2, a3, a4, a6] = e.coefficients().clone();
    let b2 = &a1 * &a1 + q(4) * &a2;
    let b4 = q(2) * &a4 + &a1 * &a3;
    let b6 = &a3 * &a3 + q(4) * &a6;
    let b8 = &a1 * &a1 * &a6 + q(4) * &a2 * &a6 - &a1 * &a3 * &a4 + &a2 * &a3 * &a3 - &a4 * &a4;
    let psi3 = q(3) * x.pow(4) + b2 * x.pow(3) + q(3) * b4 * &x * &x + q(3) * b6 * &x + b8;
    assert!(psi3.is_zero());
}

// The family y² = x³ + (ax + b)²: (0, b) has order 3 (the tangent there,
// y = ax + b, meets the curve only at that point; common practice). The
// detection finds the kernel {O, (0, ±b)} with D = 1 and the normal form
// of (a, b).
#[test]
fn rational_three_torsion_family() {
    let mut tested = 0;
    for a in -6i64..=6 {
        for b in 1i64..=7 {
            let Some(e) = flex_curve(1, a, b) else {
                continue;
            };
            let t = Point::from_ints(0, b);
            assert_eq!(e.order_up_to(&t, 10), Some(3));
            let isos = isogenies(&e);
            let iso = isos
                .iter()
                .find(|i| i.kernel_x().is_zero())
                .expect("the kernel above x = 0");
            assert!(iso.kernel_rational());
            assert_eq!(iso.image(&t).unwrap(), Point::Infinity);
            let m = iso.model();
            // No p with p | a and p³ | b here, so (a, b) is already the
            // normal form, up to the sign that makes β > 0.
            assert_eq!(
                (m.d.clone(), m.alpha.clone(), m.beta.clone()),
                (BigInt::one(), BigInt::from(a), BigInt::from(b))
            );
            let mut pts = small_points(&e, 40);
            pts.push(t);
            check_isogeny(&e, iso, &pts);
            tested += 1;
        }
    }
    assert!(tested > 80);
}

// y² = x³ + D(αx + β)² with D not a square: the kernel points (0, ±β√D)
// are not rational, the isogeny is (Cohen–Pazuki, from memory; common
// practice).
#[test]
fn irrational_kernel_models() {
    let cases = [
        (2, 1, 1),
        (5, 2, 3),
        (-1, 1, 2),
        (-2, 3, 1),
        (3, 1, 5),
        (-5, 4, 7),
        (6, -1, 1),
        (-7, 2, 9),
        (13, 5, 2),
    ];
    let mut checked = 0;
    for (d, a, b) in cases {
        let e = flex_curve(d, a, b).unwrap();
        let isos = isogenies(&e);
        let iso = isos
            .iter()
            .find(|i| i.kernel_x().is_zero())
            .expect("the kernel above x = 0");
        assert!(!iso.kernel_rational());
        let m = iso.model();
        assert_eq!(m.d, BigInt::from(d));
        // β > 0 in the normal form: (α, β) or (−α, −β).
        let s = if b > 0 { 1 } else { -1 };
        assert_eq!(
            (m.alpha.clone(), m.beta.clone()),
            (BigInt::from(s * a), BigInt::from(s * b))
        );
        let pts = small_points(&e, 60);
        checked += pts.len();
        check_isogeny(&e, iso, &pts);
    }
    assert!(checked >= 10, "{checked} points");
}

// A scaled model: y² = x³ + D(αx + β)² with p | α, p³ | β reduces to
// (α/p, β/p³) (the normal form; common practice).
#[test]
fn normal_form_removes_scalings() {
    let e = flex_curve(2, 3 * 5, 7 * 125).unwrap();
    let isos = isogenies(&e);
    let iso = isos.iter().find(|i| i.kernel_x().is_zero()).unwrap();
    let m = iso.model();
    assert_eq!(
        (m.d.clone(), m.alpha.clone(), m.beta.clone()),
        (BigInt::from(2), BigInt::from(3), BigInt::from(7))
    );
    assert_eq!(m.change.u(), &BigRational::new(5.into(), 1.into()));
}

#[path = "common/lcg.rs"]
mod lcg;
use lcg::Lcg;

fn kernels(isos: &[Isogeny3]) -> Vec<(BigInt, BigInt, BigInt)> {
    let mut v: Vec<_> = isos
        .iter()
        .map(|i| {
            let m = i.model();
            (m.d.clone(), m.alpha.clone(), m.beta.clone())
        })
        .collect();
    v.sort();
    v
}

// Model invariance: a change of coordinates moves the kernel but not the
// normal form (D, α, β), and the maps stay exact on the moved model
// (common practice: isomorphic models have the same isogenies).
#[test]
fn model_invariance_under_random_changes() {
    let mut rng = Lcg(20261205);
    let bases = [
        flex_curve(1, 2, 3).unwrap(),
        flex_curve(-3, 1, 4).unwrap(),
        flex_curve(7, -2, 5).unwrap(),
        flex_curve(1, 0, 4).unwrap(),
        "y^2 + y = x^3".parse::<Curve>().unwrap(),
    ];
    for base in &bases {
        let want = kernels(&isogenies(base));
        assert!(!want.is_empty());
        for _ in 0..6 {
            let u = [q(1), q(-1), BigRational::new(1.into(), 2.into()), q(3)]
                [rng.next(1).unsigned_abs() as usize % 4]
                .clone();
            let ch = ModelChange::new(u, q(rng.next(9)), q(rng.next(3)), q(rng.next(9))).unwrap();
            let moved = ch.apply_to_curve(base);
            let isos = isogenies(&moved);
            assert_eq!(kernels(&isos), want, "{moved}");
            for iso in &isos {
                let pts: Vec<Point> = small_points(base, 30)
                    .iter()
                    .map(|p| ch.to_new(p))
                    .collect();
                for p in &pts {
                    let img = iso.image(p).unwrap();
                    assert!(iso.codomain().contains(&img));
                    assert_eq!(
                        iso.dual_image(&img).unwrap(),
                        moved.mul(p, &BigInt::from(3))
                    );
                }
                let m = iso.model();
                assert_eq!(m.change.apply_to_curve(&moved), m.curve().unwrap());
            }
        }
    }
}

fn quick3() -> Isogeny3Options {
    let mut o = Isogeny3Options::default();
    o.search_height = 0;
    o.tamagawa_check = false;
    o.analytic = None;
    o
}

// j = 0: the general path finds the kernel above x = 0 of y² = x³ + k
// with α = 0 and Dβ² = k, the sixth-power-free k of the α = 0 descent
// (`descent3`), on y² + y = x³ and on moved models of y² = x³ + k
// (common practice: Dβ² is y₀² at the kernel).
#[test]
fn j_zero_agrees_with_the_alpha_zero_path() {
    let mut rng = Lcg(7);
    let mut curves: Vec<Curve> = vec!["y^2 + y = x^3".parse().unwrap()];
    for k in [-432i64, 2, -2, 17, 28, -11, 64 * 3, 1, -27 * 4] {
        let base = Curve::from_ints([0, 0, 0, 0, k]).unwrap();
        let ch = ModelChange::new(q(1), q(rng.next(5)), q(rng.next(2)), q(rng.next(5))).unwrap();
        curves.push(ch.apply_to_curve(&base));
    }
    for e in &curves {
        let rep = descend_3isogeny(e, &quick3()).unwrap();
        let isos = isogenies(e);
        let zero: Vec<&Isogeny3> = isos.iter().filter(|i| i.model().alpha.is_zero()).collect();
        assert_eq!(zero.len(), 1, "{e}");
        let m = zero[0].model();
        assert_eq!(&m.d * &m.beta * &m.beta, rep.k, "{e}");
        assert_eq!(m.curve().unwrap(), rep.change.apply_to_curve(e));
        check_isogeny(e, zero[0], &small_points(e, 30));
        // The other kernels of a j = 0 curve: x³ = −4k, rational only when
        // −4k is a cube (ψ₃ = 3x(x³ + 4k)).
        let four_k = BigInt::from(-4) * &rep.k;
        let cube = four_k.cbrt();
        let extra = usize::from(&cube * &cube * &cube == four_k);
        assert_eq!(isos.len(), 1 + extra, "{e}");
    }
}

// No rational 3-isogeny: ψ₃ = 3x⁴ − 6x² + 12x − 1 of y² = x³ − x + 1 has
// no rational root (its candidates ±1, ±1/3 fail; rational root theorem),
// and likewise for y² = x³ + x + 3 (ψ₃ = 3x⁴ + 6x² + 36x − 1).
#[test]
fn curves_without_a_rational_three_isogeny() {
    for e in ["0 0 0 -1 1", "0 0 0 1 3"] {
        let e: Curve = e.parse().unwrap();
        assert!(isogenies(&e).is_empty());
    }
}

// Bad input gets a typed error: a point off the curve.
#[test]
fn points_off_the_curve_are_refused() {
    let e = flex_curve(1, 1, 1).unwrap();
    let iso = &isogenies(&e)[0];
    assert!(iso.image(&Point::from_ints(1, 1)).is_err());
    assert!(iso.dual_image(&Point::from_ints(1, 1)).is_err());
}

// A tiny budget gives a typed budget error, never a panic.
#[test]
fn budgets_give_typed_errors() {
    let e = flex_curve(5, 123456789, 987654321).unwrap();
    let r = rational_3_isogenies(&e, &mut Budget::with_units(1));
    assert!(matches!(
        r,
        Err(isodescent::Error::BudgetExhausted { .. })
            | Err(isodescent::Error::FactorBudgetExhausted { .. })
    ));
    assert_eq!(isogenies(&e).len(), 1);
}

// The α = 0 descent on curves with j ≠ 0 and no point of order 2: a typed
// error that names the case (α ≠ 0, with the model, taken by the general
// descent) or says there is no rational 3-isogeny; the JSON line carries
// the same reason.
#[test]
fn descent_names_the_uncovered_case() {
    use isodescent::descent3::descend_by_isogeny;
    use isodescent::{DescentOptions, Error};
    // y² = x³ + 2(x + 1)²: x³ + 2x² + 4x + 2 has no rational root
    // (candidates ±1, ±2), so no point of order 2.
    let e = flex_curve(2, 1, 1).unwrap();
    match descend_3isogeny(&e, &quick3()) {
        Err(Error::NoSupportedIsogeny { reason }) => {
            assert!(reason.contains("α ≠ 0"), "{reason}");
            assert!(reason.contains("D = 2, α = 1, β = 1"), "{reason}");
        }
        other => panic!("{other:?}"),
    }
    // The dispatcher takes the general descent there.
    assert!(matches!(
        descend_by_isogeny(&e, &DescentOptions::default(), &quick3()),
        Ok(isodescent::descent3::IsogenyDescent::ThreeGeneral(_))
    ));
    // y² = x³ − x + 1: no rational 3-isogeny (see above) and no point of
    // order 2 (x³ − x + 1 has no root ±1).
    let none: Curve = "0 0 0 -1 1".parse().unwrap();
    match descend_3isogeny(&none, &quick3()) {
        Err(Error::NoSupportedIsogeny { reason }) => {
            assert!(reason.contains("no rational 3-isogeny"), "{reason}")
        }
        other => panic!("{other:?}"),
    }
    // The JSON line runs the general descent too, with the same model.
    let line = isodescent::output::json_for_line("0 2 0 4 2", &DescentOptions::default());
    assert!(
        line.contains(r#""isogeny3_general":{"model":{"d":"2","alpha":"1","beta":"1""#),
        "{line}"
    );
    assert!(line.contains(r#""error":null"#), "{line}");
    // A budget of one unit: still the typed error, never a panic.
    let mut tiny = quick3();
    tiny.factor_units = 1;
    assert!(matches!(
        descend_3isogeny(&e, &tiny),
        Err(Error::NoSupportedIsogeny { .. })
    ));
}
