//! The primes of an integer read off primes found earlier for the same
//! curve, instead of factoring it again.
//!
//! A descent factors several related numbers of one curve: the
//! discriminant, and b and a² − 4b of each reduced model
//! y² = x³ + a x² + b x (Δ = 16 b² (a² − 4b) for that model, so their primes
//! are those of Δ up to a change of scale). [`KnownPrimes`] collects the
//! primes found so far; [`KnownPrimes::primes_of`] answers for a new number
//! only when the answer is certainly the one [`factor`] would give *and*
//! `factor` would have spent nothing from its budget on it, so the
//! budget semantics (and every outcome) of the callers stay those of
//! factoring each number under its own budget.
//!
//! The second condition rests on two documented steps of [`factor`]:
//! every prime below [`TRIAL_BOUND`] is removed by trial division, and a
//! cofactor below 2^64 is factored completely; neither is charged. So when
//! the part of n made of primes ≥ [`TRIAL_BOUND`] is below 2^64, `factor(n)`
//! succeeds with no budget spent.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};

use crate::arith::factor::TRIAL_BOUND;

#[cfg(doc)]
use crate::arith::factor;

/// Primes met so far, ascending and without repeats.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub(crate) struct KnownPrimes {
    primes: Vec<BigInt>,
}

impl KnownPrimes {
    /// Adds primes (each must be a prime, as returned by [`factor`]).
    pub(crate) fn add<'a>(&mut self, primes: impl IntoIterator<Item = &'a BigInt>) {
        let before = self.primes.len();
        self.primes.extend(primes.into_iter().cloned());
        if self.primes.len() != before {
            self.primes.sort();
            self.primes.dedup();
        }
    }

    /// The known primes, ascending.
    #[cfg(test)]
    pub(crate) fn primes(&self) -> &[BigInt] {
        &self.primes
    }

    /// The distinct primes of n, ascending, read off the known primes —
    /// `None` unless they divide out all of |n| and the part of n made of
    /// primes ≥ [`TRIAL_BOUND`] is below 2^64 (module docs: then
    /// [`factor`] gives the same primes and spends no budget). `None` for
    /// n = 0.
    pub(crate) fn primes_of(&self, n: &BigInt) -> Option<Vec<BigInt>> {
        if n.is_zero() {
            return None;
        }
        match n.abs().to_u128() {
            Some(m) => self.primes_of_word(m),
            None => self.primes_of_big(n.abs()),
        }
    }

    fn primes_of_word(&self, mut m: u128) -> Option<Vec<BigInt>> {
        let mut out = Vec::new();
        let mut large: u128 = 1;
        for p in &self.primes {
            if m == 1 {
                break;
            }
            let Some(q) = p.to_u128() else { break };
            if q > m {
                break;
            }
            if m % q != 0 {
                continue;
            }
            while m % q == 0 {
                m /= q;
                if q >= u128::from(TRIAL_BOUND) {
                    large = large.saturating_mul(q);
                }
            }
            out.push(p.clone());
        }
        (m == 1 && large <= u128::from(u64::MAX)).then_some(out)
    }

    fn primes_of_big(&self, mut m: BigInt) -> Option<Vec<BigInt>> {
        let mut out = Vec::new();
        let mut large = BigInt::one();
        let limit = BigInt::from(u64::MAX);
        let bound = BigInt::from(TRIAL_BOUND);
        for p in &self.primes {
            if m.is_one() || p > &m {
                break;
            }
            let (mut q, mut r) = m.div_rem(p);
            if !r.is_zero() {
                continue;
            }
            while r.is_zero() {
                m = q;
                if p >= &bound {
                    large *= p;
                    if large > limit {
                        return None;
                    }
                }
                (q, r) = m.div_rem(p);
            }
            out.push(p.clone());
        }
        (m.is_one() && large <= limit).then_some(out)
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use crate::arith::factor;
    use crate::budget::Budget;

    fn big(s: &str) -> BigInt {
        s.parse().unwrap()
    }

    /// Whenever `primes_of` answers, the answer is the prime list of
    /// `factor` and `factor` spent nothing; checked on products of small
    /// primes, of primes just above the trial bound and below 2^64, with
    /// a pool that knows all, some or none of them.
    #[test]
    fn answers_agree_with_factor_and_cost_it_nothing() {
        let samples = [
            "1",
            "-1",
            "64",
            "-400000000",
            "4398046511104",
            // 65537 · 65539 (both prime, just above 2^16; sympy 1.14).
            "4295229443",
            // (2^61 − 1) · 3² · 5: one large prime below 2^64 (values of
            // this list computed with Python integers, primality by sympy 1.14).
            "103762935414616227795",
            // (2^61 − 1)² · 2: the large part exceeds 2^64.
            "10633823966279326974007084445387980802",
            // 2^64 + 13 (prime, sympy 1.14) times 6.
            "110680464442257309774",
            // 64 · 19999^6 and 2^6 · 3^6 · 7^6 · 991^6 (discriminants of
            // y² = x³ − n² x are 64 n^6).
            "4094771353589760383992320064",
            "5199213711571377649570327104",
        ];
        let mut answered = 0;
        for s in samples {
            let n = big(s);
            let f = factor(&n, &mut Budget::unlimited()).unwrap();
            let all: Vec<BigInt> = f.primes().cloned().collect();
            for keep in 0..3 {
                let mut pool = KnownPrimes::default();
                let chosen: Vec<BigInt> = match keep {
                    0 => all.clone(),
                    1 => all.iter().step_by(2).cloned().collect(),
                    _ => Vec::new(),
                };
                pool.add(&chosen);
                // Unrelated primes in the pool change nothing.
                pool.add(&[BigInt::from(11), big("4294967311")]);
                let Some(got) = pool.primes_of(&n) else {
                    continue;
                };
                assert_eq!(got, all, "{n}");
                let mut b = Budget::with_units(0);
                assert_eq!(factor(&n, &mut b).unwrap().primes().count(), got.len());
                assert_eq!(b.spent(), 0, "{n}");
                answered += 1;
            }
        }
        assert!(answered >= 10, "answered {answered}");
    }

    #[test]
    fn a_large_part_above_two_to_the_64_or_a_missing_prime_gives_no_answer() {
        let m61 = big("2305843009213693951"); // 2^61 − 1, prime (sympy 1.14)
        let mut pool = KnownPrimes::default();
        pool.add(&[BigInt::from(2), m61.clone()]);
        assert!(pool.primes_of(&(&m61 * &m61 * 2)).is_none());
        assert_eq!(
            pool.primes_of(&(&m61 * 4)),
            Some(vec![BigInt::from(2), m61])
        );
        assert!(pool.primes_of(&BigInt::from(6)).is_none());
        assert!(pool.primes_of(&BigInt::zero()).is_none());
        assert_eq!(
            pool.primes(),
            &[BigInt::from(2), big("2305843009213693951")]
        );
    }
}
