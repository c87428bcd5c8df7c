//! Integer factorisation with an effort budget.

use super::ecm::{ecm, ecm_tiers};
use super::meter::{Meter, Scaled};
use super::mont::{with_ring, Ring};
use super::prime::{is_prime, is_prime_u64, prime_table, rem_u64};
use super::rho::{pollard_brent, Split};
use super::roots::perfect_power_up_to;
use super::siqs;
use super::small::{gcd_u64, split_u64};
use crate::budget::Budget;
use crate::error::{Error, Result};
use num_bigint::{BigInt, BigUint};
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::collections::BTreeMap;
use std::sync::OnceLock;

/// A factorisation `n = sign · ∏ pᵢ^eᵢ` of a nonzero integer, primes
/// strictly ascending, exponents `≥ 1`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Factorization {
    sign: i8,
    factors: Vec<(BigInt, u32)>,
}

impl Factorization {
    /// The sign of `n`: `1` or `-1`.
    pub fn sign(&self) -> i8 {
        self.sign
    }

    /// The prime powers `(p, e)`, `p` ascending.
    pub fn factors(&self) -> &[(BigInt, u32)] {
        &self.factors
    }

    /// The distinct primes, ascending.
    pub(crate) fn primes(&self) -> impl Iterator<Item = &BigInt> {
        self.factors.iter().map(|(p, _)| p)
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

/// Every prime below this bound is removed by trial division from a
/// number above `2^64`, under every budget (numbers below `2^64` are
/// factored completely by [`factor_u64`]'s method).
pub const TRIAL_BOUND: u64 = 1 << 16;

/// Cofactors of at most this many bits get the primality and
/// perfect-power tests whatever the budget; larger ones are charged for
/// them (a Baillie–PSW test on a 4096-bit number takes tens of
/// milliseconds, on a 40000-bit one minutes).
pub const CHEAP_TEST_BITS: u64 = 4096;

/// Rho iterations tried before ECM on a cofactor too large for the sieve.
const RHO_ITERATIONS: u64 = 1 << 14;

/// Rho iterations tried before the sieve (finds factors of up to about
/// 7 digits).
const PRESIEVE_RHO_ITERATIONS: u64 = 1 << 11;

/// The product of the primes below [`TRIAL_BOUND`] (about 94 000 bits).
fn primorial() -> &'static BigUint {
    static P: OnceLock<BigUint> = OnceLock::new();
    P.get_or_init(|| {
        let table = prime_table(TRIAL_BOUND);
        let mut level: Vec<BigUint> = table
            .primes_in(2, TRIAL_BOUND - 1)
            .map(BigUint::from)
            .collect();
        while level.len() > 1 {
            level = level
                .chunks(2)
                .map(|c| c.iter().product::<BigUint>())
                .collect();
        }
        level.pop().unwrap_or_else(BigUint::one)
    })
}

/// The primes below [`TRIAL_BOUND`] grouped into products below `2^64`:
/// `(product, range of its primes in the list)`, and the list.
struct Chunks {
    chunks: Vec<(u64, std::ops::Range<usize>)>,
    primes: Vec<u64>,
}

fn chunks() -> &'static Chunks {
    static C: OnceLock<Chunks> = OnceLock::new();
    C.get_or_init(|| {
        let primes: Vec<u64> = prime_table(TRIAL_BOUND)
            .primes_in(3, TRIAL_BOUND - 1)
            .collect();
        let mut chunks = Vec::new();
        let mut start = 0;
        let mut prod = 1u64;
        for (i, &p) in primes.iter().enumerate() {
            match prod.checked_mul(p) {
                Some(q) => prod = q,
                None => {
                    chunks.push((prod, start..i));
                    start = i;
                    prod = p;
                }
            }
        }
        chunks.push((prod, start..primes.len()));
        Chunks { chunks, primes }
    })
}

/// The odd primes below [`TRIAL_BOUND`] that divide `g` (a divisor of
/// their product).
fn small_prime_divisors(g: &BigUint) -> Vec<u64> {
    if let Some(x) = g.to_u64() {
        return factor_u64(x).into_iter().map(|(p, _)| p).collect();
    }
    let t = chunks();
    let mut out = Vec::new();
    for (c, range) in &t.chunks {
        let d = gcd_u64(rem_u64(g, *c), *c);
        if d > 1 {
            out.extend(t.primes[range.clone()].iter().filter(|&&p| d % p == 0));
        }
    }
    out
}

/// Removes every prime below [`TRIAL_BOUND`] from `m`, recording it in
/// `found`; a number below `2^64` is left to the word-size path.
///
/// Method: after the powers of 2, `g = gcd(m, ∏ p)` over the odd primes
/// `p < TRIAL_BOUND`: for `m` of at most six words the product of the
/// primes, grouped into words, is accumulated modulo `m` in Montgomery
/// form (about 1900 multiplications); for larger `m` the primorial is
/// reduced modulo `m` once. Then only the primes dividing `g` are
/// divided out. A number larger than the primorial (about 94 000 bits)
/// is divided by pairs of primes instead (two primes per pass over its
/// words).
fn trial_divide(m: &mut BigUint, found: &mut BTreeMap<BigInt, u32>) {
    let tz = m.trailing_zeros().unwrap_or(0);
    if tz > 0 {
        *m >>= tz;
        *found.entry(BigInt::from(2)).or_insert(0) += tz as u32;
    }
    let mut divide_out = |m: &mut BigUint, p: u64| {
        let pb = BigUint::from(p);
        let mut e = 0u32;
        while rem_u64(m, p) == 0 {
            *m /= &pb;
            e += 1;
        }
        if e > 0 {
            *found.entry(BigInt::from(p)).or_insert(0) += e;
        }
    };
    if m.is_zero() || m.bits() <= 64 {
        return;
    }
    let prim = primorial();
    let g = if m.bits() <= 384 {
        let t = chunks();
        let acc = with_ring!(m, |ring| {
            let mut acc = ring.one();
            for (c, _) in &t.chunks {
                acc = ring.mul(&acc, &ring.unit_multiple_u64(*c));
            }
            ring.to_big(&acc)
        });
        match acc {
            Some(a) => a.magnitude().gcd(m),
            None => m.gcd(&(prim % &*m)),
        }
    } else if m.bits() < prim.bits() {
        m.gcd(&(prim % &*m))
    } else {
        let t = chunks();
        for pair in t.primes.chunks(2) {
            if m.bits() <= 64 {
                break;
            }
            let pp: u64 = pair.iter().product();
            let r = rem_u64(m, pp);
            for &p in pair {
                if r % p == 0 {
                    divide_out(m, p);
                }
            }
        }
        return;
    };
    if g.is_one() {
        return;
    }
    for p in small_prime_divisors(&g) {
        divide_out(m, p);
    }
}

/// The factorisation of a nonzero integer `n`.
///
/// Method (the fundamental theorem of arithmetic gives uniqueness). The
/// cheap steps run under every budget:
/// 1. trial division by every prime below `TRIAL_BOUND` `= 2^16`
///    (a gcd with their product, see `trial_divide`);
/// 2. a cofactor below `2^64` is factored completely and exactly by
///    [`factor_u64`]'s method (its work has a fixed bound of about
///    `2·10^6` word multiplications);
/// 3. every larger cofactor is tested with Baillie–PSW [`is_prime`] and
///    for being a perfect power `r^k` (only `k ≤ bits/16` can occur after
///    step 1); cofactors above `CHEAP_TEST_BITS` are charged for these
///    tests.
///
/// Then the budgeted methods, on a composite that is not a perfect power:
/// up to 170 bits (about 51 digits) 2048 Pollard–Brent rho iterations
/// \[Brent80\] (factors up to about 7 digits), above 100 bits a few ECM
/// curves \[Lenstra87\] with B1 = 150 and 500 (factors up to about 12
/// digits), and then the self-initialising quadratic sieve \[Pomerance85\]
/// \[Contini97\], whose running time depends only on the size of the
/// cofactor; a larger composite (or one the sieve fails on) gets 16384
/// rho iterations and ECM with B1 = 150, 500, 2000, 11000, 50000, …. Both
/// parts of a split go through the cheap steps again.
///
/// Before a failure is reported, the cofactors left are checked once more
/// against the cheap steps: they are divided by the primes already found
/// and split by their pairwise gcds, and the parts are tested again.
///
/// Primes above `2^64` in the result are Baillie–PSW probable primes (no
/// counterexample is known). Everything is deterministic: fixed rho
/// constants, Suyama parameters `σ = 11, 12, …`, a fixed pseudo-random
/// sequence for the primes of the sieve polynomials.
///
/// Input cases: `n = ±1` gives an empty factor list with sign `±1`; the
/// sign of a negative `n` is kept in [`Factorization::sign`].
///
/// # Errors
/// [`Error::Zero`] for `n = 0`;
/// [`Error::FactorBudgetExhausted`] when `budget` runs out, carrying the
/// prime powers found so far and the unfactored cofactor (their product
/// times the sign is `n`).
///
/// Budget units: one unit is one modular multiplication of numbers of
/// the size of `n` (at least 128 bits, i.e. `W = max(2, words(n))`
/// 64-bit words), so that a unit costs about the same time in every
/// method. A multiplication modulo a `k`-word cofactor in rho or ECM is
/// charged `k²/W²` units; in the sieve a sieve-array update, a
/// factor-base root update or a trial division of a candidate is charged
/// `1/(2W²)` units (an eighth of a two-word multiplication: measured
/// about 1 ns against 8 ns). The cheap steps above are not charged
/// (except the tests on cofactors above `CHEAP_TEST_BITS`: `3·bits·k²/W²`).
/// A caller that scales its budget down by `(128/bits)²` for large `n`
/// therefore still pays for the real work on a small hard cofactor only.
///
/// Cost: any `n` of up to 40 digits (whatever the sizes of its prime
/// factors) is split by the sieve in tens of milliseconds: 13–20 million
/// raw sieve operations (about 2 million units) and 15–40 ms of CPU time
/// for the 40-digit products of two 20-digit primes measured in
/// docs/performance.md; a 50-digit semiprime took about 350 million raw
/// operations (0.35 s).
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
    let words = m.bits().div_ceil(64).max(2);
    let mut state = Run {
        found: BTreeMap::new(),
        left: Vec::new(),
        out_of_budget: false,
        words,
    };
    trial_divide(&mut m, &mut found);
    state.found = found;
    state.run(vec![(m, 1)], budget);
    state.settle();
    if state.left.is_empty() {
        Ok(Factorization {
            sign,
            factors: state.found.into_iter().collect(),
        })
    } else {
        Err(exhausted(state.found, to_bigint_pairs(state.left)))
    }
}

/// The state of one factorisation: primes found, cofactors left.
struct Run {
    found: BTreeMap<BigInt, u32>,
    /// Composite cofactors (with multiplicity) no budgeted method split.
    left: Vec<(BigUint, u32)>,
    out_of_budget: bool,
    /// `max(2, words(n))`: the size the budget's units refer to.
    words: u64,
}

impl Run {
    /// Factors the work list: cheap steps always, budgeted methods while
    /// the budget lasts; what is left unsplit goes to `self.left`. All
    /// cofactors have no prime factor below [`TRIAL_BOUND`] or are below
    /// `2^64`.
    fn run(&mut self, mut work: Vec<(BigUint, u32)>, budget: &mut Budget) {
        while let Some((c, e)) = work.pop() {
            if c.is_one() {
                continue;
            }
            if let Some(small) = c.to_u64() {
                for (p, k) in factor_u64(small) {
                    *self.found.entry(BigInt::from(p)).or_insert(0) += k * e;
                }
                continue;
            }
            let bits = c.bits();
            let k = bits.div_ceil(64);
            if bits > CHEAP_TEST_BITS {
                let cost = 3 * bits * k * k / (self.words * self.words);
                if self.out_of_budget || budget.spend(cost.max(1)).is_err() {
                    self.out_of_budget = true;
                    self.left.push((c, e));
                    continue;
                }
            }
            let cb = BigInt::from(c.clone());
            if is_prime(&cb) {
                *self.found.entry(cb).or_insert(0) += e;
                continue;
            }
            let max_exp = (bits / TRIAL_BOUND.ilog2() as u64).max(2) as u32;
            if let Some((r, k)) = perfect_power_up_to(&cb, max_exp) {
                work.push((r.magnitude().clone(), e * k));
                continue;
            }
            if self.out_of_budget {
                self.left.push((c, e));
                continue;
            }
            match split_big(&c, budget, self.words) {
                Split::Found(d) => {
                    let d = d.magnitude().clone();
                    let q = &c / &d;
                    work.push((d, e));
                    work.push((q, e));
                }
                Split::Exhausted => {
                    self.out_of_budget = true;
                    self.left.push((c, e));
                }
                Split::Failed => self.left.push((c, e)),
            }
        }
    }

    /// Checks the cofactors left against the cheap steps once more:
    /// divides out the primes found, splits by pairwise gcds, and reruns
    /// the cheap steps on the parts (no budgeted method).
    fn settle(&mut self) {
        self.out_of_budget = true;
        let mut none = Budget::with_units(0);
        for _ in 0..64 {
            if self.left.is_empty() {
                return;
            }
            let mut left = std::mem::take(&mut self.left);
            let mut work: Vec<(BigUint, u32)> = Vec::new();
            let mut changed = false;
            for (c, e) in left.iter_mut() {
                for (p, k) in self.found.iter_mut() {
                    if p.bits() <= 16 || p.bits() >= c.bits() {
                        continue; // primes below TRIAL_BOUND were removed before
                    }
                    let pm = p.magnitude();
                    while (&*c % pm).is_zero() {
                        *c /= pm;
                        *k += *e;
                        changed = true;
                    }
                }
            }
            let mut i = 0;
            while i < left.len() {
                let mut j = i + 1;
                while j < left.len() {
                    let g = left[i].0.gcd(&left[j].0);
                    if !g.is_one() {
                        let (ci, ei) = left.swap_remove(j);
                        let (cj, ej) = std::mem::replace(&mut left[i], (BigUint::one(), 0));
                        work.push((&ci / &g, ei));
                        work.push((&cj / &g, ej));
                        work.push((g, ei + ej));
                        changed = true;
                        break;
                    }
                    j += 1;
                }
                i += 1;
            }
            work.extend(left.into_iter().filter(|(c, e)| *e > 0 && !c.is_one()));
            if !changed {
                self.left = work;
                return;
            }
            self.run(work, &mut none);
        }
    }
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
/// Work is charged as described at [`factor`] (`words` is `W`).
fn split_big(c: &BigUint, budget: &mut Budget, words: u64) -> Split {
    let bits = c.bits();
    let k = bits.div_ceil(64);
    let w2 = words * words;
    if bits <= siqs::MAX_BITS {
        let pre = {
            let mut meter = Scaled::new(budget, k * k, w2);
            with_ring!(c, |ring| presieve_in(&ring, bits, &mut meter)).unwrap_or(Split::Failed)
        };
        if pre != Split::Failed {
            return pre;
        }
        let mut meter = Scaled::new(budget, 1, 2 * w2);
        match siqs::siqs(c, &mut meter) {
            Split::Failed => {}
            other => return other,
        }
    }
    let mut meter = Scaled::new(budget, k * k, w2);
    with_ring!(c, |ring| split_in(&ring, &mut meter)).unwrap_or(Split::Failed)
}

/// ECM tiers `(B1, curves)` tried before the sieve on a cofactor of more
/// than 100 bits, and on one of more than 115 bits.
const PRESIEVE_ECM: [(u64, u32); 2] = [(150, 8), (500, 12)];

fn presieve_in<R: Ring>(ring: &R, bits: u64, budget: &mut impl Meter) -> Split {
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

fn split_in<R: Ring>(ring: &R, budget: &mut impl Meter) -> Split {
    match pollard_brent(ring, 1, RHO_ITERATIONS, budget) {
        Split::Failed => ecm(ring, budget),
        other => other,
    }
}

/// Odd primes below this bound are tried by trial division in
/// [`factor_u64`] (everything larger is caught by Hart's method, ECM or rho).
const U64_TRIAL_BOUND: u64 = 256;

/// The odd primes below [`U64_TRIAL_BOUND`] with their inverses modulo
/// `2^64` and `⌊(2^64 − 1)/p⌋`: an exact-division test by one
/// multiplication (T. Granlund and P. L. Montgomery, "Division by
/// invariant integers using multiplication", PLDI 1994, §9).
const SMALL_ODD: [(u64, u64, u64); 53] = {
    let mut t = [(0u64, 0u64, 0u64); 53];
    let mut p = 3u64;
    let mut i = 0;
    while p < U64_TRIAL_BOUND {
        let mut d = 3;
        let mut prime = true;
        while d * d <= p {
            if p % d == 0 {
                prime = false;
            }
            d += 2;
        }
        if prime {
            let mut inv = p;
            let mut k = 0;
            while k < 5 {
                inv = inv.wrapping_mul(2u64.wrapping_sub(p.wrapping_mul(inv)));
                k += 1;
            }
            t[i] = (p, inv, u64::MAX / p);
            i += 1;
        }
        p += 2;
    }
    t
};

/// The factorisation of `n < 2^64` as `(p, e)` pairs, `p` ascending;
/// empty for `n ≤ 1` (so `factor_u64(0)` is empty too: callers that need
/// an error for 0 use [`factor`]).
///
/// Method: trial division by the primes below 256 (one multiplication
/// each, see `SMALL_ODD`), then recursive splitting of the cofactor:
/// exact Miller–Rabin [`is_prime_u64`], a perfect-square test, Hart's
/// one-line method for cofactors below `2^34` (W. B. Hart, J. Aust.
/// Math. Soc. 92 (2012)), ECM curves \[Lenstra87\] in 64-bit Montgomery
/// arithmetic with `B1` from 47 to 165 by the size of the cofactor, and
/// Pollard–Brent rho \[Brent80\] in 64-bit Montgomery arithmetic with
/// batched gcds as the last resort. Exact: no probable primes.
///
/// Cost: the ECM curves cost at most about `2·10^6` one-word
/// multiplications and find the factor after a few to a few tens of
/// curves (mean CPU time about 21 µs for products of two 8-digit primes
/// and 45 µs for two 9-digit primes, 20 random products each,
/// docs/performance.md "Issue 16, second round"); rho then needs about `√p` iterations for the
/// least prime `p` of a composite cofactor, so at most about `2^17`
/// Montgomery multiplications.
///
/// Example: `factor_u64(600851475143) = [(71,1), (839,1), (1471,1), (6857,1)]`.
pub fn factor_u64(mut n: u64) -> Vec<(u64, u32)> {
    let mut out: Vec<(u64, u32)> = Vec::new();
    if n <= 1 {
        return out;
    }
    let tz = n.trailing_zeros();
    if tz > 0 {
        out.push((2, tz));
        n >>= tz;
    }
    for &(p, inv, lim) in SMALL_ODD.iter() {
        if p * p > n {
            break;
        }
        // p | n iff n·p⁻¹ mod 2^64 ≤ ⌊(2^64 − 1)/p⌋ (n·p⁻¹ is then n/p).
        if n.wrapping_mul(inv) <= lim {
            let mut e = 0;
            while n.wrapping_mul(inv) <= lim {
                n = n.wrapping_mul(inv);
                e += 1;
            }
            out.push((p, e));
        }
    }
    if n > 1 && n < U64_TRIAL_BOUND * U64_TRIAL_BOUND {
        out.push((n, 1));
        n = 1;
    }
    let mut work = vec![(n, 1u32)];
    while let Some((c, e)) = work.pop() {
        if c == 1 {
            continue;
        }
        if is_prime_u64(c) {
            out.push((c, e));
            continue;
        }
        let r = super::roots::isqrt_u64(c);
        if r * r == c {
            work.push((r, 2 * e));
            continue;
        }
        let d = split_u64(c);
        work.push((d, e));
        work.push((c / d, e));
    }
    out.sort_unstable();
    let mut merged: Vec<(u64, u32)> = Vec::with_capacity(out.len());
    for (p, e) in out {
        match merged.last_mut() {
            Some((q, f)) if *q == p => *f += e,
            _ => merged.push((p, e)),
        }
    }
    merged
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn settling_splits_left_cofactors_by_gcds_and_known_primes() {
        // p, q, r: primes above 2^64 (sympy 1.14.0: isprime(2**89-1), isprime(2**107-1),
        // nextprime(2**64) = 18446744073709551629).
        let p = (BigUint::one() << 89u32) - 1u32;
        let q = (BigUint::one() << 107u32) - 1u32;
        let r = BigUint::from(18446744073709551629u128);
        for x in [&p, &q, &r] {
            assert!(is_prime(&BigInt::from(x.clone())));
        }
        let mut run = Run {
            found: BTreeMap::new(),
            left: vec![(&p * &q, 1), (&p * &r, 2)],
            out_of_budget: true,
            words: 2,
        };
        run.found.insert(BigInt::from(r.clone()), 1);
        run.settle();
        assert!(run.left.is_empty(), "{:?}", run.left);
        let want: Vec<(BigInt, u32)> = vec![
            (BigInt::from(r.clone()), 3),
            (BigInt::from(p.clone()), 3),
            (BigInt::from(q.clone()), 1),
        ];
        let mut want = want;
        want.sort();
        assert_eq!(run.found.into_iter().collect::<Vec<_>>(), want);
    }
}
