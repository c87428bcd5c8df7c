//! Lenstra's elliptic curve method \[Lenstra87\] on Montgomery curves
//! `B·y² = x³ + A·x² + x` \[Montgomery87\], with Suyama's parametrisation,
//! the Montgomery ladder in stage 1 and the standard continuation with a
//! baby-step/giant-step table in stage 2.
//!
//! Only `X : Z` projective coordinates are used: doubling costs 5
//! multiplications, a differential addition 6.

use super::meter::Meter;
use super::mont::Ring;
use super::prime::{prime_table, PrimeTable};
use super::rho::Split;
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

/// A point in `X : Z` coordinates on a Montgomery curve.
#[derive(Clone, Debug)]
struct Pt<E> {
    x: E,
    z: E,
}

/// The giant-step width of stage 2: `2·3·5·7·11` for long stage 2 ranges,
/// `2·3·5·7` for short ones (fewer baby steps).
fn giant_width(b2: u64) -> u64 {
    if b2 < 200_000 {
        210
    } else {
        2310
    }
}

/// One Montgomery curve `By² = x³ + Ax² + x`: the ring and `(A + 2)/4`.
struct MontgomeryCurve<'a, R: Ring> {
    ring: &'a R,
    a24: R::E,
}

impl<R: Ring> MontgomeryCurve<'_, R> {
    /// `2P` (2 squarings, 3 multiplications).
    fn dbl(&self, p: &Pt<R::E>) -> Pt<R::E> {
        let r = self.ring;
        let s = r.sqr(&r.add(&p.x, &p.z));
        let d = r.sqr(&r.sub(&p.x, &p.z));
        let t = r.sub(&s, &d);
        let x = r.mul(&s, &d);
        let z = r.mul(&t, &r.add(&d, &r.mul(&self.a24, &t)));
        Pt { x, z }
    }

    /// `P + Q` given `P − Q` (4 multiplications, 2 squarings).
    fn add(&self, p: &Pt<R::E>, q: &Pt<R::E>, diff: &Pt<R::E>) -> Pt<R::E> {
        let r = self.ring;
        let u = r.mul(&r.sub(&p.x, &p.z), &r.add(&q.x, &q.z));
        let v = r.mul(&r.add(&p.x, &p.z), &r.sub(&q.x, &q.z));
        let x = r.mul(&diff.z, &r.sqr(&r.add(&u, &v)));
        let z = r.mul(&diff.x, &r.sqr(&r.sub(&u, &v)));
        Pt { x, z }
    }

    /// `k·P` by the Montgomery ladder, `k ≥ 1`.
    fn mul(&self, k: u64, p: &Pt<R::E>) -> Pt<R::E> {
        if k <= 1 {
            return p.clone();
        }
        let mut r0 = p.clone();
        let mut r1 = self.dbl(p);
        let top = 63 - k.leading_zeros();
        for i in (0..top).rev() {
            if (k >> i) & 1 == 1 {
                r0 = self.add(&r1, &r0, p);
                r1 = self.dbl(&r1);
            } else {
                r1 = self.add(&r1, &r0, p);
                r0 = self.dbl(&r0);
            }
        }
        r0
    }
}

/// `gcd(x, n)` classified: `Some(Found)`/`Some(Failed)` when it is not 1.
fn classify(g: BigInt, n: &BigInt) -> Option<Split> {
    if g.is_one() {
        None
    } else if &g == n || g.is_zero() {
        Some(Split::Failed)
    } else {
        Some(Split::Found(g))
    }
}

/// Runs one ECM curve with Suyama parameter `sigma ≥ 6` modulo the ring's
/// modulus `n` (odd, composite, no factor 2 or 3): stage 1 to `b1`,
/// stage 2 to `b2`.
///
/// Suyama's parametrisation \[Zimmermann-Dodson06, §2\]: `u = σ² − 5`,
/// `v = 4σ`, starting point `x₀ : z₀ = u³ : v³` on the curve with
/// `(A + 2)/4 = (v − u)³(3u + v) / (16u³v)`; its group order is divisible
/// by 12. Stage 1 multiplies the point by every prime power `≤ b1`;
/// stage 2 looks for one more prime `q ∈ (b1, b2]` in the order, pairing
/// `q = kD ± j` with `jQ` (normalised baby steps) and `kD·Q` (giant steps).
///
/// Budget: one unit per modular multiplication, charged per prime in
/// stage 1 and per giant step in stage 2.
pub(crate) fn ecm_curve<R: Ring>(
    ring: &R,
    sigma: u64,
    b1: u64,
    b2: u64,
    budget: &mut impl Meter,
) -> Split {
    let n = ring.modulus();
    let (curve, q) = match suyama_start(ring, sigma, &n) {
        Ok(start) => start,
        Err(split) => return split,
    };
    let d_width = giant_width(b2);
    let table = prime_table(b2 + d_width);
    let q = match stage_one(&curve, q, &table, b1, budget) {
        Ok(q) => q,
        Err(split) => return split,
    };
    if let Some(split) = classify(ring.to_big(&q.z).gcd(&n), &n) {
        return split;
    }
    if b2 <= b1 {
        return Split::Failed;
    }
    let baby = match baby_steps(&curve, &q, d_width, &n, budget) {
        Ok(baby) => baby,
        Err(split) => return split,
    };
    giant_steps(&curve, &q, &table, &baby, [b1, b2, d_width], budget)
}

/// The Montgomery curve and starting point of Suyama's parametrisation for
/// `sigma`, set up with big integers (once per curve); a split when the
/// denominator is not invertible modulo `n`.
fn suyama_start<'a, R: Ring>(
    ring: &'a R,
    sigma: u64,
    n: &BigInt,
) -> Result<(MontgomeryCurve<'a, R>, Pt<R::E>), Split> {
    let s = BigInt::from(sigma);
    let u = (&s * &s - 5u32).mod_floor(n);
    let v = (&s * 4u32).mod_floor(n);
    let u3 = u.modpow(&BigInt::from(3u32), n);
    let v3 = v.modpow(&BigInt::from(3u32), n);
    let den = (&u3 * &v * 16u32).mod_floor(n);
    if let Some(split) = classify(den.gcd(n), n) {
        return Err(split);
    }
    let inv = match den.modinv(n) {
        Some(i) => i,
        None => return Err(Split::Failed),
    };
    let vmu = (&v - &u).mod_floor(n);
    let num = (vmu.modpow(&BigInt::from(3u32), n) * (&u * 3u32 + &v)).mod_floor(n);
    let a24 = (num * inv).mod_floor(n);
    let curve = MontgomeryCurve {
        ring,
        a24: ring.elem_big(&a24),
    };
    let q = Pt {
        x: ring.elem_big(&u3),
        z: ring.elem_big(&v3),
    };
    Ok((curve, q))
}

/// Stage 1: the point multiplied by every prime power `≤ b1`.
fn stage_one<R: Ring>(
    curve: &MontgomeryCurve<'_, R>,
    mut q: Pt<R::E>,
    table: &PrimeTable,
    b1: u64,
    budget: &mut impl Meter,
) -> Result<Pt<R::E>, Split> {
    for p in table.primes_in(2, b1) {
        let mut pk = p;
        while pk <= b1 / p {
            pk *= p;
        }
        q = curve.mul(pk, &q);
        let bits = 64 - pk.leading_zeros() as u64;
        if budget.spend(11 * bits).is_err() {
            return Err(Split::Exhausted);
        }
    }
    Ok(q)
}

/// The baby steps of stage 2: the odd `j < D/2` prime to `D` and the
/// normalised x-coordinates of `jQ`.
struct BabySteps<E> {
    js: Vec<usize>,
    xs: Vec<E>,
}

/// Stage 2, baby steps: jQ for odd j < d_width/2, normalised for gcd(j, D) = 1.
fn baby_steps<R: Ring>(
    curve: &MontgomeryCurve<'_, R>,
    q: &Pt<R::E>,
    d_width: u64,
    n: &BigInt,
    budget: &mut impl Meter,
) -> Result<BabySteps<R::E>, Split> {
    let ring = curve.ring;
    let half = (d_width / 2) as usize;
    let mut multiples: Vec<Option<Pt<R::E>>> = vec![None; half + 1];
    let q2 = curve.dbl(q);
    multiples[1] = Some(q.clone());
    let mut prev = q.clone(); // (j-2)Q
    let mut cur = curve.add(&q2, q, q); // 3Q
    let mut j = 3usize;
    while j < half {
        if j.gcd(&(d_width as usize)) == 1 {
            multiples[j] = Some(cur.clone());
        }
        let next = curve.add(&cur, &q2, &prev);
        prev = cur;
        cur = next;
        j += 2;
    }
    if budget.spend(6 * half as u64 / 2 + 5).is_err() {
        return Err(Split::Exhausted);
    }
    let js: Vec<usize> = (1..half).filter(|&j| multiples[j].is_some()).collect();
    let zs: Vec<R::E> = js
        .iter()
        .filter_map(|&j| multiples[j].as_ref().map(|p| p.z.clone()))
        .collect();
    let zinv = batch_invert(ring, &zs, n)?;
    let xs: Vec<R::E> = js
        .iter()
        .zip(zinv.iter())
        .filter_map(|(&j, zi)| multiples[j].as_ref().map(|p| ring.mul(&p.x, zi)))
        .collect();
    if budget.spend(4 * js.len() as u64).is_err() {
        return Err(Split::Exhausted);
    }
    Ok(BabySteps { js, xs })
}

/// Stage 2, giant steps `R_k = kD·Q` for `k = k0, k0+1, …`, pairing each
/// prime `q = kD ± j` in `(b1, b2]` with its baby step; `bounds` is
/// `[b1, b2, D]`.
fn giant_steps<R: Ring>(
    curve: &MontgomeryCurve<'_, R>,
    q: &Pt<R::E>,
    table: &PrimeTable,
    baby: &BabySteps<R::E>,
    bounds: [u64; 3],
    budget: &mut impl Meter,
) -> Split {
    let [b1, b2, d_width] = bounds;
    let ring = curve.ring;
    let n = ring.modulus();
    let k0 = (b1 / d_width).max(1);
    let kmax = b2 / d_width + 1;
    let dq = curve.mul(d_width, q);
    let mut r_prev = curve.mul((k0 - 1).max(1) * d_width, q);
    let mut r = curve.mul(k0 * d_width, q);
    if k0 == 1 {
        // R_0 is the point at infinity; use the doubling for the first step.
        r_prev = Pt {
            x: ring.one(),
            z: ring.zero(),
        };
    }
    let mut acc = ring.one();
    for k in k0..=kmax {
        let base = k * d_width;
        let mut pairs = 0u64;
        for (idx, &j) in baby.js.iter().enumerate() {
            let j = j as u64;
            let lo = base - j;
            let hi = base + j;
            let want = (lo > b1 && lo <= b2 && table.is_prime(lo))
                || (hi > b1 && hi <= b2 && table.is_prime(hi));
            if want {
                let t = ring.sub(&r.x, &ring.mul(&baby.xs[idx], &r.z));
                acc = ring.mul(&acc, &t);
                pairs += 1;
            }
        }
        let next = if k0 == 1 && k == 1 {
            curve.dbl(&r)
        } else {
            curve.add(&r, &dq, &r_prev)
        };
        r_prev = std::mem::replace(&mut r, next);
        if budget.spend(2 * pairs + 6).is_err() {
            return Split::Exhausted;
        }
    }
    classify(ring.to_big(&acc).gcd(&n), &n).unwrap_or(Split::Failed)
}

/// Inverts every element by Montgomery's trick (one inversion, three
/// multiplications per element). A non-invertible element yields the gcd
/// as a split.
fn batch_invert<R: Ring>(ring: &R, xs: &[R::E], n: &BigInt) -> Result<Vec<R::E>, Split> {
    let mut prefix = Vec::with_capacity(xs.len());
    let mut acc = ring.one();
    for x in xs {
        prefix.push(acc.clone());
        acc = ring.mul(&acc, x);
    }
    let total = ring.to_big(&acc);
    if let Some(split) = classify(total.gcd(n), n) {
        return Err(split);
    }
    let inv = match total.modinv(n) {
        Some(i) => ring.elem_big(&i),
        None => return Err(Split::Failed),
    };
    let mut out = vec![ring.zero(); xs.len()];
    let mut run = inv;
    for i in (0..xs.len()).rev() {
        out[i] = ring.mul(&run, &prefix[i]);
        run = ring.mul(&run, &xs[i]);
    }
    Ok(out)
}

/// The ECM effort schedule: `(B1, curves)` per tier, aimed at prime
/// factors of about 15, 20, 25, 30, 35 digits (B1 values after the
/// optimal-parameter table of \[Zimmermann-Dodson06, Table 1\]; curve counts
/// raised for our simpler stage 2 with `B2 = 50·B1`). The last tier repeats
/// until the budget runs out.
pub(crate) const SCHEDULE: [(u64, u32); 8] = [
    (150, 10),
    (500, 15),
    (2_000, 30),
    (11_000, 110),
    (50_000, 350),
    (250_000, 900),
    (1_000_000, 2_400),
    (3_000_000, u32::MAX),
];

/// Stage-2 bound as a multiple of B1.
pub(crate) const B2_FACTOR: u64 = 50;

/// Runs ECM curves along [`SCHEDULE`] (Suyama parameters `σ = 11, 12, …`)
/// until one splits `n` or the budget runs out.
pub(crate) fn ecm<R: Ring>(ring: &R, budget: &mut impl Meter) -> Split {
    ecm_tiers(ring, &SCHEDULE, budget)
}

/// Runs ECM curves along the given `(B1, curves)` tiers (Suyama parameters
/// `σ = 11, 12, …`, `B2 = 50·B1`) until one splits `n`, the tiers end
/// ([`Split::Failed`]) or the budget runs out.
pub(crate) fn ecm_tiers<R: Ring>(ring: &R, tiers: &[(u64, u32)], budget: &mut impl Meter) -> Split {
    let mut sigma = 11u64;
    for &(b1, curves) in tiers.iter() {
        for _ in 0..curves {
            match ecm_curve(ring, sigma, b1, b1 * B2_FACTOR, budget) {
                Split::Failed => {}
                other => return other,
            }
            sigma += 1;
        }
    }
    Split::Failed
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::arith::mont::Mont;
    use crate::budget::Budget;
    use num_bigint::BigUint;

    /// Counts the curves among `σ = 11..11+count` that split `n`.
    fn successes(n: &BigUint, b1: u64, b2: u64, count: u64) -> usize {
        let ring = Mont::<2>::new(n).expect("odd, two words");
        (11..11 + count)
            .filter(|&s| {
                matches!(
                    ecm_curve(&ring, s, b1, b2, &mut Budget::unlimited()),
                    Split::Found(_)
                )
            })
            .count()
    }

    #[test]
    fn stage_two_finds_factors_that_stage_one_misses() {
        // p = 1000000000039 (13 digits), q = 1000000000000000003 (19 digits):
        // both prime by sympy 1.14 isprime.
        let p = BigUint::from(1_000_000_000_039u64);
        let q = BigUint::from(1_000_000_000_000_000_003u64);
        let n = &p * &q;
        let only1 = successes(&n, 2000, 2000, 60);
        let with2 = successes(&n, 2000, 100_000, 60);
        eprintln!("stage 1 only: {only1}, with stage 2: {with2}");
        assert!(
            with2 > only1,
            "stage 1 only: {only1}, with stage 2: {with2}"
        );
    }
}
