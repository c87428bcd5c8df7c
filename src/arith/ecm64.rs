//! Lenstra's elliptic curve method \[Lenstra87\] for word-size composites,
//! in the 64-bit Montgomery arithmetic of [`super::small::M64`].
//!
//! Same curves as [`super::ecm`] (Montgomery curves `B·y² = x³ + A·x² + x`
//! \[Montgomery87\] with Suyama's parametrisation, order divisible by 12),
//! but every step stays in machine words: the curve is set up with one
//! word-size inversion, stage 1 runs the Montgomery ladder over the
//! product of the prime powers up to `B1` packed into 64-bit words, and
//! stage 2 is the standard baby-step/giant-step continuation whose pairs
//! `(k, j)` (`kD ± j` prime) are listed once per `(B1, B2, D)`.
//!
//! Nothing allocates per curve except the list of baby steps (at most 24
//! words); a curve with `B1 = 85` costs about 2000 multiplications.

use super::prime::prime_table;
use super::small::{gcd_u64, M64};
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};

/// The work of one `(B1, B2)` setting, computed once: the stage-1
/// multiplier packed into words, and the stage-2 giant steps with their
/// baby steps.
struct Plan {
    /// Words whose product is `∏ p^⌊log_p B1⌋` over the primes `p ≤ B1`
    /// (each word below `2^64`).
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
    let mut stage1 = Vec::new();
    let mut word = 1u64;
    for p in table.primes_in(2, b1) {
        let mut pk = p;
        while pk <= b1 / p {
            pk *= p;
        }
        match word.checked_mul(pk) {
            Some(w) => word = w,
            None => {
                stage1.push(word);
                word = pk;
            }
        }
    }
    if word > 1 {
        stage1.push(word);
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

/// `x⁻¹ mod n` for a plain residue `x` (not in Montgomery form), or
/// `Err(g)` with `g = gcd(x, n) > 1`.
fn inverse_mod(x: u64, n: u64) -> Result<u64, u64> {
    let (mut r0, mut r1) = (n as i128, (x % n) as i128);
    let (mut s0, mut s1) = (0i128, 1i128);
    while r1 != 0 {
        let q = r0 / r1;
        (r0, r1) = (r1, r0 - q * r1);
        (s0, s1) = (s1, s0 - q * s1);
    }
    if r0 != 1 {
        return Err(r0 as u64);
    }
    Ok(s0.rem_euclid(n as i128) as u64)
}

/// A point `X : Z` in Montgomery form.
#[derive(Clone, Copy)]
struct Pt {
    x: u64,
    z: u64,
}

struct Curve {
    ring: M64,
    a24: u64,
}

impl Curve {
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

/// One curve with Suyama parameter `sigma ≥ 6` on the odd composite `n`
/// (no prime factor 2 or 3), along `plan`.
fn curve(ring: M64, n: u64, sigma: u64, plan: &Plan) -> Curve64 {
    let r = &ring;
    // u = σ² − 5, v = 4σ, x₀ : z₀ = u³ : v³,
    // (A + 2)/4 = (v − u)³(3u + v) / (16u³v)  [Zimmermann-Dodson06, §2].
    let s = r.elem(sigma);
    let u = r.sub(r.mul(s, s), r.elem(5));
    let v = r.add(r.add(s, s), r.add(s, s));
    let u3 = r.mul(r.mul(u, u), u);
    let v3 = r.mul(r.mul(v, v), v);
    let vmu = r.sub(v, u);
    let num = r.mul(r.mul(r.mul(vmu, vmu), vmu), r.add(r.add(r.add(u, u), u), v));
    let den = r.mul(r.mul(u3, v), r.elem(16));
    let inv = match inverse_mod(r.plain(den), n) {
        Ok(i) => r.elem(i),
        Err(g) => {
            return if g == n {
                Curve64::Failed
            } else {
                Curve64::Found(g)
            }
        }
    };
    let c = Curve {
        ring,
        a24: r.mul(num, inv),
    };
    let mut q = Pt { x: u3, z: v3 };
    for &k in &plan.stage1 {
        q = c.mul(k, q);
    }
    // Baby steps jQ (odd j < D/2), normalised to x-coordinates by one
    // batched inversion; a non-invertible Z gives the gcd.
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
    let mut prefix = [0u64; 24];
    let mut acc = r.one();
    for i in 0..nb {
        prefix[i] = acc;
        acc = r.mul(acc, bz[i]);
    }
    let total_inv = match inverse_mod(r.plain(acc), n) {
        Ok(i) => r.elem(i),
        Err(g) => {
            return if g == n {
                Curve64::Failed
            } else {
                Curve64::Found(g)
            }
        }
    };
    let mut run = total_inv;
    for i in (0..nb).rev() {
        let zi = r.mul(run, prefix[i]);
        run = r.mul(run, bz[i]);
        bx[i] = r.mul(bx[i], zi);
    }
    // Giant steps R_k = kD·Q from k0 on.
    let dq = c.mul(plan.d, q);
    let mut rk = c.mul(plan.k0 * plan.d, q);
    let mut rprev = if plan.k0 == 1 {
        Pt { x: 0, z: 0 } // unused: the first step doubles
    } else {
        c.mul((plan.k0 - 1) * plan.d, q)
    };
    let mut acc = r.one();
    for (step, row) in plan.pairs.iter().enumerate() {
        for &i in row {
            acc = r.mul(acc, r.sub(rk.x, r.mul(bx[i as usize], rk.z)));
        }
        let next = if plan.k0 == 1 && step == 0 {
            c.dbl(rk)
        } else {
            c.add(rk, dq, rprev)
        };
        rprev = rk;
        rk = next;
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
/// `11·log₂(∏ prime powers ≤ B1) + 6·B2/D + 2·(primes in (B1, B2])`.
pub(crate) fn ecm_u64(n: u64, b1: u64, curves: u32, sigma0: u64) -> Option<u64> {
    let ring = M64::new(n)?;
    let plan = plan(b1, b1 * B2_FACTOR_64);
    for s in 0..curves as u64 {
        if let Curve64::Found(d) = curve(ring, n, sigma0 + s, &plan) {
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
    fn inverses_modulo_a_word() {
        let n = 1_000_000_007u64 * 3;
        assert_eq!(inverse_mod(3, n), Err(3));
        let x = inverse_mod(10, n).unwrap();
        assert_eq!((x as u128 * 10 % n as u128) as u64, 1);
    }
}
