//! Family-scan benchmarks (being built).
fn main() {}
