//! Descent via 3-isogeny on Mordell curves y² = x³ + k for every k: the
//! kernel {O, (0, ±√k)} is defined over K = Q(√D), D the square-free part
//! of k, and the groups live in quadratic fields with class groups and
//! (for D > 0) fundamental units.

use isodescent::curve::ModelChange;
use isodescent::descent3::{
    descend_3isogeny, descend_by_isogeny, ElementOrigin, Generator3, Isogeny3Options,
    Isogeny3Report, IsogenyDescent, SideField,
};
use isodescent::{Curve, DescentOptions, Error};
use num_rational::BigRational;

fn quick() -> Isogeny3Options {
    let mut o = Isogeny3Options::default();
    o.analytic = None;
    o
}

fn mordell(k: i64) -> Curve {
    format!("0 0 0 0 {k}").parse().unwrap()
}

fn run(e: &Curve, o: &Isogeny3Options) -> Isogeny3Report {
    descend_3isogeny(e, o).unwrap_or_else(|err| panic!("{e}: {err}"))
}

// Cassels' formula for an isogeny of odd degree (Cassels, "Arithmetic on
// curves of genus 1, VIII", J. reine angew. Math. 217 (1965); Schaefer–
// Stoll, Trans. AMS 356 (2004), Lemma 3.8 — from memory) ties the two
// Selmer groups to Tamagawa numbers from Tate's algorithm, an independent
// computation. It must hold on every curve, including those whose fields
// have 3-torsion in the class group or a fundamental unit.
#[test]
fn cassels_ratio_holds_for_every_small_k() {
    let mut count = 0;
    let mut with_class_group = 0;
    let mut with_unit = 0;
    for k in -300i64..=300 {
        if k == 0 {
            continue;
        }
        let r = run(&mordell(k), &quick());
        let t = r.tamagawa.as_ref().expect("Tamagawa check computed");
        assert!(t.holds(), "k = {k}: {} vs {}", t.selmer_ratio, t.formula);
        assert!(r.rank_lower <= r.rank_upper);
        r.recheck().unwrap_or_else(|e| panic!("k = {k}: {e}"));
        for side in &r.sides {
            for g in &side.generators {
                if let Generator3::Element { origin, .. } = g {
                    match origin {
                        ElementOrigin::ClassGroup => with_class_group += 1,
                        ElementOrigin::FundamentalUnit => with_unit += 1,
                        _ => {}
                    }
                }
            }
        }
        count += 1;
    }
    assert_eq!(count, 600);
    assert!(with_class_group > 10 && with_unit > 100);
}

// y² = x³ + 1 has rank 0 (Euler; its points are (−1, 0), (0, ±1),
// (2, ±3)), y² = x³ − 2 has rank 1 (Fermat's point (3, 5)), y² = x³ + 17
// has rank 2 (Nagell's integral points, e.g. (−2, 3) and (−1, 4)) — all
// from memory. With the analytic side on, the rank is settled.
#[test]
fn classical_mordell_curves() {
    let o = Isogeny3Options::default();
    for (k, rank) in [(1i64, 0usize), (-2, 1), (17, 2)] {
        let r = run(&mordell(k), &o);
        assert_eq!(r.rank.map(|x| x.0), Some(rank), "k = {k}\n{r}");
        assert_eq!(r.rank_lower, rank, "k = {k}: generators found\n{r}");
        r.recheck().unwrap();
    }
    // Fermat's point lies among the points found, up to multiples: at least
    // one point with x = 3 or a point whose multiple is it is not asked;
    // the points found lie on the curve.
    let r = run(&mordell(-2), &o);
    assert!(r.points.iter().all(|p| r.curve.contains(p)) && !r.points.is_empty());
}

// Isomorphic models (y² = x³ + u⁶k, and a model moved by a change of
// coordinates) and the isogenous curve y² = x³ − 27k give the same rank
// bounds; the Selmer groups of the isogenous curve are those of k with
// the sides exchanged (common practice).
#[test]
fn model_and_isogeny_invariance() {
    let q = |n: i64| BigRational::from_integer(n.into());
    for k in [-26i64, -23, -11, 15, 17, 79, -89, 113, 229] {
        let base = run(&mordell(k), &quick());
        let scaled = run(&mordell(k * 64), &quick());
        let moved_curve = ModelChange::new(q(2), q(3), q(-1), q(5))
            .unwrap()
            .apply_to_curve(&mordell(k));
        let moved = run(&moved_curve, &quick());
        let dual = run(&mordell(-27 * k), &quick());
        let dims = |r: &Isogeny3Report| (r.sides[0].selmer_dim(), r.sides[1].selmer_dim());
        assert_eq!(dims(&base), dims(&scaled), "k = {k}");
        assert_eq!(dims(&base), dims(&moved), "k = {k}");
        let (a, b) = dims(&base);
        assert_eq!(dims(&dual), (b, a), "k = {k}");
        assert_eq!(base.rank_upper, dual.rank_upper, "k = {k}");
        for r in [&scaled, &moved, &dual] {
            r.recheck().unwrap();
            assert!(r.points.iter().all(|p| r.curve.contains(p)));
        }
    }
}

// The fields: a real field has its fundamental unit among the generators;
// Q(√−23) (class number 3, common practice) contributes a class-group
// generator; every generator has norm n³.
#[test]
fn generators_of_the_groups() {
    let r = run(&mordell(-23), &quick());
    assert_eq!(r.sides[0].field, SideField::Quadratic { d: -23 });
    assert_eq!(r.sides[1].field, SideField::Quadratic { d: 69 });
    let origins: Vec<&ElementOrigin> = r.sides[0]
        .generators
        .iter()
        .filter_map(|g| match g {
            Generator3::Element { origin, .. } => Some(origin),
            _ => None,
        })
        .collect();
    assert!(origins.contains(&&ElementOrigin::ClassGroup));
    let real: Vec<&ElementOrigin> = r.sides[1]
        .generators
        .iter()
        .filter_map(|g| match g {
            Generator3::Element { origin, .. } => Some(origin),
            _ => None,
        })
        .collect();
    assert!(real.contains(&&ElementOrigin::FundamentalUnit));
    for side in &r.sides {
        for g in &side.generators {
            if let Generator3::Element { a, b, d, n, .. } = g {
                assert_eq!(a * a - b * b * *d, n * n * n);
            }
        }
    }
}

// Budgets on the field: a discriminant, class-number or unit-size limit
// below what the curve needs is a typed error, never a hang or a panic
// (common practice).
#[test]
fn field_limits_give_typed_errors() {
    let e = mordell(94); // Q(√94): fundamental unit of 43 bits
    let mut o = quick();
    o.max_unit_bits = 20;
    assert!(matches!(
        descend_3isogeny(&e, &o),
        Err(Error::BudgetExhausted { .. })
    ));
    let mut o = quick();
    o.max_class_number = 1;
    assert!(matches!(
        descend_3isogeny(&mordell(-23), &o),
        Err(Error::BudgetExhausted { .. })
    ));
    let mut o = quick();
    o.max_discriminant = 1000;
    assert!(matches!(
        descend_3isogeny(&mordell(100_003), &o),
        Err(Error::BudgetExhausted { .. })
    ));
    // The dispatch uses the 3-isogeny for curves without 2-torsion.
    assert!(matches!(
        descend_by_isogeny(&mordell(17), &DescentOptions::default(), &quick()),
        Ok(IsogenyDescent::Three(_))
    ));
}

// The families: sixth-power-free k ≠ 0 and cube-free n ≥ 1 (common
// practice: these are the classes of the curves up to isomorphism), and
// their scan records carry the 3-isogeny Selmer dimensions.
#[test]
fn families_of_the_descent_via_3_isogeny() {
    use isodescent::family::{scan_member, Family, RecordLine, Tally};
    let m = Family::mordell(-70, 70).unwrap();
    // 64 = 2⁶ is the only sixth power in range: 140 − 2 members.
    assert_eq!(m.count(), 138);
    let c = Family::cube_sums(1, 30).unwrap();
    // 8, 16, 24, 27 are not cube-free.
    assert_eq!(c.count(), 26);
    assert!(Family::cube_sums(0, 3).is_err());
    let mut tally = Tally::new();
    for member in Family::mordell(-20, 20).unwrap().members() {
        let line = scan_member(&member, &DescentOptions::default()).to_line();
        let rec = RecordLine::parse(&line).unwrap();
        assert!(rec.error.is_none(), "{line}");
        // k a cube: a rational point of order 2, the 2-isogeny descent.
        let k: i64 = rec.parameter.trim_start_matches("k=").parse().unwrap();
        let cube = (-3i64..=3).any(|c| c * c * c == k);
        assert_eq!(rec.selmer3.is_some(), !cube, "{line}");
        tally.add(&rec);
    }
    assert_eq!(tally.selmer3_pairs.values().sum::<u64>(), 40 - 4);
    // The summary lists the sums dim Sel^φ + dim Sel^φ̂ (the plot's
    // histogram), one row per sum, the counts adding up to those lines.
    let text = tally.to_string();
    let rows: Vec<(u64, u64)> = text
        .lines()
        .skip_while(|l| !l.starts_with("3-isogeny Selmer sum"))
        .skip(1)
        .map_while(|l| {
            let w: Vec<&str> = l.split_whitespace().collect();
            Some((w.first()?.parse().ok()?, w.get(1)?.parse().ok()?))
        })
        .collect();
    let mut expected = std::collections::BTreeMap::new();
    for (&(a, b), &n) in &tally.selmer3_pairs {
        *expected.entry(a + b).or_insert(0u64) += n;
    }
    assert_eq!(rows, expected.into_iter().collect::<Vec<_>>(), "{text}");
}

// The dispatch re-checks either kind of report.
#[test]
fn recheck_of_either_descent() {
    for curve in ["y^2 = x^3 - 36x", "y^2 = x^3 + 17", "y^2 = x^3 - 2"] {
        let e: Curve = curve.parse().unwrap();
        let r = descend_by_isogeny(&e, &DescentOptions::default(), &quick()).unwrap();
        r.recheck().unwrap_or_else(|err| panic!("{curve}: {err}"));
    }
}

// Generators: y² = x³ − 2 has E(Q) generated by Fermat's point (3, 5), and
// y² = x³ + 17 by Nagell's points (−2, 3) and (−1, 4) (both from memory),
// with trivial torsion (k neither a square, a cube nor −432: from memory,
// Knapp, "Elliptic Curves", Thm. 5.3 for j = 0). Saturation of the points
// found proves generators; the regulator of the known basis equals theirs
// within the bounds (index 1).
#[test]
fn generators_are_proven_by_saturation() {
    use isodescent::curve::Point;
    let o = Isogeny3Options::default();
    let r = run(&mordell(-2), &o);
    assert!(r.points_generate(), "{r}");
    let s = r.saturation.as_ref().expect("saturation ran");
    assert_eq!(s.generators.len(), 1);
    assert_eq!(s.generators[0].x(), Point::from_ints(3, 5).x(), "{r}");
    assert_eq!(r.torsion.order(), 1);

    let e = mordell(17);
    let r = run(&e, &o);
    assert!(r.points_generate(), "{r}");
    let s = r.saturation.as_ref().expect("saturation ran");
    assert_eq!(s.generators.len(), 2);
    assert!(s.proven_saturated && s.regulator.lower() > 0.0);
    let known = [Point::from_ints(-2, 3), Point::from_ints(-1, 4)];
    let reg = isodescent::height::regulator(&e, &known).unwrap();
    let ratio = reg.value() / s.regulator.value();
    let slack = 4.0 * (reg.error() / reg.value() + s.regulator.error() / s.regulator.value());
    assert!(
        (ratio - 1.0).abs() <= slack.max(1e-9),
        "{ratio} {reg:?} {s:?}"
    );
    for (p, h) in s.generators.iter().zip(&s.heights) {
        assert!(e.contains(p) && h.lower() > 0.0);
    }
    r.recheck().unwrap();

    // The JSON line carries the torsion, the heights, the regulator and the
    // proof of generation.
    let line = isodescent::output::json_for_line("0 0 0 0 17", &DescentOptions::default());
    let v: serde_json::Value = serde_json::from_str(&line).unwrap();
    assert_eq!(
        v["points_generate"],
        serde_json::Value::Bool(true),
        "{line}"
    );
    assert_eq!(v["torsion"]["order"], 1, "{line}");
    assert!(
        v["regulator"].is_string() && v["saturation"].is_object(),
        "{line}"
    );
    assert_eq!(v["points"].as_array().map(|a| a.len()), Some(2), "{line}");
    assert!(v["points"][0]["height"].is_string(), "{line}");

    // x³ + y³ = 310, y² = x³ − 432·310²: the sieve of the height layer
    // leaves p = 3 open (the kernel of φ is μ₃ as a Galois module), and the
    // descent proves 3-saturation of the point found (docs/descent3.md,
    // "Generators"). Rank 1 with root number −1 (310 ≡ 4 mod 9 is not a
    // prime; the rank comes from the L-value here).
    let r = run(&mordell(-432 * 310 * 310), &o);
    assert_eq!(r.rank.map(|x| x.0), Some(1), "{r}");
    let s = r.saturation.as_ref().expect("saturation ran");
    assert_eq!(s.unresolved, vec![3], "{r}");
    assert!(r.three_saturated_by_descent && r.points_generate(), "{r}");
}

// Saturation on j = 0 at primes p ≡ 2 (mod 3) above 70 (module docs of
// `height::saturate`, "Curves with j = 0"): the useful auxiliary primes
// are q ≡ −1 (mod 3p), where #E(F_q) = q + 1. Before, the scan over all q
// stopped after 400 primes with too few rows, and these curves of the
// censuses (docs/performance.md, issue 26, fourth part) had no proven
// generators: x³ + y³ = 1798 (rank 3, index bound 377, p = 71, 83, …, 181
// open) and y² = x³ + 9052 (rank 4, p = 59 and 61 open).
#[test]
fn generators_where_the_index_bound_passes_large_inert_primes() {
    let o = Isogeny3Options::default();
    let r = run(&mordell(-432 * 1798 * 1798), &o);
    assert_eq!(r.rank.map(|x| x.0), Some(3), "{r}");
    let s = r.saturation.as_ref().expect("saturation ran");
    assert!(s.index_bound.is_some_and(|b| b > 181), "{s:?}");
    for p in [71, 83, 89, 101, 179, 181] {
        assert!(s.primes_checked.contains(&p), "{p}: {s:?}");
    }
    assert!(s.unresolved.iter().all(|&p| p == 3), "{s:?}");
    assert!(r.points_generate(), "{r}");
    r.recheck().unwrap();

    // x³ + y³ = 3526: rank 3, index bound 428 above the old limit 200 of
    // the primes examined (now 1000 for the descent via 3-isogeny).
    let r = run(&mordell(-432 * 3526 * 3526), &o);
    assert_eq!(r.rank.map(|x| x.0), Some(3), "{r}");
    let s = r.saturation.as_ref().expect("saturation ran");
    assert!(
        s.index_bound.is_some_and(|b| b > 400) && !s.beyond_max_prime,
        "{s:?}"
    );
    assert!(r.points_generate(), "{r}");

    let r = run(&mordell(9052), &o);
    assert_eq!(r.rank.map(|x| x.0), Some(4), "{r}");
    let s = r.saturation.as_ref().expect("saturation ran");
    assert!(
        s.primes_checked.contains(&59) && s.primes_checked.contains(&61),
        "{s:?}"
    );
    assert!(r.points_generate(), "{r}");
    r.recheck().unwrap();
}

// Division by p = 5 (module docs of `height::saturate`: the roots of
// (x − x_Q)·f_p² − F·f_{p−1}·f_{p+1}, Silverman AEC 2nd ed., Exercise 3.7,
// checked exactly). y² = x³ + 4481 has rank 4 and the points the descent
// finds span a sublattice of index divisible by 5: before the division
// was taken past p = 3, p = 5 stayed unresolved and the generators were
// not proven (docs/performance.md, issue 26, fourth part).
#[test]
fn generators_after_a_division_by_five() {
    let o = Isogeny3Options::default();
    let r = run(&mordell(4481), &o);
    assert_eq!(r.rank.map(|x| x.0), Some(4), "{r}");
    let s = r.saturation.as_ref().expect("saturation ran");
    assert_eq!(s.index_found % 5, 0, "{s:?}");
    assert!(
        s.primes_checked.contains(&5) && s.unresolved.is_empty(),
        "{s:?}"
    );
    assert!(r.points_generate(), "{r}");
    r.recheck().unwrap();
}
