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
//!
//! # Machine words
//!
//! For `p < 2^63` ([`WORD_LIMIT`]) the same steps run on `u64` residues
//! (products in `u64` for `p < 2^32`, else in `u128`) and on polynomials
//! held in fixed arrays, with no allocation inside the exponentiations:
//! [`WordField`], [`roots_word`], [`constant_times_square_word`], and
//! Tonelli–Shanks [`sqrt_word`]. The word functions follow the `BigInt`
//! ones step for step (same shifts `δ`, roots sorted), so both return the
//! same roots; the property tests below compare them on random and on
//! planted inputs at primes from 67 to `2^63 − 25`.

use crate::arith::word::sqrt_mod_with;
use crate::budget::Budget;
use crate::error::{Error, Result};
use crate::local::legendre_u64;
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, ToPrimitive, Zero};

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

/// `a⁻¹ mod p` (0 for `p | a`, as Fermat's `a^(p−2)` gives).
fn inv(a: &BigInt, p: &BigInt) -> BigInt {
    crate::local::sqrt::mod_inverse(a, p).unwrap_or_default()
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

// ------------------------------------------------------------ machine words
//
// The same algorithms for `p < 2^63`, with residues in `u64`, products in
// `u64` (`p < 2^32`) or `u128`, and polynomials of degree `≤ 6` in fixed
// arrays (no allocation). Every function below mirrors one above step for
// step (same shifts `δ`, same order of roots), so both paths return the
// same answers; the unit tests compare them on random inputs.

/// The largest prime handled by the machine-word path (exclusive bound):
/// below `2^63` a sum of two residues fits in a `u64`.
pub(crate) const WORD_LIMIT: u64 = 1 << 63;

/// `F_p` for an odd prime `p < 2^63`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct WordField {
    p: u64,
}

impl WordField {
    /// The field for `p` (the caller promises `p` odd prime `< 2^63`).
    pub(crate) fn new(p: u64) -> WordField {
        debug_assert!(p % 2 == 1 && p < WORD_LIMIT);
        WordField { p }
    }

    /// The characteristic.
    pub(crate) fn p(self) -> u64 {
        self.p
    }

    #[inline]
    pub(crate) fn mul(self, a: u64, b: u64) -> u64 {
        if self.p >> 32 == 0 {
            a * b % self.p
        } else {
            ((a as u128 * b as u128) % self.p as u128) as u64
        }
    }

    #[inline]
    pub(crate) fn add(self, a: u64, b: u64) -> u64 {
        let s = a + b;
        if s >= self.p {
            s - self.p
        } else {
            s
        }
    }

    #[inline]
    pub(crate) fn sub(self, a: u64, b: u64) -> u64 {
        if a >= b {
            a - b
        } else {
            a + (self.p - b)
        }
    }

    pub(crate) fn pow(self, mut a: u64, mut e: u64) -> u64 {
        let mut acc = 1 % self.p;
        while e > 0 {
            if e & 1 == 1 {
                acc = self.mul(acc, a);
            }
            a = self.mul(a, a);
            e >>= 1;
        }
        acc
    }

    /// `a⁻¹` for `a ≢ 0`, and `0` for `a ≡ 0` (as Fermat's `a^(p−2)`
    /// gives), by the extended Euclidean algorithm (the inverse is unique,
    /// so this is the value Fermat's little theorem gives).
    pub(crate) fn inv(self, a: u64) -> u64 {
        crate::arith::word::inv_mod(a, self.p).unwrap_or(0)
    }

    /// `c mod p` for an integer `c`.
    pub(crate) fn reduce(self, c: &BigInt) -> u64 {
        if let Some(v) = c.to_i64() {
            let r = v.unsigned_abs() % self.p;
            return if v < 0 && r != 0 { self.p - r } else { r };
        }
        match c.to_i128() {
            Some(v) => v.rem_euclid(self.p as i128) as u64,
            None => c.mod_floor(&BigInt::from(self.p)).to_u64().unwrap_or(0),
        }
    }

    /// True iff `a` is a non-zero square (Jacobi symbol in machine words).
    #[inline]
    pub(crate) fn is_nonzero_square(self, a: u64) -> bool {
        a != 0 && legendre_u64(a, self.p) == 1
    }

    /// `φ(r)`.
    #[inline]
    pub(crate) fn eval(self, phi: &WordPoly, r: u64) -> u64 {
        let mut acc = 0;
        for &c in phi.coeffs().iter().rev() {
            acc = self.add(self.mul(acc, r), c);
        }
        acc
    }
}

/// A polynomial over `F_p` of degree `≤ 6`, lowest degree first, entries in
/// `[0, p)`, trimmed (`len` = degree + 1; `0` for the zero polynomial).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct WordPoly {
    c: [u64; 7],
    len: usize,
}

impl WordPoly {
    const ZERO: WordPoly = WordPoly { c: [0; 7], len: 0 };

    /// From residues (at most 7), trimming trailing zeros.
    pub(crate) fn from_slice(a: &[u64]) -> WordPoly {
        let mut out = WordPoly::ZERO;
        out.c[..a.len()].copy_from_slice(a);
        out.len = a.len();
        out.trim();
        out
    }

    fn trim(&mut self) {
        while self.len > 0 && self.c[self.len - 1] == 0 {
            self.len -= 1;
        }
    }

    /// The coefficients, lowest degree first.
    pub(crate) fn coeffs(&self) -> &[u64] {
        &self.c[..self.len]
    }

    fn lead(&self) -> u64 {
        self.c[self.len - 1]
    }
}

fn wmonic(a: WordPoly, f: WordField) -> WordPoly {
    if a.len == 0 || a.lead() == 1 {
        return a;
    }
    let li = f.inv(a.lead());
    let mut out = a;
    for c in out.c[..out.len].iter_mut() {
        *c = f.mul(*c, li);
    }
    out
}

/// Remainder of `a` modulo non-zero `m`.
fn wrem(a: &WordPoly, m: &WordPoly, f: WordField) -> WordPoly {
    let dm = m.len - 1;
    let li = if m.lead() == 1 { 1 } else { f.inv(m.lead()) };
    let mut r = *a;
    while r.len > dm {
        let dr = r.len - 1;
        let q = f.mul(r.c[dr], li);
        if q != 0 {
            for i in 0..=dm {
                let idx = dr - dm + i;
                r.c[idx] = f.sub(r.c[idx], f.mul(q, m.c[i]));
            }
        }
        r.len -= 1;
        r.trim();
    }
    r
}

/// Exact quotient `a / m`.
fn wquo(a: &WordPoly, m: &WordPoly, f: WordField) -> WordPoly {
    let dm = m.len - 1;
    let li = f.inv(m.lead());
    let mut r = *a;
    let mut q = WordPoly::ZERO;
    q.len = a.len.saturating_sub(dm);
    while r.len > dm {
        let dr = r.len - 1;
        let c = f.mul(r.c[dr], li);
        for i in 0..=dm {
            let idx = dr - dm + i;
            r.c[idx] = f.sub(r.c[idx], f.mul(c, m.c[i]));
        }
        q.c[dr - dm] = c;
        r.len -= 1;
    }
    q.trim();
    q
}

/// `a·b` (degrees must add up to at most 6).
fn wmul(a: &WordPoly, b: &WordPoly, f: WordField) -> WordPoly {
    if a.len == 0 || b.len == 0 {
        return WordPoly::ZERO;
    }
    let mut out = WordPoly::ZERO;
    out.len = a.len + b.len - 1;
    for i in 0..a.len {
        for j in 0..b.len {
            out.c[i + j] = f.add(out.c[i + j], f.mul(a.c[i], b.c[j]));
        }
    }
    out.trim();
    out
}

fn wsub(a: &WordPoly, b: &WordPoly, f: WordField) -> WordPoly {
    let mut out = WordPoly::ZERO;
    out.len = a.len.max(b.len);
    for i in 0..out.len {
        let x = if i < a.len { a.c[i] } else { 0 };
        let y = if i < b.len { b.c[i] } else { 0 };
        out.c[i] = f.sub(x, y);
    }
    out.trim();
    out
}

/// Monic gcd.
fn wgcd(a: &WordPoly, b: &WordPoly, f: WordField) -> WordPoly {
    let (mut x, mut y) = (*a, *b);
    while y.len > 0 {
        let r = wrem(&x, &y, f);
        x = y;
        y = r;
    }
    wmonic(x, f)
}

/// `base^e mod m` (`deg m ≤ 4`), charging `16·bits(e)` units like [`powmod`].
fn wpowmod(
    base: &WordPoly,
    e: u64,
    m: &WordPoly,
    f: WordField,
    budget: &mut Budget,
) -> Result<WordPoly> {
    let bits = u64::from(64 - e.leading_zeros());
    charge(
        budget,
        16 * bits.max(1),
        "local solubility (polynomial powering mod p)",
    )?;
    let b = wrem(base, m, f);
    let mut acc = wrem(&WordPoly::from_slice(&[1]), m, f);
    for i in (0..bits).rev() {
        acc = wrem(&wmul(&acc, &acc, f), m, f);
        if e >> i & 1 == 1 {
            acc = wrem(&wmul(&acc, &b, f), m, f);
        }
    }
    Ok(acc)
}

/// The distinct roots of `φ` (non-zero, `deg ≤ 4`) in `F_p`, ascending:
/// the machine-word twin of [`roots`].
///
/// Linear and quadratic `φ`, and even quartics `c₄x⁴ + c₂x² + c₀` (the
/// shape of every class polynomial at the top of the tree of a 2-isogeny
/// space), are solved by formula: `−c₀/c₁`; `(−c₁ ± √D)/(2c₂)` with
/// `D = c₁² − 4c₂c₀`; and `x = ±√w` for the roots `w` of `c₄w² + c₂w + c₀`
/// (square roots by Tonelli–Shanks, [`sqrt_word`]). The set of distinct roots in
/// `F_p` does not depend on how it is found, so these give the same list
/// as the general route. The budget is charged exactly as the general
/// route charges it (see [`charge_like_general_route`]), so a budget runs
/// out at the same point on both.
pub(crate) fn roots_word(phi: &WordPoly, f: WordField, budget: &mut Budget) -> Result<Vec<u64>> {
    if phi.len <= 1 {
        return Ok(Vec::new());
    }
    if let Some(found) = roots_by_formula(phi, f) {
        charge_like_general_route(found.as_slice(), f, budget)?;
        return Ok(found.as_slice().to_vec());
    }
    roots_word_general(phi, f, budget)
}

/// At most four residues, ascending and distinct.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct RootSet {
    r: [u64; 4],
    len: usize,
}

impl RootSet {
    const EMPTY: RootSet = RootSet { r: [0; 4], len: 0 };

    fn insert(&mut self, x: u64) {
        if self.len < 4 && !self.as_slice().contains(&x) {
            self.r[self.len] = x;
            self.len += 1;
        }
    }

    fn as_slice(&self) -> &[u64] {
        &self.r[..self.len]
    }

    fn sort(&mut self) {
        self.r[..self.len].sort_unstable();
    }
}

/// The roots of `c₂x² + c₁x + c₀` (`c₂ ≠ 0`) in `F_p`, added to `out`.
fn quadratic_roots(c0: u64, c1: u64, c2: u64, f: WordField, out: &mut RootSet) {
    let four = 4 % f.p();
    let disc = f.sub(f.mul(c1, c1), f.mul(four, f.mul(c2, c0)));
    let Some(s) = sqrt_word(disc, f) else {
        return;
    };
    let inv2a = f.inv(f.add(c2, c2));
    out.insert(f.mul(f.sub(s, c1), inv2a));
    out.insert(f.mul(f.sub(f.sub(0, c1), s), inv2a));
}

/// The distinct roots of `φ` in `F_p` when `φ` is linear, quadratic or an
/// even quartic (`c₃ = c₁ = 0`), ascending; `None` for other shapes.
fn roots_by_formula(phi: &WordPoly, f: WordField) -> Option<RootSet> {
    let c = &phi.c;
    let mut out = RootSet::EMPTY;
    match phi.len {
        2 => out.insert(f.mul(f.sub(0, c[0]), f.inv(c[1]))),
        3 => quadratic_roots(c[0], c[1], c[2], f, &mut out),
        5 if c[1] == 0 && c[3] == 0 => {
            let mut squares = RootSet::EMPTY;
            quadratic_roots(c[0], c[2], c[4], f, &mut squares);
            for &w in squares.as_slice() {
                if let Some(s) = sqrt_word(w, f) {
                    out.insert(s);
                    out.insert(f.sub(0, s));
                }
            }
        }
        _ => return None,
    }
    out.sort();
    Some(out)
}

/// Charges `budget` as [`roots_word_general`] does for a polynomial whose
/// distinct roots in `F_p` are `found`: `16·bits(p)` for `x^p mod φ`, then,
/// in the recursion of [`wsplit`], `16·bits((p − 1)/2)` for every shift
/// `δ = 0, 1, 2, …` tried on a set `R` of at least two roots, until
/// `H = {ρ ∈ R : ρ + δ a non-zero square}` is neither empty nor all of `R`
/// (this is exactly when `gcd(∏(x − ρ), (x + δ)^((p−1)/2) − 1)` is a
/// proper factor); then `H` and `R \ H` are split in that order.
fn charge_like_general_route(found: &[u64], f: WordField, budget: &mut Budget) -> Result<()> {
    charge_power(f.p(), budget)?;
    charge_split(found, f, budget)
}

fn charge_power(e: u64, budget: &mut Budget) -> Result<()> {
    let bits = u64::from(64 - e.leading_zeros());
    charge(
        budget,
        16 * bits.max(1),
        "local solubility (polynomial powering mod p)",
    )
}

fn charge_split(set: &[u64], f: WordField, budget: &mut Budget) -> Result<()> {
    if set.len() < 2 {
        return Ok(());
    }
    let half = (f.p() - 1) / 2;
    let mut delta = 0u64;
    loop {
        charge_power(half, budget)?;
        let shift = delta % f.p();
        let mut inside = RootSet::EMPTY;
        let mut outside = RootSet::EMPTY;
        for &rho in set {
            if f.is_nonzero_square(f.add(rho, shift)) {
                inside.insert(rho);
            } else {
                outside.insert(rho);
            }
        }
        if inside.len > 0 && inside.len < set.len() {
            charge_split(inside.as_slice(), f, budget)?;
            return charge_split(outside.as_slice(), f, budget);
        }
        delta += 1;
    }
}

/// [`roots_word`] by the general route for every shape: `gcd(φ, x^p − x)`
/// and equal-degree splitting.
fn roots_word_general(phi: &WordPoly, f: WordField, budget: &mut Budget) -> Result<Vec<u64>> {
    if phi.len <= 1 {
        return Ok(Vec::new());
    }
    let g = wmonic(*phi, f);
    let x = WordPoly::from_slice(&[0, 1]);
    let xp = wpowmod(&x, f.p(), &g, f, budget)?;
    let r = wgcd(&g, &wsub(&xp, &x, f), f);
    let mut out = Vec::with_capacity(4);
    wsplit(&r, f, budget, &mut out)?;
    out.sort_unstable();
    Ok(out)
}

fn wsplit(r: &WordPoly, f: WordField, budget: &mut Budget, out: &mut Vec<u64>) -> Result<()> {
    match r.len {
        0 | 1 => return Ok(()),
        2 => {
            out.push(f.sub(0, r.c[0]));
            return Ok(());
        }
        _ => {}
    }
    let half = (f.p() - 1) / 2;
    let one = WordPoly::from_slice(&[1]);
    let mut delta = 0u64;
    loop {
        let shifted = WordPoly::from_slice(&[delta % f.p(), 1]);
        let pw = wpowmod(&shifted, half, r, f, budget)?;
        let h = wgcd(r, &wsub(&pw, &one, f), f);
        if h.len > 1 && h.len < r.len {
            let other = wmonic(wquo(r, &h, f), f);
            wsplit(&h, f, budget, out)?;
            return wsplit(&other, f, budget, out);
        }
        delta += 1;
    }
}

/// The machine-word twin of [`constant_times_square`].
pub(crate) fn constant_times_square_word(phi: &WordPoly, f: WordField) -> Option<u64> {
    if phi.len == 0 {
        return None;
    }
    let lc = phi.lead();
    let psi = wmonic(*phi, f);
    let two_inv = f.inv(2);
    match psi.len - 1 {
        0 => Some(lc),
        2 => {
            let disc = f.sub(f.mul(psi.c[1], psi.c[1]), f.mul(4 % f.p(), psi.c[0]));
            (disc == 0).then_some(lc)
        }
        4 => {
            let u = f.mul(psi.c[3], two_inv);
            let v = f.mul(f.sub(psi.c[2], f.mul(u, u)), two_inv);
            let ok1 = f.mul(f.mul(2, u), v) == psi.c[1];
            let ok0 = f.mul(v, v) == psi.c[0];
            (ok1 && ok0).then_some(lc)
        }
        _ => None,
    }
}

/// A square root of `a` modulo `p` (Tonelli–Shanks [Cohen93, Alg. 1.5.1]),
/// or `None` when `a` is a non-residue; `sqrt(0) = 0`.
pub(crate) fn sqrt_word(a: u64, f: WordField) -> Option<u64> {
    sqrt_mod_with(a, f.p(), |x, y| f.mul(x, y), |x, e| f.pow(x, e))
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

    // ------------------------------------------------ word vs BigInt paths

    use proptest::prelude::*;

    /// Odd primes on both sides of 2^32 and up to the word limit (primality
    /// checked with sympy 1.14 `isprime`; `2^61 − 1` is a Mersenne prime,
    /// `9223372036854775783` is sympy's `prevprime(2^63)`).
    const PRIMES: [u64; 9] = [
        67,
        101,
        257,
        65_537,
        1_000_000_007,
        4_294_967_311,
        1_000_000_000_039,
        (1 << 61) - 1,
        9_223_372_036_854_775_783,
    ];

    fn to_big(a: &[u64]) -> FpPoly {
        trim(a.iter().map(|&c| BigInt::from(c)).collect())
    }

    /// `lc·∏(x − ρᵢ)·tail`, reduced mod p (degree ≤ 4), so that random
    /// inputs have roots in `F_p` and square factors often enough.
    fn planted(p: u64, lc: u64, rho: &[u64], tail: &[u64]) -> Vec<u64> {
        let f = WordField::new(p);
        let mut acc = WordPoly::from_slice(&[lc % p]);
        for &r in rho {
            acc = wmul(&acc, &WordPoly::from_slice(&[f.sub(0, r % p), 1]), f);
        }
        let t: Vec<u64> = tail.iter().map(|&c| c % p).collect();
        acc = wmul(&acc, &WordPoly::from_slice(&t), f);
        acc.coeffs().to_vec()
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 300, ..ProptestConfig::default() })]

        #[test]
        fn word_and_bigint_root_finding_agree_on_random_polynomials(
            pi in 0usize..PRIMES.len(),
            coeffs in proptest::collection::vec(any::<u64>(), 1..=5),
        ) {
            let p = PRIMES[pi];
            let red: Vec<u64> = coeffs.iter().map(|&c| c % p).collect();
            let w = WordPoly::from_slice(&red);
            prop_assume!(w.len > 0);
            let f = WordField::new(p);
            let got = roots_word(&w, f, &mut Budget::unlimited()).unwrap();
            let want = roots(&to_big(&red), &BigInt::from(p), &mut Budget::unlimited()).unwrap();
            prop_assert_eq!(got.into_iter().map(BigInt::from).collect::<Vec<_>>(), want);
        }

        #[test]
        fn word_and_bigint_paths_agree_on_planted_roots_and_squares(
            pi in 0usize..PRIMES.len(),
            lc in 1u64..u64::MAX,
            rho in proptest::collection::vec(any::<u64>(), 0..=4),
            tail in proptest::collection::vec(any::<u64>(), 1..=2),
            square in any::<bool>(),
        ) {
            let p = PRIMES[pi];
            prop_assume!(lc % p != 0);
            let f = WordField::new(p);
            let red = if square {
                // lc·h² with h of degree ≤ 2
                let h = planted(p, 1, &rho[..rho.len().min(2)], &tail[..1]);
                let h = WordPoly::from_slice(&h);
                let sq = wmul(&h, &h, f);
                wmul(&WordPoly::from_slice(&[lc % p]), &sq, f).coeffs().to_vec()
            } else {
                let k = rho.len().min(5 - tail.len());
                planted(p, lc, &rho[..k], &tail)
            };
            let w = WordPoly::from_slice(&red);
            prop_assume!(w.len > 0);
            let pb = BigInt::from(p);
            let big = to_big(&red);
            let got = roots_word(&w, f, &mut Budget::unlimited()).unwrap();
            let want = roots(&big, &pb, &mut Budget::unlimited()).unwrap();
            prop_assert_eq!(got.iter().map(|&r| BigInt::from(r)).collect::<Vec<_>>(), want);
            for &r in &got {
                prop_assert_eq!(f.eval(&w, r), 0);
            }
            prop_assert_eq!(
                constant_times_square_word(&w, f).map(BigInt::from),
                constant_times_square(&big, &pb)
            );
            if square {
                prop_assert!(constant_times_square_word(&w, f).is_some());
            }
            for r in [0u64, 1, 2, p - 1] {
                prop_assert_eq!(BigInt::from(f.eval(&w, r)), eval(&big, &BigInt::from(r), &pb));
            }
        }

        #[test]
        fn machine_word_square_roots_square_back_and_match_legendre(
            pi in 0usize..PRIMES.len(),
            a in any::<u64>(),
        ) {
            let p = PRIMES[pi];
            let f = WordField::new(p);
            let a = a % p;
            let big_symbol = crate::local::legendre(
                &BigInt::from(a),
                &crate::local::Prime::new(BigInt::from(p)).unwrap(),
            ).unwrap();
            match sqrt_word(a, f) {
                Some(y) => {
                    prop_assert_eq!(f.mul(y, y), a);
                    prop_assert!(big_symbol >= 0);
                }
                None => prop_assert_eq!(big_symbol, -1),
            }
        }
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 600, ..ProptestConfig::default() })]

        /// The formulas of `roots_by_formula` (linear, quadratic, even
        /// quartic) against the general route `gcd(φ, x^p − x)` with
        /// splitting: the same roots, the same units charged, and the same
        /// outcome when the budget runs out part way.
        #[test]
        fn root_formulas_match_the_general_route_with_equal_charges(
            pi in 0usize..PRIMES.len() + 3,
            shape in 0usize..3,
            lc in 1u64..u64::MAX,
            rho in proptest::collection::vec(any::<u64>(), 0..=2),
            tail in any::<[u64; 2]>(),
            units in prop_oneof![Just(u64::MAX), 1u64..3000],
        ) {
            // Small primes as well, where the formulas must still agree.
            let p = [3u64, 5, 7].get(pi).copied().unwrap_or_else(|| PRIMES[pi - 3]);
            prop_assume!(lc % p != 0);
            let f = WordField::new(p);
            // shape 0: linear; 1: quadratic; 2: even quartic ψ(x²) with
            // ψ = lc·∏(w − ρ)·(tail) of degree 2.
            let k = rho.len().min(2);
            let t = [tail[0] % p, tail[1] % p, 1];
            let poly = match shape {
                0 => vec![t[0], lc % p],
                1 => planted(p, lc, &rho[..k], &t[..3 - k]),
                _ => {
                    let psi = planted(p, lc, &rho[..k], &t[..3 - k]);
                    let mut q = [0u64; 5];
                    for (i, &c) in psi.iter().enumerate() {
                        q[2 * i] = c;
                    }
                    q.to_vec()
                }
            };
            let w = WordPoly::from_slice(&poly);
            prop_assume!(w.len > 1);
            prop_assert!(roots_by_formula(&w, f).is_some());
            let (mut b1, mut b2) = (Budget::with_units(units), Budget::with_units(units));
            let fast = roots_word(&w, f, &mut b1);
            let general = roots_word_general(&w, f, &mut b2);
            prop_assert_eq!(b1.spent(), b2.spent());
            match (fast, general) {
                (Ok(x), Ok(y)) => {
                    for &r in &x {
                        prop_assert_eq!(f.eval(&w, r), 0);
                    }
                    prop_assert_eq!(x, y);
                }
                (Err(Error::BudgetExhausted { stage: s1 }), Err(Error::BudgetExhausted { stage: s2 })) => {
                    prop_assert_eq!(s1, s2);
                }
                (x, y) => prop_assert!(false, "{:?} vs {:?}", x, y),
            }
        }
    }

    #[test]
    fn word_roots_of_a_split_quartic_are_found_at_the_largest_word_prime() {
        // (x − 1)(x − 2)(x − 3)(x − (p − 1)) mod p = 9223372036854775783.
        let p = PRIMES[8];
        let phi = planted(p, 1, &[1, 2, 3, p - 1], &[1]);
        let got = roots_word(
            &WordPoly::from_slice(&phi),
            WordField::new(p),
            &mut Budget::unlimited(),
        )
        .unwrap();
        assert_eq!(got, vec![1, 2, 3, p - 1]);
    }
}
