//! Minimisation of integral binary quartics at a prime.
//!
//! A model `y² = g(x, z)` of a genus-one curve with `g` integral may be
//! replaced by `y² = g′(x, z)` with
//!
//! ```text
//! g′(x, z) = g(T·(x, z)) / ν²,   T ∈ M₂(Z), det T ≠ 0, ν ∈ Z,
//! ```
//!
//! whenever `g′` is again integral: `(x, z, y) ↦ (T·(x, z), ν·y)` maps the
//! points of the new model to those of the old one, and `T⁻¹` (over `Q`)
//! maps them back. The invariants scale as `I(g′) = (det T/ν)⁴·I(g)` and
//! `J(g′) = (det T/ν)⁶·J(g)` (they are invariants of weight 4 and 6 under
//! `g ↦ g∘T`, and homogeneous of degree 2 and 3 in the coefficients;
//! common practice). A model is *non-minimal at p* when such a `g′` exists
//! with `det T/ν = 1/p`, so that `(I, J)` shrink by `(p⁴, p⁶)`
//! (Birch and Swinnerton-Dyer, *Notes on elliptic curves I*, J. reine
//! angew. Math. 212 (1963); Cremona and Stoll, *Minimal models for
//! 2-coverings of elliptic curves*, LMS J. Comput. Math. 5 (2002); both
//! from memory: the search below is derived here, not copied from them).
//!
//! # Which `T` to try (Lemma M)
//!
//! Let `g*` be an integral model with `I(g*) = I(g)/p⁴`, so
//! `g = p^{2m}·g*(N)` for some `N ∈ GL₂(Q_p)`. By the Smith normal form
//! `N = V·diag(p^α, p^β)·U` with `U, V ∈ GL₂(Z_p)`, and after moving `U` into
//! `g` and `V` into `g*` (both keep integrality and invariants) and
//! scaling, `h = g∘U⁻¹` and `h* = g*∘V` satisfy, with `δ = |β − α|` and
//! after a swap `x ↔ z` if needed,
//!
//! ```text
//! h*(x, z) = h(p^δ x, z) / p^{2δ+2}.
//! ```
//!
//! (The exponent: `det = p^δ` and `I(h*) = I(h)/p⁴` force
//! `ν = p^{δ+1}`.) For `δ = 0` this says `p² | content(g)`. For
//! `δ ≥ 1` write the substitution `x ↦ p^δ x` as `δ` steps `x ↦ p x`: the
//! intermediate quartics `h(p^j x, z)/p^{2j}` (`j < δ`) are integral,
//! because `h*` integral gives `v_p(c_i) ≥ 2δ + 2 − δ·i` for the
//! coefficient `c_i` of `x^i z^{4−i}` of `h`, and `2δ + 2 − δ i ≥ 2j − j i`
//! for `i ≤ 1`, `j ≤ δ` (for `i ≥ 2` the bound `2j − ij ≤ 0` is empty).
//! Back on `g`, the composite `U⁻¹·diag(p^δ, 1)` is a chain of `δ` steps,
//! each an index-`p` sublattice of the previous one, never returning to the
//! lattice before (the chain of a cyclic sublattice of index `p^δ`): in the
//! current coordinates each step is `(x, z) ↦ (p x + r z, z)` with
//! `0 ≤ r < p`, or `(x, z) ↦ (x, p z)`. So:
//!
//! *If `g` is non-minimal at `p`, then either `p² | content(g)`, or there
//! is a chain of such steps, each followed by division by `p²` (the
//! quartic stays integral), the last by `p⁴`.* Each step needs the
//! quartic before it to vanish mod `p` (after removing a factor `p` from
//! its content) at the point the step contracts, `(r : 1)` or `(1 : 0)`,
//! so only the roots mod `p` are tried: at most 4 and `∞` at the first
//! step, at most 4 afterwards (the step `(x, p z)` after `(p x + r z, z)`,
//! and `(p x, z)` after `(x, p z)`, return to the lattice before and are
//! skipped).
//!
//! # Termination and cost
//!
//! Every successful reduction lowers `v_p(I)` by exactly 4 (checked in
//! exact arithmetic, with `g′·ν² = g∘T` checked too), and reductions are
//! attempted only while `v_p(I) ≥ 4` and `v_p(J) ≥ 6`, so there are at most
//! `v_p(I)/4` of them. Each attempt is a depth-first search of the chains
//! of Lemma M, at most [`MAX_DEPTH`] steps deep and [`MAX_NODES`] quartics
//! wide, every quartic charged to the budget. When the search finds
//! nothing the quartic is returned as it is: minimisation is an aid to the
//! point search, never part of a proof. The same steps are used at `p = 2`
//! and `p = 3`; there the search stays within the models `y² = g` with `g`
//! integral (no `y² + h(x, z)·y` forms), which is all the point search
//! needs.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

use super::fp;
use super::Quartic;
use crate::budget::Budget;
use crate::error::{Error, Result};

/// Longest chain of steps tried in one reduction.
pub(crate) const MAX_DEPTH: usize = 24;

/// Most quartics visited in one reduction attempt.
pub(crate) const MAX_NODES: usize = 256;

/// Primes below this are searched for roots by trying every residue.
const SMALL_PRIME: u64 = 64;

/// A 2×2 integer matrix, rows `[[α, β], [γ, δ]]`, acting on columns
/// `(x, z)`.
pub(crate) type Mat2 = [[BigInt; 2]; 2];

/// The result of [`minimise`]: `coeffs = g(frame·(x, z))/scale²`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct Minimised {
    /// `[c4, c3, c2, c1, c0]`, the coefficient of `x^{4−i} z^i` at index `i`.
    pub(crate) coeffs: [BigInt; 5],
    /// `(x, z)_old = frame·(x, z)_new`.
    pub(crate) frame: Mat2,
    /// `ν` with `g_new = g_old∘frame/ν²`.
    pub(crate) scale: BigInt,
}

fn identity() -> Mat2 {
    [
        [BigInt::one(), BigInt::zero()],
        [BigInt::zero(), BigInt::one()],
    ]
}

fn mat_mul(a: &Mat2, b: &Mat2) -> Mat2 {
    let e = |i: usize, j: usize| &a[i][0] * &b[0][j] + &a[i][1] * &b[1][j];
    [[e(0, 0), e(0, 1)], [e(1, 0), e(1, 1)]]
}

/// The product of two polynomials given by their coefficient lists.
pub(crate) fn poly_mul(p: &[BigInt], q: &[BigInt]) -> Vec<BigInt> {
    let mut out = vec![BigInt::zero(); p.len() + q.len() - 1];
    for (i, a) in p.iter().enumerate() {
        for (j, b) in q.iter().enumerate() {
            out[i + j] += a * b;
        }
    }
    out
}

/// `g(α x + β z, γ x + δ z)` (index `i` is the coefficient of `x^{4−i} z^i`).
pub(crate) fn substitute(g: &[BigInt; 5], t: &Mat2) -> [BigInt; 5] {
    let l1 = [t[0][0].clone(), t[0][1].clone()];
    let l2 = [t[1][0].clone(), t[1][1].clone()];
    let mut out: [BigInt; 5] = Default::default();
    for (i, c) in g.iter().enumerate() {
        if c.is_zero() {
            continue;
        }
        let mut p = vec![c.clone()];
        for _ in 0..(4 - i) {
            p = poly_mul(&p, &l1);
        }
        for _ in 0..i {
            p = poly_mul(&p, &l2);
        }
        for (k, x) in p.into_iter().enumerate() {
            out[k] += x;
        }
    }
    out
}

/// `v_p(n)` for `n ≠ 0`, capped at `cap`; `cap` for `n = 0`.
fn val(n: &BigInt, p: &BigInt, cap: u32) -> u32 {
    if n.is_zero() {
        return cap;
    }
    let mut v = 0;
    let mut m = n.clone();
    while v < cap && m.is_multiple_of(p) {
        m /= p;
        v += 1;
    }
    v
}

fn content_val(g: &[BigInt; 5], p: &BigInt, cap: u32) -> u32 {
    g.iter().map(|c| val(c, p, cap)).min().unwrap_or(cap)
}

/// Words of the largest coefficient (at least 1), for charging.
fn words(g: &[BigInt; 5]) -> u64 {
    g.iter().map(|c| c.bits() / 64 + 1).max().unwrap_or(1)
}

/// The steps worth trying from `h` (content valuation `v ≤ 1`): the
/// finite roots `r` of `h/p^v` mod `p` as `(p x + r z, z)`, and `(x, p z)`
/// when `(1 : 0)` is a root; `skip` is the step back to the lattice before.
fn candidate_steps(
    h: &[BigInt; 5],
    p: &BigInt,
    v: u32,
    skip: Option<&Mat2>,
    budget: &mut Budget,
) -> Result<Vec<Mat2>> {
    let pv = num_traits::pow(p.clone(), v as usize);
    let red: Vec<BigInt> = h.iter().map(|c| c / &pv).collect();
    // Lowest degree first for the F_p routines: G(t) = h(t, 1).
    let low_first: Vec<BigInt> = red.iter().rev().cloned().collect();
    let phi = fp::reduce(&low_first, p);
    let mut roots: Vec<BigInt> = Vec::new();
    if phi.len() > 1 {
        if p < &BigInt::from(SMALL_PRIME) {
            let mut r = BigInt::zero();
            while &r < p {
                if fp::eval(&phi, &r, p).is_zero() {
                    roots.push(r.clone());
                }
                r += 1;
            }
        } else {
            roots = fp::roots(&phi, p, budget)?;
        }
    }
    let mut out: Vec<Mat2> = roots
        .into_iter()
        .map(|r| [[p.clone(), r], [BigInt::zero(), BigInt::one()]])
        .collect();
    if red[0].is_multiple_of(p) {
        out.push([[BigInt::one(), BigInt::zero()], [BigInt::zero(), p.clone()]]);
    }
    if let Some(s) = skip {
        out.retain(|t| t != s);
    }
    Ok(out)
}

/// A quartic of the search with its frame and scale so far, its depth and
/// the step back to the lattice before it.
type Node = ([BigInt; 5], Mat2, BigInt, usize, Option<Mat2>);

/// One reduction at `p` by the chains of Lemma M: `Some((g′, T, ν))` with
/// `g′ = g∘T/ν²` integral and `I(g′) = I(g)/p⁴`, or `None`.
fn reduce_once(g: &[BigInt; 5], p: &BigInt, budget: &mut Budget) -> Result<Option<Minimised>> {
    let p2 = p * p;
    let p4 = &p2 * &p2;
    // Depth-first: (quartic, frame so far, scale so far, depth, step back).
    let mut stack: Vec<Node> = vec![(g.clone(), identity(), BigInt::one(), 0, None)];
    let mut nodes = 0usize;
    while let Some((h, frame, scale, depth, skip)) = stack.pop() {
        nodes += 1;
        if nodes > MAX_NODES {
            return Ok(None);
        }
        fp::charge(budget, 20 * words(&h), "minimising a 4-covering")?;
        let v = content_val(&h, p, 2);
        if v >= 2 {
            return Ok(Some(Minimised {
                coeffs: h.map(|c| c / &p2),
                frame,
                scale: scale * p,
            }));
        }
        if depth >= MAX_DEPTH {
            continue;
        }
        let steps = candidate_steps(&h, p, v, skip.as_ref(), budget)?;
        for t in steps.into_iter().rev() {
            let w = substitute(&h, &t);
            fp::charge(budget, 50 * words(&w), "minimising a 4-covering")?;
            let vw = content_val(&w, p, 4);
            let next_frame = mat_mul(&frame, &t);
            if vw >= 4 {
                return Ok(Some(Minimised {
                    coeffs: w.map(|c| c / &p4),
                    frame: next_frame,
                    scale: scale * &p2,
                }));
            }
            if vw >= 2 {
                // The step back from here: (x, p z) after (p x + r z, z),
                // (p x, z) after (x, p z).
                let back = if t[1][1] == *p {
                    [[p.clone(), BigInt::zero()], [BigInt::zero(), BigInt::one()]]
                } else {
                    [[BigInt::one(), BigInt::zero()], [BigInt::zero(), p.clone()]]
                };
                stack.push((
                    w.map(|c| c / &p2),
                    next_frame,
                    &scale * p,
                    depth + 1,
                    Some(back),
                ));
            }
        }
    }
    Ok(None)
}

/// Minimises the integral quartic `g` (non-zero discriminant) at each of
/// `primes`, by the reductions of Lemma M (module docs) while
/// `v_p(I) ≥ 4` and `v_p(J) ≥ 6`. Every reduction is checked exactly:
/// `g′·ν² = g∘T` and `(I, J)(g′)·(p⁴, p⁶) = (I, J)(g)`.
///
/// # Errors
/// [`Error::BudgetExhausted`] when `budget` runs out; [`Error::Internal`]
/// when a check fails (a bug); errors of [`Quartic::new`] for a zero
/// discriminant.
pub(crate) fn minimise(
    g: &[BigInt; 5],
    primes: &[BigInt],
    budget: &mut Budget,
) -> Result<Minimised> {
    let mut cur = Quartic::new(g.clone())?;
    let mut frame = identity();
    let mut scale = BigInt::one();
    for p in primes {
        if p <= &BigInt::one() {
            continue;
        }
        loop {
            let (i, j) = (cur.invariant_i(), cur.invariant_j());
            if val(&i, p, 4) < 4 || val(&j, p, 6) < 6 {
                break;
            }
            let Some(step) = reduce_once(cur.coeffs(), p, budget)? else {
                break;
            };
            let lhs: Vec<BigInt> = step
                .coeffs
                .iter()
                .map(|c| c * &step.scale * &step.scale)
                .collect();
            let next = Quartic::new(step.coeffs.clone())?;
            let p4 = num_traits::pow(p.clone(), 4);
            let p6 = num_traits::pow(p.clone(), 6);
            if lhs[..] != substitute(cur.coeffs(), &step.frame)[..]
                || next.invariant_i() * &p4 != i
                || next.invariant_j() * &p6 != j
            {
                return Err(Error::Internal {
                    check: format!("minimising a quartic at {p}: the invariants do not scale"),
                });
            }
            frame = mat_mul(&frame, &step.frame);
            scale *= &step.scale;
            cur = next;
        }
    }
    Ok(Minimised {
        coeffs: cur.coeffs().clone(),
        frame,
        scale,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn big(v: [i64; 5]) -> [BigInt; 5] {
        v.map(BigInt::from)
    }

    #[test]
    fn a_quartic_blown_up_at_a_prime_comes_back_down() {
        // g = x⁴ + x z³ − 2z⁴ (non-zero discriminant); h = g∘T with
        // T = [[1, 3], [0, 25]] has invariants larger by (25⁴, 25⁶) (weight
        // 4 and 6 under substitution, common practice), so two reductions
        // at 5 must bring them back exactly, and g′·ν² = h∘frame.
        let g = big([1, 0, 0, 1, -2]);
        let q = Quartic::new(g.clone()).unwrap();
        let p = BigInt::from(5);
        let t = [
            [BigInt::one(), BigInt::from(3)],
            [BigInt::zero(), BigInt::from(25)],
        ];
        let h = substitute(&g, &t);
        let qh = Quartic::new(h.clone()).unwrap();
        assert_eq!(qh.invariant_i(), q.invariant_i() * BigInt::from(5).pow(8));
        assert_eq!(qh.invariant_j(), q.invariant_j() * BigInt::from(5).pow(12));
        let m = minimise(&h, std::slice::from_ref(&p), &mut Budget::unlimited()).unwrap();
        let qm = Quartic::new(m.coeffs.clone()).unwrap();
        assert_eq!(qm.invariant_i(), q.invariant_i());
        assert_eq!(qm.invariant_j(), q.invariant_j());
        let back = substitute(&h, &m.frame);
        for (c, b) in m.coeffs.iter().zip(back.iter()) {
            assert_eq!(c * &m.scale * &m.scale, *b);
        }
    }

    #[test]
    fn a_covering_of_the_deep_search_comes_down_to_the_curve_invariants() {
        // A 4-covering the second descent built for y² = x³ − 73x² − 13x
        // (class d = −1, twist λ = −5381, after reduction): its invariants
        // are those of the curve, c₄ = 16(a² − 3b) = 85888 and
        // 2c₆ = 2·32a(9b − 2a²) = 50340800 (common practice for this
        // model), times (5381⁴, 5381⁶). One reduction at 5381 must give
        // exactly (c₄, 2c₆), i.e. a model of the same curve with minimal
        // invariants at 5381.
        let g = big([-3697909296, 1033969912, 4189775744, -542103464, -1189249429]);
        let q = Quartic::new(g.clone()).unwrap();
        let p = BigInt::from(5381);
        let (c4, c6x2) = (BigInt::from(85888), BigInt::from(50340800));
        assert_eq!(q.invariant_i(), &c4 * p.pow(4));
        assert_eq!(q.invariant_j(), &c6x2 * p.pow(6));
        let m = minimise(&g, std::slice::from_ref(&p), &mut Budget::unlimited()).unwrap();
        let qm = Quartic::new(m.coeffs.clone()).unwrap();
        assert_eq!((qm.invariant_i(), qm.invariant_j()), (c4, c6x2));
        let back = substitute(&g, &m.frame);
        for (c, b) in m.coeffs.iter().zip(back.iter()) {
            assert_eq!(c * &m.scale * &m.scale, *b);
        }
        assert!(m.coeffs.iter().all(|c| c.bits() < 64));
    }

    #[test]
    fn a_minimal_quartic_is_left_alone() {
        // x⁴ + x z³ − 2z⁴ at 2: I = 12·(−2) = −24, v_2(I) = 3 < 4.
        let g = big([1, 0, 0, 1, -2]);
        let m = minimise(&g, &[BigInt::from(2)], &mut Budget::unlimited()).unwrap();
        assert_eq!(m.coeffs, g);
        assert_eq!(m.scale, BigInt::one());
    }
}
