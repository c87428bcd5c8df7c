//! Lenstra's elliptic curve method \[Lenstra87\] for word-size composites,
//! in the 64-bit Montgomery arithmetic of [`super::small::M64`].
//!
//! Same curves as [`super::ecm`] (Montgomery curves `B·y² = x³ + A·x² + x`
//! \[Montgomery87\] with Suyama's parametrisation, order divisible by 12),
//! but every step stays in machine words: the curve is set up with one
//! word-size inversion, which also puts the starting point in the form
//! `x : 1`; stage 1 is one Montgomery ladder over the whole product of
//! the prime powers up to `B1` (a multi-word scalar), whose differential
//! additions then save the multiplication by the difference's `Z`; stage 2
//! is the standard baby-step/giant-step continuation whose pairs `(k, j)`
//! (`kD ± j` prime) are listed once per `(B1, B2, D)`, with baby and giant
//! steps both brought to `x : 1` by one batched inversion, so that each
//! pair costs one multiplication.
//!
//! Nothing allocates per curve (the giant steps live in a buffer made once
//! per call of [`ecm_u64`]); a curve with `B1 = 85` costs about 1900
//! multiplications and two word-size inversions.

use super::prime::prime_table;
use super::small::{gcd_u64, M64};
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};

/// The work of one `(B1, B2)` setting, computed once: the stage-1
/// multiplier packed into words, and the stage-2 giant steps with their
/// baby steps.
struct Plan {
    /// `∏ p^⌊log_p B1⌋` over the primes `p ≤ B1` (that is, `lcm(1, …, B1)`)
    /// as little-endian 64-bit limbs, the top limb nonzero.
    stage1: Vec<u64>,
    /// Giant-step width `D` (a multiple of 6).
    d: u64,
    /// Baby steps `j`: odd, `j < D/2`, `gcd(j, D) = 1`.
    babies: Vec<u64>,
    /// First giant step `k0 ≥ 1`.
    k0: u64,
    /// For each giant step `k = k0, k0+1, …`: the indices into `babies`
    /// of the `j` with `kD − j` or `kD + j` a prime in `(B1, B2]`.
    pairs: Vec<Vec<u8>>,
}

/// Plans by `(B1, B2)`, shared by all threads.
type Plans = Mutex<HashMap<(u64, u64), Arc<Plan>>>;

fn plan(b1: u64, b2: u64) -> Arc<Plan> {
    static PLANS: OnceLock<Plans> = OnceLock::new();
    let map = PLANS.get_or_init(|| Mutex::new(HashMap::new()));
    if let Ok(m) = map.lock() {
        if let Some(p) = m.get(&(b1, b2)) {
            return p.clone();
        }
    }
    let p = Arc::new(make_plan(b1, b2));
    if let Ok(mut m) = map.lock() {
        if m.len() < 64 {
            m.insert((b1, b2), p.clone());
        }
    }
    p
}

fn make_plan(b1: u64, b2: u64) -> Plan {
    let b2 = b2.max(b1);
    // D = 60 for short stage-2 ranges (8 baby steps), 210 beyond (24).
    let d: u64 = if b2 < 6000 { 60 } else { 210 };
    let table = prime_table(b2 + d + 2);
    let mut stage1 = vec![1u64];
    for p in table.primes_in(2, b1) {
        let mut pk = p;
        while pk <= b1 / p {
            pk *= p;
        }
        // stage1 *= pk, limb by limb.
        let mut carry = 0u128;
        for limb in stage1.iter_mut() {
            let t = *limb as u128 * pk as u128 + carry;
            *limb = t as u64;
            carry = t >> 64;
        }
        if carry > 0 {
            stage1.push(carry as u64);
        }
    }
    let babies: Vec<u64> = (1..d / 2)
        .step_by(2)
        .filter(|&j| gcd_u64(j, d) == 1)
        .collect();
    let k0 = (b1 / d).max(1);
    let kmax = b2 / d + 1;
    let mut pairs = Vec::new();
    for k in k0..=kmax {
        let base = k * d;
        let row: Vec<u8> = babies
            .iter()
            .enumerate()
            .filter(|&(_, &j)| {
                let lo = base - j;
                let hi = base + j;
                (lo > b1 && lo <= b2 && table.is_prime(lo))
                    || (hi > b1 && hi <= b2 && table.is_prime(hi))
            })
            .map(|(i, _)| i as u8)
            .collect();
        pairs.push(row);
    }
    while pairs.last().is_some_and(|r| r.is_empty()) {
        pairs.pop();
    }
    Plan {
        stage1,
        d,
        babies,
        k0,
        pairs,
    }
}

/// A point `X : Z` in Montgomery form.
#[derive(Clone, Copy)]
struct Pt {
    x: u64,
    z: u64,
}

/// One Montgomery curve `By² = x³ + Ax² + x` modulo a word: `(A + 2)/4`.
struct MontgomeryCurve {
    ring: M64,
    a24: u64,
}

impl MontgomeryCurve {
    #[inline(always)]
    fn dbl(&self, p: Pt) -> Pt {
        let r = &self.ring;
        let s = r.add(p.x, p.z);
        let d = r.sub(p.x, p.z);
        let s = r.mul(s, s);
        let d = r.mul(d, d);
        let t = r.sub(s, d);
        Pt {
            x: r.mul(s, d),
            z: r.mul(t, r.add(d, r.mul(self.a24, t))),
        }
    }

    #[inline(always)]
    fn add(&self, p: Pt, q: Pt, diff: Pt) -> Pt {
        let r = &self.ring;
        let u = r.mul(r.sub(p.x, p.z), r.add(q.x, q.z));
        let v = r.mul(r.add(p.x, p.z), r.sub(q.x, q.z));
        let s = r.add(u, v);
        let t = r.sub(u, v);
        Pt {
            x: r.mul(diff.z, r.mul(s, s)),
            z: r.mul(diff.x, r.mul(t, t)),
        }
    }

    /// `P + Q` from `P − Q = x : 1` (one multiplication fewer than
    /// [`MontgomeryCurve::add`]).
    #[inline(always)]
    fn add_unit(&self, p: Pt, q: Pt, diff_x: u64) -> Pt {
        let r = &self.ring;
        let u = r.mul(r.sub(p.x, p.z), r.add(q.x, q.z));
        let v = r.mul(r.add(p.x, p.z), r.sub(q.x, q.z));
        let s = r.add(u, v);
        let t = r.sub(u, v);
        Pt {
            x: r.mul(s, s),
            z: r.mul(diff_x, r.mul(t, t)),
        }
    }

    /// `k·P` for `P = x : 1` by the Montgomery ladder over the limbs of
    /// `k` (little-endian, top limb nonzero; `k ≥ 1`).
    fn mul_limbs(&self, k: &[u64], x: u64) -> Pt {
        let p = Pt {
            x,
            z: self.ring.one(),
        };
        let Some((&top, _)) = k.split_last() else {
            return p;
        };
        if k.len() == 1 && top <= 1 {
            return p;
        }
        let mut r0 = p;
        let mut r1 = self.dbl(p);
        let top_bit = 63 - top.leading_zeros();
        for (w, &limb) in k.iter().enumerate().rev() {
            let start = if w + 1 == k.len() { top_bit } else { 64 };
            for i in (0..start).rev() {
                if (limb >> i) & 1 == 1 {
                    r0 = self.add_unit(r1, r0, x);
                    r1 = self.dbl(r1);
                } else {
                    r1 = self.add_unit(r1, r0, x);
                    r0 = self.dbl(r0);
                }
            }
        }
        r0
    }

    /// `k·P` by the Montgomery ladder, `k ≥ 1`.
    fn mul(&self, k: u64, p: Pt) -> Pt {
        if k <= 1 {
            return p;
        }
        let mut r0 = p;
        let mut r1 = self.dbl(p);
        let top = 63 - k.leading_zeros();
        for i in (0..top).rev() {
            if (k >> i) & 1 == 1 {
                r0 = self.add(r1, r0, p);
                r1 = self.dbl(r1);
            } else {
                r1 = self.add(r1, r0, p);
                r0 = self.dbl(r0);
            }
        }
        r0
    }
}

/// Outcome of one curve.
enum Curve64 {
    Found(u64),
    /// No factor (or the whole of `n`).
    Failed,
}

/// `gcd(x, n)` as an outcome, `None` when it is 1.
fn check(x: u64, n: u64) -> Option<Curve64> {
    match gcd_u64(x, n) {
        1 => None,
        g if g == n || g == 0 => Some(Curve64::Failed),
        g => Some(Curve64::Found(g)),
    }
}

/// Giant-step buffers of one [`ecm_u64`] call (`X`, `Z`, prefix products).
struct Giants {
    x: Vec<u64>,
    z: Vec<u64>,
    prefix: Vec<u64>,
}

/// `Curve64` for a gcd `g > 1` found by a failed inversion.
fn from_gcd(g: u64, n: u64) -> Curve64 {
    if g == n {
        Curve64::Failed
    } else {
        Curve64::Found(g)
    }
}

/// One curve with Suyama parameter `sigma ≥ 6` on the odd composite `n`
/// (no prime factor 2 or 3), along `plan`.
fn curve(ring: M64, n: u64, sigma: u64, plan: &Plan, giants: &mut Giants) -> Curve64 {
    let r = &ring;
    // u = σ² − 5, v = 4σ, x₀ : z₀ = u³ : v³,
    // (A + 2)/4 = (v − u)³(3u + v) / (16u³v)  [Zimmermann-Dodson06, §2].
    // One inversion of w = 16u³v · v³ gives both (A + 2)/4 and x₀ = u³/v³;
    // gcd(w, n) > 1 iff gcd(16u³v, n) > 1, since v³ has the primes of v.
    let s = r.elem(sigma);
    let u = r.sub(r.mul(s, s), r.elem(5));
    let v = r.add(r.add(s, s), r.add(s, s));
    let u3 = r.mul(r.mul(u, u), u);
    let v3 = r.mul(r.mul(v, v), v);
    let vmu = r.sub(v, u);
    let num = r.mul(r.mul(r.mul(vmu, vmu), vmu), r.add(r.add(r.add(u, u), u), v));
    let den = r.mul(r.mul(u3, v), r.elem(16));
    let inv = match crate::arith::word::inv_mod_or_gcd(r.plain(r.mul(den, v3)), n) {
        Ok(i) => r.elem(i),
        Err(g) => return from_gcd(g, n),
    };
    let c = MontgomeryCurve {
        ring,
        a24: r.mul(num, r.mul(inv, v3)),
    };
    let x0 = r.mul(u3, r.mul(inv, den));
    let q = c.mul_limbs(&plan.stage1, x0);
    // Baby steps jQ (odd j < D/2) and giant steps kD·Q (k = k0, k0 + 1,
    // …), brought to x : 1 by one batched inversion; a non-invertible Z
    // gives the gcd.
    let q2 = c.dbl(q);
    let nb = plan.babies.len();
    let mut bx = [0u64; 24];
    let mut bz = [0u64; 24];
    let mut prev = q; // (j − 2)Q, then jQ
    let mut cur = q; // jQ
    let mut j = 1u64;
    let mut idx = 0;
    while idx < nb {
        if plan.babies[idx] == j {
            bx[idx] = cur.x;
            bz[idx] = cur.z;
            idx += 1;
        }
        let next = if j == 1 {
            c.add(q2, q, q)
        } else {
            c.add(cur, q2, prev)
        };
        prev = cur;
        cur = next;
        j += 2;
    }
    let dq = c.mul(plan.d, q);
    let mut rk = c.mul(plan.k0 * plan.d, q);
    let mut rprev = if plan.k0 == 1 {
        Pt { x: 0, z: 0 } // unused: the first step doubles
    } else {
        c.mul((plan.k0 - 1) * plan.d, q)
    };
    let ng = plan.pairs.len();
    for step in 0..ng {
        giants.x[step] = rk.x;
        giants.z[step] = rk.z;
        let next = if plan.k0 == 1 && step == 0 {
            c.dbl(rk)
        } else {
            c.add(rk, dq, rprev)
        };
        rprev = rk;
        rk = next;
    }
    let mut prefix = [0u64; 24];
    let mut acc = r.one();
    for i in 0..nb {
        prefix[i] = acc;
        acc = r.mul(acc, bz[i]);
    }
    for i in 0..ng {
        giants.prefix[i] = acc;
        acc = r.mul(acc, giants.z[i]);
    }
    let total_inv = match crate::arith::word::inv_mod_or_gcd(r.plain(acc), n) {
        Ok(i) => r.elem(i),
        Err(g) => return from_gcd(g, n),
    };
    let mut run = total_inv;
    for i in (0..ng).rev() {
        let zi = r.mul(run, giants.prefix[i]);
        run = r.mul(run, giants.z[i]);
        giants.x[i] = r.mul(giants.x[i], zi);
    }
    for i in (0..nb).rev() {
        let zi = r.mul(run, prefix[i]);
        run = r.mul(run, bz[i]);
        bx[i] = r.mul(bx[i], zi);
    }
    // (kD ± j)·Q = O mod p iff x(kD·Q) ≡ x(jQ) mod p.
    let mut acc = r.one();
    for (gx, row) in giants.x.iter().zip(&plan.pairs) {
        for &i in row {
            acc = r.mul(acc, r.sub(*gx, bx[i as usize]));
        }
    }
    check(acc, n).unwrap_or(Curve64::Failed)
}

/// Stage-2 bound as a multiple of B1 for the word-size curves.
pub(crate) const B2_FACTOR_64: u64 = 25;

/// Runs up to `curves` curves (Suyama parameters `σ = sigma0, sigma0 + 1,
/// …`) with bounds `B1 = b1`, `B2 = 25·b1` on the odd composite `n`
/// without prime factors 2 and 3; returns a proper divisor or `None`.
///
/// Cost: the number of Montgomery multiplications per curve is about
/// `10·log₂(∏ prime powers ≤ B1) + 9·B2/D + (primes in (B1, B2])`, and two
/// word-size inversions.
pub(crate) fn ecm_u64(n: u64, b1: u64, curves: u32, sigma0: u64) -> Option<u64> {
    let ring = M64::new(n)?;
    let plan = plan(b1, b1 * B2_FACTOR_64);
    let ng = plan.pairs.len();
    let mut giants = Giants {
        x: vec![0; ng],
        z: vec![0; ng],
        prefix: vec![0; ng],
    };
    for s in 0..curves as u64 {
        if let Curve64::Found(d) = curve(ring, n, sigma0 + s, &plan, &mut giants) {
            return Some(d);
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn word_size_curves_split_products_of_two_primes() {
        // 53464109 · 30246691 and 523938529 · 798935593 (sympy 1.14.0
        // factorint of the 8- and 9-digit numbers of benches/arith.rs).
        for (p, q) in [(53464109u64, 30246691u64), (523938529, 798935593)] {
            let n = p * q;
            let d = ecm_u64(n, 125, 400, 11).expect("400 curves with B1 = 125");
            assert!(d == p || d == q, "{n}: {d}");
        }
    }

    #[test]
    fn stage_two_pairs_cover_every_prime_in_range() {
        let b1 = 85;
        let b2 = b1 * B2_FACTOR_64;
        let p = make_plan(b1, b2);
        let mut covered = std::collections::BTreeSet::new();
        for (s, row) in p.pairs.iter().enumerate() {
            let base = (p.k0 + s as u64) * p.d;
            for &i in row {
                covered.insert(base - p.babies[i as usize]);
                covered.insert(base + p.babies[i as usize]);
            }
        }
        let table = prime_table(b2 + 1);
        for q in table.primes_in(b1 + 1, b2) {
            assert!(covered.contains(&q), "prime {q} not paired");
        }
    }

    #[test]
    fn stage_one_scalar_is_lcm_of_one_to_b1() {
        // lcm(1, …, B1) = ∏ p^⌊log_p B1⌋ (common practice); lcm(1..=47) =
        // 442720643463713815200 (sympy 1.14.0: sympy.ilcm(*range(1, 48))).
        let p = make_plan(47, 47 * B2_FACTOR_64);
        let v = p
            .stage1
            .iter()
            .rev()
            .fold(0u128, |a, &l| (a << 64) | l as u128);
        assert_eq!(p.stage1.len(), 2);
        assert_eq!(v, 442720643463713815200);
        for b1 in [70u64, 85, 165] {
            let p = make_plan(b1, b1 * B2_FACTOR_64);
            let mut lcm = num_bigint::BigUint::from(1u32);
            for k in 1..=b1 {
                lcm = num_integer::Integer::lcm(&lcm, &num_bigint::BigUint::from(k));
            }
            assert_eq!(
                num_bigint::BigUint::new(
                    p.stage1
                        .iter()
                        .flat_map(|&l| [l as u32, (l >> 32) as u32])
                        .collect()
                ),
                lcm,
                "B1 = {b1}"
            );
            assert_ne!(p.stage1.last(), Some(&0));
        }
    }

    #[test]
    fn ladder_over_limbs_agrees_with_word_ladders() {
        // [k1·k2]P by one ladder over the two-limb product against [k1]([k2]P):
        // equal as projective points X : Z (common practice).
        let n = 1_000_000_007u64 * 998_244_353; // two primes (sympy 1.14.0 isprime)
        let ring = M64::new(n).unwrap();
        let c = MontgomeryCurve {
            ring,
            a24: ring.elem(123_456_789),
        };
        let x = ring.elem(987_654_321);
        let p = Pt { x, z: ring.one() };
        for (k1, k2) in [
            (3u64, 5u64),
            (u64::MAX, 0xdead_beef_1234_5677),
            (1 << 63, 7),
        ] {
            let k = k1 as u128 * k2 as u128;
            let limbs: Vec<u64> = if k >> 64 == 0 {
                vec![k as u64]
            } else {
                vec![k as u64, (k >> 64) as u64]
            };
            let a = c.mul_limbs(&limbs, x);
            let b = c.mul(k1, c.mul(k2, p));
            assert_eq!(ring.mul(a.x, b.z), ring.mul(b.x, a.z), "k = {k}");
            assert_ne!(ring.plain(a.z), 0);
        }
        let one = c.mul_limbs(&[1], x);
        assert_eq!((one.x, one.z), (x, ring.one()));
    }

    #[test]
    fn inverses_modulo_a_word() {
        let n = 1_000_000_007u64 * 3;
        assert_eq!(crate::arith::word::inv_mod_or_gcd(3, n), Err(3));
        let x = crate::arith::word::inv_mod_or_gcd(10, n).unwrap();
        assert_eq!((x as u128 * 10 % n as u128) as u64, 1);
        // Above 2^63 (the i128 branch): 2^64 − 59 is prime (sympy 1.14.0
        // prevprime(2**64)).
        let n = u64::MAX - 58;
        let x = crate::arith::word::inv_mod_or_gcd(1 << 40, n).unwrap();
        assert_eq!((x as u128 * (1u128 << 40) % n as u128) as u64, 1);
        let n = (1u64 << 62) + 1; // = 5 · 5581 · 8681 · 49477 · 384773 (sympy 1.14.0 factorint)
        assert_eq!(crate::arith::word::inv_mod_or_gcd(10, n), Err(5));
    }
}
