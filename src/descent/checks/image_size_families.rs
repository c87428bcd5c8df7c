//! The full families for the cross-check of the local images against
//! Tamagawa numbers ([Schaefer96, Lemma 3.8]) and of Cassels' formula
//! ([Cassels65]) against the computed Selmer groups. Ignored by default
//! (a few minutes in release); run with
//! `cargo test --release --lib image_size_families -- --ignored --nocapture`.
//! The bounded versions run in `src/descent/checks/image_size_checks.rs`.

use std::time::Instant;

use super::{finite_primes, primes_of_2n, rm, rmb};
use crate::arith::factor_u64;
use crate::curve::{Curve, Point};
use crate::descent::{descend_isogeny, DescentOptions};
use crate::local::{Place, Prime};
use crate::selmer::image_size::{
    check_local_images, padic_count_terms, selmer_difference_from_images,
    selmer_difference_from_tamagawa,
};
use crate::Budget;

#[derive(Default, Debug)]
struct Tally {
    curves: usize,
    pairs: usize,
    real: usize,
    two: usize,
    odd: usize,
    /// Pairs at 2 where the minimal-model correction k_E − k_E′ ≠ 0.
    corrected: usize,
    mismatches: Vec<String>,
}

/// Compares predicted and computed |W_v| for E = (a, b) and
/// E′ = (−2a, a² − 4b) at R and each prime of 2b(a² − 4b).
fn tally_both_sides(a: i64, bb: i64, t: &mut Tally) {
    let d = a * a - 4 * bb;
    let primes = primes_of_2n(&[bb, d]);
    for (ca, cb) in [(a, bb), (-2 * a, d)] {
        t.curves += 1;
        let rows = check_local_images(&rm(ca, cb), &primes, &mut Budget::unlimited()).unwrap();
        for (v, predicted, computed) in rows {
            t.pairs += 1;
            match &v {
                Place::Real => t.real += 1,
                Place::Finite(p) if p.is_two() => {
                    t.two += 1;
                    let terms = padic_count_terms(&rm(ca, cb), p).unwrap();
                    if terms.scaling != terms.scaling_dual {
                        t.corrected += 1;
                    }
                }
                Place::Finite(_) => t.odd += 1,
            }
            if predicted != computed {
                t.mismatches.push(format!(
                    "a={ca} b={cb} v={v} predicted={predicted} computed={computed}"
                ));
            }
        }
    }
}

fn squarefree(n: u64) -> bool {
    factor_u64(n).iter().all(|&(_, e)| e == 1)
}

#[test]
#[ignore = "full family: a few minutes in release"]
fn predicted_sizes_match_local_solvability_for_the_box_of_radius_fifty() {
    let start = Instant::now();
    let mut t = Tally::default();
    for a in -50i64..=50 {
        for bb in -50i64..=50 {
            if bb != 0 && a * a != 4 * bb {
                tally_both_sides(a, bb, &mut t);
            }
        }
    }
    println!(
        "box |a|,|b| <= 50: {} curves (E and E'), {} (curve, place) pairs \
         (R {}, 2 {}, odd {}; {} at 2 with k_E != k_E'), {:.1} s",
        t.curves,
        t.pairs,
        t.real,
        t.two,
        t.odd,
        t.corrected,
        start.elapsed().as_secs_f64()
    );
    assert!(t.mismatches.is_empty(), "{:#?}", t.mismatches);
    assert!(t.corrected > 0);
}

#[test]
#[ignore = "full family: a few minutes in release"]
fn predicted_sizes_match_local_solvability_for_congruent_number_curves_up_to_2000() {
    let start = Instant::now();
    let mut t = Tally::default();
    for n in 1i64..=2000 {
        if squarefree(n as u64) {
            tally_both_sides(0, -n * n, &mut t);
        }
    }
    println!(
        "congruent n <= 2000: {} curves (E and E'), {} (curve, place) pairs \
         (R {}, 2 {}, odd {}), {:.1} s",
        t.curves,
        t.pairs,
        t.real,
        t.two,
        t.odd,
        start.elapsed().as_secs_f64()
    );
    assert!(t.mismatches.is_empty(), "{:#?}", t.mismatches);
}

/// Cassels' formula [Cassels65]: dim Sel(codomain) − dim Sel(domain)
/// = Σ_v (dim W_v(E′) − 1), from the computed images and from Tamagawa
/// numbers alone.
fn cassels_holds(a: i64, bb: i64) -> Result<(), String> {
    let curve = Curve::from_ints([0, a, 0, bb, 0]).unwrap();
    let d = descend_isogeny(
        &curve,
        &Point::from_ints(0, 0),
        &DescentOptions::default().local_conditions_only(),
    )
    .unwrap();
    let diff = d.codomain().dimension() as i64 - d.domain().dimension() as i64;
    let from_images = selmer_difference_from_images(d.codomain().local_images());
    let primes: Vec<Prime> = finite_primes(d.codomain().local_images());
    let from_tamagawa =
        selmer_difference_from_tamagawa(&rmb(d.domain().a(), d.domain().b()), &primes).unwrap();
    if from_images == diff && from_tamagawa == diff {
        Ok(())
    } else {
        Err(format!(
            "a={a} b={bb}: dims {} (domain) {} (codomain), images {from_images}, tamagawa {from_tamagawa}",
            d.domain().dimension(),
            d.codomain().dimension()
        ))
    }
}

#[test]
#[ignore = "full family: a few minutes in release"]
fn cassels_formula_holds_for_the_box_of_radius_fifty_and_congruent_numbers_up_to_2000() {
    let start = Instant::now();
    let mut bad = Vec::new();
    let mut count = 0;
    for a in -50i64..=50 {
        for bb in -50i64..=50 {
            if bb != 0 && a * a != 4 * bb {
                count += 1;
                if let Err(e) = cassels_holds(a, bb) {
                    bad.push(e);
                }
            }
        }
    }
    let box_secs = start.elapsed().as_secs_f64();
    let mut cn = 0;
    for n in 1i64..=2000 {
        if squarefree(n as u64) {
            cn += 1;
            if let Err(e) = cassels_holds(0, -n * n) {
                bad.push(e);
            }
        }
    }
    println!(
        "Cassels: {count} curves in the box ({box_secs:.1} s), {cn} congruent-number curves, \
         {:.1} s in all",
        start.elapsed().as_secs_f64()
    );
    assert!(bad.is_empty(), "{bad:#?}");
}
