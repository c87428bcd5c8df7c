use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
fn main() {
    let opts = DescentOptions::default();
    for a in -30i64..=30 { for b in -30i64..=30 {
        if b == 0 || a * a == 4 * b { continue; }
        let c = Curve::from_ints([0, a, 0, b, 0]).unwrap();
        if let Ok(r) = descend(&c, &opts) {
            if r.rank_lower >= 2 || r.rank_lower != r.rank_upper { println!("{a} {b}: [{}, {}] tors {} isog {}", r.rank_lower, r.rank_upper, r.torsion.order(), r.isogenies.len()); }
        }
    }}
}
