//! The tally of the 3-isogeny census examples (examples/mordell_census.rs
//! and examples/cube_sums_census.rs): settled ranks by what settled them,
//! points, Cassels' check, partial reports, and the distributions of the
//! upper bounds and of the settled ranks; and the sixth-power-free test
//! of the Mordell examples (examples/mordell_open.rs too).
#![allow(dead_code)]

use std::collections::BTreeMap;

use isodescent::descent3::{Isogeny3Report, Rank3Proof};

/// Counts over the curves of a census.
#[derive(Default)]
pub struct Census3 {
    pub total: usize,
    pub by_descent: usize,
    pub by_analytic: usize,
    pub open: usize,
    pub errors: usize,
    pub missing_points: usize,
    pub with_points: usize,
    pub proven_generators: usize,
    pub cassels_fail: usize,
    pub partial: usize,
    pub uppers: BTreeMap<usize, usize>,
    pub ranks: BTreeMap<usize, usize>,
}

impl Census3 {
    /// Counts the report of one curve; true when the rank is settled and
    /// positive, with rank-many points, but the generators are not proven.
    pub fn add(&mut self, r: &Isogeny3Report) -> bool {
        *self.uppers.entry(r.rank_upper).or_default() += 1;
        if r.tamagawa.as_ref().is_some_and(|t| !t.holds()) {
            self.cassels_fail += 1;
        }
        if !r.cut.is_empty() {
            self.partial += 1;
        }
        match r.rank {
            Some((rank, proof)) => {
                *self.ranks.entry(rank).or_default() += 1;
                match proof {
                    Rank3Proof::Analytic(_) => self.by_analytic += 1,
                    _ => self.by_descent += 1,
                }
                if r.rank_lower < rank {
                    self.missing_points += 1;
                } else if rank > 0 {
                    self.with_points += 1;
                    if r.points_generate() {
                        self.proven_generators += 1;
                    } else {
                        return true;
                    }
                }
            }
            None => self.open += 1,
        }
        false
    }

    /// How many ranks are settled, and by what.
    pub fn print_settled(&self) {
        let settled = self.by_descent + self.by_analytic;
        println!(
            "rank settled: {} ({:.1}%): {} by the descent alone, {} with a certified L-value",
            settled,
            100.0 * settled as f64 / self.total.max(1) as f64,
            self.by_descent,
            self.by_analytic
        );
    }

    /// The settled positive ranks with as many points, and how many of
    /// those saturation proved generators.
    pub fn print_points(&self) {
        println!(
            "settled with positive rank and rank-many points: {}; generators proven by saturation: {}",
            self.with_points, self.proven_generators
        );
    }

    /// The distributions of the upper bounds and of the settled ranks.
    pub fn print_tables(&self) {
        println!("upper bound (Selmer ranks minus torsion) : count");
        for (u, c) in &self.uppers {
            println!("  {u} : {c}");
        }
        println!("rank : count (settled curves)");
        for (r, c) in &self.ranks {
            println!("  {r} : {c}");
        }
    }
}

/// `k` has no sixth-power factor d⁶ > 1.
pub fn sixth_power_free(k: i64) -> bool {
    let n = k.abs();
    (2..)
        .take_while(|d: &i64| d.pow(6) <= n)
        .all(|d| n % d.pow(6) != 0)
}

/// Why a settled curve of positive rank with rank-many points has no
/// proven generators (printed with `LIST_UNPROVEN=1`).
pub fn unproven_reason(r: &Isogeny3Report) -> String {
    let points = r.points.iter().filter(|p| !p.is_infinity()).count();
    let head = format!(
        "{} points, {} independent, torsion {}, cut {:?}",
        points,
        r.independent_points.len(),
        r.torsion.order(),
        r.cut
    );
    match &r.saturation {
        None => format!("{head}; no saturation"),
        Some(s) => format!(
            "{head}; index bound {:?} ({:?}), beyond max prime {}, checked {:?}, unresolved {:?}, 3 by descent {}",
            s.index_bound,
            s.height_lower_bound_source,
            s.beyond_max_prime,
            s.primes_checked,
            s.unresolved,
            r.three_saturated_by_descent
        ),
    }
}
