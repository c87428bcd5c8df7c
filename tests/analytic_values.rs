//! L-values, periods and ranks of a few classical curves.

use isodescent::analytic::{analyse, AnalyticOptions, RankTheorem, RootNumberRoute};
use isodescent::curve::Curve;
use isodescent::Budget;

fn run(a: [i64; 5]) -> isodescent::analytic::AnalyticData {
    let e = Curve::from_ints(a).unwrap();
    let mut b = Budget::unlimited();
    let local = e.local_data(&mut b).unwrap();
    analyse(&e, &local, &AnalyticOptions::default(), &mut b).unwrap()
}

#[test]
fn print_some() {
    for a in [
        [0, -1, 1, -10, -20],
        [0, 0, 1, -1, 0],
        [0, 0, 0, -1, 0],
        [0, 1, 1, -2, 0],
        [0, 0, 1, -7, 6],
    ] {
        let d = run(a);
        println!(
            "{a:?} N={} w={:?} {:?} Ω={:?} L={:?} rank={:?} proven={:?} terms={} split={:?}",
            d.conductor(),
            d.root_number(),
            d.root_number_route(),
            d.real_period(),
            d.l_values(),
            d.analytic_rank(),
            d.rank_proven(),
            d.terms_used(),
            d.split_check()
        );
    }
    let _ = (RankTheorem::CoatesWiles, RootNumberRoute::Formula);
}
