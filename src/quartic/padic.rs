//! The finite places: does `y² = g(x, z)` have a point over `Q_p`?
//!
//! # Reduction to residue classes
//!
//! Scaling `(x, z, y) ↦ (λx, λz, λ²y)` by a unit `λ` does not change the
//! point, so `C(Q_p) ≠ ∅` iff `g(x, z) ∈ Q_p²` (zero allowed) for some
//! `(x : z) ∈ P¹(Q_p)`, and `P¹(Q_p)` is covered by the two *charts*
//! `{(t : 1) : t ∈ Z_p}` and `{(1 : t) : t ∈ pZ_p}`. In a chart the question
//! is whether a polynomial `f ∈ Z[t]` (`f(t) = g(t, 1)` resp. `g(1, t)`)
//! takes a square value on a *class* `t ∈ t₀ + p^k Z_p`. We write
//! `F(s) = f(t₀ + p^k s) = Σ Fᵢ sⁱ` for the class polynomial; dividing `F`
//! by an even power of `p` does not change the question, so we keep only
//! the parity of the content valuation `m = minᵢ v(Fᵢ)` and
//! `F₁ = F/p^m` (primitive).
//!
//! A zero of `g` in `P¹(Q_p)` is a simple root (`Δ ≠ 0`); near it `g` takes
//! every value of the form `g'(α)·s` with `s` small, so there are also
//! points with `g(x, z)` a *non-zero* square. Every witness this module
//! returns has `g(x, z)` a non-zero square in `Q_p`.
//!
//! # Lemma P (odd p) — common practice; cf. [MerrimanSiksekSmart96, §5], [Cremona97, §3.6]
//!
//! Let `p` be odd, `F = p^m F₁` as above and `φ = F₁ mod p ≠ 0`. For a residue
//! `r ∈ F_p` with `φ(r) ≠ 0`, every `s ≡ r (mod p)` has
//! `F(s) = p^m·(unit ≡ φ(r) mod p)`, which is a square in `Q_p` iff `m` is
//! even and `φ(r)` is a quadratic residue (a unit of `Z_p` is a square iff
//! it is a square mod `p`, by Hensel's lemma). So:
//!
//! * `m` even and some `φ(r)` a non-zero residue: **soluble**, witness
//!   `t₀ + p^k r`.
//! * otherwise only the roots `r` of `φ` can carry solutions, and the
//!   class is replaced by the classes `t₀ + p^k r + p^{k+1} Z_p`, with
//!   class polynomial `F(r + p s)`, whose content exceeds `m` (all its
//!   coefficients are divisible by `p^{m+1}`).
//!
//! # Lemma T (p = 2) — common practice; cf. [MerrimanSiksekSmart96, §5], \[Siksek95\]
//!
//! A unit of `Z_2` is a square iff it is `≡ 1 mod 8` [Serre73, II.3.3].
//! With `F = 2^m F₁`, `a₀ = F₁(0)` and `μ = min_{i≥1} v(F₁ᵢ)` (`∞` if `F₁` is
//! constant):
//!
//! * if `F(0) ≠ 0` is a square in `Q_2`: **soluble**, witness `t₀`;
//! * if `a₀` is odd and `μ ≥ 1`, then `F₁(s) ≡ a₀ (mod 2^μ)` for all
//!   `s ∈ Z_2`, so `v(F(s)) = m` for all `s`, and the class **dies** if
//!   `m` is odd, or `μ ≥ 3` (then `F₁(s) ≡ a₀ ≢ 1 mod 8`), or `μ = 2` and
//!   `a₀ ≡ 3 (mod 4)`;
//! * otherwise the class is split into `t₀ + 2^k r + 2^{k+1}Z_2`, `r ∈ {0, 1}`.
//!
//! # Termination (both cases)
//!
//! Along a chain of nested classes that never dies, either the content
//! `m` grows (odd p: at every step; p = 2: within every 4 steps, because
//! `μ` grows by at least 1 per step while `v(a₀)` stays put once `a₀` is
//! odd), so the classes shrink to a root `α ∈ Z_p` of `f`. If `f` has no
//! root in the chart, every chain dies and the search ends: **insoluble**.
//! If `α` is a root, put `δ = v(f'(α))`; for `k > δ` the class of `α` has
//! `F(s) = f'(α) p^k (s + τ)(1 + p·(…))`, so (odd p) `φ` is linear and takes
//! a non-zero residue value as soon as `m = k + δ` is even, i.e. within two
//! more steps; (p = 2) the neighbouring class at distance `2^k` reaches
//! `μ ≥ 3` within three more steps and its unit parts run through all odd
//! residues mod 8. The classes are processed breadth first, so the chain
//! of the root itself (which never dies) cannot hide these witnesses: the
//! search stops at depth about `δ + 4 ≤ v(Δ) + 4`.
//!
//! # Large primes (odd p ≥ [`ENUMERATION_LIMIT`])
//!
//! Looping over `r ∈ F_p` is replaced by three exact facts:
//!
//! * **Weil's bound** [LidlNiederreiter97, Thm. 5.41]: if `φ` is not a
//!   constant times a square in `F_p[x]` and has `d ≤ 4` distinct roots in
//!   `F̄_p`, then `|Σ_{r∈F_p} χ(φ(r))| ≤ (d − 1)√p ≤ 3√p`. The number of
//!   `r` with `φ(r)` a non-zero square is `(p − Z + Σχ)/2 ≥ (p − 4 − 3√p)/2`
//!   (`Z ≤ 4` the number of roots in `F_p`), which is positive for `p > 16`.
//!   So when `m` is even the class is **soluble**; a witness is found by
//!   testing `r = 0, 1, 2, …` in order (expected about two tries; the scan
//!   is bounded by the count above and charged to the budget).
//! * If `φ = c·h²` with `c` a residue, any `r` with `h(r) ≠ 0` is a witness
//!   (`deg h ≤ 2`, so one of `r = 0, 1, 2` works); if `c` is a non-residue,
//!   no `r` with `φ(r) ≠ 0` is, and only the roots of `h` are refined.
//! * The roots of `φ` in `F_p` come from `gcd(φ, x^p − x)` and
//!   equal-degree splitting (module `fp`), `O(log p)` polynomial products.
//!
//! So the cost at a prime `p` is polynomial in `log p` and in the size of
//! the coefficients: at most 4 classes per level, depth `≤ v_p(Δ) + 4`.

use super::form::Quartic;
use super::fp;
use crate::arith::word::word_paths_enabled;
use crate::budget::Budget;
use crate::error::Result;
use crate::local::{legendre, split_valuation, Prime};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::collections::VecDeque;

/// Odd primes below this bound are handled by looping over all residues
/// `r ∈ F_p`; from this bound on by Weil's bound and root finding (Weil's
/// argument needs `p > 16`).
pub const ENUMERATION_LIMIT: u64 = 64;

/// Which chart a class lives in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Chart {
    /// `(t : 1)`, `t ∈ Z_p`.
    Affine,
    /// `(1 : t)`, `t ∈ pZ_p`.
    Infinity,
}

/// The class `t ∈ base + scale·Z_p` of a chart, with class polynomial
/// `poly(s) = f(base + scale·s) / p^(2j)` (lowest degree first).
#[derive(Debug, Clone)]
pub(super) struct Class {
    pub(super) chart: Chart,
    pub(super) base: BigInt,
    pub(super) scale: BigInt,
    pub(super) poly: Vec<BigInt>,
}

impl Class {
    pub(super) fn witness(&self, r: &BigInt) -> (BigInt, BigInt) {
        let t = &self.base + &self.scale * r;
        match self.chart {
            Chart::Affine => (t, BigInt::one()),
            Chart::Infinity => (BigInt::one(), t),
        }
    }

    /// The class `base + scale·(r + p·Z_p)`, polynomial `F(r + p s)`.
    pub(super) fn child(&self, r: &BigInt, p: &BigInt) -> Class {
        Class {
            chart: self.chart,
            base: &self.base + &self.scale * r,
            scale: &self.scale * p,
            poly: shift_scale(&self.poly, r, p),
        }
    }
}

/// `G(s) = F(r + p s)`: Taylor shift by `r` (synthetic division), then scale
/// coefficient `i` by `pⁱ`.
fn shift_scale(f: &[BigInt], r: &BigInt, p: &BigInt) -> Vec<BigInt> {
    let mut c = f.to_vec();
    let n = c.len();
    for i in 0..n {
        for j in (i..n.saturating_sub(1)).rev() {
            let t = &c[j + 1] * r;
            c[j] += t;
        }
    }
    let mut pw = BigInt::one();
    for ci in c.iter_mut() {
        *ci *= &pw;
        pw *= p;
    }
    c
}

/// The two starting classes: `g(t, 1)` on `Z_p` and `g(1, p t)` on `Z_p`.
pub(super) fn initial_classes(q: &Quartic, p: &BigInt) -> VecDeque<Class> {
    initial_classes_of(q.coeffs(), p)
}

/// [`initial_classes`] for the coefficients `[c4, c3, c2, c1, c0]`.
pub(super) fn initial_classes_of(c: &[BigInt; 5], p: &BigInt) -> VecDeque<Class> {
    let affine: Vec<BigInt> = c.iter().rev().cloned().collect();
    let mut pw = BigInt::one();
    let infinity: Vec<BigInt> = c
        .iter()
        .map(|ci| {
            let v = ci * &pw;
            pw *= p;
            v
        })
        .collect();
    VecDeque::from(vec![
        Class {
            chart: Chart::Affine,
            base: BigInt::zero(),
            scale: BigInt::one(),
            poly: affine,
        },
        Class {
            chart: Chart::Infinity,
            base: BigInt::zero(),
            scale: p.clone(),
            poly: infinity,
        },
    ])
}

/// Content valuation `m` of a non-zero polynomial and the quotient `F/p^m`.
pub(super) fn content_split(f: &[BigInt], p: &Prime) -> (u64, Vec<BigInt>) {
    let m = f
        .iter()
        .filter_map(|c| split_valuation(c, p).map(|(v, _)| v))
        .min()
        .unwrap_or(0);
    let pm = num_traits::pow(p.get().clone(), m as usize);
    (m, f.iter().map(|c| c / &pm).collect())
}

/// Divides `F` by `p^(2⌊m/2⌋)` (keeps numbers small; the parity of the
/// content and `F₁` are unchanged).
pub(super) fn strip_even_power(f: &[BigInt], m: u64, p: &BigInt) -> Vec<BigInt> {
    let e = (m / 2) * 2;
    if e == 0 {
        return f.to_vec();
    }
    let pe = num_traits::pow(p.clone(), e as usize);
    f.iter().map(|c| c / &pe).collect()
}

/// True iff the integer `n ≠ 0` is a square in `Q_p` (exact: `v` even and
/// the unit part a residue mod `p`, or `≡ 1 mod 8` at 2).
fn is_nonzero_padic_square(n: &BigInt, p: &Prime) -> bool {
    match split_valuation(n, p) {
        None => false,
        Some((v, u)) => {
            v % 2 == 0
                && if p.is_two() {
                    u.mod_floor(&BigInt::from(8)).is_one()
                } else {
                    legendre(&u, p).map(|s| s == 1).unwrap_or(false)
                }
        }
    }
}

/// Decides `C(Q_p) ≠ ∅` for an odd prime `p` by Lemma P (small `p`) or
/// Lemma P with the large-prime facts; returns a witness `(x, z)`
/// (coprime to `p` jointly) with `g(x, z)` a non-zero square in `Q_p`, or
/// `None` when there is no `Q_p`-point.
///
/// The class tree is kept in exact integers; the work modulo `p` (values
/// of `φ`, residuosity, roots) runs in machine words when `p < 2^63`
/// ([`class_verdict_word`]) and in `BigInt` above ([`class_verdict_big`]).
/// Both decide a class the same way: the witness is the least residue `r`
/// with `φ(r)` a non-zero square (when `m` is even), otherwise the class is
/// refined at the roots of `φ`, ascending. (For `p ≥ ENUMERATION_LIMIT`
/// Weil's bound and `φ = c·h²` only tell *that* such an `r` exists; the
/// scan `r = 0, 1, 2, …` then finds the least one, so enumeration and the
/// large-prime route give the same answer.)
///
/// Budget: one unit per class and per residue tested; `16·log₂ p` per
/// polynomial exponentiation.
pub(crate) fn odd_prime_witness(
    q: &Quartic,
    p: &Prime,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    let pb = p.get();
    let word = p
        .to_u64()
        .filter(|&v| v < fp::WORD_LIMIT)
        .map(fp::WordField::new);
    if let Some(f) = word.filter(|_| word_paths_enabled()) {
        return super::padic_word::odd_prime_witness_words(q, p, f, budget);
    }
    let mut queue = initial_classes(q, pb);
    while let Some(class) = queue.pop_front() {
        if let Some(w) = odd_big_step(class, p, word, &mut queue, budget)? {
            return Ok(Some(w));
        }
    }
    Ok(None)
}

/// One class of Lemma P in `BigInt` arithmetic (the residues in words when
/// `word` is given): the witness, or the subclasses pushed onto `queue`.
pub(super) fn odd_big_step(
    class: Class,
    p: &Prime,
    word: Option<fp::WordField>,
    queue: &mut VecDeque<Class>,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    let pb = p.get();
    fp::charge(budget, 1, ODD_STAGE)?;
    let (verdict, m) = match word {
        Some(f) => {
            let (m, phi) = content_residues_word(&class.poly, p, f);
            (class_verdict_word(&phi, m % 2 == 0, f, budget)?, m)
        }
        None => {
            let (m, f1) = content_split(&class.poly, p);
            (class_verdict_big(&f1, m % 2 == 0, p, budget)?, m)
        }
    };
    match verdict {
        Verdict::Witness(r) => return Ok(Some(class.witness(&r))),
        Verdict::Refine(roots) if roots.is_empty() => {}
        Verdict::Refine(roots) => {
            let class = Class {
                poly: strip_even_power(&class.poly, m, pb),
                ..class
            };
            for r in roots {
                queue.push_back(class.child(&r, pb));
            }
        }
    }
    Ok(None)
}

pub(super) const ODD_STAGE: &str = "local solubility at an odd prime";

/// What Lemma P says about one class: a witness residue `r`, or the
/// residues (roots of `φ`, ascending) whose subclasses must be examined.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Verdict {
    Witness(BigInt),
    Refine(Vec<BigInt>),
}

/// Lemma P for one class in `BigInt` arithmetic: `f1 = F/p^m` (primitive),
/// `even` = `m` even.
pub(crate) fn class_verdict_big(
    f1: &[BigInt],
    even: bool,
    p: &Prime,
    budget: &mut Budget,
) -> Result<Verdict> {
    let pb = p.get();
    let phi = fp::reduce(f1, pb);
    if let Some(ps) = p.to_u64().filter(|&v| v < ENUMERATION_LIMIT) {
        let mut children = Vec::new();
        for r in 0..ps {
            fp::charge(budget, 1, ODD_STAGE)?;
            let r = BigInt::from(r);
            let val = fp::eval(&phi, &r, pb);
            if val.is_zero() {
                children.push(r);
            } else if even && legendre(&val, p)? == 1 {
                return Ok(Verdict::Witness(r));
            }
        }
        return Ok(Verdict::Refine(children));
    }
    if even {
        match fp::constant_times_square(&phi, pb) {
            None => {
                // Weil: a witness exists; scan r = 0, 1, 2, ….
                let mut r = BigInt::zero();
                loop {
                    fp::charge(budget, 1 + pb.bits() / 8, ODD_STAGE)?;
                    let val = fp::eval(&phi, &r, pb);
                    if !val.is_zero() && legendre(&val, p)? == 1 {
                        return Ok(Verdict::Witness(r));
                    }
                    r += 1;
                }
            }
            Some(c) if legendre(&c, p)? == 1 => {
                let mut r = BigInt::zero();
                loop {
                    fp::charge(budget, 1, ODD_STAGE)?;
                    if !fp::eval(&phi, &r, pb).is_zero() {
                        return Ok(Verdict::Witness(r));
                    }
                    r += 1;
                }
            }
            Some(_) => {}
        }
    }
    Ok(Verdict::Refine(fp::roots(&phi, pb, budget)?))
}

/// Bit `r` of entry `p` is set iff `r` is a non-zero square modulo `p`
/// (`p < 64`; entries for even or composite `p` are never read).
const SMALL_SQUARES: [u64; 64] = small_square_masks();

const fn small_square_masks() -> [u64; 64] {
    let mut out = [0u64; 64];
    let mut p = 3;
    while p < 64 {
        let mut r = 1;
        while r < p {
            out[p] |= 1 << (r * r % p);
            r += 1;
        }
        p += 2;
    }
    out
}

/// Lemma P for one class in machine words (`p < 2^63`): the twin of
/// [`class_verdict_big`], taking `φ = F₁ mod p` already reduced.
pub(crate) fn class_verdict_word(
    phi: &fp::WordPoly,
    even: bool,
    f: fp::WordField,
    budget: &mut Budget,
) -> Result<Verdict> {
    Ok(match class_verdict_u64(phi, even, f, budget)? {
        WordVerdict::Witness(r) => Verdict::Witness(BigInt::from(r)),
        WordVerdict::Refine(roots) => {
            Verdict::Refine(roots.into_iter().map(BigInt::from).collect())
        }
    })
}

/// [`Verdict`] with residues as words.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum WordVerdict {
    Witness(u64),
    Refine(Vec<u64>),
}

/// The body of [`class_verdict_word`], answering in words.
pub(crate) fn class_verdict_u64(
    phi: &fp::WordPoly,
    even: bool,
    f: fp::WordField,
    budget: &mut Budget,
) -> Result<WordVerdict> {
    let p = f.p();
    if p < ENUMERATION_LIMIT {
        let squares = SMALL_SQUARES[p as usize];
        let mut children = Vec::new();
        let mut tested = 0;
        let mut witness = None;
        // φ(r) for r = 0, 1, 2, … by forward differences: diff[k] holds
        // Δ^k φ(r) (mod p), and Δ^(deg φ) φ is constant [common practice].
        let deg = phi.coeffs().len().saturating_sub(1);
        let mut diff = [0u64; 5];
        for (j, slot) in diff.iter_mut().enumerate().take(deg + 1) {
            *slot = f.eval(phi, j as u64);
        }
        for k in 1..=deg {
            for j in (k..=deg).rev() {
                diff[j] = f.sub(diff[j], diff[j - 1]);
            }
        }
        for r in 0..p {
            tested += 1;
            let val = diff[0];
            for k in 0..deg {
                diff[k] = f.add(diff[k], diff[k + 1]);
            }
            debug_assert_eq!(val, f.eval(phi, r));
            if val == 0 {
                children.push(r);
            } else if even && squares >> val & 1 == 1 {
                witness = Some(r);
                break;
            }
        }
        fp::charge(budget, tested, ODD_STAGE)?;
        return Ok(match witness {
            Some(r) => WordVerdict::Witness(r),
            None => WordVerdict::Refine(children),
        });
    }
    if even {
        match fp::constant_times_square_word(phi, f) {
            None => {
                // Weil: a witness exists; scan r = 0, 1, 2, ….
                let per_try = 1 + u64::from(64 - p.leading_zeros()) / 8;
                let mut r = 0u64;
                loop {
                    fp::charge(budget, per_try, ODD_STAGE)?;
                    if f.is_nonzero_square(f.eval(phi, r)) {
                        return Ok(WordVerdict::Witness(r));
                    }
                    r += 1;
                }
            }
            Some(c) if f.is_nonzero_square(c) => {
                let mut r = 0u64;
                loop {
                    fp::charge(budget, 1, ODD_STAGE)?;
                    if f.eval(phi, r) != 0 {
                        return Ok(WordVerdict::Witness(r));
                    }
                    r += 1;
                }
            }
            Some(_) => {}
        }
    }
    Ok(WordVerdict::Refine(fp::roots_word(phi, f, budget)?))
}

/// `v_p(c)` for `c ≠ 0` (machine-word fast path), `None` for `c = 0`.
fn val_word(c: &BigInt, p: &Prime, pw: u64) -> Option<u64> {
    if let Some(x) = c.to_i64() {
        if x == 0 {
            return None;
        }
        let mut u = x.unsigned_abs();
        let mut v = 0;
        while u % pw == 0 {
            u /= pw;
            v += 1;
        }
        return Some(v);
    }
    match c.to_i128() {
        Some(0) => None,
        Some(mut x) => {
            let q = pw as i128;
            let mut v = 0;
            while x % q == 0 {
                x /= q;
                v += 1;
            }
            Some(v)
        }
        None => split_valuation(c, p).map(|(v, _)| v),
    }
}

/// The content valuation `m` of a non-zero class polynomial `F` and
/// `φ = (F/p^m) mod p`, without building `F/p^m` when the coefficients
/// fit in `i128`.
pub(crate) fn content_residues_word(
    f: &[BigInt],
    p: &Prime,
    field: fp::WordField,
) -> (u64, fp::WordPoly) {
    let pw = field.p();
    let m = f
        .iter()
        .filter_map(|c| val_word(c, p, pw))
        .min()
        .unwrap_or(0);
    let mut res = [0u64; 5];
    let mut pm: Option<BigInt> = None;
    for (slot, c) in res.iter_mut().zip(f) {
        *slot = if m == 0 {
            field.reduce(c)
        } else if let Some(x) = c.to_i64() {
            let q = pw as i128;
            let mut x = i128::from(x);
            for _ in 0..m {
                x /= q;
            }
            x.rem_euclid(q) as u64
        } else if let Some(mut x) = c.to_i128() {
            for _ in 0..m {
                x /= pw as i128;
            }
            x.rem_euclid(pw as i128) as u64
        } else {
            let pm = pm.get_or_insert_with(|| num_traits::pow(p.get().clone(), m as usize));
            field.reduce(&(c / &*pm))
        };
    }
    (m, fp::WordPoly::from_slice(&res[..f.len().min(5)]))
}

/// Decides `C(Q_2) ≠ ∅` by Lemma T; returns a witness `(x, z)` (not both
/// even) with `g(x, z)` a non-zero square in `Q_2`, or `None`.
///
/// Lemma T needs only `m`, the parity and residue mod 4 of `a₀ = F₁(0)`,
/// `μ` and the residue mod 8 of the unit part of `F(0)`; these are read
/// off the binary digits of the coefficients (`v₂` = trailing zeros) without
/// forming `F₁ = F/2^m`, and the subclasses use shifts instead of products.
///
/// Budget: one unit per class.
pub(crate) fn two_adic_witness(
    q: &Quartic,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    if word_paths_enabled() {
        return super::padic_word::two_adic_witness_words(q, budget);
    }
    let two = BigInt::from(2);
    let mut queue = initial_classes(q, &two);
    while let Some(class) = queue.pop_front() {
        if let Some(w) = two_adic_big_step(class, &mut queue, budget)? {
            return Ok(Some(w));
        }
    }
    Ok(None)
}

pub(super) const TWO_STAGE: &str = "local solubility at 2";

/// One class of Lemma T in `BigInt` arithmetic: the witness, or the
/// subclasses pushed onto `queue` (none when the class dies).
pub(super) fn two_adic_big_step(
    class: Class,
    queue: &mut VecDeque<Class>,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    {
        fp::charge(budget, 1, TWO_STAGE)?;
        let vals: Vec<Option<u64>> = class.poly.iter().map(|c| c.trailing_zeros()).collect();
        let m = vals.iter().flatten().copied().min().unwrap_or(0);
        // F(0) / 2^(2⌊m/2⌋) ≠ 0 a square in Q_2: v₂ even, unit ≡ 1 mod 8.
        if let Some(v0) = vals[0] {
            if v0 % 2 == 0 && unit_mod8(&class.poly[0], v0) == 1 {
                return Ok(Some(class.witness(&BigInt::zero())));
            }
        }
        // a₀ = F(0)/2^m is odd iff v₂(F(0)) = m; μ = min_{i≥1} v₂(Fᵢ) − m.
        let a0_odd = vals[0] == Some(m);
        let mu = vals[1..].iter().flatten().min().map(|&v| v - m);
        if a0_odd && mu.map_or(true, |u| u >= 1) {
            let mu = mu.unwrap_or(u64::MAX);
            let a0_mod4 = unit_mod8(&class.poly[0], m) % 4;
            if m % 2 == 1 || mu >= 3 || (mu == 2 && a0_mod4 == 3) {
                return Ok(None);
            }
        }
        let e = (m / 2) * 2;
        let poly: Vec<BigInt> = class.poly.iter().map(|c| c >> e).collect();
        for r in [false, true] {
            queue.push_back(Class {
                chart: class.chart,
                base: if r {
                    &class.base + &class.scale
                } else {
                    class.base.clone()
                },
                scale: &class.scale << 1u32,
                poly: shift_scale_two(&poly, r),
            });
        }
    }
    Ok(None)
}

/// `(c / 2^v) mod 8` for `c ≠ 0` with `2^v | c`, read from the binary
/// digits of `|c|` (two's complement of the digits for `c < 0`).
pub(super) fn unit_mod8(c: &BigInt, v: u64) -> u8 {
    let mag = c.magnitude();
    let word = (v / 64) as usize;
    let bit = v % 64;
    let mut digits = mag.iter_u64_digits().skip(word);
    let lo = digits.next().unwrap_or(0) >> bit;
    let hi = if bit > 61 {
        digits.next().unwrap_or(0) << (64 - bit)
    } else {
        0
    };
    let low3 = ((lo | hi) & 7) as u8;
    if c.is_negative() {
        (8 - low3) & 7
    } else {
        low3
    }
}

/// `G(s) = F(r + 2s)` for `r ∈ {0, 1}`: Taylor shift by `r` (additions
/// only), then coefficient `i` shifted left by `i` bits.
pub(super) fn shift_scale_two(f: &[BigInt], r: bool) -> Vec<BigInt> {
    let mut c = f.to_vec();
    let n = c.len();
    if r {
        for i in 0..n {
            for j in (i..n.saturating_sub(1)).rev() {
                let t = c[j + 1].clone();
                c[j] += t;
            }
        }
    }
    for (i, ci) in c.iter_mut().enumerate() {
        *ci <<= i;
    }
    c
}

/// `true` iff `n` is a non-zero square in `Q_p`; used by callers that want
/// the same exact test (the verifier has its own independent copy).
pub(crate) fn is_padic_square(n: &BigInt, p: &Prime) -> bool {
    !n.is_zero() && is_nonzero_padic_square(n, p)
}

/// `v_p(n)` for `n ≠ 0`, as `u32` (saturating).
pub(crate) fn val_u32(n: &BigInt, p: &Prime) -> u32 {
    split_valuation(n, p)
        .map(|(v, _)| v.min(u32::MAX as u64) as u32)
        .unwrap_or(0)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Small primes (enumeration) and large ones up to the word limit
    /// (primality checked with sympy 1.14 `isprime`).
    const PRIMES: [u64; 10] = [
        3,
        5,
        7,
        61,
        67,
        101,
        65_537,
        4_294_967_311,
        (1 << 61) - 1,
        9_223_372_036_854_775_783,
    ];

    proptest! {
        #![proptest_config(ProptestConfig { cases: 400, ..ProptestConfig::default() })]

        /// The machine-word and `BigInt` versions of one Lemma P step give
        /// the same verdict (same witness residue, same refinement list) and
        /// the same content valuation and residues.
        #[test]
        fn word_and_bigint_class_verdicts_agree(
            pi in 0usize..PRIMES.len(),
            base in proptest::collection::vec(any::<i64>(), 5),
            vals in proptest::collection::vec(0u32..4, 5),
            planted_root in any::<u64>(),
            plant in any::<bool>(),
            huge in any::<bool>(),
        ) {
            let p = PRIMES[pi];
            let prime = Prime::new(BigInt::from(p)).unwrap();
            let pb = BigInt::from(p);
            // F_i = base_i·p^vals_i (optionally times 10^30 to leave i128),
            // optionally shifted so that φ has the root planted_root.
            let mut poly: Vec<BigInt> = base
                .iter()
                .zip(&vals)
                .map(|(&c, &v)| BigInt::from(c) * num_traits::pow(pb.clone(), v as usize))
                .collect();
            if plant {
                let r = BigInt::from(planted_root % p);
                let at_r = fp::eval(&poly, &r, &pb);
                poly[0] -= at_r;
            }
            if huge {
                let big: BigInt = "1000000000000000000000000000001".parse().unwrap();
                for c in poly.iter_mut() {
                    *c *= &big;
                }
            }
            prop_assume!(poly.iter().any(|c| !c.is_zero()));
            let (m_big, f1) = content_split(&poly, &prime);
            let f = fp::WordField::new(p);
            let (m_word, phi) = content_residues_word(&poly, &prime, f);
            prop_assert_eq!(m_word, m_big);
            let reduced: Vec<u64> = f1.iter().map(|c| f.reduce(c)).collect();
            prop_assert_eq!(phi, fp::WordPoly::from_slice(&reduced));
            for even in [true, false] {
                let w = class_verdict_word(&phi, even, f, &mut Budget::unlimited()).unwrap();
                let b = class_verdict_big(&f1, even, &prime, &mut Budget::unlimited()).unwrap();
                prop_assert_eq!(w, b);
            }
        }
    }

    #[test]
    fn the_small_square_table_matches_eulers_criterion() {
        // Euler's criterion [Serre73, I.3.2] (section from memory): r ≠ 0 is a square mod p iff
        // r^((p−1)/2) ≡ 1.
        for p in (3u64..64)
            .step_by(2)
            .filter(|&p| (2..p).all(|d| p % d != 0))
        {
            let f = fp::WordField::new(p);
            for r in 1..p {
                let euler = f.pow(r, (p - 1) / 2) == 1;
                assert_eq!(
                    SMALL_SQUARES[p as usize] >> r & 1 == 1,
                    euler,
                    "{r} mod {p}"
                );
            }
            assert_eq!(SMALL_SQUARES[p as usize] & 1, 0);
        }
    }
}
