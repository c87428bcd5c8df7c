//! Pollard's rho method in Brent's variant.

use super::meter::Meter;
use super::mont::Ring;

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::One;

/// Outcome of a search for a proper divisor.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Split {
    /// A divisor `1 < d < n`.
    Found(BigInt),
    /// The method gave up within its own iteration limit.
    Failed,
    /// The caller's budget ran out.
    Exhausted,
}

/// Number of iterations between two gcds (Brent's product trick).
const BATCH: u64 = 128;

/// Pollard–Brent rho \[Brent80\] on the ring's (odd, composite) modulus `n`
/// with the map `x ↦ x² + c` (in Montgomery form: still a polynomial map
/// of degree 2 mod every prime factor) from the start `x₀ = 2`.
///
/// Finds a prime factor `p` after about `√(πp/2)` iterations; gives up
/// after `max_iter` iterations. Budget: one unit per modular
/// multiplication (the square in each step of the map, the product of
/// differences), charged per batch of at most 128 iterations.
pub(crate) fn pollard_brent<R: Ring>(
    ring: &R,
    c: i64,
    max_iter: u64,
    budget: &mut impl Meter,
) -> Split {
    let n = ring.modulus();
    let cc = ring.elem_i64(c);
    let f = |x: &R::E| ring.add(&ring.sqr(x), &cc);
    let mut y = ring.elem_i64(2);
    let mut x = y.clone();
    let mut q = ring.one();
    let mut ys = y.clone();
    let mut r: u64 = 1;
    let mut done: u64 = 0;
    let mut g = BigInt::one();
    while g.is_one() {
        x = y.clone();
        for _ in 0..r {
            y = f(&y);
        }
        if budget.spend(r).is_err() {
            return Split::Exhausted;
        }
        done += r;
        let mut k = 0u64;
        while k < r && g.is_one() {
            ys = y.clone();
            let steps = BATCH.min(r - k);
            for _ in 0..steps {
                y = f(&y);
                q = ring.mul(&q, &ring.sub(&x, &y));
            }
            if budget.spend(2 * steps).is_err() {
                return Split::Exhausted;
            }
            g = ring.to_big(&q).gcd(&n);
            k += steps;
            done += steps;
        }
        r *= 2;
        if done > max_iter && g.is_one() {
            return Split::Failed;
        }
    }
    if g == n {
        // The batch overshot: step back one iteration at a time.
        loop {
            ys = f(&ys);
            g = ring.to_big(&ring.sub(&x, &ys)).gcd(&n);
            if budget.spend(2).is_err() {
                return Split::Exhausted;
            }
            if !g.is_one() {
                break;
            }
        }
    }
    if g == n {
        Split::Failed
    } else {
        Split::Found(g)
    }
}
