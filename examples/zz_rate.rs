use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
fn main() {
    let n_max: i64 = std::env::args().nth(1).unwrap().parse().unwrap();
    let full = std::env::args().nth(2).is_some();
    let opts = if full { DescentOptions::default() } else { DescentOptions::selmer_only() };
    let t = std::time::Instant::now();
    let (mut k, mut dec) = (0, 0);
    for n in 1..=n_max {
        if (2..).take_while(|p| p * p <= n).any(|p| n % (p * p) == 0) { continue; }
        let c = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
        let r = descend(&c, &opts).unwrap();
        k += 1; if r.rank_lower == r.rank_upper { dec += 1; }
    }
    let el = t.elapsed().as_secs_f64();
    println!("{k} curves, {dec} decided, {el:.3}s, {:.0} curves/s", k as f64 / el);
}
