//! LLL reduction of a basis given by its Gram matrix (the height pairing).
//!
//! Lenstra–Lenstra–Lovász, Math. Ann. 261 (1982), with δ = 3/4, run on the
//! Gram matrix in f64 (Cohen, *A Course in Computational Algebraic Number
//! Theory*, §2.6, the Gram-matrix form). Only the unimodular integer
//! transformation is kept: callers form the new points exactly and
//! recompute their heights, so rounding here can only make the basis less
//! reduced, never wrong.

// Matrix code reads best with explicit indices.
#![allow(clippy::needless_range_loop)]

/// `U` (rows = integer combinations of the input basis) with `U·G·Uᵀ`
/// LLL-reduced. The input must be positive definite.
pub(crate) fn lll_gram(gram: &[Vec<f64>]) -> Vec<Vec<i64>> {
    let n = gram.len();
    let mut u: Vec<Vec<i64>> = (0..n)
        .map(|i| (0..n).map(|j| i64::from(i == j)).collect())
        .collect();
    if n <= 1 {
        return u;
    }
    let mut g: Vec<Vec<f64>> = gram.to_vec();
    let mut k = 1usize;
    let mut steps = 0usize;
    while k < n && steps < 10_000 {
        steps += 1;
        // Size reduction of b_k against b_{k−1}, …, b_0.
        for j in (0..k).rev() {
            let (mu, _) = gso(&g);
            let q = mu[k][j].round();
            if q != 0.0 && q.is_finite() && q.abs() < 1e12 {
                let qi = q as i64;
                for c in 0..n {
                    u[k][c] = u[k][c].saturating_sub(qi.saturating_mul(u[j][c]));
                }
                g = transformed(gram, &u);
            }
        }
        let (mu, bstar) = gso(&g);
        if bstar[k] < (0.75 - mu[k][k - 1] * mu[k][k - 1]) * bstar[k - 1] {
            u.swap(k, k - 1);
            g = transformed(gram, &u);
            k = (k - 1).max(1);
        } else {
            k += 1;
        }
    }
    u
}

/// `U·G·Uᵀ`.
fn transformed(g: &[Vec<f64>], u: &[Vec<i64>]) -> Vec<Vec<f64>> {
    let n = g.len();
    let mut out = vec![vec![0.0; n]; n];
    for i in 0..n {
        for j in 0..n {
            let mut s = 0.0;
            for a in 0..n {
                for b in 0..n {
                    s += u[i][a] as f64 * g[a][b] * u[j][b] as f64;
                }
            }
            out[i][j] = s;
        }
    }
    out
}

/// Gram–Schmidt coefficients μ and squared lengths B* from a Gram matrix.
fn gso(g: &[Vec<f64>]) -> (Vec<Vec<f64>>, Vec<f64>) {
    let n = g.len();
    let mut mu = vec![vec![0.0; n]; n];
    let mut b = vec![0.0; n];
    for i in 0..n {
        for j in 0..i {
            let mut s = g[i][j];
            for k in 0..j {
                s -= mu[j][k] * mu[i][k] * b[k];
            }
            mu[i][j] = if b[j] != 0.0 { s / b[j] } else { 0.0 };
        }
        let mut s = g[i][i];
        for k in 0..i {
            s -= mu[i][k] * mu[i][k] * b[k];
        }
        b[i] = s;
    }
    (mu, b)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_skewed_basis_of_z2_comes_back_short() {
        // Basis (1, 0), (7, 1) of Z²: LLL returns vectors of length 1
        // (the definition of a reduced basis, LLL 1982).
        let b = [[1.0, 0.0], [7.0, 1.0]];
        let g: Vec<Vec<f64>> = (0..2)
            .map(|i| {
                (0..2)
                    .map(|j| b[i][0] * b[j][0] + b[i][1] * b[j][1])
                    .collect()
            })
            .collect();
        let u = lll_gram(&g);
        for row in &u {
            let v = [
                row[0] as f64 * b[0][0] + row[1] as f64 * b[1][0],
                row[0] as f64 * b[0][1] + row[1] as f64 * b[1][1],
            ];
            assert!((v[0] * v[0] + v[1] * v[1] - 1.0).abs() < 1e-9, "{u:?}");
        }
    }
}
