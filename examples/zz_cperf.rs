//! Temporary timing harness for the curves layer (to be deleted).
use isodescent::curve::{
    torsion_subgroup, two_torsion_model, two_torsion_points, Curve, TwoIsogeny,
};
use isodescent::descent::{descend, DescentOptions};
use isodescent::Budget;
use std::io::Write;
use std::time::Instant;

fn families() -> Vec<(&'static str, Vec<Curve>)> {
    let ns: Vec<i64> = (1..=2000)
        .filter(|&n: &i64| !(2..).take_while(|p: &i64| p * p <= n).any(|p| n % (p * p) == 0))
        .collect();
    let cong: Vec<Curve> = ns
        .iter()
        .map(|&n| Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap())
        .collect();
    let mut ab = Vec::new();
    for a in -30..=30i64 {
        for b in -30..=30i64 {
            if let Ok(c) = Curve::from_ints([0, a, 0, b, 0]) {
                ab.push(c);
            }
        }
    }
    vec![("congruent", cong), ("ab30", ab)]
}

fn main() {
    let dump = std::env::args().nth(1);
    let mut out = dump.map(|p| std::fs::File::create(p).unwrap());
    for (name, curves) in families() {
        let k = curves.len() as f64;
        let us = |t: Instant| t.elapsed().as_secs_f64() * 1e6 / k;
        println!("== {name}: {} curves", curves.len());
        let t = Instant::now();
        let mut c2 = Vec::new();
        for _ in 0..1 {
            c2 = curves
                .iter()
                .map(|c| Curve::new(c.coefficients().clone()).unwrap())
                .collect();
        }
        println!("  Curve::new            {:9.1} µs/curve", us(t));
        let t = Instant::now();
        let ts: Vec<_> = c2.iter().map(two_torsion_points).collect();
        println!("  two_torsion_points    {:9.1} µs/curve", us(t));
        let t = Instant::now();
        let tors: Vec<_> = c2.iter().map(torsion_subgroup).collect();
        println!("  torsion_subgroup(E)   {:9.1} µs/curve", us(t));
        let t = Instant::now();
        let models: Vec<Vec<_>> = c2
            .iter()
            .zip(&ts)
            .map(|(c, ps)| ps.iter().map(|p| two_torsion_model(c, p).unwrap()).collect())
            .collect();
        println!("  two_torsion_model(all){:9.1} µs/curve", us(t));
        let t = Instant::now();
        let isos: Vec<Vec<_>> = models
            .iter()
            .map(|ms| ms.iter().map(|m| TwoIsogeny::from_model(m).unwrap()).collect())
            .collect();
        println!("  TwoIsogeny::from_model{:9.1} µs/curve", us(t));
        let t = Instant::now();
        let tors2: Vec<Vec<_>> = isos
            .iter()
            .map(|is| is.iter().map(|i| torsion_subgroup(i.codomain())).collect())
            .collect();
        println!("  torsion_subgroup(E')  {:9.1} µs/curve", us(t));
        let t = Instant::now();
        let mut cnt = 0;
        for (c, tg) in c2.iter().zip(&tors) {
            for p in tg.points() {
                cnt += c.contains(p) as usize;
            }
        }
        println!("  contains(torsion)     {:9.1} µs/curve ({cnt})", us(t));
        let t = Instant::now();
        let mut moved = Vec::new();
        for (ms, tg) in models.iter().zip(&tors) {
            for m in ms {
                for p in tg.points() {
                    let q = m.from_input(p);
                    moved.push(m.to_input(&q));
                }
            }
        }
        println!("  to_new+to_old         {:9.1} µs/curve", us(t));
        let t = Instant::now();
        let mut duals = Vec::new();
        for (is, t2) in isos.iter().zip(&tors2) {
            for (i, tg) in is.iter().zip(t2) {
                for q in tg.points() {
                    duals.push(i.dual_image(q));
                }
            }
        }
        println!("  dual_image            {:9.1} µs/curve", us(t));
        let t = Instant::now();
        let lds: Vec<_> = c2
            .iter()
            .map(|c| c.local_data(&mut Budget::unlimited()).unwrap())
            .collect();
        println!("  local_data            {:9.1} µs/curve", us(t));
        let opts = DescentOptions::selmer_only();
        let t = Instant::now();
        let reps: Vec<_> = c2.iter().map(|c| descend(c, &opts)).collect();
        let el = t.elapsed().as_secs_f64();
        println!(
            "  descend selmer_only   {:9.1} µs/curve  = {:.0} curves/s",
            el * 1e6 / k,
            k / el
        );
        if let Some(f) = out.as_mut() {
            for (i, c) in c2.iter().enumerate() {
                writeln!(f, "{name} {c} j={} D={} c4={} c6={} b8={}", c.j_invariant(), c.discriminant(), c.c4(), c.c6(), c.b8()).unwrap();
                writeln!(f, "  ts {:?}", ts[i].iter().map(|p| p.to_string()).collect::<Vec<_>>()).unwrap();
                let tg = &tors[i];
                writeln!(f, "  tors {:?} {} gens {:?} pts {:?}", tg.structure(), tg.reduction_bound(), tg.generators().iter().map(|p| p.to_string()).collect::<Vec<_>>(), tg.points().iter().map(|p| p.to_string()).collect::<Vec<_>>()).unwrap();
                for (j, m) in models[i].iter().enumerate() {
                    let ch = m.change();
                    writeln!(f, "  model a={} b={} curve={} change=({}, {}, {}, {}) E'={} tors2 {:?} {} {:?}", m.a, m.b, m.curve(), ch.u(), ch.r(), ch.s(), ch.t(), isos[i][j].codomain(), tors2[i][j].structure(), tors2[i][j].reduction_bound(), tors2[i][j].points().iter().map(|p| p.to_string()).collect::<Vec<_>>()).unwrap();
                }
                writeln!(f, "  local {:?}", lds[i].conductor).unwrap();
                match &reps[i] {
                    Ok(r) => writeln!(f, "  rank {} {}", r.rank_lower, r.rank_upper).unwrap(),
                    Err(e) => writeln!(f, "  err {e}").unwrap(),
                }
            }
            writeln!(f, "{} {}", moved.len(), duals.len()).unwrap();
            for p in moved.iter().chain(&duals) {
                writeln!(f, "{p}").unwrap();
            }
        }
    }
}
