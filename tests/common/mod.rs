//! Helpers shared by the congruent-number tests: square-freeness and
//! Tunnell's criterion.
#![allow(dead_code)]

/// n ≥ 1 is square-free (no p² | n; common practice).
pub fn squarefree(n: i64) -> bool {
    (2..).take_while(|p| p * p <= n).all(|p| n % (p * p) != 0)
}

/// Number of integer solutions of x² + c1·y² + c2·z² = m.
pub fn count(m: i64, c1: i64, c2: i64) -> usize {
    let r = (m as f64).sqrt() as i64 + 1;
    let mut k = 0;
    for x in -r..=r {
        for y in -r..=r {
            let rest = m - x * x - c1 * y * y;
            if rest < 0 || rest % c2 != 0 {
                continue;
            }
            let z2 = rest / c2;
            let z = (z2 as f64).sqrt().round() as i64;
            if z * z == z2 {
                k += if z == 0 { 1 } else { 2 };
            }
        }
    }
    k
}

/// Tunnell, A classical Diophantine problem and modular forms of weight
/// 3/2, Invent. Math. 72 (1983), 323–334: for square-free n, if n is
/// congruent then A(n) = 2B(n), where for odd n A, B count
/// x² + 2y² + 8z² = n and x² + 2y² + 32z² = n, and for even n they count
/// x² + 4y² + 8z² = n/2 and x² + 4y² + 32z² = n/2. The equality holds iff
/// L(E_n, 1) = 0.
pub fn tunnell_equality(n: i64) -> bool {
    if n % 2 == 1 {
        count(n, 2, 8) == 2 * count(n, 2, 32)
    } else {
        count(n / 2, 4, 8) == 2 * count(n / 2, 4, 32)
    }
}
