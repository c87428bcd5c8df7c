//! The Cremona–Siksek lower bound for ĥ (src/height/lower_bound.rs).

use isodescent::curve::{Curve, Point};
use isodescent::height::{cremona_siksek_bound, height_lower_bound, HeightContext};
use isodescent::Budget;

#[test]
#[ignore]
fn explore() {
    let mut cases: Vec<[i64; 5]> = vec![[0, 0, 1, -1, 0], [0, 1, 1, -2, 0], [0, 0, 1, -7, 6], [0,0,0,-1,0]];
    for n in [5i64, 6, 7, 13, 14, 15, 21, 34, 41, 157, 210, 997] {
        cases.push([0, 0, 0, -n * n, 0]);
    }
    for a in cases {
        let e = Curve::from_ints(a).unwrap();
        let ctx = HeightContext::new(&e, &mut Budget::unlimited()).unwrap();
        let t = std::time::Instant::now();
        let cs = cremona_siksek_bound(&ctx);
        let dt = t.elapsed();
        let sb = height_lower_bound(&ctx, 8.0, &mut Budget::unlimited()).unwrap();
        println!("{a:?}: cs {cs:?} ({dt:?}); search {:?}", sb.map(|s| (s.bound, s.smallest.map(|(p, h)| (p, h.value)))));
    }
    let _ = Point::from_ints(0, 0);
}
