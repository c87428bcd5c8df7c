//! Polynomials of degree at most 4 over `F_p` (`p` an odd prime of any
//! size): reduction, the test "constant times a square", and the roots in
//! `F_p` by `gcd(φ, x^p − x)` followed by equal-degree splitting.
//!
//! # Root finding [CantorZassenhaus81], [Cohen93, Alg. 3.4.6]
//!
//! For monic `φ ∈ F_p[x]`, `r(x) = gcd(φ, x^p − x)` is the product of the
//! distinct linear factors of `φ` (Fermat: `x^p − x = ∏_{a∈F_p} (x − a)`);
//! `x^p mod φ` is computed by square-and-multiply. A product `r` of `n ≥ 2`
//! distinct linear factors `∏ (x − ρᵢ)` is split by
//! `gcd(r, (x + δ)^{(p−1)/2} − 1)`, which collects the `ρᵢ` with
//! `ρᵢ + δ` a non-zero square; the shifts `δ = 0, 1, 2, …` are tried in
//! order (deterministic). Two distinct roots are separated by `δ` unless
//! `χ(ρ₁ + δ) = χ(ρ₂ + δ)`, which by Weil's bound for the character sum of
//! `(x + ρ₁)(x + ρ₂)` [LidlNiederreiter97, Thm. 5.41] happens for at most
//! `(p + 1)/2 + 1` shifts; in practice one or two shifts suffice. Each shift
//! is charged to the caller's budget, so the loop always stops.
//!
//! Cost: `O(log p)` multiplications of polynomials of degree `< 4` modulo
//! `φ`, i.e. `O(16·log p)` multiplications of `log p`-bit integers, per
//! exponentiation; one exponentiation for `x^p` and one per shift.

use crate::budget::Budget;
use crate::error::{Error, Result};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

/// A polynomial over `F_p`, lowest degree first, entries in `[0, p)`, no
/// trailing zeros (the zero polynomial is empty).
pub(crate) type FpPoly = Vec<BigInt>;

pub(crate) fn charge(budget: &mut Budget, units: u64, stage: &str) -> Result<()> {
    budget.spend(units).map_err(|_| Error::BudgetExhausted {
        stage: stage.to_string(),
    })
}

fn trim(mut a: FpPoly) -> FpPoly {
    while a.last().is_some_and(|c| c.is_zero()) {
        a.pop();
    }
    a
}

/// Reduces integer coefficients modulo `p`.
pub(crate) fn reduce(a: &[BigInt], p: &BigInt) -> FpPoly {
    trim(a.iter().map(|c| c.mod_floor(p)).collect())
}

/// `a⁻¹ mod p` for `a ≢ 0` (Fermat).
fn inv(a: &BigInt, p: &BigInt) -> BigInt {
    a.modpow(&(p - BigInt::from(2)), p)
}

/// Makes `a` monic (no-op on the zero polynomial).
fn monic(a: FpPoly, p: &BigInt) -> FpPoly {
    match a.last() {
        None => a,
        Some(lc) if lc.is_one() => a,
        Some(lc) => {
            let li = inv(lc, p);
            a.iter().map(|c| (c * &li).mod_floor(p)).collect()
        }
    }
}

/// `φ(r) mod p`.
pub(crate) fn eval(a: &[BigInt], r: &BigInt, p: &BigInt) -> BigInt {
    let mut acc = BigInt::zero();
    for c in a.iter().rev() {
        acc = (acc * r + c).mod_floor(p);
    }
    acc
}

/// Remainder of `a` modulo `m` (`m` non-zero).
fn rem(a: &FpPoly, m: &FpPoly, p: &BigInt) -> FpPoly {
    let dm = m.len() - 1;
    let li = inv(&m[dm], p);
    let mut r = a.clone();
    while r.len() > dm {
        let dr = r.len() - 1;
        let q = (&r[dr] * &li).mod_floor(p);
        if !q.is_zero() {
            for (i, mc) in m.iter().enumerate() {
                let idx = dr - dm + i;
                r[idx] = (&r[idx] - &q * mc).mod_floor(p);
            }
        }
        r.pop();
        r = trim(r);
    }
    r
}

/// Exact quotient `a / m` (`m` divides `a`).
fn quo(a: &FpPoly, m: &FpPoly, p: &BigInt) -> FpPoly {
    let dm = m.len() - 1;
    let li = inv(&m[dm], p);
    let mut r = a.clone();
    let mut q = vec![BigInt::zero(); a.len().saturating_sub(dm)];
    while r.len() > dm {
        let dr = r.len() - 1;
        let c = (&r[dr] * &li).mod_floor(p);
        for (i, mc) in m.iter().enumerate() {
            let idx = dr - dm + i;
            r[idx] = (&r[idx] - &c * mc).mod_floor(p);
        }
        q[dr - dm] = c;
        r.pop();
    }
    trim(q)
}

fn mul(a: &FpPoly, b: &FpPoly, p: &BigInt) -> FpPoly {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    let mut out = vec![BigInt::zero(); a.len() + b.len() - 1];
    for (i, x) in a.iter().enumerate() {
        for (j, y) in b.iter().enumerate() {
            out[i + j] += x * y;
        }
    }
    trim(out.into_iter().map(|c| c.mod_floor(p)).collect())
}

fn sub(a: &FpPoly, b: &FpPoly, p: &BigInt) -> FpPoly {
    let n = a.len().max(b.len());
    let z = BigInt::zero();
    trim(
        (0..n)
            .map(|i| (a.get(i).unwrap_or(&z) - b.get(i).unwrap_or(&z)).mod_floor(p))
            .collect(),
    )
}

/// Monic gcd.
fn gcd(a: &FpPoly, b: &FpPoly, p: &BigInt) -> FpPoly {
    let (mut x, mut y) = (a.clone(), b.clone());
    while !y.is_empty() {
        let r = rem(&x, &y, p);
        x = y;
        y = r;
    }
    monic(x, p)
}

/// `base^e mod m`, charging `16·bits(e)` units.
fn powmod(
    base: &FpPoly,
    e: &BigInt,
    m: &FpPoly,
    p: &BigInt,
    budget: &mut Budget,
) -> Result<FpPoly> {
    let bits = e.bits();
    charge(
        budget,
        16 * bits.max(1),
        "local solubility (polynomial powering mod p)",
    )?;
    let b = rem(base, m, p);
    let mut acc: FpPoly = rem(&vec![BigInt::one()], m, p);
    for i in (0..bits).rev() {
        acc = rem(&mul(&acc, &acc, p), m, p);
        if e.bit(i) {
            acc = rem(&mul(&acc, &b, p), m, p);
        }
    }
    Ok(acc)
}

/// The distinct roots of `φ` in `F_p` (`φ` reduced mod `p`, non-zero,
/// `p` odd), sorted ascending.
pub(crate) fn roots(phi: &FpPoly, p: &BigInt, budget: &mut Budget) -> Result<Vec<BigInt>> {
    if phi.len() <= 1 {
        return Ok(Vec::new());
    }
    let f = monic(phi.clone(), p);
    let x: FpPoly = vec![BigInt::zero(), BigInt::one()];
    let xp = powmod(&x, p, &f, p, budget)?;
    let r = gcd(&f, &sub(&xp, &x, p), p);
    let mut out = Vec::new();
    split(&r, p, budget, &mut out)?;
    out.sort();
    Ok(out)
}

/// Splits a monic product of distinct linear factors into its roots.
fn split(r: &FpPoly, p: &BigInt, budget: &mut Budget, out: &mut Vec<BigInt>) -> Result<()> {
    match r.len() {
        0 | 1 => return Ok(()),
        2 => {
            out.push((-&r[0]).mod_floor(p));
            return Ok(());
        }
        _ => {}
    }
    let half = (p - BigInt::one()) / BigInt::from(2);
    let mut delta = BigInt::zero();
    loop {
        let shifted: FpPoly = trim(vec![delta.mod_floor(p), BigInt::one()]);
        let pw = powmod(&shifted, &half, r, p, budget)?;
        let h = gcd(r, &sub(&pw, &vec![BigInt::one()], p), p);
        if h.len() > 1 && h.len() < r.len() {
            let other = monic(quo(r, &h, p), p);
            split(&h, p, budget, out)?;
            return split(&other, p, budget, out);
        }
        delta += 1;
    }
}

/// `Some(c)` when `φ = c·h²` for some `h ∈ F_p[x]` and constant `c ≠ 0`
/// (`p` odd, `p > 4`, `deg φ ≤ 4`), else `None`.
///
/// Method: for monic `ψ = φ/c`: degree 0 is `1²`; odd degree is never a
/// square; degree 2 is a square iff its discriminant vanishes; degree 4,
/// `ψ = x⁴ + a₃x³ + a₂x² + a₁x + a₀`, is a square iff `ψ = (x² + ux + v)²`
/// with `u = a₃/2`, `v = (a₂ − u²)/2`, which must satisfy `2uv = a₁` and
/// `v² = a₀` (compare coefficients).
pub(crate) fn constant_times_square(phi: &FpPoly, p: &BigInt) -> Option<BigInt> {
    let lc = phi.last()?.clone();
    let psi = monic(phi.clone(), p);
    let two_inv = inv(&BigInt::from(2), p);
    match psi.len() - 1 {
        0 => Some(lc),
        2 => {
            let disc = (&psi[1] * &psi[1] - BigInt::from(4) * &psi[0]).mod_floor(p);
            disc.is_zero().then_some(lc)
        }
        4 => {
            let u = (&psi[3] * &two_inv).mod_floor(p);
            let v = ((&psi[2] - &u * &u) * &two_inv).mod_floor(p);
            let ok1 = (BigInt::from(2) * &u * &v - &psi[1]).mod_floor(p).is_zero();
            let ok0 = (&v * &v - &psi[0]).mod_floor(p).is_zero();
            (ok1 && ok0).then_some(lc)
        }
        _ => None,
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    fn brute_roots(phi: &[i64], p: i64) -> Vec<BigInt> {
        (0..p)
            .filter(|&r| {
                let mut acc = 0i64;
                for c in phi.iter().rev() {
                    acc = (acc * r + c).rem_euclid(p);
                }
                acc == 0
            })
            .map(BigInt::from)
            .collect()
    }

    #[test]
    fn roots_mod_p_agree_with_exhaustive_evaluation_for_small_primes() {
        // Independent check: evaluate at every residue (common practice).
        let mut seed = 12345u64;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (seed >> 33) as i64
        };
        for &p in &[5i64, 7, 11, 13, 67, 101, 257] {
            for _ in 0..200 {
                let phi: Vec<i64> = (0..5).map(|_| next() % p).collect();
                let red = reduce(
                    &phi.iter().map(|&c| BigInt::from(c)).collect::<Vec<_>>(),
                    &BigInt::from(p),
                );
                if red.is_empty() {
                    continue;
                }
                let mut b = Budget::unlimited();
                let got = roots(&red, &BigInt::from(p), &mut b).unwrap();
                assert_eq!(got, brute_roots(&phi, p), "phi = {phi:?} mod {p}");
            }
        }
    }

    #[test]
    fn constant_times_square_detects_squares_and_rejects_the_rest() {
        let p = BigInt::from(101);
        // 3·(x² + 2x + 5)² = 3x⁴ + 12x³ + 42x² + 60x + 75
        let sq = reduce(&[75, 60, 42, 12, 3].map(BigInt::from), &p);
        assert_eq!(constant_times_square(&sq, &p), Some(BigInt::from(3)));
        let not = reduce(&[76, 60, 42, 12, 3].map(BigInt::from), &p);
        assert_eq!(constant_times_square(&not, &p), None);
        let lin = reduce(&[1, 1].map(BigInt::from), &p);
        assert_eq!(constant_times_square(&lin, &p), None);
        let quad = reduce(&[1, 2, 1].map(BigInt::from), &p);
        assert_eq!(constant_times_square(&quad, &p), Some(BigInt::one()));
    }
}
