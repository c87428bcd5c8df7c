//! Local data at every prime: Tate's algorithm, minimal models, the
//! conductor and Tamagawa numbers.
//!
//! # What is computed
//! For an integral Weierstrass model
//! `E: y² + a1·xy + a3·y = x³ + a2·x² + a4·x + a6` and a prime `p`,
//! [`local_reduction`] runs Tate's algorithm \[Tate75\], in the form of
//! [Sil94, IV.9, Algorithm 9.4] (see also [Cre97, 3.2]), and returns the
//! Kodaira symbol of the special fibre of the Néron model, the exponent
//! `f_p` of the conductor, the Tamagawa number `c_p = [E(Q_p) : E⁰(Q_p)]`,
//! `v_p(Δ)` of a model minimal at `p`, and the change of coordinates to
//! such a model. It works at every prime, including 2 and 3, for primes
//! of any size (nothing loops over F_p), and for non-minimal input with
//! any valuations (the algorithm loops back after each scaling by `u = p`).
//!
//! [`global_local_data`] takes a rational model, scales it to an integral
//! one, factors the discriminant, runs Tate's algorithm at each prime
//! divisor, and returns the reduced global minimal model (Q has class
//! number one, so a global minimal model exists [Sil86, VIII.8.3]), the
//! conductor `N = ∏ p^f_p` and the local data at the bad primes.
//!
//! # Machine words
//! When the integral model and every intermediate fit in `i128` and
//! `p < 2^62`, the same steps run in checked machine words (module
//! `tate_word`, with the same choices of `r, s, t`); on overflow the
//! computation continues in `BigInt` from the same state. Both routes give
//! the same records; the tests in `tate_word` compare them. Changes of
//! model are composed with [`ModelChange::then`].
//!
//! # Conventions
//! A change of model `[u, r, s, t]` is the substitution
//! `x = u²x' + r`, `y = u³y' + s·u²x' + t`; its effect on the coefficients
//! is [Sil86, III.1, Table 3.1]:
//! ```text
//! u  a1' = a1 + 2s
//! u² a2' = a2 − s·a1 + 3r − s²
//! u³ a3' = a3 + r·a1 + 2t
//! u⁴ a4' = a4 − s·a3 + 2r·a2 − (t + r·s)·a1 + 3r² − 2s·t
//! u⁶ a6' = a6 + r·a4 + r²·a2 + r³ − t·a3 − t² − r·t·a1
//! ```
//! Changes compose as
//! `[u1, r1, s1, t1] ∘ [u2, r2, s2, t2] =
//! [u1u2, r1 + u1²r2, s1 + u1s2, t1 + u1³t2 + s1u1²r2]` (first 1, then 2).

use std::fmt;

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

use super::tate_word::{self, Stop, WordReduction};
use crate::arith::factor;
use crate::arith::word::word_paths_enabled;
use crate::budget::Budget;
use crate::curve::{weierstrass_invariants, Curve, ModelChange, WeierstrassInvariants};
use crate::error::{Error, Result};
use crate::local::known_primes::KnownPrimes;
use crate::local::{legendre, valuation, Prime};

/// The Kodaira symbol of the special fibre of the Néron model at a prime
/// [Sil94, IV.8, Table 4.1].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Kodaira {
    /// Good reduction: the fibre is an elliptic curve.
    I0,
    /// Multiplicative reduction: a cycle of `n ≥ 1` rational curves.
    In(u64),
    /// A cuspidal rational curve.
    II,
    /// Two rational curves tangent at one point.
    III,
    /// Three rational curves through one point.
    IV,
    /// Five components (D̃4).
    I0Star,
    /// `n + 5` components (D̃_{n+4}), `n ≥ 1`.
    InStar(u64),
    /// Seven components (Ẽ6).
    IVStar,
    /// Eight components (Ẽ7).
    IIIStar,
    /// Nine components (Ẽ8).
    IIStar,
}

impl Kodaira {
    /// The number `m_p` of irreducible components of the special fibre
    /// (counted without multiplicity) over the algebraic closure of F_p
    /// [Sil94, IV.8, Table 4.1]: I0 → 1, I_n → n, II → 1, III → 2, IV → 3,
    /// I0* → 5, I_n* → n + 5, IV* → 7, III* → 8, II* → 9.
    ///
    /// This is the `m_p` of Ogg's formula `v_p(Δ_min) = f_p + m_p − 1`.
    ///
    /// ```
    /// use isodescent::curve::Kodaira;
    /// assert_eq!(Kodaira::InStar(3).component_count(), 8);
    /// ```
    pub fn component_count(&self) -> u64 {
        match *self {
            Kodaira::I0 => 1,
            Kodaira::In(n) => n,
            Kodaira::II => 1,
            Kodaira::III => 2,
            Kodaira::IV => 3,
            Kodaira::I0Star => 5,
            Kodaira::InStar(n) => n + 5,
            Kodaira::IVStar => 7,
            Kodaira::IIIStar => 8,
            Kodaira::IIStar => 9,
        }
    }
}

impl fmt::Display for Kodaira {
    /// "I0", "I5", "II", "III", "IV", "I0*", "I1*", "IV*", "III*", "II*".
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Kodaira::I0 => write!(f, "I0"),
            Kodaira::In(n) => write!(f, "I{n}"),
            Kodaira::II => write!(f, "II"),
            Kodaira::III => write!(f, "III"),
            Kodaira::IV => write!(f, "IV"),
            Kodaira::I0Star => write!(f, "I0*"),
            Kodaira::InStar(n) => write!(f, "I{n}*"),
            Kodaira::IVStar => write!(f, "IV*"),
            Kodaira::IIIStar => write!(f, "III*"),
            Kodaira::IIStar => write!(f, "II*"),
        }
    }
}

/// The reduction type of a minimal model at a prime [Sil86, VII.5].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ReductionKind {
    /// The reduction is an elliptic curve.
    Good,
    /// A node whose two tangent slopes lie in F_p.
    SplitMultiplicative,
    /// A node whose tangent slopes are conjugate in F_{p²}.
    NonSplitMultiplicative,
    /// A cusp.
    Additive,
}

/// The local data of an elliptic curve at one prime, as found by Tate's
/// algorithm.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct LocalReduction {
    /// The prime `p`.
    pub prime: Prime,
    /// The Kodaira symbol of the special fibre.
    pub kodaira: Kodaira,
    /// The exponent `f_p` of `p` in the conductor.
    pub conductor_exponent: u32,
    /// The Tamagawa number `c_p = [E(Q_p) : E⁰(Q_p)]`.
    pub tamagawa: u64,
    /// `v_p(Δ)` of a model minimal at `p`.
    pub disc_valuation: u64,
    /// True when the model given was already minimal at `p` (for a
    /// rational model: `p`-integral and minimal at `p`).
    pub minimal_at_input: bool,
    /// Good, split or non-split multiplicative, or additive.
    pub reduction: ReductionKind,
    /// `[u, r, s, t]` taking the model given to a model that is integral
    /// and minimal at `p` (convention of the module docs). For
    /// [`local_reduction`] all four are integers and `u = p^k`.
    pub change: [BigRational; 4],
}

/// The local data at every prime together with the global minimal model.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct GlobalLocalData {
    /// The reduced global minimal model `[a1, a2, a3, a4, a6]`:
    /// integral, minimal at every prime, with `a1, a3 ∈ {0, 1}` and
    /// `a2 ∈ {−1, 0, 1}` (unique with these properties [Cre97, 3.2]).
    pub minimal_model: [BigInt; 5],
    /// `[u, r, s, t]` taking the model given to `minimal_model`.
    pub change: [BigRational; 4],
    /// The conductor `N = ∏ p^f_p`.
    pub conductor: BigInt,
    /// The local data at the primes of bad reduction, ascending; each
    /// record's `change` starts from the model given.
    pub primes: Vec<LocalReduction>,
}

// ---------------------------------------------------------------------
// Arithmetic helpers over F_p.
// ---------------------------------------------------------------------

/// A failure of an invariant the algorithm guarantees; reaching it means a
/// defect in this module, never bad input.
fn internal(what: &str) -> Error {
    Error::Internal {
        check: format!("Tate's algorithm: {what}"),
    }
}

/// `a⁻¹ mod p` for `p ∤ a`.
fn inv_mod(a: &BigInt, p: &BigInt) -> Result<BigInt> {
    crate::local::sqrt::mod_inverse(a, p).ok_or_else(|| internal("inverting a multiple of p"))
}

/// `p^k | x` (true for x = 0).
fn divisible(x: &BigInt, pk: &BigInt) -> bool {
    x.is_multiple_of(pk)
}

/// `x / d`, which must be exact.
fn exact_div(x: &BigInt, d: &BigInt) -> Result<BigInt> {
    let (q, r) = x.div_rem(d);
    if r.is_zero() {
        Ok(q)
    } else {
        Err(internal("inexact division"))
    }
}

/// The roots in F_p of `A·X² + B·X + C` with `p ∤ A`.
#[derive(Debug, Clone, PartialEq, Eq)]
enum QuadRoots {
    /// Two distinct roots in the algebraic closure; `rational` says
    /// whether they lie in F_p.
    Distinct { rational: bool },
    /// One double root, in F_p (given as `0 ≤ root < p`).
    Double(BigInt),
}

/// Roots of `A·X² + B·X + C` over F_p, `p ∤ A`.
///
/// Odd p: the discriminant `D = B² − 4AC`; `D ≢ 0` gives distinct roots,
/// rational iff `(D/p) = 1`; else the double root is `−B/(2A)`.
/// p = 2 (A odd): `B` odd gives distinct roots, the roots of `X² + X + C`,
/// rational iff `C` is even; `B` even gives `X² + C = (X + C)²`, double
/// root `C mod 2`.
fn quadratic_roots(qa: &BigInt, qb: &BigInt, qc: &BigInt, p: &Prime) -> Result<QuadRoots> {
    let pp = p.get();
    if p.is_two() {
        if qb.is_odd() {
            Ok(QuadRoots::Distinct {
                rational: qc.is_even(),
            })
        } else {
            Ok(QuadRoots::Double(qc.mod_floor(pp)))
        }
    } else {
        let d: BigInt = qb * qb - 4 * qa * qc;
        let d = d.mod_floor(pp);
        if d.is_zero() {
            let den = inv_mod(&(2 * qa), pp)?;
            Ok(QuadRoots::Double((-qb * den).mod_floor(pp)))
        } else {
            Ok(QuadRoots::Distinct {
                rational: legendre(&d, p)? == 1,
            })
        }
    }
}

/// The roots in F_p of a monic cubic `T³ + a·T² + b·T + c`.
#[derive(Debug, Clone, PartialEq, Eq)]
enum CubicRoots {
    /// Three distinct roots in the algebraic closure, `count` of them in
    /// F_p (0, 1 or 3).
    Distinct { count: u64 },
    /// A double root (in F_p) and a different simple root.
    Double(BigInt),
    /// A triple root (in F_p).
    Triple(BigInt),
}

/// Classifies the roots of `T³ + aT² + bT + c` over F_p.
///
/// p = 2, 3: by trying every element of F_p and dividing out roots
/// (multiplicities by synthetic division).
///
/// p ≥ 5: with `D = a²b² − 4b³ − 4a³c − 27c² + 18abc` the discriminant,
/// * `D ≢ 0`: the number of roots in F_p is `deg gcd(T^p − T, P)`, with
///   `T^p mod P` found by repeated squaring (about `2 log₂ p` products of
///   quadratics modulo P);
/// * `D ≡ 0` and `a² ≡ 3b`: `P' = 3(T + a/3)²` shares its double root
///   with P, so P has the triple root `−a/3`;
/// * `D ≡ 0` otherwise: the double root is `(ab − 9c) / (2(3b − a²))`
///   (common practice; check: `P = (T − α)²(T − β)` gives
///   `ab − 9c = 2(3b − a²)α`).
fn cubic_roots(a: &BigInt, b: &BigInt, c: &BigInt, p: &Prime) -> Result<CubicRoots> {
    let pp = p.get();
    let (a, b, c) = (a.mod_floor(pp), b.mod_floor(pp), c.mod_floor(pp));
    match p.to_u64() {
        Some(q) if q <= 3 => cubic_roots_by_search(&a, &b, &c, q),
        _ => {
            let d: BigInt =
                &a * &a * &b * &b - 4 * &b * &b * &b - 4 * &a * &a * &a * &c - 27 * &c * &c
                    + 18 * &a * &b * &c;
            let d = d.mod_floor(pp);
            if !d.is_zero() {
                let count = count_roots_squarefree_cubic(&a, &b, &c, pp)?;
                return Ok(CubicRoots::Distinct { count });
            }
            let e: BigInt = &a * &a - 3 * &b;
            let e = e.mod_floor(pp);
            if e.is_zero() {
                let alpha = (-&a * inv_mod(&BigInt::from(3), pp)?).mod_floor(pp);
                Ok(CubicRoots::Triple(alpha))
            } else {
                let num: BigInt = &a * &b - 9 * &c;
                let den = inv_mod(&(BigInt::from(-2) * &e), pp)?;
                Ok(CubicRoots::Double((num * den).mod_floor(pp)))
            }
        }
    }
}

/// Root structure by exhaustive search, for p = 2 or 3.
fn cubic_roots_by_search(a: &BigInt, b: &BigInt, c: &BigInt, q: u64) -> Result<CubicRoots> {
    let pp = BigInt::from(q);
    // Coefficients high to low: [1, a, b, c].
    let mut poly: Vec<BigInt> = vec![BigInt::one(), a.clone(), b.clone(), c.clone()];
    let mut roots: Vec<(BigInt, u32)> = Vec::new();
    let mut x = 0u64;
    while x < q && poly.len() > 1 {
        let xb = BigInt::from(x);
        // Synthetic division by (T − x).
        let mut quo: Vec<BigInt> = Vec::with_capacity(poly.len() - 1);
        let mut acc = BigInt::zero();
        for co in &poly {
            acc = (&acc * &xb + co).mod_floor(&pp);
            quo.push(acc.clone());
        }
        let rem = quo.pop().unwrap_or_default();
        if rem.is_zero() {
            poly = quo;
            match roots.last_mut() {
                Some((r, m)) if *r == xb => *m += 1,
                _ => roots.push((xb, 1)),
            }
        } else {
            x += 1;
        }
    }
    let total: u32 = roots.iter().map(|(_, m)| m).sum();
    if let Some((r, _)) = roots.iter().find(|(_, m)| *m == 3) {
        return Ok(CubicRoots::Triple(r.clone()));
    }
    if let Some((r, _)) = roots.iter().find(|(_, m)| *m == 2) {
        return Ok(CubicRoots::Double(r.clone()));
    }
    // All roots in F_p are simple. A cubic over F_p with a repeated root has
    // that root in F_p (a double root is fixed by Frobenius), so the roots
    // are distinct; `total` of them are rational.
    if total == 2 {
        return Err(internal("cubic with exactly two simple rational roots"));
    }
    Ok(CubicRoots::Distinct {
        count: u64::from(total),
    })
}

/// `f·g mod (P, p)` for `f, g` of degree ≤ 2, `P = T³ + aT² + bT + c`;
/// coefficients low to high.
fn mul_mod_cubic(f: &[BigInt; 3], g: &[BigInt; 3], abc: &[BigInt; 3], p: &BigInt) -> [BigInt; 3] {
    let mut h: [BigInt; 5] = Default::default();
    for i in 0..3 {
        for j in 0..3 {
            h[i + j] += &f[i] * &g[j];
        }
    }
    // T³ ≡ −(aT² + bT + c).
    for k in (3..5).rev() {
        let co = std::mem::take(&mut h[k]).mod_floor(p);
        h[k - 1] -= &co * &abc[0];
        h[k - 2] -= &co * &abc[1];
        h[k - 3] -= &co * &abc[2];
    }
    [h[0].mod_floor(p), h[1].mod_floor(p), h[2].mod_floor(p)]
}

/// Degree of `gcd(f, g)` over F_p (coefficients low to high).
fn gcd_degree(mut f: Vec<BigInt>, mut g: Vec<BigInt>, p: &BigInt) -> Result<usize> {
    fn trim(v: &mut Vec<BigInt>) {
        while v.last().is_some_and(|x| x.is_zero()) {
            v.pop();
        }
    }
    trim(&mut f);
    trim(&mut g);
    while !g.is_empty() {
        // f ← f mod g
        let lead_inv = inv_mod(&g[g.len() - 1], p)?;
        while f.len() >= g.len() {
            let shift = f.len() - g.len();
            let co = (&f[f.len() - 1] * &lead_inv).mod_floor(p);
            for (i, gi) in g.iter().enumerate() {
                f[shift + i] = (&f[shift + i] - &co * gi).mod_floor(p);
            }
            trim(&mut f);
            if f.is_empty() {
                break;
            }
        }
        std::mem::swap(&mut f, &mut g);
    }
    Ok(f.len().saturating_sub(1))
}

/// Number of roots in F_p of a square-free monic cubic `T³ + aT² + bT + c`:
/// `deg gcd(T^p − T, P)`, since `T^p − T = ∏_{x ∈ F_p} (T − x)`.
fn count_roots_squarefree_cubic(a: &BigInt, b: &BigInt, c: &BigInt, p: &BigInt) -> Result<u64> {
    let abc = [a.clone(), b.clone(), c.clone()];
    let t: [BigInt; 3] = [BigInt::zero(), BigInt::one(), BigInt::zero()];
    let mut acc: [BigInt; 3] = [BigInt::one(), BigInt::zero(), BigInt::zero()];
    let bits = p.bits();
    for i in (0..bits).rev() {
        acc = mul_mod_cubic(&acc, &acc, &abc, p);
        if p.bit(i) {
            acc = mul_mod_cubic(&acc, &t, &abc, p);
        }
    }
    let h = vec![
        acc[0].clone(),
        (&acc[1] - BigInt::one()).mod_floor(p),
        acc[2].clone(),
    ];
    let cubic = vec![c.clone(), b.clone(), a.clone(), BigInt::one()];
    Ok(gcd_degree(cubic, h, p)? as u64)
}

// ---------------------------------------------------------------------
// Models and changes of coordinates.
// ---------------------------------------------------------------------

/// Applies `[1, r, s, t]` to integral coefficients [Sil86, III.1, Table 3.1].
fn shift(a: &[BigInt; 5], r: &BigInt, s: &BigInt, t: &BigInt) -> [BigInt; 5] {
    let [a1, a2, a3, a4, a6] = a;
    let n1 = a1 + 2 * s;
    let n2 = a2 - s * a1 + 3 * r - s * s;
    let n3 = a3 + r * a1 + 2 * t;
    let n4 = a4 - s * a3 + 2 * r * a2 - (t + r * s) * a1 + 3 * r * r - 2 * s * t;
    let n6 = a6 + r * a4 + r * r * a2 + r * r * r - t * a3 - t * t - r * t * a1;
    [n1, n2, n3, n4, n6]
}

fn rat(x: &BigInt) -> BigRational {
    BigRational::from_integer(x.clone())
}

/// The working state of one run: the current model and the integral
/// change `[u, r, s, t]` from the input to it.
struct Run<'a> {
    p: &'a Prime,
    a: [BigInt; 5],
    u: BigInt,
    r: BigInt,
    s: BigInt,
    t: BigInt,
    /// p⁰, …, p⁶.
    small_powers: Vec<BigInt>,
}

impl Run<'_> {
    fn pow(&self, k: u32) -> BigInt {
        match self.small_powers.get(k as usize) {
            Some(pk) => pk.clone(),
            None => num_traits::pow(self.p.get().clone(), k as usize),
        }
    }

    /// Applies `[1, r, s, t]` and records it.
    fn apply(&mut self, r: &BigInt, s: &BigInt, t: &BigInt) {
        if r.is_zero() && s.is_zero() && t.is_zero() {
            return;
        }
        self.a = shift(&self.a, r, s, t);
        let u2 = &self.u * &self.u;
        self.t = &self.t + &u2 * &self.u * t + &self.s * &u2 * r;
        self.r = &self.r + &u2 * r;
        self.s = &self.s + &self.u * s;
    }

    /// Applies `[p, 0, 0, 0]`: `a_i ← a_i / p^i`.
    fn scale_down(&mut self) -> Result<()> {
        let p = self.p.get();
        let mut out = self.a.clone();
        for (coef, e) in out.iter_mut().zip([1u32, 2, 3, 4, 6]) {
            *coef = exact_div(coef, &self.pow(e))?;
        }
        self.a = out;
        self.u = &self.u * p;
        Ok(())
    }

    /// `a_i / p^k`, exact.
    fn part(&self, i: usize, k: u32) -> Result<BigInt> {
        exact_div(&self.a[i], &self.pow(k))
    }
}

/// The outcome of one pass of the algorithm over the current model.
enum Pass {
    /// The type was found.
    Found {
        kodaira: Kodaira,
        tamagawa: u64,
        reduction: ReductionKind,
    },
    /// Step 11: the model is not minimal; scale by `u = p` and repeat.
    NotMinimal,
}

/// Step 2: integers `r, t ∈ [0, p)` moving a singular point of the
/// reduction mod p to (0, 0), so that afterwards `p | a3, a4, a6`.
///
/// * p = 2: the partial derivatives mod 2 are `a1·x + a3` and
///   `a1·y + x² + a4`. If `a1` is odd the singular point is
///   `(a3, a3 + a4)`; if `a1` is even, `x = a4` and `y² = y` gives
///   `y = x(1 + a2 + a4) + a6`.
/// * p = 3: completing the square, `y² = x³ + b2x² − b4x + b6` mod 3; if
///   `3 | b2` the cusp is the triple root `x = −b6`, otherwise the double
///   root `x = −b4/b2 = −b2b4`; `y = −(a1x + a3)/2 = a1x + a3`.
/// * p ≥ 5: in the model `Y² = X³ − 27·c4X − 54·c6` with
///   `X = 36x + 3b2`, the double root is `X = −3c6/c4` (or 0 when
///   `p | c4`), so `x = −(c6 + b2c4)/(12·c4)` (or `−b2/12`);
///   `y = −(a1x + a3)/2`.
fn singular_point(
    a: &[BigInt; 5],
    inv: &WeierstrassInvariants,
    p: &Prime,
) -> Result<(BigInt, BigInt)> {
    let pp = p.get();
    let [a1, a2, a3, a4, a6] = a;
    match p.to_u64() {
        Some(2) => {
            if a1.is_even() {
                let r = a4.mod_floor(pp);
                let t = (&r * (a2 + a4 + 1u32) + a6).mod_floor(pp);
                Ok((r, t))
            } else {
                let r = a3.mod_floor(pp);
                let t = (&r + a4).mod_floor(pp);
                Ok((r, t))
            }
        }
        Some(3) => {
            let r = if divisible(&inv.b2, pp) {
                (-&inv.b6).mod_floor(pp)
            } else {
                (-&inv.b2 * &inv.b4).mod_floor(pp)
            };
            let t = (a1 * &r + a3).mod_floor(pp);
            Ok((r, t))
        }
        _ => {
            let r = if divisible(&inv.c4, pp) {
                (-&inv.b2 * inv_mod(&BigInt::from(12), pp)?).mod_floor(pp)
            } else {
                let den = inv_mod(&(12 * &inv.c4), pp)?;
                (-(&inv.c6 + &inv.b2 * &inv.c4) * den).mod_floor(pp)
            };
            let t = (-(a1 * &r + a3) * inv_mod(&BigInt::from(2), pp)?).mod_floor(pp);
            Ok((r, t))
        }
    }
}

/// One pass of Tate's algorithm, steps 2–11 of [Sil94, IV.9.4], over a
/// model with `n = v_p(Δ) ≥ 1`.
fn tate_pass(run: &mut Run<'_>, n: u64) -> Result<Pass> {
    let p = run.p;
    let pp = p.get().clone();
    let inv0 = weierstrass_invariants(&run.a);

    // Step 2: singular point to (0, 0).
    let (r, t) = singular_point(&run.a, &inv0, p)?;
    run.apply(&r, &BigInt::zero(), &t);
    if !(divisible(&run.a[2], &pp) && divisible(&run.a[3], &pp) && divisible(&run.a[4], &pp)) {
        return Err(internal("singular point not moved to (0, 0)"));
    }
    let inv = weierstrass_invariants(&run.a);
    if !divisible(&inv.b2, &pp) {
        // Multiplicative: tangent slopes are the roots of T² + a1T − a2.
        let split = matches!(
            quadratic_roots(&BigInt::one(), &run.a[0], &(-&run.a[1]), p)?,
            QuadRoots::Distinct { rational: true }
        );
        let tamagawa = if split {
            n
        } else if n % 2 == 0 {
            2
        } else {
            1
        };
        return Ok(Pass::Found {
            kodaira: Kodaira::In(n),
            tamagawa,
            reduction: if split {
                ReductionKind::SplitMultiplicative
            } else {
                ReductionKind::NonSplitMultiplicative
            },
        });
    }
    let additive = |kodaira, tamagawa| {
        Ok(Pass::Found {
            kodaira,
            tamagawa,
            reduction: ReductionKind::Additive,
        })
    };
    // Step 3.
    if !divisible(&run.a[4], &run.pow(2)) {
        return additive(Kodaira::II, 1);
    }
    // Step 4.
    if !divisible(&inv.b8, &run.pow(3)) {
        return additive(Kodaira::III, 2);
    }
    // Step 5.
    if !divisible(&inv.b6, &run.pow(3)) {
        let q = quadratic_roots(&BigInt::one(), &run.part(2, 1)?, &(-run.part(4, 2)?), p)?;
        let c = if matches!(q, QuadRoots::Distinct { rational: true }) {
            3
        } else {
            1
        };
        return additive(Kodaira::IV, c);
    }
    // Step 6: make p | a1, a2; p² | a3, a4; p³ | a6.
    let (s, t) = if p.is_two() {
        let s = run.a[1].mod_floor(&pp);
        let t = 2 * run.part(4, 2)?.mod_floor(&pp);
        (s, t)
    } else {
        let half = inv_mod(&BigInt::from(2), &pp)?;
        let s = (-&run.a[0] * &half).mod_floor(&pp);
        let t = &pp * (-run.part(2, 1)? * &half).mod_floor(&pp);
        (s, t)
    };
    run.apply(&BigInt::zero(), &s, &t);
    let ok = divisible(&run.a[0], &pp)
        && divisible(&run.a[1], &pp)
        && divisible(&run.a[2], &run.pow(2))
        && divisible(&run.a[3], &run.pow(2))
        && divisible(&run.a[4], &run.pow(3));
    if !ok {
        return Err(internal("step 6 divisibility"));
    }
    let roots = cubic_roots(&run.part(1, 1)?, &run.part(3, 2)?, &run.part(4, 3)?, p)?;
    match roots {
        CubicRoots::Distinct { count } => additive(Kodaira::I0Star, 1 + count),
        CubicRoots::Double(alpha) => {
            run.apply(&(&alpha * &pp), &BigInt::zero(), &BigInt::zero());
            let (k, c) = subprocedure_in_star(run, n)?;
            additive(Kodaira::InStar(k), c)
        }
        CubicRoots::Triple(alpha) => {
            run.apply(&(&alpha * &pp), &BigInt::zero(), &BigInt::zero());
            // Step 8: p² | a2, p³ | a4, p⁴ | a6.
            let q = quadratic_roots(&BigInt::one(), &run.part(2, 2)?, &(-run.part(4, 4)?), p)?;
            match q {
                QuadRoots::Distinct { rational } => {
                    additive(Kodaira::IVStar, if rational { 3 } else { 1 })
                }
                QuadRoots::Double(y0) => {
                    // Step 9: double root to 0, then p³ | a3, p⁵ | a6.
                    let t = y0 * run.pow(2);
                    run.apply(&BigInt::zero(), &BigInt::zero(), &t);
                    if !divisible(&run.a[3], &run.pow(4)) {
                        return additive(Kodaira::IIIStar, 2);
                    }
                    // Step 10.
                    if !divisible(&run.a[4], &run.pow(6)) {
                        return additive(Kodaira::IIStar, 1);
                    }
                    // Step 11.
                    Ok(Pass::NotMinimal)
                }
            }
        }
    }
}

/// Step 7, the I_n* subprocedure, entered with the double root of
/// `P(T) = T³ + a2,1T² + a4,2T + a6,3` at `T = 0` (so `p ∤ a2/p`,
/// `p³ | a4`, `p⁴ | a6`). Level `k = 1, 2, …` alternates:
/// * odd k, `m = (k + 3)/2`: the quadratic `Y² + (a3/p^m)Y − a6/p^{2m}`;
///   distinct roots end with I_k*; a double root `y0` is moved to 0 by
///   `t = y0·p^m`, giving `p^{m+1} | a3`, `p^{2m+1} | a6`;
/// * even k, `m = k/2 + 1`: the quadratic
///   `(a2/p)X² + (a4/p^{m+1})X + a6/p^{2m+1}`; distinct roots end with
///   I_k*; a double root `x0` is moved to 0 by `r = x0·p^m`, giving
///   `p^{m+2} | a4`, `p^{2m+2} | a6`.
///
/// `c_p = 4` if the final quadratic splits over F_p, else 2. The level
/// never exceeds `v_p(Δ) − 4` (Ogg's formula), so more than `v_p(Δ)`
/// levels signal a defect.
fn subprocedure_in_star(run: &mut Run<'_>, disc_val: u64) -> Result<(u64, u64)> {
    let p = run.p;
    let mut k: u64 = 1;
    loop {
        if k > disc_val {
            return Err(internal("I_n* loop longer than v(Δ)"));
        }
        let m = u32::try_from(if k % 2 == 1 { (k + 3) / 2 } else { k / 2 + 1 })
            .map_err(|_| internal("I_n* level overflow"))?;
        let q = if k % 2 == 1 {
            quadratic_roots(&BigInt::one(), &run.part(2, m)?, &(-run.part(4, 2 * m)?), p)?
        } else {
            quadratic_roots(
                &run.part(1, 1)?,
                &run.part(3, m + 1)?,
                &run.part(4, 2 * m + 1)?,
                p,
            )?
        };
        match q {
            QuadRoots::Distinct { rational } => return Ok((k, if rational { 4 } else { 2 })),
            QuadRoots::Double(root) => {
                let shift_by = root * run.pow(m);
                if k % 2 == 1 {
                    run.apply(&BigInt::zero(), &BigInt::zero(), &shift_by);
                } else {
                    run.apply(&shift_by, &BigInt::zero(), &BigInt::zero());
                }
            }
        }
        k += 1;
    }
}

/// Tate's algorithm at one prime: the local data of the integral model
/// `coeffs = [a1, a2, a3, a4, a6]` at `p`.
///
/// # Statement
/// Returns the Kodaira symbol, `f_p`, `c_p`, `v_p(Δ_min)`, whether the
/// model is minimal at `p`, and `[u, r, s, t]` (integers, `u = p^k`) to a
/// model integral and minimal at `p` \[Tate75\], [Sil94, IV.9].
///
/// # The algorithm ([Sil94, IV.9, Algorithm 9.4]; [Cre97, 3.2])
/// Write `a_{i,k} = a_i / p^k` and `n = v_p(Δ)`.
/// 1. `p ∤ Δ`: good reduction, I0, `f = 0`, `c = 1`.
/// 2. Move a singular point of the reduction to (0, 0), so `p | a3, a4, a6`.
///    If `p ∤ b2`: multiplicative, I_n, `f = 1`; split iff
///    `T² + a1T − a2` has roots in F_p; `c = n` if split, else 1 (n odd)
///    or 2 (n even).
/// 3. `p² ∤ a6`: II, `c = 1`.
/// 4. `p³ ∤ b8`: III, `c = 2`.
/// 5. `p³ ∤ b6`: IV, `c = 3` if `T² + a_{3,1}T − a_{6,2}` splits, else 1.
/// 6. Change coordinates so `p | a1, a2`, `p² | a3, a4`, `p³ | a6`
///    (odd p: `s = −a1/2`, `t = −a3/2 mod p²`; p = 2: `s = a2 mod 2`,
///    `t = 2(a_{6,2} mod 2)`). Let
///    `P(T) = T³ + a_{2,1}T² + a_{4,2}T + a_{6,3}`. Distinct roots: I0*,
///    `c = 1 + #{roots in F_p}`.
/// 7. A double root: move it to 0; the I_n* subprocedure (see the source)
///    finds `n ≥ 1` and `c ∈ {2, 4}`.
/// 8. A triple root: move it to 0 (`p² | a2`, `p³ | a4`, `p⁴ | a6`).
///    `Y² + a_{3,2}Y − a_{6,4}` with distinct roots: IV*, `c = 3` if they
///    are in F_p, else 1.
/// 9. Otherwise move its double root to 0 (`p³ | a3`, `p⁵ | a6`);
///    `p⁴ ∤ a4`: III*, `c = 2`.
/// 10. `p⁶ ∤ a6`: II*, `c = 1`.
/// 11. Otherwise the model is not minimal: replace `a_i` by `a_i/p^i`
///     (the change `u = p`) and go back to step 1.
///
/// The exponent of the conductor: `f = 0` (good), 1 (multiplicative),
/// and for additive reduction `f = 2` when `p ≥ 5` (tame), and
/// `f = v_p(Δ_min) + 1 − m_p` when `p = 2, 3`, by Ogg's formula \[Ogg67\]
/// (proved for p = 2 in \[Saito88\]), `m_p` = [`Kodaira::component_count`].
///
/// The roots of quadratics mod p use the Legendre symbol; the number of
/// roots of the cubic in step 6 is `deg gcd(T^p − T, P)` computed by
/// repeated squaring, so primes of any size are handled without looping
/// over F_p.
///
/// # Errors
/// [`Error::SingularCurve`] when `Δ = 0`.
///
/// # Cost
/// One pass is O(1) big-integer operations plus `O(log p)` products for
/// the cubic and `O(v_p(Δ))` steps in the I_n* loop; a non-minimal model
/// needs one further pass per scaling.
///
/// # Example
/// `y² + y = x³ − x² − 10x − 20` has `Δ = −11⁵`; at 11 it is split
/// multiplicative of type I5 with `c_11 = 5` (from memory):
/// ```
/// use isodescent::curve::{local_reduction, Kodaira};
/// use isodescent::local::Prime;
/// let a = [0, -1, 1, -10, -20].map(Into::into);
/// let lr = local_reduction(&a, &Prime::small(11).unwrap()).unwrap();
/// assert_eq!(lr.kodaira, Kodaira::In(5));
/// assert_eq!((lr.conductor_exponent, lr.tamagawa), (1, 5));
/// ```
pub fn local_reduction(coeffs: &[BigInt; 5], p: &Prime) -> Result<LocalReduction> {
    local_reduction_with_budget(coeffs, p, &mut Budget::unlimited())
}

/// [`local_reduction`] under a budget's deadline, read before each pass
/// of Tate's algorithm (a pass is O(1) products of numbers of the model's
/// size, and takes milliseconds on huge models). No units are charged:
/// the number of passes is at most v_p(Δ)/12 + 1, bounded by the input.
///
/// # Errors
/// Those of [`local_reduction`]; [`Error::BudgetExhausted`] when the
/// budget or its deadline runs out.
pub(crate) fn local_reduction_with_budget(
    coeffs: &[BigInt; 5],
    p: &Prime,
    budget: &mut Budget,
) -> Result<LocalReduction> {
    if let Some(lr) = local_reduction_by_words(coeffs, p)? {
        return Ok(lr);
    }
    local_reduction_budgeted(coeffs, p, budget)
}

fn tate_stopped() -> Error {
    Error::BudgetExhausted {
        stage: "Tate's algorithm".into(),
    }
}

/// The machine-word route of [`local_reduction`] (module `tate_word`):
/// `Ok(None)` when the word paths are off, a coefficient or an
/// intermediate leaves `i128`, or `p ≥ 2^62`.
fn local_reduction_by_words(coeffs: &[BigInt; 5], p: &Prime) -> Result<Option<LocalReduction>> {
    if !word_paths_enabled() {
        return Ok(None);
    }
    let (Some(pw), Some(a)) = (p.to_u64(), ints_i128(coeffs)) else {
        return Ok(None);
    };
    let Ok(disc) = tate_word::discriminant_word(&a) else {
        return Ok(None);
    };
    if disc == 0 {
        return Err(Error::SingularCurve {
            reason: "discriminant is 0".into(),
        });
    }
    match tate_word::local_reduction_word(&a, disc, pw) {
        Ok(w) => Ok(Some(from_word(p, w))),
        Err(Stop::Overflow) => Ok(None),
        Err(Stop::Internal(what)) => Err(internal(what)),
    }
}

/// The `i128` coefficients of an integral model, when all fit.
fn ints_i128(coeffs: &[BigInt; 5]) -> Option<[i128; 5]> {
    let mut out = [0i128; 5];
    for (o, c) in out.iter_mut().zip(coeffs) {
        *o = c.to_i128()?;
    }
    Some(out)
}

/// A word answer as a [`LocalReduction`].
fn from_word(p: &Prime, w: WordReduction) -> LocalReduction {
    LocalReduction {
        prime: p.clone(),
        kodaira: w.kodaira,
        conductor_exponent: w.conductor_exponent,
        tamagawa: w.tamagawa,
        disc_valuation: w.disc_valuation,
        minimal_at_input: w.minimal_at_input,
        reduction: w.reduction,
        change: w.change.map(|x| BigRational::from_integer(BigInt::from(x))),
    }
}

/// [`local_reduction`] in `BigInt` arithmetic throughout.
#[cfg(test)]
pub(crate) fn local_reduction_big(coeffs: &[BigInt; 5], p: &Prime) -> Result<LocalReduction> {
    local_reduction_budgeted(coeffs, p, &mut Budget::unlimited())
}

/// [`local_reduction`] in `BigInt` arithmetic throughout, under `budget`
/// (see [`local_reduction_with_budget`]).
fn local_reduction_budgeted(
    coeffs: &[BigInt; 5],
    p: &Prime,
    budget: &mut Budget,
) -> Result<LocalReduction> {
    budget.check_deadline().map_err(|_| tate_stopped())?;
    let inv = weierstrass_invariants(coeffs);
    if inv.discriminant.is_zero() {
        return Err(Error::SingularCurve {
            reason: "discriminant is 0".into(),
        });
    }
    let mut run = Run {
        p,
        a: coeffs.clone(),
        u: BigInt::one(),
        r: BigInt::zero(),
        s: BigInt::zero(),
        t: BigInt::zero(),
        small_powers: std::iter::successors(Some(BigInt::one()), |x| Some(x * p.get()))
            .take(7)
            .collect(),
    };
    let mut scalings: u64 = 0;
    // v_p(Δ); a change [1, r, s, t] keeps Δ, the scaling u = p divides it
    // by p¹².
    let mut n = valuation(&inv.discriminant, p).ok_or_else(|| internal("zero discriminant"))?;
    loop {
        budget.check_deadline().map_err(|_| tate_stopped())?;
        let found = if n == 0 {
            Pass::Found {
                kodaira: Kodaira::I0,
                tamagawa: 1,
                reduction: ReductionKind::Good,
            }
        } else {
            // A pass ending in step 11 leaves integral changes behind; the
            // scaling by p then applies to the changed model.
            tate_pass(&mut run, n)?
        };
        match found {
            Pass::NotMinimal => {
                run.scale_down()?;
                scalings += 1;
                n = n
                    .checked_sub(12)
                    .ok_or_else(|| internal("non-minimal with v(Δ) < 12"))?;
            }
            Pass::Found {
                kodaira,
                tamagawa,
                reduction,
            } => {
                let small_p = matches!(p.to_u64(), Some(2) | Some(3));
                let f: u64 = match reduction {
                    ReductionKind::Good => 0,
                    ReductionKind::SplitMultiplicative | ReductionKind::NonSplitMultiplicative => 1,
                    ReductionKind::Additive if !small_p => 2,
                    ReductionKind::Additive => (n + 1)
                        .checked_sub(kodaira.component_count())
                        .ok_or_else(|| internal("negative conductor exponent"))?,
                };
                let conductor_exponent =
                    u32::try_from(f).map_err(|_| internal("conductor exponent overflow"))?;
                return Ok(LocalReduction {
                    prime: p.clone(),
                    kodaira,
                    conductor_exponent,
                    tamagawa,
                    disc_valuation: n,
                    minimal_at_input: scalings == 0,
                    reduction,
                    change: [rat(&run.u), rat(&run.r), rat(&run.s), rat(&run.t)],
                });
            }
        }
    }
}

/// The reduction `[1, r, s, t]` of an integral model to the one with
/// `a1, a3 ∈ {0, 1}`, `a2 ∈ {−1, 0, 1}` and the same `u = 1` invariants:
/// `s = −⌊a1/2⌋`, `r = −⌊(a2 − s·a1 − s² + 1)/3⌋`,
/// `t = −⌊(a3 + r·a1)/2⌋` [Cre97, 3.2].
fn normalising_shift(a: &[BigInt; 5]) -> (BigInt, BigInt, BigInt) {
    let [a1, a2, a3, _, _] = a;
    let two = BigInt::from(2);
    let three = BigInt::from(3);
    let s = -a1.div_floor(&two);
    let a2s = a2 - &s * a1 - &s * &s;
    let r = -(a2s + BigInt::one()).div_floor(&three);
    let t = -(a3 + &r * a1).div_floor(&two);
    (r, s, t)
}

/// The global minimal model, the conductor, and the local data at every
/// bad prime of a rational Weierstrass model.
///
/// # Statement
/// Q has class number one, so `E` has a global minimal model, integral
/// and minimal at every prime [Sil86, VIII.8.3]; it is unique once
/// normalised to `a1, a3 ∈ {0, 1}`, `a2 ∈ {−1, 0, 1}` [Cre97, 3.2]
/// (\[Kraus89\] characterises the invariants `c4, c6` that occur).
/// The conductor is `N = ∏ p^f_p`.
///
/// # Method
/// 1. Scale to an integral model by `u = 1/d`, `d` the lcm of the
///    denominators (then `d^i a_i ∈ Z`).
/// 2. Factor `d` and the numerator of `Δ`; their primes include every
///    prime dividing the discriminant of the integral model.
/// 3. For each such prime `p`, ascending, run [`local_reduction`] on the
///    current integral model and apply its change: `u = p^k` and integral
///    `r, s, t` give a model integral everywhere (the divisions are by
///    powers of `p` only, and Tate's algorithm makes it `p`-integral),
///    minimal at `p`, and with unchanged `v_q(Δ)` at every other `q`.
/// 4. Normalise by `[1, r, s, t]` as in [Cre97, 3.2].
///
/// # Errors
/// [`Error::SingularCurve`] when `Δ = 0`; the errors of
/// [`factor`](fn@crate::arith::factor) ([`Error::FactorBudgetExhausted`],
/// [`Error::BudgetExhausted`]) when `budget` runs out.
///
/// # Cost
/// Dominated by factoring the discriminant; then one [`local_reduction`]
/// per prime divisor.
///
/// # Example
/// `y² = x³ − x` has conductor 32 (from memory):
/// ```
/// use isodescent::curve::global_local_data;
/// use isodescent::Budget;
/// use num_rational::BigRational;
/// let a = [0, 0, 0, -1, 0].map(|c: i64| BigRational::from_integer(c.into()));
/// let g = global_local_data(&a, &mut Budget::unlimited()).unwrap();
/// assert_eq!(g.conductor, 32.into());
/// ```
pub fn global_local_data(
    coeffs: &[BigRational; 5],
    budget: &mut Budget,
) -> Result<GlobalLocalData> {
    global_local_data_with(coeffs, budget, &mut KnownPrimes::default())
}

/// [`global_local_data`], reading the primes of the discriminant (and of
/// the scaling `d`) off `known` when it holds them all and factoring would
/// have spent no budget ([`KnownPrimes::primes_of`]), else factoring under
/// `budget` as there and adding the primes found to `known`. The result is
/// the same either way.
pub(crate) fn global_local_data_with(
    coeffs: &[BigRational; 5],
    budget: &mut Budget,
    known: &mut KnownPrimes,
) -> Result<GlobalLocalData> {
    // Step 1: an integral model; in machine words when it is the input
    // itself and its discriminant fits in i128 (module `tate_word`).
    let (d, integral) = integral_scaling(coeffs);
    let word_start = if word_paths_enabled() && d.is_one() {
        ints_i128(&integral)
            .and_then(|a| tate_word::discriminant_word(&a).ok().map(|disc| (a, disc)))
    } else {
        None
    };
    let disc = match &word_start {
        Some((_, disc)) => BigInt::from(*disc),
        None => weierstrass_invariants(&integral).discriminant,
    };
    if disc.is_zero() {
        return Err(Error::SingularCurve {
            reason: "discriminant is 0".into(),
        });
    }
    // Step 2: the primes.
    let primes = discriminant_primes(&d, &disc, budget, known)?;
    // Step 3: minimal at each prime in turn; the model and the change so
    // far stay in words until something leaves i128.
    let state = match word_start {
        Some((a, disc)) => Global::Word {
            a,
            disc,
            total: [1, 0, 0, 0],
        },
        None => Global::Big {
            a: integral,
            total: ModelChange::scaling(BigRational::new(BigInt::one(), d))?,
        },
    };
    let (state, records, conductor) = minimise_at_each(state, primes, coeffs, budget)?;
    // Step 4: normalise.
    normalise_global(state, records, conductor)
}

/// Step 2 of [`global_local_data_with`]: the sorted primes of the
/// integral model's discriminant. Δ(integral) = d¹² Δ(input), so they are
/// those of `d` and of the numerator of Δ(input).
fn discriminant_primes(
    d: &BigInt,
    disc: &BigInt,
    budget: &mut Budget,
    known: &mut KnownPrimes,
) -> Result<Vec<BigInt>> {
    let mut primes: Vec<BigInt> = Vec::with_capacity(16);
    let disc_numer = if d.is_one() {
        disc.abs()
    } else {
        BigRational::new(disc.abs(), num_traits::pow(d.clone(), 12))
            .numer()
            .abs()
    };
    for m in [d.clone(), disc_numer] {
        if m > BigInt::one() {
            match known.primes_of(&m) {
                Some(ps) => primes.extend(ps),
                None => {
                    let f = factor(&m, budget)?;
                    known.add(f.primes());
                    primes.extend(f.primes().cloned());
                }
            }
        }
    }
    primes.sort();
    primes.dedup();
    Ok(primes)
}

/// Step 3 of [`global_local_data_with`]: Tate's algorithm at each prime in
/// turn, moving the model to one minimal there; returns the final state,
/// the local data of the bad primes (relative to the input model) and the
/// conductor.
fn minimise_at_each(
    mut state: Global,
    primes: Vec<BigInt>,
    coeffs: &[BigRational; 5],
    budget: &mut Budget,
) -> Result<(Global, Vec<LocalReduction>, BigInt)> {
    let mut records = Vec::with_capacity(primes.len());
    let mut conductor = BigInt::one();
    for q in primes {
        budget.check_deadline().map_err(|_| tate_stopped())?;
        let p = Prime::new(q)?;
        if let Global::Word { a, disc, total } = &mut state {
            match p.to_u64().map(|pw| word_step(a, *disc, total, pw)) {
                Some(Ok((w, next))) => {
                    let to_here = next.total;
                    (*a, *disc, *total) = (next.a, next.disc, to_here);
                    if w.reduction != ReductionKind::Good {
                        conductor *=
                            num_traits::pow(p.get().clone(), w.conductor_exponent as usize);
                        let lr = from_word(&p, w);
                        let to_here = to_here.map(|x| BigRational::from_integer(BigInt::from(x)));
                        records.push(relative_to_input(lr, coeffs, to_here));
                    }
                    continue;
                }
                Some(Err(Stop::Internal(what))) => return Err(internal(what)),
                Some(Err(Stop::Overflow)) | None => state = state.to_big()?,
            }
        }
        let Global::Big { a, total } = &mut state else {
            return Err(internal("model state"));
        };
        let lr = local_reduction_with_budget(a, &p, budget)?;
        let [u, r, s, t] = lr.change.clone();
        let change = ModelChange::new(u, r, s, t)?;
        let to_here = total.then(&change);
        if !change.is_identity() {
            *a = change
                .apply_to_integral(a)
                .ok_or_else(|| internal("model after a local change is not integral"))?;
            *total = to_here.clone();
        }
        if lr.reduction != ReductionKind::Good {
            conductor *= num_traits::pow(p.get().clone(), lr.conductor_exponent as usize);
            records.push(relative_to_input(lr, coeffs, change_array(&to_here)));
        }
    }
    Ok((state, records, conductor))
}

/// Step 4 of [`global_local_data_with`]: the normalising shift of
/// [Cre97, 3.2], in words while the model fits.
fn normalise_global(
    mut state: Global,
    records: Vec<LocalReduction>,
    conductor: BigInt,
) -> Result<GlobalLocalData> {
    if let Global::Word { a, total, .. } = &state {
        let normalised = tate_word::normalising_shift_word(a).and_then(|(r, s, t)| {
            Ok((
                tate_word::shift_word(a, r, s, t)?,
                tate_word::compose_word(total, &[1, r, s, t])?,
            ))
        });
        match normalised {
            Ok((m, ch)) => {
                return Ok(GlobalLocalData {
                    minimal_model: m.map(BigInt::from),
                    change: ch.map(|x| BigRational::from_integer(BigInt::from(x))),
                    conductor,
                    primes: records,
                })
            }
            Err(Stop::Internal(what)) => return Err(internal(what)),
            Err(Stop::Overflow) => state = state.to_big()?,
        }
    }
    let Global::Big { a, total } = state else {
        return Err(internal("model state"));
    };
    let (r, s, t) = normalising_shift(&a);
    let minimal_model = shift(&a, &r, &s, &t);
    let total = total.then(&ModelChange::translation(rat(&r), rat(&s), rat(&t)));
    Ok(GlobalLocalData {
        minimal_model,
        change: change_array(&total),
        conductor,
        primes: records,
    })
}

/// The running state of [`global_local_data`]: the current integral model
/// and the change from the input to it, in words or in big numbers (one
/// value per call, so the size difference of the variants is immaterial).
#[allow(clippy::large_enum_variant)]
enum Global {
    Word {
        a: [i128; 5],
        disc: i128,
        total: [i128; 4],
    },
    Big {
        a: [BigInt; 5],
        total: ModelChange,
    },
}

impl Global {
    fn to_big(&self) -> Result<Global> {
        Ok(match self {
            Global::Word { a, total, .. } => {
                let [u, r, s, t] = total.map(|x| BigRational::from_integer(BigInt::from(x)));
                Global::Big {
                    a: a.map(BigInt::from),
                    total: ModelChange::new(u, r, s, t)?,
                }
            }
            Global::Big { a, total } => Global::Big {
                a: a.clone(),
                total: total.clone(),
            },
        })
    }
}

/// The word state after one prime.
struct WordNext {
    a: [i128; 5],
    disc: i128,
    total: [i128; 4],
}

/// One prime of step 3 in words, without touching the state (so that an
/// overflow leaves it for the `BigInt` route).
fn word_step(
    a: &[i128; 5],
    disc: i128,
    total: &[i128; 4],
    p: u64,
) -> std::result::Result<(WordReduction, WordNext), Stop> {
    let w = tate_word::local_reduction_word(a, disc, p)?;
    let to_here = tate_word::compose_word(total, &w.change)?;
    if w.change == [1, 0, 0, 0] {
        return Ok((
            w,
            WordNext {
                a: *a,
                disc,
                total: to_here,
            },
        ));
    }
    let next = tate_word::apply_change_word(a, &w.change)?;
    let u12 = w.change[0].checked_pow(12).ok_or(Stop::Overflow)?;
    let disc = crate::arith::word::Ck::new(disc)
        .exact_div(u12)
        .ok_or(Stop::Internal("Δ not divisible by u¹²"))?;
    Ok((
        w,
        WordNext {
            a: next,
            disc,
            total: to_here,
        },
    ))
}

/// `[u, r, s, t]` of a change.
fn change_array(c: &ModelChange) -> [BigRational; 4] {
    [c.u().clone(), c.r().clone(), c.s().clone(), c.t().clone()]
}

/// `d` = the lcm of the denominators, and `[d·a1, d²·a2, d³·a3, d⁴·a4,
/// d⁶·a6]` (the change `u = 1/d`), an integral model.
fn integral_scaling(coeffs: &[BigRational; 5]) -> (BigInt, [BigInt; 5]) {
    if coeffs.iter().all(|c| c.denom().is_one()) {
        // d = 1: the model is its own integral scaling.
        return (BigInt::one(), coeffs.clone().map(|c| c.numer().clone()));
    }
    let mut d = BigInt::one();
    for c in coeffs {
        d = d.lcm(c.denom());
    }
    let weights = [1usize, 2, 3, 4, 6];
    let integral: [BigInt; 5] = std::array::from_fn(|i| {
        (&coeffs[i] * rat(&num_traits::pow(d.clone(), weights[i]))).to_integer()
    });
    (d, integral)
}

/// A record from an integral model re-expressed for the rational `coeffs`:
/// `change` is the total change from `coeffs`, and the input counts as
/// minimal at p iff it is p-integral and that change has `v_p(u) = 0`.
fn relative_to_input(
    lr: LocalReduction,
    coeffs: &[BigRational; 5],
    change: [BigRational; 4],
) -> LocalReduction {
    let p_integral = coeffs.iter().all(|c| !divisible(c.denom(), lr.prime.get()));
    let vu = crate::local::valuation_rational(&change[0], &lr.prime).unwrap_or(0);
    LocalReduction {
        minimal_at_input: p_integral && vu == 0,
        change,
        ..lr
    }
}

/// Tate's algorithm at `p` for a model with rational coefficients.
///
/// The model is first scaled to an integral one by `u = 1/d`, `d` the lcm
/// of the denominators; then [`local_reduction`] runs on it. The record's
/// `change` goes from `coeffs` to a model integral at every prime and
/// minimal at `p`; `minimal_at_input` is true iff `coeffs` is `p`-integral
/// and minimal at `p`.
///
/// # Errors
/// [`Error::SingularCurve`] when `Δ = 0`.
///
/// # Example
/// `y² = x³ − x/16` is `y² = x³ − x` with `u = 1/2`; at 2 it is type III
/// and not minimal:
/// ```
/// use isodescent::curve::{local_reduction_rational, Kodaira};
/// use isodescent::local::Prime;
/// use num_rational::BigRational;
/// let mut a = [0, 0, 0, 0, 0].map(|c: i64| BigRational::from_integer(c.into()));
/// a[3] = BigRational::new((-1).into(), 16.into());
/// let lr = local_reduction_rational(&a, &Prime::two()).unwrap();
/// assert_eq!(lr.kodaira, Kodaira::III);
/// assert!(!lr.minimal_at_input);
/// assert_eq!(lr.change[0], BigRational::new(1.into(), 2.into()));
/// ```
pub fn local_reduction_rational(coeffs: &[BigRational; 5], p: &Prime) -> Result<LocalReduction> {
    let (d, integral) = integral_scaling(coeffs);
    let lr = local_reduction(&integral, p)?;
    let [u, r, s, t] = lr.change.clone();
    let change = ModelChange::scaling(BigRational::new(BigInt::one(), d))?
        .then(&ModelChange::new(u, r, s, t)?);
    Ok(relative_to_input(lr, coeffs, change_array(&change)))
}

impl Curve {
    /// The global minimal model, the conductor and the local data at the
    /// bad primes of this curve: [`global_local_data`] on its coefficients.
    ///
    /// # Errors
    /// Those of [`global_local_data`] (budget exhaustion while factoring Δ).
    ///
    /// # Example
    /// ```
    /// use isodescent::curve::Curve;
    /// use isodescent::Budget;
    /// let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
    /// assert_eq!(e.tate_data(&mut Budget::unlimited()).unwrap().conductor, 37.into());
    /// ```
    pub fn tate_data(&self, budget: &mut Budget) -> Result<GlobalLocalData> {
        global_local_data(self.coefficients(), budget)
    }

    /// The reduced global minimal model and the change of model to it
    /// (see [`global_local_data`]).
    ///
    /// # Errors
    /// Those of [`global_local_data`].
    ///
    /// # Example
    /// `y² = x³ − 16x` has minimal model `y² = x³ − x`, reached by `u = 2`:
    /// ```
    /// use isodescent::curve::Curve;
    /// use isodescent::Budget;
    /// let e = Curve::from_ints([0, 0, 0, -16, 0]).unwrap();
    /// let (m, ch) = e.to_minimal(&mut Budget::unlimited()).unwrap();
    /// assert_eq!(m, Curve::from_ints([0, 0, 0, -1, 0]).unwrap());
    /// assert_eq!(ch.u().to_string(), "2");
    /// ```
    pub fn to_minimal(&self, budget: &mut Budget) -> Result<(Curve, ModelChange)> {
        let g = self.tate_data(budget)?;
        let [u, r, s, t] = g.change;
        Ok((
            Curve::from_bigints(g.minimal_model)?,
            ModelChange::new(u, r, s, t)?,
        ))
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    #[test]
    fn a_passed_deadline_stops_tates_algorithm() {
        // The clock is read before each prime, on the word path too.
        let a = [0, -30, 0, 3, 0].map(|c: i64| BigRational::from_integer(c.into()));
        let mut b = Budget::unlimited().with_deadline(std::time::Instant::now());
        let r = global_local_data_with(&a, &mut b, &mut KnownPrimes::default());
        assert!(matches!(r, Err(Error::BudgetExhausted { .. })));
        let mut free = Budget::unlimited();
        assert!(global_local_data_with(&a, &mut free, &mut KnownPrimes::default()).is_ok());
    }

    fn p(q: u64) -> Prime {
        Prime::small(q).unwrap()
    }

    fn brute_cubic(a: i64, b: i64, c: i64, q: i64) -> (u64, Vec<(i64, u32)>) {
        // Roots with multiplicity by trial division over F_q.
        let mut poly = vec![1i64, a, b, c];
        let mut roots: Vec<(i64, u32)> = Vec::new();
        let mut x = 0;
        while x < q && poly.len() > 1 {
            let mut quo = Vec::new();
            let mut acc = 0i64;
            for co in &poly {
                acc = (acc * x + co).rem_euclid(q);
                quo.push(acc);
            }
            let rem = quo.pop().unwrap();
            if rem == 0 {
                poly = quo;
                match roots.last_mut() {
                    Some((r, m)) if *r == x => *m += 1,
                    _ => roots.push((x, 1)),
                }
            } else {
                x += 1;
            }
        }
        (roots.len() as u64, roots)
    }

    #[test]
    fn cubic_classification_for_p_at_least_5_agrees_with_trial_division() {
        for &q in &[5i64, 7, 11, 13, 31, 97] {
            let pr = p(q as u64);
            for a in 0..q.min(13) {
                for b in 0..q.min(13) {
                    for c in 0..q.min(13) {
                        let (_, roots) = brute_cubic(a, b, c, q);
                        let got = cubic_roots(&a.into(), &b.into(), &c.into(), &pr).unwrap();
                        let want = if let Some((r, _)) = roots.iter().find(|(_, m)| *m == 3) {
                            CubicRoots::Triple((*r).into())
                        } else if let Some((r, _)) = roots.iter().find(|(_, m)| *m == 2) {
                            CubicRoots::Double((*r).into())
                        } else {
                            CubicRoots::Distinct {
                                count: roots.len() as u64,
                            }
                        };
                        assert_eq!(got, want, "T^3+{a}T^2+{b}T+{c} mod {q}");
                    }
                }
            }
        }
    }

    #[test]
    fn quadratic_roots_mod_2_and_odd_p_agree_with_trial() {
        for &q in &[2i64, 3, 5, 7, 13] {
            let pr = p(q as u64);
            for a in 1..q {
                for b in 0..q {
                    for c in 0..q {
                        let roots: Vec<i64> = (0..q)
                            .filter(|x| (a * x * x + b * x + c) % q == 0)
                            .collect();
                        let got = quadratic_roots(&a.into(), &b.into(), &c.into(), &pr).unwrap();
                        let disc_zero = if q == 2 {
                            b % 2 == 0
                        } else {
                            (b * b - 4 * a * c).rem_euclid(q) == 0
                        };
                        if disc_zero {
                            assert_eq!(roots.len(), 1);
                            assert_eq!(got, QuadRoots::Double(roots[0].into()));
                        } else {
                            assert_eq!(
                                got,
                                QuadRoots::Distinct {
                                    rational: roots.len() == 2
                                }
                            );
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn root_count_of_a_cubic_modulo_a_40_digit_prime_uses_the_gcd() {
        // (T − 1)(T − 2)(T − 3) = T³ − 6T² + 11T − 6 has three roots mod any
        // p > 3; T³ − 2 has one root when p ≡ 2 mod 3 (cubing is bijective).
        // 10^39 + 37 is prime and ≡ 2 mod 3 (sympy 1.14 nextprime).
        let q: BigInt = "1000000000000000000000000000000000000037".parse().unwrap();
        let pr = Prime::new(q).unwrap();
        let got = cubic_roots(&(-6).into(), &11.into(), &(-6).into(), &pr).unwrap();
        assert_eq!(got, CubicRoots::Distinct { count: 3 });
        let got = cubic_roots(&0.into(), &0.into(), &(-2).into(), &pr).unwrap();
        assert_eq!(got, CubicRoots::Distinct { count: 1 });
        // T²(T − 5) has the double root 0.
        let got = cubic_roots(&(-5).into(), &0.into(), &0.into(), &pr).unwrap();
        assert_eq!(got, CubicRoots::Double(0.into()));
    }
}
