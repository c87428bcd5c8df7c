use isodescent::curve::{Curve, torsion_subgroup, two_torsion_model, two_torsion_points};
use isodescent::arith::factor;
use isodescent::Budget;
use isodescent::quartic::local_image;
use isodescent::local::{Place, Prime};
use std::time::Instant;
fn main() {
    let ns: Vec<i64> = (1..=600).filter(|&n: &i64| !(2..).take_while(|p: &i64| p * p <= n).any(|p| n % (p * p) == 0)).collect();
    let curves: Vec<Curve> = ns.iter().map(|&n| Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap()).collect();
    let t = Instant::now(); for c in &curves { let _ = torsion_subgroup(c); } println!("torsion {:?}", t.elapsed());
    let t = Instant::now(); for c in &curves { let _ = two_torsion_points(c); } println!("2-torsion pts {:?}", t.elapsed());
    let t = Instant::now(); for c in &curves { for p in two_torsion_points(c) { let _ = two_torsion_model(c, &p); } } println!("models {:?}", t.elapsed());
    let t = Instant::now(); for &n in &ns { let _ = factor(&(n*n).into(), &mut Budget::unlimited()); } println!("factor {:?}", t.elapsed());
    let t = Instant::now(); for &n in &ns { let b = (-n*n).into(); let a = 0.into(); let mut bu = Budget::unlimited();
        let _ = local_image(&a, &b, &Place::Real, &mut bu); let _ = local_image(&a, &b, &Place::Finite(Prime::two()), &mut bu);
        for p in [3u64,5,7,11,13] { if n % p as i64 == 0 { let _ = local_image(&a, &b, &Place::Finite(Prime::small(p).unwrap()), &mut bu); } } } println!("local images {:?}", t.elapsed());
}
