//! The torsion subgroup E(Q)_tors, exactly.
//!
//! # Method
//! Work on an integral model M: y² = F(x) = x³ + f2x² + f4x + f6 (f_i ∈ Z):
//! the input itself when it is integral with a1 = a3 = 0 (as every model the
//! descent builds is), else its integral short model
//! (`two_torsion::short_integral_model`). Results are mapped back to the
//! input model.
//!
//! 1. **Points of order 2.** (e, 0) with e an integer root of F.
//! 2. **A multiple of the order.** For an odd prime p of good reduction
//!    (p ∤ Δ(M)) the reduction map E(Q)_tors → Ẽ(F_p) is injective
//!    [Sil09, VII.3.1(b)] (the kernel of reduction has no torsion when
//!    v(p) < p − 1 [Sil09, IV.6.1]), so #E(Q)_tors divides
//!    N = gcd #M̃(F_p) over the first 24 such primes. Each
//!    #M̃(F_p) = p + 1 + Σ_x (F(x) | p) is a Legendre-symbol sum over a
//!    precomputed table, with F(x) mod p stepped by finite differences in
//!    machine words. **Early exit:** as soon as the running gcd equals the
//!    number of points already found in step 1, those points are the whole
//!    group (they form a subgroup whose order is a multiple of #E(Q)_tors),
//!    and nothing else is computed; this settles the common groups Z/2 and
//!    Z/2 × Z/2 after a few primes. The counting also stops once N is a
//!    power of 2 unchanged over 6 primes: step 4 then proves the group
//!    whatever N is, at the cost of a few square tests.
//! 3. **Integrality.** By the Nagell–Lutz theorem [Sil09, VIII.7.2],
//!    [ST92, II.5] every rational torsion point of M has integer
//!    coordinates, so only integer roots of the polynomials below matter;
//!    they are found exactly by p-adic lifting (`poly` module).
//! 4. **The 2-primary part** (if 2 | N), by halving on M: the points of
//!    order 4 over T = (e, 0) come from two square tests (see
//!    `two_primary`), the points of order 2^k, k ≥ 3, from integer roots of
//!    the halving quartic x⁴ − b4x² − 2b6x − b8 − x_Q(4x³ + b2x² + 2b4x + b6)
//!    [Sil09, III.2.3(d)]; levels stop when one is empty or 2^k ∤ N.
//! 5. **The ℓ-primary part, for each odd prime ℓ | N**, on the integral
//!    short model E_s: y² = x³ + Ax + B of M. With the division
//!    polynomials ψ_n [Sil09, Exercise 3.7] (ψ_n = f_n(x) for odd n,
//!    ψ_n = 2y·f_n(x) for even n, f_0 = 0, f_1 = f_2 = 1,
//!    f_3 = 3x⁴ + 6Ax² + 12Bx − A²,
//!    f_4 = 2(x⁶ + 5Ax⁴ + 20Bx³ − 5A²x² − 4ABx − 8B² − A³) and the usual
//!    doubling recurrences), the points of order ℓ are the (x, ±y) with x an
//!    integer root of f_ℓ and y² = x³ + Ax + B a square. A point P of
//!    order ℓ^(k+1) (k ≥ 1) is a solution of ℓP = Q with Q of order ℓ^k:
//!    x(P) is an integer root of φ_ℓ(x) − x(Q)ψ_ℓ(x)²,
//!    φ_ℓ = xψ_ℓ² − ψ_(ℓ+1)ψ_(ℓ−1) [Sil09, III.3.7], and each candidate is
//!    confirmed by computing ℓP. Levels stop when one is empty or
//!    ℓ^(k+1) ∤ N. Every polynomial used has distinct roots (the ℓ² solutions
//!    of ℓP = Q have distinct x when ℓ is odd), as the root finder requires.
//! 6. **Assembly.** E(Q)_tors is the direct sum of its ℓ-primary parts; the
//!    order of a sum is the product of the orders (known from the levels);
//!    its structure Z/n1 × Z/n2 (n2 | n1) has n1 the largest order of an
//!    element.
//!
//! Mazur's theorem \[Maz77\] (the group is Z/n, n ≤ 10 or n = 12, or
//! Z/2 × Z/2m, m ≤ 4) is *not* used by the algorithm; the tests check it.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, ToPrimitive, Zero};

use std::sync::OnceLock;

use super::model::ModelChange;
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
    /// The multiple N of the order obtained from point counts mod p
    /// (step 2 of the module docs): the gcd over the good primes used,
    /// which are the first 24, or fewer when the early exit applied (then
    /// N equals the order).
    pub fn reduction_bound(&self) -> u32 {
        self.bound
    }
}

/// The torsion subgroup of E(Q), exactly (module docs).
///
/// Cost: on an integral model y² = x³ + a2x² + a4x + a6 with small
/// coefficients (the descent's models), a few microseconds when the
/// rational 2-torsion already accounts for the point-count bound (the
/// common case), plus a few square-root tests per point of order 2 when
/// points of order 4 must be ruled out; the division-polynomial search for
/// an odd prime ℓ | N costs more (a millisecond or so for 30-digit
/// coefficients; see docs/performance.md).
///
/// Example: y² = x³ − x has E(Q)_tors = {O, (−1,0), (0,0), (1,0)} ≅
/// Z/2 × Z/2.
pub fn torsion(e: &Curve) -> TorsionGroup {
    let work = WorkModel::of(e);
    let roots = integer_roots(&work.cubic);
    let (bound, proven) = reduction_bound(&work, 1 + roots.len() as u32);
    let mut parts: Vec<Primary> = Vec::new();
    if proven {
        if !roots.is_empty() {
            parts.push(two_primary(&work, &roots, 1));
        }
    } else {
        for (l, e_max) in factor_small(bound) {
            let part = if l == 2 {
                two_primary(&work, &roots, e_max)
            } else {
                odd_primary(&work, l, e_max)
            };
            if part.levels.iter().any(|lv| !lv.is_empty()) {
                parts.push(part);
            }
        }
    }
    assemble(&work, &parts, bound)
}

/// The points of E(Q)_tors, in the order of [`torsion`], for a curve whose
/// torsion the caller knows to be a 2-group — without the point-count
/// bound: the 2-primary part by halving up to order 8, which is as far as
/// it goes over Q (Mazur's list \[Maz77\]: the 2-primary part is a subgroup
/// of Z/2 × Z/8). The descent uses it on the codomain E′ of a 2-isogeny
/// φ: E → E′ when E(Q)_tors is a 2-group: φ and its dual have kernels of
/// order 2, so they are injective on points of odd order and
/// |E(Q)[m]| = |E′(Q)[m]| for odd m (common practice).
///
/// Cost: a few exact square roots (and, when points of order 4 exist, a
/// quartic root search), no point counting.
pub(crate) fn two_group_torsion_points(e: &Curve) -> Vec<Point> {
    let work = WorkModel::of(e);
    let roots = integer_roots(&work.cubic);
    let parts: Vec<Primary> = if roots.is_empty() {
        Vec::new()
    } else {
        vec![two_primary(&work, &roots, 3)]
    };
    assemble(&work, &parts, 0).points
}

/// The working model M: y² = x³ + f2x² + f4x + f6 with f_i ∈ Z (the input
/// itself when it already has that shape, else its integral short model),
/// with the change of model from the input to M.
struct WorkModel<'e> {
    /// M itself: borrowed when it is the input.
    curve: std::borrow::Cow<'e, Curve>,
    /// [f6, f4, f2, 1]: the cubic F with M: y² = F(x).
    cubic: ZPoly,
    /// `None` when M is the input model.
    change: Option<ModelChange>,
}

impl<'e> WorkModel<'e> {
    fn of(e: &'e Curve) -> WorkModel<'e> {
        if let Some([a1, a2, a3, a4, a6]) = e.integer_coefficients() {
            if a1.is_zero() && a3.is_zero() {
                return WorkModel {
                    cubic: ZPoly::new(vec![a6.clone(), a4.clone(), a2.clone(), BigInt::one()]),
                    curve: std::borrow::Cow::Borrowed(e),
                    change: None,
                };
            }
        }
        let (a, b, short, change) = short_integral_model(e);
        WorkModel {
            cubic: ZPoly::new(vec![b, a, BigInt::zero(), BigInt::one()]),
            curve: std::borrow::Cow::Owned(short),
            change: Some(change),
        }
    }

    fn coefficient(&self, i: usize) -> BigInt {
        self.cubic.0.get(i).cloned().unwrap_or_default()
    }

    /// A point of M, written on the input model.
    fn to_input(&self, p: &Point) -> Point {
        match &self.change {
            None => p.clone(),
            Some(c) => c.to_old(p),
        }
    }
}

/// The ℓ-primary part of M(Q): `levels[k − 1]` holds the points of order
/// exactly ℓ^k; for ℓ = 2, `parents[k − 1][i]` is the index in level k − 1
/// of twice the i-th point of level k (unused for level 1 and odd ℓ).
struct Primary {
    l: u32,
    levels: Vec<Vec<Point>>,
    parents: Vec<Vec<usize>>,
}

/// The 2-primary part of M(Q) up to order 2^e_max, from the integer roots
/// of F (the points of order 2) by halving.
///
/// * Order 4: with T = (e, 0) and x ↦ x + e, M becomes
///   y² = x(x² + a′x + b′), a′ = 3e + f2, b′ = F′(e), on which
///   x(2P) = (x² − b′)²/(4y²) [ST92, III.4]; so 2P = T iff x(P)² = b′ and
///   y(P) ≠ 0. Hence b′ = d² must be a square, x(P) = e + s with s = ±d,
///   and y(P)² = s²(2s + a′) must be a nonzero square.
/// * Order 2^k, k ≥ 3: the halves P of Q (2Q ≠ O) have x(P) an integer
///   (Nagell–Lutz on M, [ST92, II.5]) root of the monic quartic
///   x⁴ − b4x² − 2b6x − b8 − x_Q(4x³ + b2x² + 2b4x + b6) [Sil09, III.2.3(d)]
///   with four distinct roots over Q̄; each candidate is confirmed by
///   doubling.
fn two_primary(work: &WorkModel<'_>, roots: &[BigInt], e_max: u32) -> Primary {
    let level1: Vec<Point> = roots
        .iter()
        .map(|x| Point::new(BigRational::from_integer(x.clone()), BigRational::zero()))
        .collect();
    let mut part = Primary {
        l: 2,
        levels: vec![level1],
        parents: vec![Vec::new()],
    };
    if e_max < 2 || roots.is_empty() {
        return part;
    }
    let (f2, f4, f6) = (
        work.coefficient(2),
        work.coefficient(1),
        work.coefficient(0),
    );
    // Order 4.
    let mut level2 = Vec::new();
    let mut parents2 = Vec::new();
    for (i, e) in roots.iter().enumerate() {
        let a1: BigInt = e * 3u32 + &f2;
        let b1: BigInt = (e * 3u32 + &f2 * 2u32) * e + &f4;
        let Some(d) = crate::arith::sqrt_exact(&b1) else {
            continue;
        };
        if d.is_zero() {
            continue; // b′ = 0 would make M singular
        }
        for s in [-d.clone(), d.clone()] {
            let w2: BigInt = &s * BigInt::from(2) + &a1;
            if w2.is_zero() {
                continue;
            }
            let Some(w) = crate::arith::sqrt_exact(&w2) else {
                continue;
            };
            let x = BigRational::from_integer(e + &s);
            let y = &s * &w;
            for yy in [-y.clone(), y] {
                level2.push(Point::new(x.clone(), BigRational::from_integer(yy)));
                parents2.push(i);
            }
        }
    }
    let mut level = level2;
    let mut parents = parents2;
    let mut k = 2;
    // The halving polynomials, built only when a level 3 is sought.
    let mut halving: Option<(ZPoly, ZPoly)> = None;
    loop {
        if level.is_empty() {
            break;
        }
        part.levels.push(std::mem::take(&mut level));
        part.parents.push(std::mem::take(&mut parents));
        if k >= e_max {
            break;
        }
        let (num, four_f) = halving.get_or_insert_with(|| {
            let b4: BigInt = &f4 * 2u32;
            let b6: BigInt = &f6 * 4u32;
            let b8: BigInt = &f2 * &f6 * 4u32 - &f4 * &f4;
            (
                ZPoly::new(vec![-b8, -(&b6 * 2u32), -b4, BigInt::zero(), BigInt::one()]),
                work.cubic.scale(&BigInt::from(4)),
            )
        });
        let prev = &part.levels[k as usize - 1];
        for (i, q) in prev.iter().enumerate() {
            let Some(xq) = q.x() else { continue };
            let target = num.sub(&four_f.scale(&xq.to_integer()));
            for p in points_over_roots(&work.cubic, &target) {
                if work.curve.double(&p) == *q && !level.contains(&p) {
                    level.push(p);
                    parents.push(i);
                }
            }
        }
        k += 1;
    }
    part
}

/// The ℓ-primary part of M(Q) for an odd prime ℓ, ℓ^e_max ∥ N, computed on
/// the integral short model of M (module docs, step 3).
fn odd_primary(work: &WorkModel<'_>, l: u32, e_max: u32) -> Primary {
    let (a, b, short, change) = short_integral_model(&work.curve);
    let cubic = ZPoly::new(vec![b.clone(), a.clone(), BigInt::zero(), BigInt::one()]);
    let levels = primary_part(&short, &a, &b, &cubic, l, e_max)
        .into_iter()
        .map(|lv| lv.iter().map(|p| change.to_old(p)).collect())
        .collect();
    Primary {
        l,
        levels,
        parents: Vec::new(),
    }
}

/// The group from its primary parts, on the input model.
fn assemble(work: &WorkModel<'_>, parts: &[Primary], bound: u32) -> TorsionGroup {
    // Points of M with their orders.
    let mut group: Vec<(Point, u32)> = vec![(Point::Infinity, 1)];
    for part in parts {
        let mut elems: Vec<(Point, u32)> = vec![(Point::Infinity, 1)];
        let mut ord = 1u32;
        for lv in &part.levels {
            ord = ord.saturating_mul(part.l);
            elems.extend(lv.iter().map(|p| (p.clone(), ord)));
        }
        if group.len() == 1 {
            group = elems;
            continue;
        }
        let mut next = Vec::with_capacity(group.len() * elems.len());
        for (p, op) in &group {
            for (q, oq) in &elems {
                next.push((work.curve.add(p, q), op.saturating_mul(*oq)));
            }
        }
        group = next;
    }
    let n = group.len() as u32;
    let n1 = group.iter().map(|g| g.1).max().unwrap_or(1).max(1);
    let n2 = (n / n1).max(1);
    // On the input model, in ascending order (O first).
    let mut on_input: Vec<(Point, u32, usize)> = group
        .iter()
        .enumerate()
        .map(|(i, (p, o))| (work.to_input(p), *o, i))
        .collect();
    on_input.sort();
    let mut generators = Vec::new();
    // Deterministic choice: the least point (in the order of `Point`) of
    // order n1; then the least point of order n2 none of whose nonzero
    // multiples lies in the cyclic group generated by the first.
    if let Some((g1, _, i1)) = on_input.iter().find(|g| g.1 == n1 && n1 > 1) {
        generators.push(g1.clone());
        if n2 > 1 {
            let g2 = if n2 == 2 && parts.len() == 1 && parts[0].l == 2 {
                // In a 2-group, ⟨g1⟩ meets E[2] in the point reached by
                // halving steps back from g1 to level 1.
                let base = two_torsion_below(&parts[0], &group[*i1].0);
                on_input
                    .iter()
                    .find(|g| g.1 == 2 && Some(&group[g.2].0) != base)
            } else {
                let cyclic: Vec<Point> = (0..n1 as i64)
                    .map(|k| work.curve.mul_i64(&group[*i1].0, k))
                    .collect();
                on_input.iter().find(|g| {
                    g.1 == n2
                        && (1..n2 as i64)
                            .all(|k| !cyclic.contains(&work.curve.mul_i64(&group[g.2].0, k)))
                })
            };
            if let Some((g2, _, _)) = g2 {
                generators.push(g2.clone());
            }
        }
    }
    TorsionGroup {
        points: on_input.into_iter().map(|g| g.0).collect(),
        generators,
        structure: (n1, n2),
        bound,
    }
}

/// The point of order 2 in the cyclic group generated by a point P of a
/// 2-primary part (found by following the halving parents down).
fn two_torsion_below<'a>(part: &'a Primary, p: &Point) -> Option<&'a Point> {
    let (mut k, mut i) = part
        .levels
        .iter()
        .enumerate()
        .find_map(|(k, lv)| lv.iter().position(|q| q == p).map(|i| (k, i)))?;
    while k > 0 {
        i = *part.parents.get(k)?.get(i)?;
        k -= 1;
    }
    part.levels.first()?.get(i)
}

/// The ℓ-primary part of E_s(Q) without O, level by level: entry k − 1
/// holds the points of order ℓ^k, for ℓ^e_max ∥ N.
fn primary_part(
    short: &Curve,
    a: &BigInt,
    b: &BigInt,
    cubic: &ZPoly,
    l: u32,
    e_max: u32,
) -> Vec<Vec<Point>> {
    let mut all = Vec::new();
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
        all.push(level.clone());
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

/// N = gcd of #M̃(F_p) over the first [`GOOD_PRIMES`] odd primes p ∤ Δ(M),
/// stopping early, with `true`, as soon as N equals `found` (the number of
/// rational torsion points already in hand, which then make up the whole
/// group since #E(Q)_tors | N). It also stops early, with `false`, once N
/// is a power of 2 that has not changed over [`STABLE_PRIMES`] primes: the
/// 2-primary search that follows settles the group as exactly as with more
/// primes, and costs only a few square-root tests at each level.
fn reduction_bound(work: &WorkModel<'_>, found: u32) -> (u32, bool) {
    let f = [
        work.coefficient(0),
        work.coefficient(1),
        work.coefficient(2),
    ];
    let disc = work.curve.discriminant().numer();
    // Residues in machine words when the numbers fit (the same values as
    // `mod_floor` below: both are the least non-negative residue).
    let small: Option<[i128; 4]> = match (
        f[0].to_i128(),
        f[1].to_i128(),
        f[2].to_i128(),
        disc.to_i128(),
    ) {
        (Some(a), Some(b), Some(c), Some(d)) => Some([a, b, c, d]),
        _ => None,
    };
    let residues = |p: u64| -> [u64; 4] {
        match small {
            Some(v) => v.map(|c| c.rem_euclid(i128::from(p)) as u64),
            None => {
                let pb = BigInt::from(p);
                let r = |c: &BigInt| c.mod_floor(&pb).to_u64().unwrap_or(0);
                [r(&f[0]), r(&f[1]), r(&f[2]), r(disc)]
            }
        }
    };
    let tables = square_tables();
    let mut g: u64 = 0;
    let mut used = 0;
    let mut stable = 0;
    let mut extra = odd_primes().skip(tables.len());
    let mut k = 0;
    loop {
        let fresh;
        let (p, chi): (u64, &[i8]) = match tables.get(k) {
            Some((p, chi)) => (*p, chi),
            None => match extra.next() {
                Some(p) => {
                    fresh = legendre_table(p);
                    (p, &fresh)
                }
                None => break,
            },
        };
        k += 1;
        let [f6, f4, f2, dm] = residues(p);
        if dm == 0 {
            continue;
        }
        let new_g = g.gcd(&count_points_with_table(f2, f4, f6, p, chi));
        stable = if new_g == g { stable + 1 } else { 0 };
        g = new_g;
        used += 1;
        let bound = g.min(u32::MAX as u64) as u32;
        if bound == found {
            return (bound, true);
        }
        if used == GOOD_PRIMES || (stable >= STABLE_PRIMES && g.is_power_of_two()) {
            break;
        }
    }
    (g.min(u32::MAX as u64) as u32, false)
}

/// See [`reduction_bound`].
const STABLE_PRIMES: usize = 6;

/// Number of odd primes whose Legendre tables are kept.
const TABLED_PRIMES: usize = 64;

/// χ_p(v) = (v | p) for v = 0, …, p − 1, as −1, 0, 1.
fn legendre_table(p: u64) -> Vec<i8> {
    let mut chi = vec![-1i8; p as usize];
    chi[0] = 0;
    for y in 1..p {
        chi[((y * y) % p) as usize] = 1;
    }
    chi
}

/// The first [`TABLED_PRIMES`] odd primes with their Legendre tables,
/// built once.
fn square_tables() -> &'static [(u64, Vec<i8>)] {
    static TABLES: OnceLock<Vec<(u64, Vec<i8>)>> = OnceLock::new();
    TABLES.get_or_init(|| {
        odd_primes()
            .take(TABLED_PRIMES)
            .map(|p| (p, legendre_table(p)))
            .collect()
    })
}

/// #M̃(F_p) = p + 1 + Σ_x χ(x³ + f2x² + f4x + f6) for p odd (residues of
/// the f_i given), with χ read from `chi`.
///
/// F(x) mod p is stepped by finite differences (F(x + 1) = F(x) + D1(x),
/// D1(x + 1) = D1(x) + D2(x), D2(x + 1) = D2(x) + 6), so the loop has
/// additions only.
fn count_points_with_table(f2: u64, f4: u64, f6: u64, p: u64, chi: &[i8]) -> u64 {
    let add = |a: u64, b: u64| {
        let s = a + b;
        if s >= p {
            s - p
        } else {
            s
        }
    };
    // F(0) = f6, D1(0) = F(1) − F(0) = 1 + f2 + f4, D2(0) = 6 + 2f2.
    let mut v = f6 % p;
    let mut d1 = (1 + f2 + f4) % p;
    let mut d2 = (6 + 2 * f2) % p;
    let six = 6 % p;
    let mut total: i64 = p as i64 + 1;
    for _ in 0..p {
        total += chi[v as usize] as i64;
        v = add(v, d1);
        d1 = add(d1, d2);
        d2 = add(d2, six);
    }
    total as u64
}

/// #Ẽ(F_p) = p + 1 + Σ_x χ(x³ + ax + b) for y² = x³ + ax + b over F_p,
/// p an odd prime (χ the Legendre symbol, read from a table of squares).
#[cfg(test)]
pub(crate) fn count_points_mod_p(a: u64, b: u64, p: u64) -> u64 {
    count_points_with_table(0, a % p, b % p, p, &legendre_table(p))
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

    /// `two_group_torsion_points` against [`torsion`] on the codomains of
    /// 2-isogenies whose domain has 2-group torsion: every model
    /// y² = x³ + ax² + bx with |a|, |b| ≤ 40 and the three 2-isogenies of
    /// y² = x³ − n²x for n ≤ 300, with the group orders met on the way
    /// (orders 2, 4 and 8 must all occur, so halving was exercised).
    #[test]
    fn two_group_torsion_agrees_with_the_full_computation() {
        use crate::curve::ReducedModel;
        let mut models: Vec<(i64, i64)> = Vec::new();
        for a in -40i64..=40 {
            for b in -40i64..=40 {
                models.push((a, b));
            }
        }
        for n in 1i64..=300 {
            models.extend([(0, -n * n), (3 * n, 2 * n * n), (-3 * n, 2 * n * n)]);
        }
        let mut orders = std::collections::BTreeMap::new();
        let mut skipped_odd = 0;
        for (a, b) in models {
            let Ok(m) = ReducedModel::new(BigInt::from(a), BigInt::from(b)) else {
                continue;
            };
            if !torsion(m.curve()).points().len().is_power_of_two() {
                skipped_odd += 1;
                continue;
            }
            let e2 = m.isogenous().unwrap();
            let full = torsion(e2.curve());
            assert_eq!(
                two_group_torsion_points(e2.curve()),
                full.points(),
                "codomain of a = {a}, b = {b}"
            );
            *orders.entry(full.points().len()).or_insert(0) += 1;
        }
        for k in [2usize, 4, 8] {
            assert!(orders.contains_key(&k), "{orders:?}");
        }
        assert!(skipped_odd > 0);
    }

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
    fn point_counts_with_an_x_squared_term_match_a_brute_force_count() {
        for p in [3u64, 5, 7, 11, 13, 101] {
            let chi = legendre_table(p);
            for f2 in 0..4u64 {
                for f4 in 0..4u64 {
                    for f6 in 0..4u64 {
                        let mut n = 1u64; // O
                        for x in 0..p {
                            let fx = (x * x * x + f2 * x * x + f4 * x + f6) % p;
                            n += (0..p).filter(|y| y * y % p == fx).count() as u64;
                        }
                        assert_eq!(
                            count_points_with_table(f2 % p, f4 % p, f6 % p, p, &chi),
                            n,
                            "p={p} f=({f2},{f4},{f6})"
                        );
                    }
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
