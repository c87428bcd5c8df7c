//! Command-line front end for the descent (being built).
use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    for a in args {
        let c: Curve = match a.parse() { Ok(c) => c, Err(e) => { println!("{e}"); continue; } };
        let t = std::time::Instant::now();
        match descend(&c, &DescentOptions::default()) {
            Ok(r) => { println!("{r}"); println!("{}", r.to_json(&a)); }
            Err(e) => println!("error: {e}"),
        }
        println!("time {:?}", t.elapsed());
    }
}
