//! Certified isolation of the real roots of an integer polynomial.
//!
//! Sturm's theorem (Sturm 1829; e.g. Basu, Pollack, Roy, *Algorithms in
//! Real Algebraic Geometry*, 2nd ed., Theorem 2.50): for a square-free `f`
//! with Sturm sequence `f, f′, −rem(…)…`, the number of real roots in
//! `(a, b]` (`f(a)·f(b) ≠ 0`) is `V(a) − V(b)`, `V` counting sign changes.
//! Intervals are split at dyadic points until each holds one root, then
//! narrowed by bisection with exact signs. All arithmetic is exact in Q.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};
use std::cmp::Ordering;

/// An interval `[lo, hi]` holding exactly one real root of the polynomial
/// it came from: either `lo == hi` is the root, or `lo < hi`, the root lies
/// in the open interval and `f(lo)`, `f(hi)` are non-zero of opposite signs.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct RootInterval {
    /// Lower end.
    pub lo: BigRational,
    /// Upper end.
    pub hi: BigRational,
}

impl RootInterval {
    /// `hi − lo`.
    pub fn width(&self) -> BigRational {
        &self.hi - &self.lo
    }
}

/// Sign of the integer polynomial `c` (ascending) at `x`, exactly.
fn sign_exact(c: &[BigInt], x: &BigRational) -> Ordering {
    let (n, d) = (x.numer(), x.denom());
    let mut acc = BigInt::zero();
    let mut dpow = BigInt::one();
    for a in c.iter().rev() {
        acc = acc * n + a * &dpow;
        dpow *= d;
    }
    // d > 0, so the sign of d^deg·f(x) is the sign of f(x).
    acc.cmp(&BigInt::zero())
}

type Poly = Vec<BigRational>;

fn trim(mut p: Poly) -> Poly {
    while p.last().is_some_and(Zero::is_zero) {
        p.pop();
    }
    p
}

/// Remainder of `a` by `b` (`b` non-zero, trimmed).
fn rem(a: &Poly, b: &Poly) -> Poly {
    let mut r = a.clone();
    let db = b.len() - 1;
    let lead = &b[db];
    while r.len() > db && !r.is_empty() {
        let k = r.len() - 1;
        let q = &r[k] / lead;
        for (i, bi) in b.iter().enumerate() {
            let idx = k - db + i;
            r[idx] = &r[idx] - &q * bi;
        }
        r = trim(r);
        if r.len() > k {
            // The leading term cancels exactly; guard against no progress.
            r.pop();
        }
    }
    r
}

/// Sturm sequence of `f`; `None` unless `f` is square-free of degree ≥ 1.
fn sturm(c: &[BigInt]) -> Option<Vec<Poly>> {
    let f = trim(c.iter().cloned().map(BigRational::from_integer).collect());
    if f.len() < 2 {
        return None;
    }
    let df: Poly = trim(
        f.iter()
            .enumerate()
            .skip(1)
            .map(|(i, a)| a * BigRational::from_integer(BigInt::from(i)))
            .collect(),
    );
    let mut seq = vec![f, df];
    loop {
        let n = seq.len();
        let r = rem(&seq[n - 2], &seq[n - 1]);
        if r.is_empty() {
            break;
        }
        seq.push(r.into_iter().map(|v| -v).collect());
    }
    // Square-free iff the last element (gcd(f, f′) up to a unit) is constant.
    (seq.last()?.len() == 1).then_some(seq)
}

fn variations(seq: &[Poly], x: &BigRational) -> usize {
    let mut last = Ordering::Equal;
    let mut n = 0;
    for p in seq {
        let mut acc = BigRational::zero();
        for a in p.iter().rev() {
            acc = acc * x + a;
        }
        let s = acc.numer().cmp(&BigInt::zero());
        if s == Ordering::Equal {
            continue;
        }
        if last != Ordering::Equal && s != last {
            n += 1;
        }
        last = s;
    }
    n
}

/// Isolating intervals of all real roots of the square-free integer
/// polynomial `c` (ascending coefficients), in increasing order and
/// pairwise disjoint. `None` if `c` is not square-free or is constant.
pub(crate) fn isolate_real_roots(c: &[BigInt]) -> Option<Vec<RootInterval>> {
    let seq = sturm(c)?;
    let deg = seq[0].len() - 1;
    let lead = seq[0][deg].abs();
    // Cauchy's bound: every root has |x| < 1 + max|c_i / c_d| ≤ B.
    let mut bound = BigRational::one();
    for a in &seq[0][..deg] {
        let v = a.abs() / &lead;
        if v > bound {
            bound = v;
        }
    }
    let b = BigRational::from_integer(bound.to_integer() + 2);
    let mut out = Vec::new();
    let mut stack = vec![(-b.clone(), b, None::<usize>)];
    while let Some((a, b, count)) = stack.pop() {
        let n = count.unwrap_or_else(|| variations(&seq, &a) - variations(&seq, &b));
        if n == 0 {
            continue;
        }
        if n == 1 {
            out.push(RootInterval { lo: a, hi: b });
            continue;
        }
        // Split at a point that is not a root: among deg + 1 distinct
        // fractions of the interval at least one is not.
        let two = BigRational::from_integer(BigInt::from(2));
        let mut m = (&a + &b) / &two;
        let mut k = 1u32;
        while sign_exact(c, &m) == Ordering::Equal {
            k += 1;
            let frac = BigRational::new(BigInt::from(1), BigInt::from(1u64 << k.min(62)));
            m = &a + (&b - &a) * frac;
        }
        let vm = variations(&seq, &m);
        let (va, vb) = (variations(&seq, &a), variations(&seq, &b));
        stack.push((a, m.clone(), Some(va - vm)));
        stack.push((m, b, Some(vm - vb)));
    }
    out.sort_by(|x, y| x.lo.cmp(&y.lo));
    Some(out)
}

/// Narrows `iv` (an interval from [`isolate_real_roots`] for `c`) by
/// bisection until its width is at most `width` (> 0) or the root is
/// found exactly.
pub(crate) fn refine(c: &[BigInt], iv: &mut RootInterval, width: &BigRational) {
    if iv.lo == iv.hi {
        return;
    }
    let two = BigRational::from_integer(BigInt::from(2));
    let s_lo = sign_exact(c, &iv.lo);
    while iv.width() > *width {
        let m = (&iv.lo + &iv.hi) / &two;
        match sign_exact(c, &m) {
            Ordering::Equal => {
                iv.lo = m.clone();
                iv.hi = m;
                return;
            }
            s if s == s_lo => iv.lo = m,
            _ => iv.hi = m,
        }
    }
}

/// The largest f64 strictly below `q` (exact comparison).
pub(crate) fn f64_below(q: &BigRational) -> Option<f64> {
    step_f64(q, Ordering::Less)
}

/// The smallest f64 strictly above `q` (exact comparison).
pub(crate) fn f64_above(q: &BigRational) -> Option<f64> {
    step_f64(q, Ordering::Greater)
}

fn step_f64(q: &BigRational, want: Ordering) -> Option<f64> {
    use num_traits::ToPrimitive;
    let mut v = q.to_f64()?;
    for _ in 0..8 {
        if !v.is_finite() {
            return None;
        }
        let ord = BigRational::from_float(v)?.cmp(q);
        if ord == want {
            return Some(v);
        }
        // One outward step of a few ulps (the exact check above decides).
        let step = v.abs() * f64::EPSILON + f64::MIN_POSITIVE;
        v = if want == Ordering::Less {
            v - step
        } else {
            v + step
        };
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ints(v: &[i64]) -> Vec<BigInt> {
        v.iter().map(|&x| BigInt::from(x)).collect()
    }

    #[test]
    fn isolates_integer_and_close_roots() {
        // (x − 1)(x − 2)(x − 3): roots exactly at integers (common practice).
        let c = ints(&[-6, 11, -6, 1]);
        let iv = isolate_real_roots(&c).unwrap();
        assert_eq!(iv.len(), 3);
        for (k, mut r) in iv.into_iter().enumerate() {
            refine(&c, &mut r, &BigRational::new(1.into(), 1000.into()));
            let root = BigRational::from_integer(BigInt::from(k as i64 + 1));
            assert!(r.lo <= root && root <= r.hi, "{r:?}");
        }
        // x(10⁶x − 1)(10⁶x − 2) = 10¹²x³ − 3·10⁶x² + 2x: roots 10⁻⁶ apart.
        let c = ints(&[0, 2, -3_000_000, 1_000_000_000_000]);
        let iv = isolate_real_roots(&c).unwrap();
        assert_eq!(iv.len(), 3);
        for w in iv.windows(2) {
            assert!(w[0].hi <= w[1].lo);
        }
        // x³ + x + 1: one real root; x² + 1: none; (x − 1)²: not square-free.
        assert_eq!(isolate_real_roots(&ints(&[1, 1, 0, 1])).unwrap().len(), 1);
        assert_eq!(isolate_real_roots(&ints(&[1, 0, 1])).unwrap().len(), 0);
        assert!(isolate_real_roots(&ints(&[1, -2, 1])).is_none());
    }

    #[test]
    fn directed_f64() {
        let third = BigRational::new(1.into(), 3.into());
        let (a, b) = (f64_below(&third).unwrap(), f64_above(&third).unwrap());
        assert!(BigRational::from_float(a).unwrap() < third);
        assert!(BigRational::from_float(b).unwrap() > third);
        let one = BigRational::one();
        assert!(f64_below(&one).unwrap() < 1.0);
        assert!(f64_above(&one).unwrap() > 1.0);
    }
}
