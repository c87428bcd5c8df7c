use std::time::Instant;
use isodescent::curve::{two_torsion_model, two_torsion_points, Curve};
use isodescent::descent::{descend, DescentOptions};
use num_bigint::BigInt;
const P1: &str = "796349315032472021914478070833304424447722898993491866306619285267380610682346010664523445665708211071535153228652706584133979371555738936009101306759";
const P2: &str = "717863177452502217571925298282586370877708442241218677046712223629095435417813230685966985609842090035651514693577049119496404620262919845187160655039";
#[test]
fn scratch() {
    let n: BigInt = P1.parse::<BigInt>().unwrap() * P2.parse::<BigInt>().unwrap();
    let e: Curve = format!("0 {n} 0 {n} 0").parse().unwrap();
    let ts = two_torsion_points(&e);
    let t = Instant::now();
    let m = two_torsion_model(&e, &ts[0]);
    eprintln!("model {:?} ok={} {:?}", t.elapsed(), m.is_ok(), m.as_ref().err().map(|e| e.to_string().chars().take(80).collect::<String>()));
    let mut o = DescentOptions::default(); o.factor_units = 50_000;
    let t = Instant::now();
    let r = descend(&e, &o);
    eprintln!("descend {:?} {:?}", t.elapsed(), r.as_ref().err().map(|e| e.to_string().chars().take(80).collect::<String>()));
}
