//! The torsion subgroup E(Q)_tors, exactly.
//!
//! # Method
//! Work on the integral short model E_s: y² = x³ + A x + B
//! (`two_torsion::short_integral_model`).
//!
//! 1. **A multiple of the order.** For a prime p ≥ 3 of good reduction the
//!    reduction map E(Q)_tors → Ẽ(F_p) is injective [Sil09, VII.3.1(b)], so
//!    #E(Q)_tors divides N = gcd #Ẽ(F_p) over the first 24 primes p ≥ 5 with
//!    p ∤ 4A³ + 27B². Each #Ẽ(F_p) = p + 1 + Σ_x (x³ + Ax + B | p) is a
//!    Legendre-symbol sum read off a table of squares mod p.
//! 2. **Integrality.** By the Nagell–Lutz theorem [Sil09, VIII.7.2] every
//!    rational torsion point of E_s has integer coordinates, so only integer
//!    roots of the polynomials below matter; they are found exactly by
//!    p-adic lifting (`poly` module).
//! 3. **The ℓ-primary part, for each prime ℓ | N.** With the division
//!    polynomials ψ_n [Sil09, Exercise 3.7] (ψ_n = f_n(x) for odd n,
//!    ψ_n = 2y·f_n(x) for even n, f_0 = 0, f_1 = f_2 = 1,
//!    f_3 = 3x⁴ + 6Ax² + 12Bx − A²,
//!    f_4 = 2(x⁶ + 5Ax⁴ + 20Bx³ − 5A²x² − 4ABx − 8B² − A³) and the usual
//!    doubling recurrences), the points of order ℓ are the (x, ±y) with x an
//!    integer root of x³ + Ax + B (ℓ = 2) or of f_ℓ (ℓ odd) and
//!    y² = x³ + Ax + B a square. The points of order 4 come from the integer roots of
//!    f_4/2. A point P of order ℓ^(k+1) (k ≥ 1, and k ≥ 2 when ℓ = 2) is a
//!    solution of ℓP = Q with Q of order ℓ^k: x(P) is an integer root of
//!    φ_ℓ(x) − x(Q)ψ_ℓ(x)², φ_ℓ = xψ_ℓ² − ψ_(ℓ+1)ψ_(ℓ−1) [Sil09, III.3.7],
//!    and each candidate is confirmed by computing ℓP. Levels stop when one
//!    is empty or ℓ^(k+1) ∤ N. Every polynomial used has distinct roots
//!    (for odd ℓ, or ℓ = 2 with 2Q ≠ O, the ℓ² solutions of ℓP = Q have
//!    distinct x), as the root finder requires.
//! 4. **Assembly.** E(Q)_tors is the direct sum of its ℓ-primary parts; its
//!    structure Z/n1 × Z/n2 (n2 | n1) has n1 the largest order of an element.
//!
//! Mazur's theorem \[Maz77\] (the group is Z/n, n ≤ 10 or n = 12, or
//! Z/2 × Z/2m, m ≤ 4) is *not* used by the algorithm; the tests check it.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, ToPrimitive, Zero};

use super::point::Point;
use super::poly::{integer_roots, odd_primes, ZPoly};
use super::two_torsion::short_integral_model;
use super::weierstrass::Curve;

/// Number of good primes whose point counts are combined in the bound.
const GOOD_PRIMES: usize = 24;

/// E(Q)_tors with its points, generators and structure, on the input model.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TorsionGroup {
    points: Vec<Point>,
    generators: Vec<Point>,
    structure: (u32, u32),
    bound: u32,
}

impl TorsionGroup {
    /// #E(Q)_tors.
    pub fn order(&self) -> u32 {
        self.structure.0 * self.structure.1
    }
    /// (n1, n2) with n2 | n1 and E(Q)_tors ≅ Z/n1 × Z/n2 ((1, 1) for the
    /// trivial group, (n, 1) for a cyclic group).
    pub fn structure(&self) -> (u32, u32) {
        self.structure
    }
    /// True iff the group is cyclic.
    pub fn is_cyclic(&self) -> bool {
        self.structure.1 == 1
    }
    /// Generators: none for the trivial group, one of order n1 for a cyclic
    /// group, and one of order n1 plus one of order n2 otherwise.
    pub fn generators(&self) -> &[Point] {
        &self.generators
    }
    /// All torsion points: O first, then the affine points in ascending
    /// (x, y) order.
    pub fn points(&self) -> &[Point] {
        &self.points
    }
    /// The multiple of the order obtained from point counts mod p
    /// (step 1 of the module docs).
    pub fn reduction_bound(&self) -> u32 {
        self.bound
    }
    /// True iff the structure is one of the fifteen groups of Mazur's
    /// theorem \[Maz77\].
    pub fn is_in_mazur_list(&self) -> bool {
        match self.structure {
            (n, 1) => (1..=10).contains(&n) || n == 12,
            (n, 2) => matches!(n, 2 | 4 | 6 | 8),
            _ => false,
        }
    }
}

/// The torsion subgroup of E(Q), exactly (module docs).
///
/// Cost: dominated by the point counts (24 primes, a few hundred
/// operations each) and a few Newton lifts per prime ℓ | N; about a
/// millisecond for 30-digit coefficients (see docs/performance.md).
///
/// Example: y² = x³ − x has E(Q)_tors = {O, (−1,0), (0,0), (1,0)} ≅
/// Z/2 × Z/2.
pub fn torsion_subgroup(e: &Curve) -> TorsionGroup {
    let (a, b, short, change) = short_integral_model(e);
    let bound = reduction_bound(&a, &b);
    let cubic = ZPoly::new(vec![b.clone(), a.clone(), BigInt::zero(), BigInt::one()]);
    let mut group = vec![Point::Infinity];
    for (l, e_max) in factor_small(bound) {
        let part = primary_part(&short, &a, &b, &cubic, l, e_max);
        let mut next = Vec::with_capacity(group.len() * part.len());
        for p in &group {
            for q in &part {
                next.push(short.add(p, q));
            }
        }
        group = next;
    }
    let n = group.len() as u32;
    let orders: Vec<u32> = group
        .iter()
        .map(|p| short.order_up_to(p, n).unwrap_or(0))
        .collect();
    let n1 = orders.iter().copied().max().unwrap_or(1).max(1);
    let n2 = (n / n1).max(1);
    let mut generators = Vec::new();
    if n1 > 1 {
        // Deterministic choice: the least point (in the order of `Point`)
        // of order n1, mapped back; similarly for the second generator.
        let mut idx: Vec<usize> = (0..group.len()).collect();
        idx.sort_by(|&i, &j| change.to_old(&group[i]).cmp(&change.to_old(&group[j])));
        let g1 = idx.iter().copied().find(|&i| orders[i] == n1);
        if let Some(i1) = g1 {
            let cyclic: Vec<Point> = (0..n1 as i64)
                .map(|k| short.mul_i64(&group[i1], k))
                .collect();
            generators.push(group[i1].clone());
            if n2 > 1 {
                let g2 = idx.iter().copied().find(|&i| {
                    orders[i] == n2
                        && (1..n2 as i64).all(|k| !cyclic.contains(&short.mul_i64(&group[i], k)))
                });
                if let Some(i2) = g2 {
                    generators.push(group[i2].clone());
                }
            }
        }
    }
    let mut points: Vec<Point> = group.iter().map(|p| change.to_old(p)).collect();
    points.sort();
    TorsionGroup {
        points,
        generators: generators.iter().map(|p| change.to_old(p)).collect(),
        structure: (n1, n2),
        bound,
    }
}

/// The ℓ-primary part of E_s(Q) (including O), for ℓ^e_max ∥ N.
fn primary_part(
    short: &Curve,
    a: &BigInt,
    b: &BigInt,
    cubic: &ZPoly,
    l: u32,
    e_max: u32,
) -> Vec<Point> {
    let mut all = vec![Point::Infinity];
    let polys = division_polynomials(a, b, l as usize + 1);
    let level1: Vec<Point> = if l == 2 {
        integer_roots(cubic)
            .into_iter()
            .map(|x| Point::new(BigRational::from_integer(x), BigRational::zero()))
            .collect()
    } else {
        points_over_roots(cubic, &polys[l as usize])
            .into_iter()
            .filter(|p| short.mul_i64(p, l as i64).is_infinity())
            .collect()
    };
    let mut level = level1;
    let mut k = 1;
    while !level.is_empty() {
        all.extend(level.iter().cloned());
        if k >= e_max {
            break;
        }
        let mut next: Vec<Point> = Vec::new();
        if l == 2 && k == 1 {
            // Points of order exactly 4: roots of f_4 / 2.
            let sextic = ZPoly::new(polys[4].0.iter().map(|c| c / BigInt::from(2)).collect());
            for p in points_over_roots(cubic, &sextic) {
                let d = short.double(&p);
                if !d.is_infinity() && short.double(&d).is_infinity() {
                    next.push(p);
                }
            }
        } else {
            let (phi, psi_sq) = multiplication_numerator(a, b, cubic, &polys, l as usize);
            for q in &level {
                let Some(xq) = q.x() else { continue };
                let target = phi.sub(&psi_sq.scale(&xq.to_integer()));
                for p in points_over_roots(cubic, &target) {
                    if short.mul_i64(&p, l as i64) == *q && !next.contains(&p) {
                        next.push(p);
                    }
                }
            }
        }
        next.sort();
        level = next;
        k += 1;
    }
    all
}

/// The points (x, ±y) of E_s with x an integer root of `f` and
/// y² = x³ + Ax + B a nonzero square (or y = 0).
fn points_over_roots(cubic: &ZPoly, f: &ZPoly) -> Vec<Point> {
    let mut out = Vec::new();
    for x in integer_roots(f) {
        let y2 = cubic.eval(&x);
        let Some(y) = crate::arith::sqrt_exact(&y2) else {
            continue;
        };
        let xr = BigRational::from_integer(x);
        if y.is_zero() {
            out.push(Point::new(xr, BigRational::zero()));
        } else {
            out.push(Point::new(
                xr.clone(),
                BigRational::from_integer(-y.clone()),
            ));
            out.push(Point::new(xr, BigRational::from_integer(y)));
        }
    }
    out
}

/// f_0, …, f_n with ψ_k = f_k (k odd) or 2y·f_k (k even) on
/// y² = x³ + Ax + B (module docs). With F = x³ + Ax + B:
/// f_(2m+1) = 16F²f_(m+2)f_m³ − f_(m−1)f_(m+1)³ (m even),
/// f_(2m+1) = f_(m+2)f_m³ − 16F²f_(m−1)f_(m+1)³ (m odd),
/// f_(2m) = f_m(f_(m+2)f_(m−1)² − f_(m−2)f_(m+1)²).
pub(crate) fn division_polynomials(a: &BigInt, b: &BigInt, n: usize) -> Vec<ZPoly> {
    let n = n.max(4);
    let z = |v: &[BigInt]| ZPoly::new(v.to_vec());
    let i = |k: i64| BigInt::from(k);
    let a2 = a * a;
    let mut f: Vec<ZPoly> = vec![
        ZPoly::new(vec![]),
        ZPoly::constant(BigInt::one()),
        ZPoly::constant(BigInt::one()),
        z(&[-a2.clone(), b * i(12), a * i(6), BigInt::zero(), i(3)]),
        z(&[
            (-(b * b) * i(8) - &a2 * a) * i(2),
            -(a * b) * i(8),
            -(&a2 * i(10)),
            b * i(40),
            a * i(10),
            BigInt::zero(),
            i(2),
        ]),
    ];
    let cubic = z(&[b.clone(), a.clone(), BigInt::zero(), BigInt::one()]);
    let f16 = cubic.mul(&cubic).scale(&i(16));
    for k in 5..=n {
        let m = k / 2;
        let next = if k % 2 == 1 {
            let t1 = f[m + 2].mul(&f[m]).mul(&f[m]).mul(&f[m]);
            let t2 = f[m - 1].mul(&f[m + 1]).mul(&f[m + 1]).mul(&f[m + 1]);
            if m % 2 == 0 {
                f16.mul(&t1).sub(&t2)
            } else {
                t1.sub(&f16.mul(&t2))
            }
        } else {
            let t1 = f[m + 2].mul(&f[m - 1]).mul(&f[m - 1]);
            let t2 = f[m - 2].mul(&f[m + 1]).mul(&f[m + 1]);
            f[m].mul(&t1.sub(&t2))
        };
        f.push(next);
    }
    f
}

/// (φ_ℓ, ψ_ℓ²) as polynomials in x, so that x([ℓ]P) = φ_ℓ/ψ_ℓ².
fn multiplication_numerator(
    _a: &BigInt,
    _b: &BigInt,
    cubic: &ZPoly,
    f: &[ZPoly],
    l: usize,
) -> (ZPoly, ZPoly) {
    let four_f = cubic.scale(&BigInt::from(4));
    if l % 2 == 1 {
        let psi_sq = f[l].mul(&f[l]);
        let cross = four_f.mul(&f[l + 1]).mul(&f[l - 1]);
        (ZPoly::x().mul(&psi_sq).sub(&cross), psi_sq)
    } else {
        let psi_sq = four_f.mul(&f[l]).mul(&f[l]);
        let cross = f[l + 1].mul(&f[l - 1]);
        (ZPoly::x().mul(&psi_sq).sub(&cross), psi_sq)
    }
}

/// gcd of #Ẽ(F_p) over the first [`GOOD_PRIMES`] primes p ≥ 5 of good
/// reduction for y² = x³ + Ax + B.
fn reduction_bound(a: &BigInt, b: &BigInt) -> u32 {
    let disc: BigInt = a * a * a * BigInt::from(4) + b * b * BigInt::from(27);
    let mut g: u64 = 0;
    let mut used = 0;
    for p in odd_primes().skip(1) {
        let pb = BigInt::from(p);
        if (&disc % &pb).is_zero() {
            continue;
        }
        let am = a.mod_floor(&pb).to_u64().unwrap_or(0);
        let bm = b.mod_floor(&pb).to_u64().unwrap_or(0);
        g = g.gcd(&count_points_mod_p(am, bm, p));
        used += 1;
        if used == GOOD_PRIMES {
            break;
        }
    }
    g.min(u32::MAX as u64) as u32
}

/// #Ẽ(F_p) = p + 1 + Σ_x χ(x³ + ax + b) for y² = x³ + ax + b over F_p,
/// p an odd prime (χ the Legendre symbol, read from a table of squares).
pub(crate) fn count_points_mod_p(a: u64, b: u64, p: u64) -> u64 {
    let mut is_sq = vec![false; p as usize];
    for y in 1..p {
        is_sq[((y * y) % p) as usize] = true;
    }
    let mut total: i64 = p as i64 + 1;
    for x in 0..p {
        let v = ((x * x % p * x) % p + a * x % p + b) % p;
        if v == 0 {
            continue;
        }
        total += if is_sq[v as usize] { 1 } else { -1 };
    }
    total as u64
}

/// Prime factorisation of a small positive integer by trial division.
fn factor_small(mut n: u32) -> Vec<(u32, u32)> {
    let mut out = Vec::new();
    let mut d = 2u32;
    while d.saturating_mul(d) <= n {
        let mut e = 0;
        while n % d == 0 {
            n /= d;
            e += 1;
        }
        if e > 0 {
            out.push((d, e));
        }
        d += 1;
    }
    if n > 1 {
        out.push((n, 1));
    }
    out
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    #[test]
    fn point_counts_match_a_brute_force_count_over_small_fields() {
        for p in [5u64, 7, 11, 13, 101] {
            for a in 0..5u64 {
                for b in 0..5u64 {
                    let mut n = 1u64; // O
                    for x in 0..p {
                        for y in 0..p {
                            if (y * y) % p == (x * x * x + a * x + b) % p {
                                n += 1;
                            }
                        }
                    }
                    assert_eq!(count_points_mod_p(a, b, p), n, "p={p} a={a} b={b}");
                }
            }
        }
    }

    #[test]
    fn division_polynomial_f5_vanishes_at_a_five_torsion_x() {
        // y^2 + y = x^3 - x^2 has (0,0) of order 5 (Tate normal form with
        // b = c = 1); its short model is checked through the group law.
        let e = Curve::from_ints([0, -1, 1, 0, 0]).unwrap();
        let (a, b, short, change) = short_integral_model(&e);
        let p = change.to_new(&Point::from_ints(0, 0));
        assert_eq!(short.order_up_to(&p, 10), Some(5));
        let f = division_polynomials(&a, &b, 6);
        assert!(f[5].eval(&p.x().unwrap().to_integer()).is_zero());
    }
}
