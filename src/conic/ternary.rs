//! Ternary quadratic forms with integer coefficients and their zeros.
#![allow(clippy::needless_range_loop)] // index loops mirror the formulas

use std::fmt;

use num_bigint::BigInt;
use num_traits::Zero;

// The zero-finder for general ternary forms (`solve_ternary`) is used by
// the unit tests only; the second descent works with diagonal conics.
#[cfg(test)]
use super::legendre::{primitive, solve_core, ConicSolution};
#[cfg(test)]
use crate::arith::factor;
#[cfg(test)]
use crate::budget::Budget;
#[cfg(test)]
use crate::error::{Error, Result};
#[cfg(test)]
use crate::local::Prime;
#[cfg(test)]
use std::collections::BTreeSet;

/// The ternary quadratic form
/// q(x, y, z) = a x² + b y² + c z² + d yz + e zx + f xy
/// with integer coefficients, stored as `[a, b, c, d, e, f]`.
///
/// Its *doubled Gram matrix* is the even symmetric integer matrix
/// H = [[2a, f, e], [f, 2b, d], [e, d, 2c]], so that 2q(v) = vᵀHv and the
/// polar form is B(v, w) = q(v + w) − q(v) − q(w) = vᵀHw. The conic
/// q = 0 is non-degenerate iff det H ≠ 0.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct TernaryForm {
    coeffs: [BigInt; 6],
}

impl fmt::Display for TernaryForm {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let [a, b, c, d, e, g] = &self.coeffs;
        write!(f, "{a}x^2 + {b}y^2 + {c}z^2 + {d}yz + {e}zx + {g}xy")
    }
}

impl TernaryForm {
    /// q = a x² + b y² + c z² + d yz + e zx + f xy.
    pub fn new(a: BigInt, b: BigInt, c: BigInt, d: BigInt, e: BigInt, f: BigInt) -> Self {
        TernaryForm {
            coeffs: [a, b, c, d, e, f],
        }
    }

    /// The diagonal form a x² + b y² + c z².
    pub fn diagonal(a: BigInt, b: BigInt, c: BigInt) -> Self {
        Self::new(a, b, c, BigInt::zero(), BigInt::zero(), BigInt::zero())
    }

    #[cfg(test)]
    /// The form vᵀ M v of a symmetric integer matrix M.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] if M is not symmetric.
    pub fn from_symmetric_matrix(m: &[[BigInt; 3]; 3]) -> Result<Self> {
        for i in 0..3 {
            for j in 0..i {
                if m[i][j] != m[j][i] {
                    return Err(Error::InvalidArgument {
                        reason: format!(
                            "matrix is not symmetric: entry ({i},{j}) = {} but ({j},{i}) = {}",
                            m[i][j], m[j][i]
                        ),
                    });
                }
            }
        }
        Ok(Self::new(
            m[0][0].clone(),
            m[1][1].clone(),
            m[2][2].clone(),
            &m[1][2] * 2u32,
            &m[0][2] * 2u32,
            &m[0][1] * 2u32,
        ))
    }

    /// The doubled Gram matrix H (see the type docs).
    pub fn doubled_gram(&self) -> [[BigInt; 3]; 3] {
        let [a, b, c, d, e, f] = &self.coeffs;
        [
            [a * 2u32, f.clone(), e.clone()],
            [f.clone(), b * 2u32, d.clone()],
            [e.clone(), d.clone(), c * 2u32],
        ]
    }

    /// det H, where H is the doubled Gram matrix; 0 iff the conic is
    /// degenerate (a line pair, a double line, or worse).
    pub fn doubled_determinant(&self) -> BigInt {
        det3(&self.doubled_gram())
    }

    /// q(v).
    pub fn evaluate(&self, v: &[BigInt; 3]) -> BigInt {
        let [a, b, c, d, e, f] = &self.coeffs;
        let [x, y, z] = v;
        a * x * x + b * y * y + c * z * z + d * y * z + e * z * x + f * x * y
    }

    /// The polar form B(v, w) = q(v + w) − q(v) − q(w) = vᵀHw.
    pub(crate) fn polar(&self, v: &[BigInt; 3], w: &[BigInt; 3]) -> BigInt {
        let h = self.doubled_gram();
        let mut s = BigInt::zero();
        for i in 0..3 {
            for j in 0..3 {
                s += &v[i] * &h[i][j] * &w[j];
            }
        }
        s
    }
}

pub(crate) fn det3(m: &[[BigInt; 3]; 3]) -> BigInt {
    &m[0][0] * (&m[1][1] * &m[2][2] - &m[1][2] * &m[2][1])
        - &m[0][1] * (&m[1][0] * &m[2][2] - &m[1][2] * &m[2][0])
        + &m[0][2] * (&m[1][0] * &m[2][1] - &m[1][1] * &m[2][0])
}

#[cfg(test)]
/// Small integer vectors tried as basis vectors: e₁, e₂, e₃, e₁+e₂,
/// e₁+e₃, e₂+e₃. For a non-degenerate form one of them is anisotropic
/// (if q(eᵢ) = q(eᵢ+eⱼ) = 0 for all i, j then every coefficient is 0).
fn small_vectors() -> Vec<[BigInt; 3]> {
    let v = |a: i32, b: i32, c: i32| [BigInt::from(a), BigInt::from(b), BigInt::from(c)];
    vec![
        v(1, 0, 0),
        v(0, 1, 0),
        v(0, 0, 1),
        v(1, 1, 0),
        v(1, 0, 1),
        v(0, 1, 1),
    ]
}

#[cfg(test)]
fn check_nondegenerate(q: &TernaryForm) -> Result<BigInt> {
    let det = q.doubled_determinant();
    if det.is_zero() {
        return Err(Error::Degenerate {
            reason: format!("the ternary form {q} has determinant 0"),
        });
    }
    Ok(det)
}

#[cfg(test)]
/// A nontrivial rational zero of a non-degenerate ternary quadratic form,
/// or a place where it has none.
///
/// **Statement.** q = 0 has a nontrivial rational solution iff it has one
/// over every completion Q_v (Hasse–Minkowski, [Serre73, IV.3.2, Thm. 8]).
///
/// **Method: diagonalisation by leading minors** (common practice:
/// Lagrange's completion of squares, written with Jacobi's leading
/// principal minors). Choose integer vectors f₁, f₂, f₃ (from e₁, e₂, e₃ and their
/// pairwise sums) with q(f₁) ≠ 0 and Δ₂ ≠ 0, and let H′ = UᵀHU for
/// U = (f₁ f₂ f₃) with leading minors Δ₁ = H′₁₁, Δ₂, Δ₃ = det H′ =
/// (det U)² det H. The vectors w₁ = e₁, w₂ = Δ₁e₂ − H′₁₂e₁ and
/// w₃ = adj(H′)e₃ are H′-orthogonal, with
/// 2q(Uwᵢ) = Δ₁, Δ₁Δ₂, Δ₂Δ₃ respectively. So q(U(y₁w₁ + y₂w₂ + y₃w₃)) =
/// ½(Δ₁y₁² + Δ₁Δ₂y₂² + Δ₂Δ₃y₃²): a zero of the diagonal form (found by
/// [`super::solve_diagonal`]'s method, with the primes of abc taken from the
/// factorisations of Δ₁, Δ₂, det U and det H, which are much smaller than the
/// diagonal coefficients) maps to a zero of q.
///
/// **Answer.** A primitive integer zero (first nonzero coordinate positive)
/// or a place of local insolubility, chosen as in
/// [`super::solve_diagonal`] for the diagonal form.
///
/// # Errors
/// [`Error::Degenerate`] if det H = 0;
/// [`Error::FactorBudgetExhausted`] / [`Error::BudgetExhausted`] when the
/// budget runs out.
///
/// **Cost.** Factoring four integers of sizes about C, C², C and C³ for
/// coefficients of size C, then the cost of [`super::solve_diagonal`].
///
/// ```
/// use isodescent::conic::{solve_ternary, TernaryForm};
/// use isodescent::Budget;
/// // xy − z² = 0 has the point (1, 0, 0).
/// let q = TernaryForm::new(0.into(), 0.into(), (-1).into(), 0.into(), 0.into(), 1.into());
/// let s = solve_ternary(&q, &mut Budget::unlimited()).unwrap();
/// let p = s.point().unwrap();
/// assert_eq!(q.evaluate(p), 0.into());
/// ```
pub fn solve_ternary(q: &TernaryForm, budget: &mut Budget) -> Result<ConicSolution> {
    let det_h = check_nondegenerate(q)?;
    let h = q.doubled_gram();
    let hv = |v: &[BigInt; 3], w: &[BigInt; 3]| -> BigInt {
        let mut s = BigInt::zero();
        for i in 0..3 {
            for j in 0..3 {
                s += &v[i] * &h[i][j] * &w[j];
            }
        }
        s
    };
    let cands = small_vectors();
    let degenerate = || Error::Degenerate {
        reason: format!("no anisotropic basis found for {q}"),
    };
    let f1 = cands
        .iter()
        .find(|v| !hv(v, v).is_zero())
        .cloned()
        .ok_or_else(degenerate)?;
    let d1 = hv(&f1, &f1);
    let f2 = cands
        .iter()
        .find(|e| {
            let be = hv(&f1, e);
            !(&d1 * hv(e, e) - &be * &be).is_zero()
        })
        .cloned()
        .ok_or_else(degenerate)?;
    let f3 = cands
        .iter()
        .take(3)
        .find(|e| !det3(&[f1.clone(), f2.clone(), (*e).clone()]).is_zero())
        .cloned()
        .ok_or_else(degenerate)?;
    let basis = [f1, f2, f3];
    // H' = Uᵀ H U
    let mut hp: [[BigInt; 3]; 3] = Default::default();
    for i in 0..3 {
        for j in 0..3 {
            hp[i][j] = hv(&basis[i], &basis[j]);
        }
    }
    let det_u = det3(&basis);
    let delta1 = hp[0][0].clone();
    let delta2 = &hp[0][0] * &hp[1][1] - &hp[0][1] * &hp[1][0];
    let delta3 = det3(&hp);
    // w vectors in U-coordinates
    let w1 = [BigInt::from(1), BigInt::zero(), BigInt::zero()];
    let w2 = [-&hp[0][1], delta1.clone(), BigInt::zero()];
    // third column of adj(H'): cofactors C_{3,i}
    let w3 = [
        &hp[0][1] * &hp[1][2] - &hp[0][2] * &hp[1][1],
        &hp[0][2] * &hp[1][0] - &hp[0][0] * &hp[1][2],
        delta2.clone(),
    ];
    let diag = [delta1.clone(), &delta1 * &delta2, &delta2 * &delta3];
    let mut set: BTreeSet<BigInt> = BTreeSet::new();
    for n in [&delta1, &delta2, &det_u, &det_h] {
        for p in factor(n, budget)?.primes() {
            set.insert(p.clone());
        }
    }
    let ps: Vec<Prime> = set.into_iter().map(Prime::new).collect::<Result<_>>()?;
    let sol = solve_core(diag, &ps, budget)?;
    let y = match sol {
        ConicSolution::Point(y) => y,
        other => return Ok(other),
    };
    // x = U (y1 w1 + y2 w2 + y3 w3)
    let mut wcomb = [BigInt::zero(), BigInt::zero(), BigInt::zero()];
    for (yk, wk) in y.iter().zip([&w1, &w2, &w3]) {
        for c in 0..3 {
            wcomb[c] += yk * &wk[c];
        }
    }
    let mut x = vec![BigInt::zero(), BigInt::zero(), BigInt::zero()];
    for (k, f) in basis.iter().enumerate() {
        for c in 0..3 {
            x[c] += &wcomb[k] * &f[c];
        }
    }
    primitive(&mut x);
    if x.iter().all(|v| v.is_zero())
        || !q
            .evaluate(&[x[0].clone(), x[1].clone(), x[2].clone()])
            .is_zero()
    {
        // cannot happen: U and (w1 w2 w3) are invertible and the diagonal
        // form is q in the new coordinates; reported rather than panicking.
        return Err(Error::Degenerate {
            reason: format!("internal diagonalisation check failed for {q}"),
        });
    }
    Ok(ConicSolution::Point([
        x[0].clone(),
        x[1].clone(),
        x[2].clone(),
    ]))
}
