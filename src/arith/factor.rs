//! Integer factorisation with an effort budget.

use super::ecm::{ecm, ecm_tiers};
use super::mont::{with_ring, Ring};
use super::prime::{is_prime, is_prime_u64, prime_table};
use super::rho::{pollard_brent, rho_u64, Split};
use super::roots::perfect_power;
use super::siqs;
use crate::budget::Budget;
use crate::error::{Error, Result};
use num_bigint::{BigInt, BigUint};
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::collections::BTreeMap;

/// A factorisation `n = sign · ∏ pᵢ^eᵢ` of a nonzero integer, primes
/// strictly ascending, exponents `≥ 1`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Factorization {
    sign: i8,
    factors: Vec<(BigInt, u32)>,
}

impl Factorization {
    /// Builds a factorisation from a sign (`±1`) and prime powers; the
    /// pairs are sorted and equal primes merged. The caller vouches that
    /// the `pᵢ` are primes; nothing is checked but the sign.
    ///
    /// Errors: [`Error::InvalidArgument`] for a sign other than `±1`, a
    /// "prime" `< 2`, or an exponent 0.
    pub fn from_parts(sign: i8, factors: Vec<(BigInt, u32)>) -> Result<Self> {
        if sign != 1 && sign != -1 {
            return Err(Error::InvalidArgument {
                reason: format!("sign of a factorisation must be 1 or -1, got {sign}"),
            });
        }
        let mut map: BTreeMap<BigInt, u32> = BTreeMap::new();
        for (p, e) in factors {
            if p < BigInt::from(2) || e == 0 {
                return Err(Error::InvalidArgument {
                    reason: format!("prime power {p}^{e} in a factorisation"),
                });
            }
            *map.entry(p).or_insert(0) += e;
        }
        Ok(Factorization {
            sign,
            factors: map.into_iter().collect(),
        })
    }

    /// The sign of `n`: `1` or `-1`.
    pub fn sign(&self) -> i8 {
        self.sign
    }

    /// The prime powers `(p, e)`, `p` ascending.
    pub fn factors(&self) -> &[(BigInt, u32)] {
        &self.factors
    }

    /// The distinct primes, ascending.
    pub fn primes(&self) -> impl Iterator<Item = &BigInt> {
        self.factors.iter().map(|(p, _)| p)
    }

    /// The exponent of `p` (0 if `p` does not divide `n`).
    pub fn exponent(&self, p: &BigInt) -> u32 {
        self.factors
            .binary_search_by(|(q, _)| q.cmp(p))
            .map(|i| self.factors[i].1)
            .unwrap_or(0)
    }

    /// The number `n` itself.
    pub fn value(&self) -> BigInt {
        let mut v = BigInt::from(self.sign);
        for (p, e) in &self.factors {
            v *= num_traits::pow(p.clone(), *e as usize);
        }
        v
    }
}

/// Primes below this bound are removed by trial division.
const TRIAL_BOUND: u64 = 1 << 12;

/// Rho iterations tried before ECM on a cofactor too large for the sieve.
const RHO_ITERATIONS: u64 = 1 << 14;

/// Rho iterations tried before the sieve (finds factors of up to about
/// 7 digits).
const PRESIEVE_RHO_ITERATIONS: u64 = 1 << 11;

/// The factorisation of a nonzero integer `n`.
///
/// Method (the fundamental theorem of arithmetic gives uniqueness):
/// 1. trial division by the primes below 4096;
/// 2. a cofactor `< 2^64` is split by [`factor_u64`]'s method
///    (exact primality, Pollard–Brent rho);
/// 3. a larger cofactor is tested with Baillie–PSW [`is_prime`] and checked
///    for being a perfect power; a composite of at most 170 bits (about 51
///    digits) then gets 2048 Pollard–Brent rho iterations \[Brent80\]
///    (factors up to about 7 digits), above 100 bits a few ECM curves
///    \[Lenstra87\] with B1 = 150 and 500 (factors up to about 12 digits),
///    and finally the self-initialising quadratic sieve \[Pomerance85\]
///    \[Contini97\], whose running time depends only on the size of the
///    cofactor; a larger composite (or one the sieve fails on) gets 16384
///    rho iterations and ECM with B1 = 150, 500, 2000, 11000, 50000, …;
///    both parts of a split are factored recursively.
///
/// Primes above `2^64` in the result are Baillie–PSW probable primes (no
/// counterexample is known). Everything is deterministic: fixed rho
/// constants, Suyama parameters `σ = 11, 12, …`, a fixed pseudo-random
/// sequence for the primes of the sieve polynomials.
///
/// Input cases: `n = ±1` gives an empty factor list with sign `±1`; the
/// sign of a negative `n` is kept in [`Factorization::sign`].
///
/// Errors: [`Error::Zero`] for `n = 0`;
/// [`Error::FactorBudgetExhausted`] when `budget` runs out, carrying the
/// prime powers found so far and the unfactored cofactor (their product
/// times the sign is `n`).
///
/// Budget units: one per trial division, one per modular multiplication
/// in rho and ECM, and in the sieve one per sieve-array update, per
/// factor-base root update and per trial division of a sieve candidate.
///
/// Cost: any `n` of up to 40 digits (whatever the sizes of its prime
/// factors) is split by the sieve in tens of milliseconds: 13–20 million
/// budget units and 15–40 ms of CPU time for the 40-digit products of two
/// 20-digit primes measured in docs/performance.md, about 1.4 million
/// units and 5 ms for 30-digit ones; a 50-digit semiprime took about
/// 350 million units (0.35 s).
///
/// Example: `factor(−360) = −1 · 2³ · 3² · 5`.
pub fn factor(n: &BigInt, budget: &mut Budget) -> Result<Factorization> {
    if n.is_zero() {
        return Err(Error::Zero {
            what: "the integer to factor".into(),
        });
    }
    let sign: i8 = if n.is_negative() { -1 } else { 1 };
    let mut found: BTreeMap<BigInt, u32> = BTreeMap::new();
    let mut m = n.magnitude().clone();

    // 1. Trial division.
    let table = prime_table(TRIAL_BOUND);
    let mut spent = 0u64;
    for p in table.primes_in(2, TRIAL_BOUND) {
        if m.is_one() {
            break;
        }
        if m.bits() <= 64 {
            break; // the u64 path takes over
        }
        spent += 1;
        if super::prime::rem_u64(&m, p) == 0 {
            let mut e = 0u32;
            let pb = BigUint::from(p);
            while super::prime::rem_u64(&m, p) == 0 {
                m /= &pb;
                e += 1;
            }
            found.insert(BigInt::from(p), e);
        }
    }
    if budget.spend(spent).is_err() {
        return Err(exhausted(found, vec![(BigInt::from(m), 1)]));
    }

    // 2–3. A work list of (cofactor, multiplicity) pairs.
    let mut work: Vec<(BigUint, u32)> = vec![(m, 1)];
    while let Some((c, e)) = work.pop() {
        if c.is_one() {
            continue;
        }
        if let Some(small) = c.to_u64() {
            match factor_u64_budget(small, budget) {
                Some(fs) => {
                    for (p, k) in fs {
                        *found.entry(BigInt::from(p)).or_insert(0) += k * e;
                    }
                    continue;
                }
                None => {
                    work.push((c, e));
                    return Err(exhausted(found, to_bigint_pairs(work)));
                }
            }
        }
        let cb = BigInt::from(c.clone());
        if budget.spend(c.bits()).is_err() {
            work.push((c, e));
            return Err(exhausted(found, to_bigint_pairs(work)));
        }
        if is_prime(&cb) {
            *found.entry(cb).or_insert(0) += e;
            continue;
        }
        if let Some((r, k)) = perfect_power(&cb) {
            work.push((r.magnitude().clone(), e * k));
            continue;
        }
        match split_big(&c, budget) {
            Split::Found(d) => {
                let d = d.magnitude().clone();
                let q = &c / &d;
                work.push((d, e));
                work.push((q, e));
            }
            Split::Exhausted | Split::Failed => {
                work.push((c, e));
                return Err(exhausted(found, to_bigint_pairs(work)));
            }
        }
    }
    Ok(Factorization {
        sign,
        factors: found.into_iter().collect(),
    })
}

fn to_bigint_pairs(work: Vec<(BigUint, u32)>) -> Vec<(BigInt, u32)> {
    work.into_iter()
        .map(|(c, e)| (BigInt::from(c), e))
        .collect()
}

fn exhausted(found: BTreeMap<BigInt, u32>, rest: Vec<(BigInt, u32)>) -> Error {
    let mut cofactor = BigInt::one();
    for (c, e) in rest {
        cofactor *= num_traits::pow(c, e as usize);
    }
    Error::FactorBudgetExhausted {
        found: found.into_iter().collect(),
        cofactor,
    }
}

/// A proper divisor of the odd composite `c > 2^64` that is not a perfect
/// power and has no prime factor below [`TRIAL_BOUND`].
///
/// Up to [`siqs::MAX_BITS`] bits: a short rho run and a few small ECM
/// curves (cheap next to the sieve, they catch factors of up to about 12
/// digits), then the quadratic sieve, whose cost depends only on the size
/// of `c`. Beyond, or if the sieve fails: rho and the full ECM schedule.
fn split_big(c: &BigUint, budget: &mut Budget) -> Split {
    let bits = c.bits();
    if bits <= siqs::MAX_BITS {
        let pre = with_ring!(c, |ring| presieve_in(&ring, bits, budget)).unwrap_or(Split::Failed);
        if pre != Split::Failed {
            return pre;
        }
        match siqs::siqs(c, budget) {
            Split::Failed => {}
            other => return other,
        }
    }
    with_ring!(c, |ring| split_in(&ring, budget)).unwrap_or(Split::Failed)
}

/// ECM tiers `(B1, curves)` tried before the sieve on a cofactor of more
/// than 100 bits, and on one of more than 115 bits.
const PRESIEVE_ECM: [(u64, u32); 2] = [(150, 8), (500, 12)];

fn presieve_in<R: Ring>(ring: &R, bits: u64, budget: &mut Budget) -> Split {
    match pollard_brent(ring, 1, PRESIEVE_RHO_ITERATIONS, budget) {
        Split::Failed => {}
        other => return other,
    }
    let tiers: &[(u64, u32)] = match bits {
        0..=100 => &[],
        101..=115 => &PRESIEVE_ECM[..1],
        _ => &PRESIEVE_ECM[..],
    };
    ecm_tiers(ring, tiers, budget)
}

fn split_in<R: Ring>(ring: &R, budget: &mut Budget) -> Split {
    match pollard_brent(ring, 1, RHO_ITERATIONS, budget) {
        Split::Failed => ecm(ring, budget),
        other => other,
    }
}

/// The factorisation of `n < 2^64` as `(p, e)` pairs, `p` ascending;
/// empty for `n ≤ 1` (so `factor_u64(0)` is empty too: callers that need
/// an error for 0 use [`factor`]).
///
/// Method: trial division by the primes below 4096, then recursive
/// splitting of the cofactor with [`is_prime_u64`] (exact) and
/// Pollard–Brent rho \[Brent80\] in 64-bit Montgomery arithmetic. Exact: no
/// probable primes.
///
/// Cost: rho needs about `p^{1/2} ≤ 2^16` steps for the second-largest
/// prime `p ≤ 2^32` of `n`: at most a few milliseconds.
///
/// Example: `factor_u64(600851475143) = [(71,1), (839,1), (1471,1), (6857,1)]`.
pub fn factor_u64(n: u64) -> Vec<(u64, u32)> {
    factor_u64_budget(n, &mut Budget::unlimited()).unwrap_or_default()
}

/// [`factor_u64`] with a budget: `None` when it ran out.
fn factor_u64_budget(mut n: u64, budget: &mut Budget) -> Option<Vec<(u64, u32)>> {
    let mut out: BTreeMap<u64, u32> = BTreeMap::new();
    if n <= 1 {
        return Some(Vec::new());
    }
    let tz = n.trailing_zeros();
    if tz > 0 {
        out.insert(2, tz);
        n >>= tz;
    }
    let mut divisions = 0u64;
    let mut p = 3u64;
    while p < TRIAL_BOUND && p * p <= n {
        divisions += 1;
        if n % p == 0 {
            let mut e = 0;
            while n % p == 0 {
                n /= p;
                e += 1;
            }
            out.insert(p, e);
        }
        p += 2;
    }
    budget.spend(divisions).ok()?;
    if n > 1 && n < TRIAL_BOUND * TRIAL_BOUND {
        *out.entry(n).or_insert(0) += 1;
        n = 1;
    }
    let mut work = vec![n];
    while let Some(c) = work.pop() {
        if c == 1 {
            continue;
        }
        budget.spend(64).ok()?;
        if is_prime_u64(c) {
            *out.entry(c).or_insert(0) += 1;
            continue;
        }
        let r = super::roots::isqrt_u64(c);
        if r * r == c {
            work.push(r);
            work.push(r);
            continue;
        }
        let d = rho_u64(c);
        budget
            .spend(4 * (super::roots::isqrt_u64(super::roots::isqrt_u64(c)) + 1))
            .ok()?;
        work.push(d);
        work.push(c / d);
    }
    Some(out.into_iter().collect())
}
