//! The whole answer: the descent, the analytic side, saturation and the
//! Birch–Swinnerton-Dyer ledger together, on whole families.
//!
//! Sources: Tunnell, "A classical Diophantine problem and modular forms of
//! weight 3/2", Invent. Math. 72 (1983) — L(E_n, 1) = 0 iff A_n = 2B_n for
//! the congruent-number curve E_n: y² = x³ − n²x; Coates–Wiles (1977) and
//! Gross–Zagier (1986) with Kolyvagin (1990) — the analytic theorems that
//! settle the rank; Monsky, "Generalizing the Birch–Stephens theorem",
//! Math. Z. 221 (1996), from memory — (−1)^(dim Sel²(E) − dim E(Q)[2]) = w(E);
//! Cassels — #Ш is a square when finite (Silverman, AEC, X.4.14 and the
//! remarks after it).

mod common;

use common::{squarefree, tunnell_equality};
use isodescent::{descend, Curve, DescentOptions, RankProof};

fn check_consistent(label: &str, r: &isodescent::DescentReport) {
    assert!(r.conflict().is_none(), "{label}: {:?}", r.conflict());
    let d = r.descent_bounds();
    let b = r.rank_bounds();
    assert!(d.lower() <= b.lower() && b.upper() <= d.upper(), "{label}");
    // Monsky's 2-parity theorem.
    if let (Some(s2), Some(w)) = (r.selmer2_rank(), r.analytic().and_then(|a| a.root_number())) {
        let (_, n2) = r.torsion().structure();
        let t2 = if n2 <= 1 { 1 } else { 2 };
        let parity = if (s2 - t2) % 2 == 0 { 1 } else { -1 };
        assert_eq!(parity, w, "{label}: dim Sel^2 = {s2}, w = {w}");
    }
    // A ledger is a square up to its error bound, when it exists.
    if let Some(l) = r.sha_ledger() {
        assert!(l.is_square_within_error, "{label}: Sha_an = {:?}", l.value);
    }
    // Generators, when claimed, are as many as the rank and lie on the curve.
    if r.generators().is_some() {
        assert_eq!(r.points().len(), b.lower(), "{label}");
    }
    for p in r.points() {
        assert!(r.curve().contains(p), "{label}");
    }
}

#[test]
fn congruent_number_curves_up_to_1000_all_have_a_decided_rank() {
    let opts = DescentOptions::default();
    let (mut total, mut by_analytic) = (0, 0);
    for n in (1..=1000i64).filter(|&n| squarefree(n)) {
        let c = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
        let r = descend(&c, &opts).unwrap();
        let label = format!("n = {n}");
        check_consistent(&label, &r);
        assert!(
            r.rank_bounds().is_decided(),
            "{label}: {:?}",
            r.rank_bounds()
        );
        // Tunnell with Coates–Wiles: A_n ≠ 2B_n gives L(E_n, 1) ≠ 0, so rank 0;
        // rank ≥ 1 forces the equality (the proven direction).
        if !tunnell_equality(n) {
            assert_eq!(r.rank_bounds().lower(), 0, "{label}");
        }
        if r.rank_bounds().lower() > 0 {
            assert!(tunnell_equality(n), "{label}");
        }
        if let Some(RankProof::Analytic(_)) = r.rank_settled_by() {
            by_analytic += 1;
        }
        total += 1;
    }
    assert_eq!(total, 608);
    // The descent alone decides most of them; the theorems close the rest.
    assert!(by_analytic > 0 && by_analytic < total / 2, "{by_analytic}");
}

#[test]
fn the_box_up_to_twelve_is_consistent_and_decided() {
    let opts = DescentOptions::default();
    let (mut decided, mut total, mut generated, mut with_points) = (0, 0, 0, 0);
    for a in -12i64..=12 {
        for b in -12i64..=12 {
            let Ok(c) = Curve::from_ints([0, a, 0, b, 0]) else {
                continue;
            };
            let r = descend(&c, &opts).unwrap();
            check_consistent(&format!("a = {a}, b = {b}"), &r);
            total += 1;
            decided += usize::from(r.rank_bounds().is_decided());
            if r.rank_bounds().is_decided()
                && r.rank_bounds().lower() > 0
                && r.descent_points().len() == r.rank_bounds().lower()
            {
                with_points += 1;
                generated += usize::from(r.generators().is_some());
            }
        }
    }
    assert_eq!(decided, total, "decided {decided} of {total}");
    assert!(with_points > 100);
    // Saturation proves generation on every curve where it has the points
    // and a lower bound for ĥ (docs/heights.md); allow a few without one.
    assert!(
        generated * 100 >= with_points * 95,
        "{generated} of {with_points}"
    );
}

#[test]
fn descent_only_options_leave_the_analytic_fields_empty() {
    let c: Curve = "y^2 = x^3 - 2109x".parse().unwrap(); // 2109 = 3·19·37
    let r = descend(&c, &DescentOptions::default().descent_only()).unwrap();
    assert!(r.analytic().is_none());
    assert!(r.saturation().is_none());
    assert!(r.sha_ledger().is_none());
    assert_eq!(r.rank_bounds(), r.descent_bounds());
}
