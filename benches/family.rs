//! Family-scan throughput: the congruent-number curves for square-free
//! n ≤ 200 (122 curves), scanned on 1 thread and — with the `parallel`
//! feature — on 2 threads. The goal: 2 threads reach at least 1.8 times the
//! 1-thread rate on a 2-core machine (compare the two "thrpt" lines).
//!
//! cargo bench --features parallel --bench family

use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use isodescent::descent::DescentOptions;
use isodescent::family::{scan, Family, ScanOptions};

fn scan_congruent(c: &mut Criterion) {
    let fam = Family::congruent_numbers(1, 200).expect("valid range");
    let n = fam.count();
    let opts = DescentOptions::default();
    let mut g = c.benchmark_group("family_scan_congruent_200");
    g.sample_size(10);
    g.throughput(Throughput::Elements(n));
    let thread_counts: &[usize] = if cfg!(feature = "parallel") {
        &[1, 2]
    } else {
        &[1]
    };
    for &threads in thread_counts {
        g.bench_function(format!("threads_{threads}"), |b| {
            b.iter(|| {
                let mut so = ScanOptions::default();
                so.threads = threads;
                let done = scan(fam.members(), &opts, &so)
                    .expect("pool starts")
                    .count();
                assert_eq!(done as u64, n);
            })
        });
    }
    g.finish();
}

criterion_group!(benches, scan_congruent);
criterion_main!(benches);
