//! The self-initialising quadratic sieve (SIQS) for composites of about
//! 18 to 50 digits.
//!
//! Method \[Pomerance85\] with the self-initialising polynomials of
//! \[Contini97, §2–3\] and one large prime (\[Crandall-Pomerance05, §6.1\]).
//! For `A = q₁⋯q_s` (factor-base primes) and `B ≡ ±√(kN) (mod qⱼ)`,
//! `B² ≡ kN (mod A)`, the values
//!
//! `(A·x + B)² − kN = A·Q(x)`, `Q(x) = A·x² + 2B·x + C`, `C = (B² − kN)/A`,
//!
//! are sieved over `x ∈ [−M, M)`; `2^(s−1)` values of `B` share one `A`
//! and their sieve roots follow from each other by one addition per prime
//! (Gray-code order). A relation `(A·x + B)² ≡ A·Q(x) (mod N)` whose right
//! side factors over the factor base (times at most one large prime, paired
//! with another relation having the same one) gives one row of an
//! exponent matrix over GF(2); a dependency gives `X² ≡ Y² (mod N)` and
//! `gcd(X − Y, N)` splits `N` with probability at least 1/2 when `N` has
//! two distinct prime factors. The multiplier `k` is chosen by the
//! Knuth–Schroeppel function \[Silverman87, §5\].
//!
//! Everything is deterministic: the primes of each `A` are drawn by a fixed
//! pseudo-random sequence.

use super::meter::Meter;
use super::rho::Split;
use super::word::{pow_mod, sqrt_mod};
use num_bigint::{BigInt, BigUint};
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::collections::HashMap;

/// Largest modulus (in bits) the sieve accepts: beyond this the sieve
/// values no longer fit `i128` with the parameters below.
pub(crate) const MAX_BITS: u64 = 170;

/// Smallest modulus (in bits) the sieve accepts.
pub(crate) const MIN_BITS: u64 = 40;

/// `(bits of kN, factor-base size, half-width M of the sieve interval)`.
const PARAMS: [(u64, usize, usize); 9] = [
    (60, 50, 2 * 1024),
    (70, 70, 3 * 1024),
    (80, 100, 4 * 1024),
    (90, 130, 6 * 1024),
    (100, 170, 8 * 1024),
    (115, 260, 12 * 1024),
    (135, 450, 16 * 1024),
    (150, 600, 24 * 1024),
    (175, 1000, 32 * 1024),
];

/// A cofactor below `LARGE_PRIME_FACTOR · p_max` left after trial division
/// is kept as a large prime.
const LARGE_PRIME_FACTOR: u64 = 128;

/// Sieve threshold slack, in multiples of `log₂ p_max` (2.4 before;
/// 2.0 lets through fewer candidates that then fail trial division: the
/// instruction count of three 16-, 18- and 21-digit products each fell
/// by 22 %, 31 % and 14 %, docs/performance.md).
const THRESHOLD_SLACK: f64 = 2.0;

/// Primes below this are not sieved (their logarithms are small), only
/// trial-divided.
const SIEVE_MIN_PRIME: u32 = 30;

/// One prime of the factor base.
#[derive(Clone, Copy, Debug)]
struct FbPrime {
    p: u32,
    /// `⌊(2^64 − 1)/p⌋ + 1`: `x mod p` by two multiplications for
    /// `x < 2^32` (D. Lemire, O. Kaser, N. Kurz, "Faster remainder by
    /// direct computation", Softw. Pract. Exp. 49 (2019), §3).
    recip: u64,
    /// `√(kN) mod p` (0 when `p | k`).
    t: u32,
    /// `round(log₂ p)`.
    logp: u8,
}

/// A relation `∏ yᵢ² ≡ (−1)^neg · ∏ pⱼ (mod N)`.
#[derive(Clone, Debug)]
struct Relation {
    ys: Vec<BigInt>,
    /// Factor-base indices with multiplicity.
    primes: Vec<u32>,
    neg: bool,
    /// Large primes with multiplicity (always in pairs in a full relation).
    large: Vec<u64>,
}

impl FbPrime {
    fn new(p: u32, t: u32, logp: u8) -> Self {
        FbPrime {
            p,
            recip: (u64::MAX / p as u64).wrapping_add(1),
            t,
            logp,
        }
    }

    /// `x mod p` for `x < 2^32`.
    #[inline(always)]
    fn rem(&self, x: u32) -> u32 {
        let low = self.recip.wrapping_mul(x as u64);
        ((low as u128 * self.p as u128) >> 64) as u32
    }
}

/// `a^{-1} mod p` for `gcd(a, p) = 1` (0 otherwise; callers ensure it).
fn inv_mod(a: u64, p: u64) -> u64 {
    super::word::inv_mod(a, p).unwrap_or(0)
}

/// Legendre symbol `(a/p)` for an odd prime `p`, as `a^((p−1)/2)`.
fn is_residue(a: u64, p: u64) -> bool {
    a % p == 0 || pow_mod(a, (p - 1) / 2, p) == 1
}

/// The Knuth–Schroeppel multiplier among the small square-free `k`
/// \[Silverman87, §5\]: maximises the expected contribution of small primes
/// to `Q(x)` minus `½·log k`.
fn multiplier(n: &BigUint) -> u64 {
    const KS: [u64; 16] = [1, 3, 5, 7, 11, 13, 15, 17, 19, 21, 23, 29, 31, 33, 35, 37];
    let small: Vec<u64> = (3u64..200)
        .filter(|&p| (2..p).all(|d| p % d != 0))
        .collect();
    let mut best = (f64::MIN, 1u64);
    for &k in &KS {
        let kn8 = (super::prime::rem_u64(n, 8) * k) % 8;
        let mut f = -0.5 * (k as f64).ln();
        f += match kn8 {
            1 => 2.0,
            5 => 1.0,
            _ => 0.5,
        } * 2f64.ln();
        for &p in &small {
            let knp = super::prime::rem_u64(n, p) * (k % p) % p;
            if k % p == 0 {
                f += (p as f64).ln() / p as f64;
            } else if is_residue(knp, p) {
                f += 2.0 * (p as f64).ln() / (p - 1) as f64;
            }
        }
        if f > best.0 {
            best = (f, k);
        }
    }
    best.1
}

/// A deterministic pseudo-random sequence (xorshift64*).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self, bound: usize) -> usize {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 33) as usize % bound.max(1)
    }
}

/// Splits the odd composite `n` (not a perfect power, no prime factor
/// below the trial-division bound, `MIN_BITS ≤ bits ≤ MAX_BITS`).
///
/// Budget: one unit per sieve-array update, per factor-base root update
/// and per trial division of a candidate, charged per polynomial.
/// Returns [`Split::Failed`] for moduli outside the size range or if every
/// dependency gives a trivial gcd.
pub(crate) fn siqs(n: &BigUint, budget: &mut impl Meter) -> Split {
    let bits = n.bits();
    if !(MIN_BITS..=MAX_BITS).contains(&bits) || n.is_even() {
        return Split::Failed;
    }
    let k = multiplier(n);
    let kn = n * k;
    let knb = BigInt::from(kn.clone());
    let nb = BigInt::from(n.clone());
    let kbits = kn.bits();
    let &(_, fb_size, m) = PARAMS
        .iter()
        .find(|&&(b, _, _)| kbits <= b)
        .unwrap_or(&PARAMS[PARAMS.len() - 1]);
    let fb = match factor_base(n, k, fb_size) {
        Ok(fb) => fb,
        Err(p) => return Split::Found(BigInt::from(p)),
    };
    let shape = SieveShape::new(&fb, kbits, m);
    let need = fb.len() + 1 + 24;
    let mut found = Relations::default();
    let mut rng = Lcg(0x9E37_79B9_7F4A_7C15 ^ kbits);
    let mut used_a: std::collections::HashSet<Vec<usize>> = Default::default();
    let mut state = PolyState {
        sieve: vec![0u8; 2 * m],
        root1: vec![0u32; fb.len()],
        root2: vec![0u32; fb.len()],
        in_a: vec![false; fb.len()],
    };
    let mut tries = 0usize;

    while found.fulls.len() < need {
        tries += 1;
        if tries > 100_000 {
            return Split::Failed;
        }
        let Some(qs) = choose_a(&fb, &shape, &mut rng) else {
            return Split::Failed;
        };
        if !used_a.insert(qs.clone()) {
            continue;
        }
        let Some(mut family) = PolyFamily::first(&fb, &qs, &shape, &mut state) else {
            return Split::Failed;
        };
        let polys = 1usize << (shape.s - 1);
        for g in 0..polys {
            if g > 0 {
                family.next(g, &fb, &mut state);
            }
            if budget
                .spend(shape.sieve_units + (fb.len() as u64) * (shape.s as u64 + 1))
                .is_err()
            {
                return Split::Exhausted;
            }
            let c_big = (&family.b * &family.b - &knb) / &family.a;
            let (Some(ai), Some(bi), Some(ci)) =
                (family.a.to_i128(), family.b.to_i128(), c_big.to_i128())
            else {
                return Split::Failed;
            };
            state.sieve_polynomial(&fb, &shape);
            let candidates = state.scan(&fb, &shape, &qs, [ai, bi, ci], &mut found);
            if budget.spend(candidates * fb.len() as u64).is_err() {
                return Split::Exhausted;
            }
            if found.fulls.len() >= need {
                break;
            }
        }
    }
    combine(&found.fulls, &fb, &nb)
}

/// The factor base of `kN`: 2, then the first odd primes `p` with
/// `(kN/p) ≠ −1`, until `size` of them; `Err(p)` when a prime `p` of the
/// base divides `n`.
fn factor_base(n: &BigUint, k: u64, size: usize) -> std::result::Result<Vec<FbPrime>, u64> {
    let mut fb: Vec<FbPrime> = vec![FbPrime::new(2, 1, 1)];
    let mut p = 3u64;
    while fb.len() < size {
        if (2..).take_while(|d| d * d <= p).all(|d| p % d != 0) {
            let nm = super::prime::rem_u64(n, p);
            if nm == 0 {
                return Err(p);
            }
            let knm = nm * (k % p) % p;
            if is_residue(knm, p) {
                fb.push(FbPrime::new(
                    p as u32,
                    sqrt_mod(knm, p).unwrap_or(0) as u32,
                    (p as f64).log2().round() as u8,
                ));
            }
        }
        p += 2;
    }
    Ok(fb)
}

/// The sizes one run of the sieve works with, fixed by `kN` and its
/// factor base.
struct SieveShape {
    /// Half the sieve interval: `x ∈ [−M, M)`.
    m: usize,
    /// The largest prime of the base.
    pmax: u64,
    /// Cofactors below this (and above `pmax`) are kept as large primes.
    large_bound: u64,
    /// The first index of the base that is sieved.
    first_sieved: usize,
    /// The initial byte of the sieve (the threshold is the top bit).
    init: u8,
    /// Units charged per polynomial for the sieve itself.
    sieve_units: u64,
    /// `log₂` of the target `A ≈ √(2kN)/M`.
    log_target: f64,
    /// The number of primes in `A`.
    s: usize,
    /// The range of base indices the primes of `A` are drawn from.
    lo: usize,
    hi: usize,
}

impl SieveShape {
    fn new(fb: &[FbPrime], kbits: u64, m: usize) -> SieveShape {
        let pmax = fb[fb.len() - 1].p as u64;
        let first_sieved = fb
            .iter()
            .position(|f| f.p >= SIEVE_MIN_PRIME)
            .unwrap_or(fb.len());
        // Threshold: log₂ of the typical |Q(x)| ≈ M·√(kN/2), less the allowance
        // for one large prime and the unsieved small primes.
        let log_q = (m as f64).log2() + 0.5 * (kbits as f64 - 1.0);
        let thresh = (log_q - THRESHOLD_SLACK * (pmax as f64).log2() - 3.0).max(8.0);
        let init = (128.0 - thresh).clamp(0.0, 127.0) as u8;
        let sieve_units: u64 = fb[first_sieved..]
            .iter()
            .map(|f| 2 * (2 * m as u64 / f.p as u64 + 1))
            .sum();
        // Sizes of the primes of A.
        let log_target = 0.5 * ((kbits as f64) + 1.0) - (m as f64).log2();
        // s primes of about 2^(log_target/s) each, s chosen so that they lie
        // well inside the factor base.
        let top_log = (pmax as f64).log2() - 1.5;
        let s = ((log_target / top_log).ceil() as usize).max(1);
        let each = log_target / s as f64;
        let lo = fb
            .iter()
            .position(|f| (f.p as f64).log2() >= each - 0.5)
            .unwrap_or(1)
            .max(first_sieved)
            .max(1);
        let hi = fb
            .iter()
            .position(|f| (f.p as f64).log2() > each + 0.5)
            .unwrap_or(fb.len())
            .max(lo + 2 * s + 2)
            .min(fb.len());
        SieveShape {
            m,
            pmax,
            large_bound: pmax * LARGE_PRIME_FACTOR,
            first_sieved,
            init,
            sieve_units,
            log_target,
            s,
            lo,
            hi,
        }
    }
}

/// The base indices of the primes `q₁ < … < q_s` of the next `A`, near
/// `√(2kN)/M` in product: `s − 1` drawn at random, the last one chosen to
/// bring the product closest to the target. `None` if no last prime fits.
fn choose_a(fb: &[FbPrime], shape: &SieveShape, rng: &mut Lcg) -> Option<Vec<usize>> {
    let (s, lo, hi) = (shape.s, shape.lo, shape.hi);
    let mut qs: Vec<usize> = Vec::with_capacity(s);
    let mut log_a = 0.0;
    while qs.len() + 1 < s {
        let i = lo + rng.next(hi - lo);
        if !qs.contains(&i) && fb[i].t != 0 {
            log_a += (fb[i].p as f64).log2();
            qs.push(i);
        }
    }
    let rest = shape.log_target - log_a;
    let last = (shape.first_sieved.max(1)..fb.len())
        .filter(|i| !qs.contains(i) && fb[*i].t != 0)
        .min_by(|&a, &b| {
            let da = ((fb[a].p as f64).log2() - rest).abs();
            let db = ((fb[b].p as f64).log2() - rest).abs();
            da.total_cmp(&db)
        })?;
    qs.push(last);
    qs.sort_unstable();
    Some(qs)
}

/// The buffers reused from one polynomial to the next: the sieve array,
/// the two roots of `Q(x)` modulo each prime of the base (shifted by `M`),
/// and which primes divide `A`.
struct PolyState {
    sieve: Vec<u8>,
    root1: Vec<u32>,
    root2: Vec<u32>,
    in_a: Vec<bool>,
}

/// The `2^(s−1)` polynomials `Q(x) = ((Ax + B)² − kN)/A` sharing one `A`:
/// `B = Σ ±B_j`, with `2·B_j·A⁻¹ mod p` for the root updates.
struct PolyFamily {
    a: BigInt,
    b: BigInt,
    bl: Vec<BigInt>,
    bainv: Vec<Vec<u32>>,
}

impl PolyFamily {
    /// The first polynomial of the family of `A = ∏ q`, with the roots of
    /// every prime of the base written into `state`. `None` when `A` or
    /// `B` leave 128 bits.
    fn first(
        fb: &[FbPrime],
        qs: &[usize],
        shape: &SieveShape,
        state: &mut PolyState,
    ) -> Option<PolyFamily> {
        let (s, m) = (shape.s, shape.m);
        let a: BigInt = qs.iter().map(|&i| BigInt::from(fb[i].p)).product();
        // B_j ≡ t_j (mod q_j), ≡ 0 (mod q_i) for i ≠ j.
        let mut bl: Vec<BigInt> = Vec::with_capacity(s);
        for &i in qs {
            let q = fb[i].p as u64;
            let a_over = &a / q;
            let ao = (&a_over % q).to_u64().unwrap_or(0);
            let mut g = fb[i].t as u64 * inv_mod(ao, q) % q;
            if g > q / 2 {
                g = q - g;
            }
            bl.push(a_over * g);
        }
        let b: BigInt = bl.iter().sum();
        for f in state.in_a.iter_mut() {
            *f = false;
        }
        for &i in qs {
            state.in_a[i] = true;
        }
        // Per prime: A⁻¹ and 2·B_j·A⁻¹ mod p.
        let mut bainv: Vec<Vec<u32>> = vec![vec![0; fb.len()]; s];
        // A, the B_j and B are below 2^128 here (A ≈ √(2kN)/M, B < A·s);
        // residues by word arithmetic instead of big-integer division.
        let (a128, b128) = (a.to_u128()?, b.to_u128()?);
        let bl128 = bl
            .iter()
            .map(|x| x.to_u128())
            .collect::<Option<Vec<u128>>>()?;
        for (i, f) in fb.iter().enumerate().skip(1) {
            if state.in_a[i] {
                continue;
            }
            let p = f.p as u64;
            let am = (a128 % p as u128) as u64;
            let ainv = inv_mod(am, p);
            for j in 0..s {
                let bm = (bl128[j] % p as u128) as u64;
                bainv[j][i] = (2 * bm % p * ainv % p) as u32;
            }
            let bm = (b128 % p as u128) as u64;
            let t = f.t as u64;
            let mo = m as u64 % p;
            state.root1[i] = (((t + p - bm) % p * ainv + mo) % p) as u32;
            state.root2[i] = (((2 * p - t - bm) % p * ainv + mo) % p) as u32;
        }
        Some(PolyFamily { a, b, bl, bainv })
    }

    /// Moves to polynomial `g > 0` of the family (Gray code: one `B_j`
    /// changes sign) and updates the roots in `state`.
    fn next(&mut self, g: usize, fb: &[FbPrime], state: &mut PolyState) {
        let v = g.trailing_zeros() as usize; // B_{v+1} changes sign
        let neg = ((g ^ (g >> 1)) >> v) & 1 == 1;
        let d = &self.bl[v + 1] * 2u32;
        if neg {
            self.b -= d;
        } else {
            self.b += d;
        }
        let row = &self.bainv[v + 1];
        for i in 1..fb.len() {
            if state.in_a[i] {
                continue;
            }
            let p = fb[i].p;
            let delta = row[i];
            // r = A⁻¹(±t − B): B ↓ 2B_l ⇒ r ↑ 2B_l·A⁻¹.
            let (r1, r2) = if neg {
                (
                    add_mod(state.root1[i], delta, p),
                    add_mod(state.root2[i], delta, p),
                )
            } else {
                (
                    sub_mod(state.root1[i], delta, p),
                    sub_mod(state.root2[i], delta, p),
                )
            };
            state.root1[i] = r1;
            state.root2[i] = r2;
        }
    }
}

impl PolyState {
    /// Adds `log p` at every root position of every sieved prime.
    // One index ties the base to its roots and to `in_a`.
    #[allow(clippy::needless_range_loop)]
    fn sieve_polynomial(&mut self, fb: &[FbPrime], shape: &SieveShape) {
        let m = shape.m;
        self.sieve.fill(shape.init);
        for i in shape.first_sieved..fb.len() {
            if self.in_a[i] {
                continue;
            }
            let p = fb[i].p as usize;
            let lg = fb[i].logp;
            let mut j = self.root1[i] as usize;
            while j < 2 * m {
                self.sieve[j] = self.sieve[j].wrapping_add(lg);
                j += p;
            }
            if self.root2[i] != self.root1[i] {
                let mut j = self.root2[i] as usize;
                while j < 2 * m {
                    self.sieve[j] = self.sieve[j].wrapping_add(lg);
                    j += p;
                }
            }
        }
    }

    /// Trial-divides `Q(x) = A x² + 2B x + C` (`abc = [A, B, C]`) at every
    /// position over the threshold and records the relations; returns the
    /// number of candidates tried.
    fn scan(
        &self,
        fb: &[FbPrime],
        shape: &SieveShape,
        qs: &[usize],
        abc: [i128; 3],
        found: &mut Relations,
    ) -> u64 {
        let [ai, bi, ci] = abc;
        let m = shape.m;
        let mut candidates = 0u64;
        for (w, chunk) in self.sieve.chunks_exact(8).enumerate() {
            let word = u64::from_le_bytes([
                chunk[0], chunk[1], chunk[2], chunk[3], chunk[4], chunk[5], chunk[6], chunk[7],
            ]);
            if word & 0x8080_8080_8080_8080 == 0 {
                continue;
            }
            for (o, &byte) in chunk.iter().enumerate() {
                if byte < 128 {
                    continue;
                }
                candidates += 1;
                let pos = w * 8 + o;
                let x = pos as i128 - m as i128;
                let Some(val) = ai
                    .checked_mul(x * x)
                    .and_then(|t| t.checked_add(2 * bi * x))
                    .and_then(|t| t.checked_add(ci))
                else {
                    continue;
                };
                if val == 0 {
                    continue;
                }
                let mut primes: Vec<u32> = qs.iter().map(|&i| i as u32).collect();
                let neg = val < 0;
                let mut v = val.unsigned_abs();
                let tz = v.trailing_zeros();
                v >>= tz;
                primes.extend(std::iter::repeat(0).take(tz as usize));
                for (i, f) in fb.iter().enumerate().skip(1) {
                    let r = f.rem(pos as u32);
                    if self.in_a[i] || r == self.root1[i] || r == self.root2[i] {
                        let pp = f.p as u128;
                        while v % pp == 0 {
                            v /= pp;
                            primes.push(i as u32);
                        }
                    }
                }
                let y = BigInt::from(ai * x + bi);
                found.record(y, primes, neg, v, shape);
            }
        }
        candidates
    }
}

/// The relations found so far: full ones, and partial ones with one large
/// prime waiting for a partner.
#[derive(Default)]
struct Relations {
    fulls: Vec<Relation>,
    partials: HashMap<u64, Relation>,
}

impl Relations {
    /// Records `y² ≡ ±∏ primes · v (mod kN)`: a full relation when the
    /// cofactor `v` is 1, a partial one (or a full pair) when `v` is a
    /// large prime, nothing otherwise.
    fn record(&mut self, y: BigInt, primes: Vec<u32>, neg: bool, v: u128, shape: &SieveShape) {
        if v == 1 {
            self.fulls.push(Relation {
                ys: vec![y],
                primes,
                neg,
                large: Vec::new(),
            });
        } else if v < shape.large_bound as u128 && v > shape.pmax as u128 {
            let l = v as u64;
            if let Some(other) = self.partials.remove(&l) {
                let mut ys = other.ys;
                ys.push(y);
                let mut ps = other.primes;
                ps.extend(primes);
                self.fulls.push(Relation {
                    ys,
                    primes: ps,
                    neg: neg ^ other.neg,
                    large: vec![l, l],
                });
            } else {
                self.partials.insert(
                    l,
                    Relation {
                        ys: vec![y],
                        primes,
                        neg,
                        large: Vec::new(),
                    },
                );
            }
        }
    }
}

#[inline(always)]
fn add_mod(a: u32, b: u32, p: u32) -> u32 {
    let s = a + b;
    if s >= p {
        s - p
    } else {
        s
    }
}

#[inline(always)]
fn sub_mod(a: u32, b: u32, p: u32) -> u32 {
    if a >= b {
        a - b
    } else {
        a + p - b
    }
}

/// Gaussian elimination over GF(2) on the exponent parities, then
/// `gcd(X − Y, N)` for each dependency.
fn combine(rels: &[Relation], fb: &[FbPrime], n: &BigInt) -> Split {
    let cols = fb.len() + 1; // the last column is the sign
    let cw = cols.div_ceil(64);
    let rows = rels.len();
    let hw = rows.div_ceil(64);
    let mut mat: Vec<Vec<u64>> = Vec::with_capacity(rows);
    let mut hist: Vec<Vec<u64>> = Vec::with_capacity(rows);
    for (r, rel) in rels.iter().enumerate() {
        let mut v = vec![0u64; cw];
        for &i in &rel.primes {
            v[i as usize / 64] ^= 1 << (i % 64);
        }
        if rel.neg {
            v[fb.len() / 64] ^= 1 << (fb.len() % 64);
        }
        mat.push(v);
        let mut h = vec![0u64; hw];
        h[r / 64] |= 1 << (r % 64);
        hist.push(h);
    }
    let mut used = vec![false; rows];
    for c in 0..cols {
        let (w, bit) = (c / 64, 1u64 << (c % 64));
        let Some(piv) = (0..rows).find(|&r| !used[r] && mat[r][w] & bit != 0) else {
            continue;
        };
        used[piv] = true;
        let (prow, phist) = (mat[piv].clone(), hist[piv].clone());
        for r in 0..rows {
            if r != piv && mat[r][w] & bit != 0 {
                for (a, b) in mat[r].iter_mut().zip(&prow) {
                    *a ^= b;
                }
                for (a, b) in hist[r].iter_mut().zip(&phist) {
                    *a ^= b;
                }
            }
        }
    }
    for r in (0..rows).filter(|&r| !used[r]) {
        let mut x = BigInt::one();
        let mut exps = vec![0u32; fb.len()];
        let mut large: HashMap<u64, u32> = HashMap::new();
        for (i, rel) in rels.iter().enumerate() {
            if hist[r][i / 64] >> (i % 64) & 1 == 0 {
                continue;
            }
            for y in &rel.ys {
                x = (x * y).mod_floor(n);
            }
            for &p in &rel.primes {
                exps[p as usize] += 1;
            }
            for &l in &rel.large {
                *large.entry(l).or_insert(0) += 1;
            }
        }
        // Y = ∏ p^(e/2): the small primes' powers are multiplied up in a
        // word while they fit, then reduced modulo N once per word.
        let mut y = BigInt::one();
        let mut word = 1u64;
        let factors = exps
            .iter()
            .enumerate()
            .flat_map(|(i, &e)| std::iter::repeat(fb[i].p as u64).take((e / 2) as usize))
            .chain(
                large
                    .iter()
                    .flat_map(|(&l, &e)| std::iter::repeat(l).take((e / 2) as usize)),
            );
        for p in factors {
            match word.checked_mul(p) {
                Some(w) => word = w,
                None => {
                    y = (y * word) % n;
                    word = p;
                }
            }
        }
        y = (y * word) % n;
        let g = (&x - &y).gcd(n);
        if !g.is_one() && &g != n && !g.is_zero() {
            return Split::Found(g.abs());
        }
    }
    Split::Failed
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::budget::Budget;

    #[test]
    fn the_sieve_splits_semiprimes_of_20_to_40_digits() {
        // Factors from tests/data/factor_built.txt (sympy 1.14.0 / python-flint 0.9.0).
        for (p, q) in [(1303950553u64, 1822850903u64), (3795742297, 5942859581)] {
            let n = BigUint::from(p) * BigUint::from(q);
            match siqs(&n, &mut Budget::unlimited()) {
                Split::Found(d) => assert!(d == BigInt::from(p) || d == BigInt::from(q)),
                other => panic!("{n}: {other:?}"),
            }
        }
    }

    #[test]
    fn the_sieve_splits_a_product_of_two_15_digit_primes() {
        // 370961196796819 · 720421300418621: both prime by sympy 1.14 isprime
        // (the first number of the 15-digit group of benches/arith.rs).
        let n: BigUint = "267248347801212327008981166599".parse().unwrap();
        match siqs(&n, &mut Budget::unlimited()) {
            Split::Found(d) => {
                let d = d.magnitude().clone();
                assert!(d > BigUint::one() && d < n && (&n % &d).is_zero());
            }
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn a_small_budget_stops_the_sieve() {
        let n: BigUint = "267248347801212327008981166599".parse().unwrap();
        let mut b = Budget::with_units(1000);
        assert_eq!(siqs(&n, &mut b), Split::Exhausted);
    }

    #[test]
    fn moduli_outside_the_size_range_are_declined() {
        let small = BigUint::from(1_009u64 * 1_013);
        assert_eq!(siqs(&small, &mut Budget::unlimited()), Split::Failed);
        let huge = (BigUint::one() << 200u32) + 1u32;
        assert_eq!(siqs(&huge, &mut Budget::unlimited()), Split::Failed);
    }

    #[test]
    fn modular_square_roots_square_back() {
        for p in [3u64, 5, 13, 17, 97, 65537, 4294967291] {
            for a in 1..40u64 {
                if is_residue(a, p) {
                    let r = sqrt_mod(a, p).unwrap();
                    assert_eq!(r * r % p, a % p, "sqrt({a}) mod {p}");
                }
            }
        }
    }
}
