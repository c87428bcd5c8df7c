use isodescent::curve::Curve;
use isodescent::heegner::{heegner_point, HeegnerOptions};
use isodescent::{descend, Budget, DescentOptions};
#[test]
fn two() {
    let n: i64 = std::env::var("N").unwrap().parse().unwrap();
    let e = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
    let mut o = DescentOptions::default();
    o.heegner = None;
    o.deep_search = None;
    let t = std::time::Instant::now();
    let r = descend(&e, &o).unwrap();
    println!(
        "no heegner, no deep search: {:.2}s points {}",
        t.elapsed().as_secs_f64(),
        r.points().len()
    );
    let t = std::time::Instant::now();
    let r = descend(&e, &DescentOptions::default()).unwrap();
    println!(
        "default: {:.2}s points {}",
        t.elapsed().as_secs_f64(),
        r.points().len()
    );
    for h in [20.0, 60.0, 100.0, 140.0] {
        let t = std::time::Instant::now();
        let o = heegner_point(
            &e,
            Some(h),
            &HeegnerOptions::default(),
            &mut Budget::unlimited(),
        );
        println!(
            "heegner alone (pred {h}): {:.2}s {:?}",
            t.elapsed().as_secs_f64(),
            o.map(|o| match o {
                isodescent::heegner::HeegnerOutcome::Found(h) => (h.precision_bits, h.terms),
                _ => (0, 0),
            })
        );
    }
    let t = std::time::Instant::now();
    let o = heegner_point(
        &e,
        Some(40.0),
        &HeegnerOptions::default(),
        &mut Budget::unlimited(),
    );
    println!(
        "heegner alone (pred 40): {:.2}s {:?}",
        t.elapsed().as_secs_f64(),
        o.map(|o| matches!(o, isodescent::heegner::HeegnerOutcome::Found(_)))
    );
}
