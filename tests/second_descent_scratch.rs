use isodescent::quartic::covering::*;
use isodescent::Budget;
use num_bigint::BigInt;

#[test]
#[ignore]
fn scratch() {
    let args: Vec<i64> = std::env::var("SD").unwrap().split(',').map(|x| x.parse().unwrap()).collect();
    let (a, b, d) = (BigInt::from(args[0]), BigInt::from(args[1]), BigInt::from(args[2]));
    let t = std::time::Instant::now();
    let mut bud = Budget::unlimited();
    let out = second_descent(&a, &b, &d, &SecondDescentOptions::default(), &mut bud);
    println!("{:?}", t.elapsed());
    match &out {
        Ok(SecondDescentOutcome::NoPoint(ev)) => {
            println!("NoPoint {:?}", ev);
            println!("verify {}", verify_obstruction(&a, &b, &d, ev, &mut Budget::unlimited()));
        }
        o => println!("{:?}", o),
    }
}
