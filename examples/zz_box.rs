use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
fn main() {
    let bound: i64 = std::env::args().nth(1).unwrap().parse().unwrap();
    let opts = DescentOptions::default();
    let t = std::time::Instant::now();
    let (mut k, mut dec, mut err) = (0, 0, 0);
    let mut slowest = (0.0, 0, 0);
    for a in -bound..=bound { for b in -bound..=bound {
        if b == 0 || a * a == 4 * b { continue; }
        let c = Curve::from_ints([0, a, 0, b, 0]).unwrap();
        let t1 = std::time::Instant::now();
        match descend(&c, &opts) { Ok(r) => { k += 1; if r.rank_lower == r.rank_upper { dec += 1; } } Err(e) => { err += 1; eprintln!("{a} {b}: {e}"); } }
        let s = t1.elapsed().as_secs_f64(); if s > slowest.0 { slowest = (s, a, b); }
    }}
    let el = t.elapsed().as_secs_f64();
    println!("{k} curves ok, {err} errors, {dec} decided ({:.1}%), {el:.2}s total, {:.2} ms/curve, slowest {:?}", 100.0 * dec as f64 / k as f64, 1000.0 * el / k as f64, slowest);
}
