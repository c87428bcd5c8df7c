//! Small-dimensional lattice tools for the conic solver: exact LLL
//! reduction and Fincke–Pohst enumeration with respect to a positive
//! definite *diagonal* quadratic form N(v) = Σ wᵢ vᵢ².
//!
//! Everything is exact (rational Gram–Schmidt data), so the enumeration
//! returns *every* lattice vector with N(v) ≤ R, which is what the
//! correctness argument of [`super::legendre`] needs. The dimension is 2 or
//! 3 here, so recomputing the Gram–Schmidt data after each change is cheap.
//!
//! References: LLL reduction \[LLL82\], [Cohen93, Alg. 2.6.3]; enumeration of
//! short vectors \[FinckePohst85\], [Cohen93, Alg. 2.7.5].
#![allow(clippy::needless_range_loop)] // index loops mirror the formulas

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};

use crate::arith::isqrt;
use crate::budget::Budget;
use crate::error::{Error, Result};

/// A basis of a lattice in Z^n, one row per basis vector.
pub(crate) type Basis = Vec<Vec<BigInt>>;

/// N(x) = Σ wᵢ xᵢ yᵢ, the bilinear form of the diagonal weight vector.
fn inner(w: &[BigInt], x: &[BigInt], y: &[BigInt]) -> BigInt {
    w.iter()
        .zip(x.iter().zip(y.iter()))
        .map(|(wi, (xi, yi))| wi * xi * yi)
        .sum()
}

fn exhausted(stage: &str) -> Error {
    Error::BudgetExhausted {
        stage: stage.to_string(),
    }
}

/// LLL-reduces `basis` (linearly independent rows) in place with respect
/// to N, with Lovász constant δ = 3/4, by the all-integer variant of
/// \[LLL82\] given as [Cohen93, Alg. 2.6.7]: the Gram–Schmidt data are kept
/// as the integers dᵢ (Gram determinants) and λᵢⱼ = dⱼ μᵢⱼ, so no
/// rational arithmetic is needed. One budget unit per size-reduction or
/// swap step.
///
/// # Errors
/// [`Error::Degenerate`] if the rows are dependent;
/// [`Error::BudgetExhausted`] when the budget runs out.
pub(crate) fn lll(w: &[BigInt], basis: &mut Basis, budget: &mut Budget) -> Result<()> {
    let n = basis.len();
    if n < 2 {
        return Ok(());
    }
    // 0-indexed: d[i+1] is the Gram determinant of b_0..b_i, d[0] = 1.
    let mut d = vec![BigInt::zero(); n + 1];
    let mut lam = vec![vec![BigInt::zero(); n]; n];
    d[0] = BigInt::one();
    d[1] = inner(w, &basis[0], &basis[0]);
    if d[1].is_zero() {
        return Err(dependent());
    }
    let mut k = 1usize;
    let mut kmax = 0usize;
    while k < n {
        budget
            .spend(1)
            .map_err(|_| exhausted("lattice reduction"))?;
        if k > kmax {
            kmax = k;
            for j in 0..=k {
                let mut u = inner(w, &basis[k], &basis[j]);
                for i in 0..j {
                    u = (&d[i + 1] * &u - &lam[k][i] * &lam[j][i]) / &d[i];
                }
                if j < k {
                    lam[k][j] = u;
                } else {
                    if u.is_zero() {
                        return Err(dependent());
                    }
                    d[k + 1] = u;
                }
            }
        }
        reduce(basis, &mut lam, &d, k, k - 1);
        let l = &lam[k][k - 1];
        let lhs = BigInt::from(4) * &d[k + 1] * &d[k - 1];
        let rhs = BigInt::from(3) * &d[k] * &d[k] - BigInt::from(4) * l * l;
        if lhs < rhs {
            swap(basis, &mut lam, &mut d, k, kmax);
            k = if k > 1 { k - 1 } else { 1 };
        } else {
            for l in (0..k.saturating_sub(1)).rev() {
                reduce(basis, &mut lam, &d, k, l);
            }
            k += 1;
        }
    }
    Ok(())
}

fn dependent() -> Error {
    Error::Degenerate {
        reason: "lattice basis is linearly dependent".into(),
    }
}

/// RED(k, l) of [Cohen93, Alg. 2.6.7] (0-indexed).
fn reduce(basis: &mut Basis, lam: &mut [Vec<BigInt>], d: &[BigInt], k: usize, l: usize) {
    let two_lam: BigInt = &lam[k][l] * 2u32;
    if two_lam.abs() <= d[l + 1] {
        return;
    }
    // q = round(λ / d): floor((2λ + d) / 2d)
    let q = (&two_lam + &d[l + 1]).div_floor(&(&d[l + 1] * 2u32));
    let bl = basis[l].clone();
    for (x, y) in basis[k].iter_mut().zip(bl.iter()) {
        *x -= &q * y;
    }
    lam[k][l] = &lam[k][l] - &q * &d[l + 1];
    for i in 0..l {
        let t = &q * &lam[l][i];
        lam[k][i] -= t;
    }
}

/// SWAP(k) of [Cohen93, Alg. 2.6.7] (0-indexed).
fn swap(basis: &mut Basis, lam: &mut [Vec<BigInt>], d: &mut [BigInt], k: usize, kmax: usize) {
    basis.swap(k, k - 1);
    for j in 0..k.saturating_sub(1) {
        let t = lam[k][j].clone();
        lam[k][j] = lam[k - 1][j].clone();
        lam[k - 1][j] = t;
    }
    let l = lam[k][k - 1].clone();
    let b = (&d[k - 1] * &d[k + 1] + &l * &l) / &d[k];
    for i in (k + 1)..=kmax {
        let t = lam[i][k].clone();
        lam[i][k] = (&d[k + 1] * &lam[i][k - 1] - &l * &t) / &d[k];
        lam[i][k - 1] = (&b * &t + &l * &lam[i][k]) / &d[k + 1];
    }
    d[k] = b;
}

/// The integral Gram–Schmidt data of [Cohen93, §2.6.3]: `d[i + 1]` is the
/// Gram determinant of b_0..b_i (`d[0] = 1`) and `lam[k][j] = d[j + 1] μ_kj`,
/// all integers.
fn integral_gs(w: &[BigInt], basis: &Basis) -> Result<(Vec<BigInt>, Vec<Vec<BigInt>>)> {
    let n = basis.len();
    let mut d = vec![BigInt::one(); n + 1];
    let mut lam = vec![vec![BigInt::zero(); n]; n];
    for k in 0..n {
        for j in 0..=k {
            let mut u = inner(w, &basis[k], &basis[j]);
            for i in 0..j {
                u = (&d[i + 1] * &u - &lam[k][i] * &lam[j][i]) / &d[i];
            }
            if j < k {
                lam[k][j] = u;
            } else {
                if u.is_zero() {
                    return Err(dependent());
                }
                d[k + 1] = u;
            }
        }
    }
    Ok((d, lam))
}

/// Every nonzero vector v of the lattice spanned by `basis` with
/// N(v) ≤ `radius`, up to sign (exactly one of ±v is listed), by
/// Fincke–Pohst enumeration \[FinckePohst85\] in exact integer arithmetic,
/// collected into a vector (for tests; the solver streams them with
/// [`visit_short_vectors`] and stores none).
#[cfg(test)]
pub(crate) fn short_vectors(
    w: &[BigInt],
    basis: &Basis,
    radius: &BigInt,
    budget: &mut Budget,
) -> Result<Vec<Vec<BigInt>>> {
    let mut out: Vec<Vec<BigInt>> = Vec::new();
    visit_short_vectors(w, basis, radius, budget, &mut |v| {
        out.push(v.to_vec());
        false
    })?;
    Ok(out)
}

/// Hands every nonzero vector v of the lattice spanned by `basis` with
/// N(v) ≤ `radius`, up to sign (exactly one of ±v), to `visit`, in a fixed
/// order, by Fincke–Pohst enumeration \[FinckePohst85\] in exact integer
/// arithmetic. Nothing is stored: memory is that of one vector and the
/// recursion (depth = dimension). `visit` returns true to stop; the result
/// is then `Ok(true)`.
///
/// With yᵢ = d_{i+1} xᵢ + Σ_{j>i} λ_{ji} xⱼ one has
/// N(Σ xᵢ bᵢ) = Σᵢ yᵢ² / (dᵢ d_{i+1}), so each level is an integer range.
/// `basis` should be LLL-reduced so that the search tree is small. One
/// budget unit per tree node and per candidate.
pub(crate) fn visit_short_vectors(
    w: &[BigInt],
    basis: &Basis,
    radius: &BigInt,
    budget: &mut Budget,
    visit: &mut dyn FnMut(&[BigInt]) -> bool,
) -> Result<bool> {
    let n = basis.len();
    let (d, lam) = integral_gs(w, basis)?;
    let mut coords = vec![BigInt::zero(); n];
    let level = Level {
        d: &d,
        lam: &lam,
        basis,
    };
    level.enumerate(n, radius.clone(), BigInt::one(), &mut coords, visit, budget)
}

struct Level<'a> {
    d: &'a [BigInt],
    lam: &'a [Vec<BigInt>],
    basis: &'a Basis,
}

impl Level<'_> {
    /// Coordinates x_{level..n} are fixed in `coords`; the radius left for
    /// the levels below is num/den. `Ok(true)` when `visit` asked to stop.
    fn enumerate(
        &self,
        level: usize,
        num: BigInt,
        den: BigInt,
        coords: &mut Vec<BigInt>,
        visit: &mut dyn FnMut(&[BigInt]) -> bool,
        budget: &mut Budget,
    ) -> Result<bool> {
        let n = self.basis.len();
        if level == 0 {
            if coords.iter().all(|c| c.is_zero()) {
                return Ok(false);
            }
            // keep one of ±v: the last nonzero coordinate positive
            if let Some(last) = coords.iter().rev().find(|c| !c.is_zero()) {
                if last.is_negative() {
                    return Ok(false);
                }
            }
            let dim = self.basis[0].len();
            let mut v = vec![BigInt::zero(); dim];
            for (c, row) in coords.iter().zip(self.basis.iter()) {
                for (vi, bi) in v.iter_mut().zip(row.iter()) {
                    *vi += c * bi;
                }
            }
            return Ok(visit(&v));
        }
        let i = level - 1;
        budget
            .spend(1)
            .map_err(|_| exhausted("short-vector enumeration"))?;
        let c: BigInt = ((i + 1)..n).map(|j| &self.lam[j][i] * &coords[j]).sum();
        let dd = &self.d[i] * &self.d[i + 1];
        // |y| ≤ Y with Y² ≤ num·dᵢd_{i+1}/den
        let bound = (&num * &dd).div_floor(&den);
        if bound.is_negative() {
            return Ok(false);
        }
        let y_max = isqrt(&bound).unwrap_or_else(|_| BigInt::zero());
        let di1 = &self.d[i + 1];
        // x from ceil((−Y − c)/d) to floor((Y − c)/d)
        let lo = -((&y_max + &c).div_floor(di1));
        let hi = (&y_max - &c).div_floor(di1);
        let mut x = lo;
        while x <= hi {
            // every candidate costs, at the innermost level too (where the
            // recursion returns before charging): the range can be long.
            budget
                .spend(1)
                .map_err(|_| exhausted("short-vector enumeration"))?;
            let y = di1 * &x + &c;
            coords[i] = x.clone();
            let num2 = &num * &dd - &y * &y * &den;
            let den2 = &den * &dd;
            if self.enumerate(i, num2, den2, coords, visit, budget)? {
                coords[i] = BigInt::zero();
                return Ok(true);
            }
            x += 1u32;
        }
        coords[i] = BigInt::zero();
        Ok(false)
    }
}

/// Hermite normal form style echelon basis of the lattice generated by the
/// rows of `gens` (integer vectors of length `dim`, spanning a full-rank
/// lattice). Returns `dim` independent rows.
pub(crate) fn echelon_basis(gens: &[Vec<BigInt>], dim: usize) -> Result<Basis> {
    let mut rows: Vec<Vec<BigInt>> = gens.to_vec();
    let mut basis: Basis = Vec::with_capacity(dim);
    for col in 0..dim {
        // gather the gcd of column `col` into one row by extended Euclid
        let mut pivot: Option<Vec<BigInt>> = None;
        let mut rest: Vec<Vec<BigInt>> = Vec::new();
        for row in rows.into_iter() {
            if row[col].is_zero() {
                rest.push(row);
                continue;
            }
            match pivot.take() {
                None => pivot = Some(row),
                Some(p) => {
                    let e = p[col].extended_gcd(&row[col]);
                    let (pa, ra) = (&p[col] / &e.gcd, &row[col] / &e.gcd);
                    // new pivot = x p + y row  (entry gcd), other = ra p - pa row (entry 0)
                    let newp: Vec<BigInt> = p
                        .iter()
                        .zip(row.iter())
                        .map(|(u, v)| &e.x * u + &e.y * v)
                        .collect();
                    let other: Vec<BigInt> = p
                        .iter()
                        .zip(row.iter())
                        .map(|(u, v)| &ra * u - &pa * v)
                        .collect();
                    rest.push(other);
                    pivot = Some(newp);
                }
            }
        }
        match pivot {
            Some(p) => basis.push(p),
            None => {
                return Err(Error::Degenerate {
                    reason: "generators do not span a full-rank lattice".into(),
                })
            }
        }
        rows = rest;
    }
    Ok(basis)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    fn v(xs: &[i64]) -> Vec<BigInt> {
        xs.iter().map(|&x| BigInt::from(x)).collect()
    }

    #[test]
    fn enumeration_finds_every_short_vector_of_z2() {
        // Z^2 with N = x^2 + y^2: vectors of norm <= 2 up to sign are
        // (1,0), (0,1), (1,1), (-1,1): four of them (common practice).
        let w = v(&[1, 1]);
        let mut basis = vec![v(&[1, 0]), v(&[7, 1])];
        let mut budget = Budget::unlimited();
        lll(&w, &mut basis, &mut budget).unwrap();
        let out = short_vectors(&w, &basis, &BigInt::from(2), &mut budget).unwrap();
        assert_eq!(out.len(), 4);
    }

    #[test]
    fn streaming_visits_the_same_vectors_and_stops_when_asked() {
        // The stream and the collected list agree; a visitor that stops at
        // the first vector sees exactly one (common practice).
        let w = v(&[1, 1]);
        let mut basis = vec![v(&[1, 0]), v(&[7, 1])];
        let mut budget = Budget::unlimited();
        lll(&w, &mut basis, &mut budget).unwrap();
        let all = short_vectors(&w, &basis, &BigInt::from(5), &mut budget).unwrap();
        let mut seen = Vec::new();
        let stopped = visit_short_vectors(&w, &basis, &BigInt::from(5), &mut budget, &mut |x| {
            seen.push(x.to_vec());
            true
        })
        .unwrap();
        assert!(stopped);
        assert_eq!(seen.len(), 1);
        assert_eq!(seen[0], all[0]);
        // a unit budget stops the enumeration with a budget error
        let mut tiny = Budget::with_units(2);
        let r = visit_short_vectors(&w, &basis, &BigInt::from(50), &mut tiny, &mut |_| false);
        assert!(matches!(r, Err(Error::BudgetExhausted { .. })));
    }

    #[test]
    fn echelon_basis_has_the_right_index() {
        // lattice {x ≡ 2y mod 5} in Z^2 has index 5
        let gens = vec![v(&[2, 1]), v(&[5, 0]), v(&[0, 5])];
        let b = echelon_basis(&gens, 2).unwrap();
        let det = &b[0][0] * &b[1][1] - &b[0][1] * &b[1][0];
        assert_eq!(det.abs(), BigInt::from(5));
    }
}
