// Temporary timing harness (to be deleted). CPU time from /proc/thread-self/schedstat.
use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
use isodescent::local::{Place, Prime};
use isodescent::quartic::local_image;
use isodescent::Budget;
use num_bigint::BigInt;

fn cpu_ns() -> u64 {
    let s = std::fs::read_to_string("/proc/thread-self/schedstat").unwrap();
    s.split_whitespace().next().unwrap().parse().unwrap()
}

fn squarefree(n: i64) -> bool {
    !(2..).take_while(|p| p * p <= n).any(|p| n % (p * p) == 0)
}

fn odd_primes(mut n: i64) -> Vec<u64> {
    n = n.abs();
    let mut out = vec![];
    let mut p = 2;
    while p * p <= n {
        if n % p == 0 {
            if p != 2 {
                out.push(p as u64);
            }
            while n % p == 0 {
                n /= p;
            }
        }
        p += 1;
    }
    if n > 2 {
        out.push(n as u64);
    }
    out
}

type Job = (BigInt, BigInt, Place);

fn jobs_for(jobs: &mut [Vec<Job>; 4], a: i64, b: i64) {
    let disc = b * (a * a - 4 * b);
    let mut places = vec![Place::Real, Place::Finite(Prime::two())];
    for p in odd_primes(disc) {
        places.push(Place::Finite(Prime::small(p).unwrap()));
    }
    for v in places {
        let k = kind(&v);
        jobs[k].push((BigInt::from(a), BigInt::from(b), v));
    }
}

fn kind(place: &Place) -> usize {
    match place {
        Place::Real => 0,
        Place::Finite(p) if p.is_two() => 1,
        Place::Finite(p) if p.to_u64().unwrap() < 64 => 2,
        _ => 3,
    }
}

fn run_jobs(name: &str, jobs: &[Vec<Job>; 4], checksum: &mut u64) {
    let names = ["R", "2", "odd p<64", "odd p>=64"];
    for k in 0..4 {
        if jobs[k].is_empty() {
            continue;
        }
        let reps = 3;
        let t = cpu_ns();
        for _ in 0..reps {
            for (a, b, v) in &jobs[k] {
                let w = local_image(a, b, v, &mut Budget::unlimited()).unwrap();
                *checksum = checksum
                    .wrapping_mul(31)
                    .wrapping_add(w.members.iter().map(|&m| 1u64 << m).sum::<u64>());
            }
        }
        let ns = (cpu_ns() - t) as f64 / reps as f64;
        println!(
            "{name:>12} {:>10}: {:>6} images, {:>9.2} us/image",
            names[k],
            jobs[k].len(),
            ns / jobs[k].len() as f64 / 1e3
        );
    }
}

fn main() {
    let n_max: i64 = std::env::args().nth(1).map(|s| s.parse().unwrap()).unwrap_or(2000);
    let mode = std::env::args().nth(2).unwrap_or_default();
    let mut checksum = 0u64;
    if mode != "descent" {
        let mut jobs: [Vec<Job>; 4] = Default::default();
        for n in 1..=n_max {
            if !squarefree(n) {
                continue;
            }
            jobs_for(&mut jobs, 0, -n * n);
            jobs_for(&mut jobs, 0, 4 * n * n);
        }
        run_jobs("congruent", &jobs, &mut checksum);
        let mut jobs: [Vec<Job>; 4] = Default::default();
        for a in -30i64..=30 {
            for b in -30i64..=30 {
                if b * (a * a - 4 * b) != 0 {
                    jobs_for(&mut jobs, a, b);
                }
            }
        }
        run_jobs("small a,b", &jobs, &mut checksum);
        println!("image checksum {checksum:x}");
    }
    if mode != "images" {
        let opts = DescentOptions::selmer_only();
        let t = cpu_ns();
        let mut k = 0u64;
        let mut h = 0u64;
        for n in 1..=n_max {
            if !squarefree(n) {
                continue;
            }
            let c = Curve::from_ints([0, 0, 0, -n * n, 0]).unwrap();
            let r = descend(&c, &opts).unwrap();
            h = h.wrapping_mul(31).wrapping_add(r.rank_upper as u64 * 7 + r.rank_lower as u64);
            k += 1;
        }
        let s = (cpu_ns() - t) as f64 / 1e9;
        println!("selmer-only descent: {k} curves, {s:.3} s CPU, {:.0} curves/s, rank checksum {h:x}", k as f64 / s);
    }
}
