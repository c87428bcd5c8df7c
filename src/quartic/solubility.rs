//! Local solubility of `y² = g(x, z)` at one place, with evidence.
//!
//! [`locally_soluble`] dispatches to [`real_soluble`] (Lemma R, module
//! `real`), [`odd_prime_soluble`] (Lemma P) and [`two_adic_soluble`]
//! (Lemma T, both in module `padic`). A soluble answer carries a
//! [`LocalPoint`]; [`LocalPoint::verify`] re-checks it from scratch with
//! its own arithmetic (plain division for the valuation, Euler's criterion
//! for residuosity), sharing no code with the search.

use super::form::Quartic;
use super::fp;
use super::padic;
use super::real;
use crate::arith::word::{word_paths_enabled, Ck};
use crate::budget::Budget;
use crate::error::{Error, Result};
use crate::local::{split_valuation, sqrt_mod_prime_power, Place, Prime};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::fmt;

/// Extra `p`-adic digits of `y` beyond `v_p(g(x, z))` in a [`LocalPoint`].
pub const EXTRA_PRECISION: u32 = 8;

/// Evidence that `y² = g(x, z)` has a point over `Q_v`.
///
/// * At a prime `p`: integers `(x, z)`, not both divisible by `p`, with
///   `G = g(x, z)` a **non-zero square in `Q_p`** (so `(x : z : √G)` is a
///   `Q_p`-point), and `y` with `y² ≡ G (mod p^precision)`, where
///   `precision = v_p(G) + EXTRA_PRECISION`. Squareness is exactly
///   checkable: `v_p(G)` even and the unit part a residue mod `p`
///   (`≡ 1 mod 8` at 2) [Serre73, II.3.3].
/// * At the real place: integers `(x, z)` with `G = g(x, z) > 0`;
///   `y = ⌊√G⌋` and `precision = 0`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LocalPoint {
    place: Place,
    x: BigInt,
    z: BigInt,
    y: BigInt,
    precision: u32,
}

impl LocalPoint {
    /// Wraps evidence from elsewhere (unchecked; call [`LocalPoint::verify`]).
    pub fn new(place: Place, x: BigInt, z: BigInt, y: BigInt, precision: u32) -> LocalPoint {
        LocalPoint {
            place,
            x,
            z,
            y,
            precision,
        }
    }

    /// The place the point lives over.
    pub fn place(&self) -> &Place {
        &self.place
    }

    /// The `x` coordinate (an integer).
    pub fn x(&self) -> &BigInt {
        &self.x
    }

    /// The `z` coordinate (an integer).
    pub fn z(&self) -> &BigInt {
        &self.z
    }

    /// The approximate `y`: `y² ≡ g(x, z) mod p^precision` (finite place),
    /// or `⌊√g(x, z)⌋` (real place).
    pub fn y(&self) -> &BigInt {
        &self.y
    }

    /// The `p`-adic precision of `y` (0 at the real place).
    pub fn precision(&self) -> u32 {
        self.precision
    }

    /// Re-checks the evidence against `q`, independently of the search:
    ///
    /// * real place: `g(x, z) > 0` and `y = ⌊√g(x, z)⌋`;
    /// * prime `p`: `p ∤ gcd(x, z)`; `G = g(x, z) ≠ 0`; `v = v_p(G)` (by
    ///   repeated division) is even; the unit part `u` satisfies
    ///   `u^((p−1)/2) ≡ 1 (mod p)` (Euler's criterion) for odd `p`, or
    ///   `u ≡ 1 (mod 8)` for `p = 2`; `precision > v`; and
    ///   `y² ≡ G (mod p^precision)`.
    ///
    /// Example: for `g = −34x⁴ + 2z⁴` at `p = 17`, `(x, z) = (0, 1)` gives
    /// `G = 2 ≡ 6² (mod 17)`, so `(0, 1)` with `y = 6`, precision 1 passes,
    /// while `y = 5` or `(x, z) = (17, 17)` fails.
    pub fn verify(&self, q: &Quartic) -> bool {
        let g = q.eval(&self.x, &self.z);
        match &self.place {
            Place::Real => g.is_positive() && self.y == g.sqrt(),
            Place::Finite(p) => {
                verify_finite(p.get(), &self.x, &self.z, &g, &self.y, self.precision)
            }
        }
    }
}

/// The independent `p`-adic check of [`LocalPoint::verify`].
fn verify_finite(
    p: &BigInt,
    x: &BigInt,
    z: &BigInt,
    g: &BigInt,
    y: &BigInt,
    precision: u32,
) -> bool {
    if x.is_multiple_of(p) && z.is_multiple_of(p) {
        return false;
    }
    if g.is_zero() {
        return false;
    }
    let mut u = g.clone();
    let mut v = 0u32;
    while u.is_multiple_of(p) {
        u /= p;
        v += 1;
    }
    if v % 2 == 1 || precision <= v {
        return false;
    }
    let unit_ok = if p == &BigInt::from(2) {
        u.mod_floor(&BigInt::from(8)).is_one()
    } else {
        let e = (p - BigInt::one()) / BigInt::from(2);
        u.mod_floor(p).modpow(&e, p).is_one()
    };
    let modulus = num_traits::pow(p.clone(), precision as usize);
    unit_ok && (y * y - g).mod_floor(&modulus).is_zero()
}

impl fmt::Display for LocalPoint {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match &self.place {
            Place::Real => write!(f, "(x, z) = ({}, {}) over R, g > 0", self.x, self.z),
            Place::Finite(p) => write!(
                f,
                "(x, z) = ({}, {}) over Q_{}, y ≡ {} mod {}^{}",
                self.x, self.z, p, self.y, p, self.precision
            ),
        }
    }
}

/// The answer to "does `y² = g(x, z)` have a `Q_v`-point?".
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum LocalSolubility {
    /// There is a point; here is one.
    Soluble(LocalPoint),
    /// There is no point over the completion at `place`.
    Insoluble {
        /// The place where the curve has no point.
        place: Place,
    },
}

impl LocalSolubility {
    /// True for [`LocalSolubility::Soluble`].
    pub fn is_soluble(&self) -> bool {
        matches!(self, LocalSolubility::Soluble(_))
    }

    /// The witness, if soluble.
    pub fn point(&self) -> Option<&LocalPoint> {
        match self {
            LocalSolubility::Soluble(pt) => Some(pt),
            LocalSolubility::Insoluble { .. } => None,
        }
    }
}

/// Decides whether `y² = g(x, z)` has a point over `Q_v` (`v` = `place`),
/// exactly, with evidence.
///
/// Statement and method: real place by Lemma R (`real_soluble`); odd `p`
/// by Lemma P (`odd_prime_soluble`); `p = 2` by Lemma T
/// (`two_adic_soluble`). All three terminate on every non-degenerate
/// quartic (see the module docs of `padic` for the termination proof).
///
/// # Errors
/// [`Error::BudgetExhausted`] when `budget` runs out.
///
/// Cost: real place, `O(log(coefficients))` Sturm evaluations; prime `p`,
/// at most `4·(v_p(Δ) + 4)` classes, each costing `p` residue tests for
/// `p < 64` and `O(log p)` polynomial products above (in machine words for
/// `p < 2^63`). For the spaces of a congruent-number descent this is about
/// 1–3 µs per class (see docs/performance.md).
///
/// Example: `y² = −34x⁴ + 2z⁴`, i.e. `[−34, 0, 0, 0, 2]` (the curve
/// `2Y² = 1 − 17X⁴` of \[Lind40\], \[Reichardt42\] with `y = 2Y`), is soluble
/// at `R`, 2, 17 and every other place, yet has no rational point.
pub fn locally_soluble(q: &Quartic, place: &Place, budget: &mut Budget) -> Result<LocalSolubility> {
    match place {
        Place::Real => real_soluble(q, budget),
        Place::Finite(p) if p.is_two() => two_adic_soluble(q, budget),
        Place::Finite(p) => odd_prime_soluble(q, p, budget),
    }
}

/// Real solubility by Lemma R (module `real`); the witness has
/// `g(x, z) > 0`.
///
/// # Errors
/// [`Error::BudgetExhausted`].
///
/// Example: `x⁴ − 17z⁴` is soluble (witness `(1, 0)`); `−x⁴ − z⁴` is not.
pub fn real_soluble(q: &Quartic, budget: &mut Budget) -> Result<LocalSolubility> {
    Ok(match real::real_witness(q, budget)? {
        Some((x, z)) => {
            let g = q.eval(&x, &z);
            LocalSolubility::Soluble(LocalPoint::new(Place::Real, x, z, g.sqrt(), 0))
        }
        None => LocalSolubility::Insoluble { place: Place::Real },
    })
}

/// `Q_p`-solubility for an odd prime `p` by Lemma P (module `padic`).
///
/// # Errors
/// [`Error::InvalidArgument`] for `p = 2` (use
/// [`two_adic_soluble`]); [`Error::BudgetExhausted`].
///
/// Example: `x⁴ − 3z⁴` at 3: `g(1, 0) = 1` is a square, soluble.
/// `3x⁴ + 3z⁴` at 3 is not: `x⁴ + z⁴ ≢ 0 (mod 3)` for `(x, z)` not both
/// divisible by 3, so every value has valuation exactly 1.
pub fn odd_prime_soluble(q: &Quartic, p: &Prime, budget: &mut Budget) -> Result<LocalSolubility> {
    if p.is_two() {
        return Err(Error::InvalidArgument {
            reason: "odd_prime_soluble called with p = 2".into(),
        });
    }
    finish(q, p, padic::odd_prime_witness(q, p, budget)?)
}

/// `Q_2`-solubility by Lemma T (module `padic`).
///
/// # Errors
/// [`Error::BudgetExhausted`].
///
/// Example: `x⁴ + z⁴` is soluble (`g(0, 1) = 1`). `3x⁴ + 3z⁴` is not:
/// with one of `x, z` odd and one even, `x⁴ + z⁴ ≡ 1 (mod 16)` and
/// `3·(1 + 16k) ≡ 3 (mod 8)`; with both odd, `v₂(3(x⁴ + z⁴)) = 1`.
pub fn two_adic_soluble(q: &Quartic, budget: &mut Budget) -> Result<LocalSolubility> {
    finish(q, &Prime::two(), padic::two_adic_witness(q, budget)?)
}

/// Attaches `y` (a square root of `g(x, z)` to `v + EXTRA_PRECISION`
/// digits) to a `p`-adic witness.
fn finish(q: &Quartic, p: &Prime, w: Option<(BigInt, BigInt)>) -> Result<LocalSolubility> {
    let place = Place::Finite(p.clone());
    let Some((x, z)) = w else {
        return Ok(LocalSolubility::Insoluble { place });
    };
    if word_paths_enabled() {
        if let Some((y, precision)) = finish_word(q, p, &x, &z) {
            return Ok(LocalSolubility::Soluble(LocalPoint::new(
                place, x, z, y, precision,
            )));
        }
    }
    let g = q.eval(&x, &z);
    debug_assert!(padic::is_padic_square(&g, p));
    let (y, precision) = padic_sqrt_of(&g, p, &x, &z)?;
    Ok(LocalSolubility::Soluble(LocalPoint::new(
        place, x, z, y, precision,
    )))
}

/// The `y` of a witness `(x, z)` with `g = g(x, z)` a non-zero square in
/// `Q_p`: a square root modulo `p^precision`, `precision = v_p(g) +
/// EXTRA_PRECISION`, in `BigInt` arithmetic.
pub(crate) fn padic_sqrt_of(
    g: &BigInt,
    p: &Prime,
    x: &BigInt,
    z: &BigInt,
) -> Result<(BigInt, u32)> {
    let precision = padic::val_u32(g, p).saturating_add(EXTRA_PRECISION);
    let y = padic_sqrt(g, p, precision).ok_or_else(|| Error::Internal {
        check: format!("g({x}, {z}) = {g} has no square root mod {p}^{precision}"),
    })?;
    Ok((y, precision))
}

/// [`finish`] in machine words: `y` and the precision when `g(x, z)`
/// fits in `i128` and the root can be lifted in words (`p = 2` with at
/// most 62 digits; odd `p` with `p^(EXTRA_PRECISION) < 2^127` and
/// `p^⌈EXTRA_PRECISION/2⌉ < 2^63`); `None` otherwise, and the caller runs
/// the `BigInt` route. The root is the unique lift of the Tonelli–Shanks
/// root `y₀` of the unit part modulo `p^k` reduced to `[0, p^k)`, exactly
/// as [`padic_sqrt`] returns it.
fn finish_word(q: &Quartic, p: &Prime, x: &BigInt, z: &BigInt) -> Option<(BigInt, u32)> {
    let c = q.coeffs();
    let words = [
        c[0].to_i128()?,
        c[1].to_i128()?,
        c[2].to_i128()?,
        c[3].to_i128()?,
        c[4].to_i128()?,
    ];
    finish_word_coeffs(&words, p, x, z)
}

/// [`finish_word`] for a quartic given by its coefficients in words.
pub(crate) fn finish_word_coeffs(
    coeffs: &[i128; 5],
    p: &Prime,
    x: &BigInt,
    z: &BigInt,
) -> Option<(BigInt, u32)> {
    let pw = p.to_u64()?;
    let (xw, zw) = (x.to_i128()?, z.to_i128()?);
    let g = eval_words(coeffs, xw, zw)?;
    if g == 0 {
        return None;
    }
    let q128 = i128::from(pw);
    let (mut v, mut u) = (0u32, g);
    if let Ok(g64) = i64::try_from(g) {
        // The valuation in u64 division (same quotient, cheaper).
        let mut mag = g64.unsigned_abs();
        while mag % pw == 0 {
            mag /= pw;
            v += 1;
        }
        u = if g64 < 0 {
            -i128::from(mag)
        } else {
            i128::from(mag)
        };
    } else {
        while u % q128 == 0 {
            u /= q128;
            v += 1;
        }
    }
    if v % 2 == 1 {
        return None;
    }
    let precision = v.checked_add(EXTRA_PRECISION)?;
    let k = EXTRA_PRECISION;
    let scale = q128.checked_pow(v / 2)?;
    let y = if pw == 2 {
        if k > 62 {
            return None;
        }
        let mask = (1i128 << k) - 1;
        let uu = (u & mask) as u64;
        let need = if k >= 3 { 7 } else { (1 << k) - 1 };
        if uu & need != 1 & need {
            return None;
        }
        let mut y: u64 = 1;
        for j in 3..k {
            let diff = (u128::from(y) * u128::from(y)).wrapping_sub(u128::from(uu));
            if diff & ((1u128 << (j + 1)) - 1) != 0 {
                y += 1 << (j - 1);
            }
        }
        i128::from(y)
    } else {
        let f = fp::WordField::new(pw);
        let y0 = fp::sqrt_word(u.rem_euclid(q128) as u64, f)?;
        if y0 == 0 {
            return None;
        }
        lift_unit_root(u, y0, pw, k, f)?
    };
    let y = match y.checked_mul(scale) {
        Some(ys) => BigInt::from(ys),
        None => BigInt::from(y) * BigInt::from(scale),
    };
    Some((y, precision))
}

/// `g(x, z) = Σ cᵢ x^(4−i) zⁱ` in words, `None` when it leaves `i128`.
/// With `|cᵢ| < 2^C` and `|x|, |z| < 2^X`, each term is below `2^(C+4X)`
/// and the sum below `2^(C+4X+3)`: under `2^127` no check is needed.
fn eval_words(coeffs: &[i128; 5], x: i128, z: i128) -> Option<i128> {
    let bits = |v: i128| 128 - v.unsigned_abs().leading_zeros();
    let cb = coeffs.iter().map(|&c| bits(c)).max().unwrap_or(0);
    let xb = bits(x).max(bits(z));
    if cb + 4 * xb + 3 <= 126 {
        let (x2, z2) = (x * x, z * z);
        let xp = [x2 * x2, x2 * x, x2, x, 1];
        let zp = [1, z, z2, z2 * z, z2 * z2];
        let mut g = 0i128;
        for i in 0..5 {
            g += coeffs[i] * (xp[i] * zp[i]);
        }
        return Some(g);
    }
    let (x, z) = (Ck::new(x), Ck::new(z));
    let mut g = Ck::new(0);
    let mut zp = Ck::new(1);
    let mut xp = [Ck::new(1); 5];
    for i in 1..5 {
        xp[i] = xp[i - 1] * x;
    }
    for (i, &c) in coeffs.iter().enumerate() {
        g = g + Ck::new(c) * xp[4 - i] * zp;
        zp = zp * z;
    }
    g.get()
}

/// The root `y ∈ [0, p^k)` of `y² ≡ u (mod p^k)` with `y ≡ y₀ (mod p)`
/// (odd `p`, `u` a unit, `y₀² ≡ u mod p`, `y₀ ≠ 0`), in words; `None` when
/// `p^k ≥ 2^127` or `p^⌈k/2⌉ ≥ 2^63`.
///
/// First Newton–Hensel doubling [Cohen93, §1.5] modulo `P = p^⌈k/2⌉`
/// (`y ← y − (y² − u)·w`, `w ≡ (2y)⁻¹` kept by `w ← w(2 − 2y·w)`), all
/// products below `2^127`. If `⌈k/2⌉ < k`, one more step to `p^k`: with
/// `y₁` the root modulo `P`, `(y₁ + P·t)² ≡ y₁² + 2y₁·P·t (mod p^k)`
/// because `P² ≡ 0`, so `t ≡ ((u − y₁²)/P)·w (mod p^(k − ⌈k/2⌉))`.
/// The root is unique (Hensel), so this is the value of [`padic_sqrt`].
fn lift_unit_root(u: i128, y0: u64, pw: u64, k: u32, f: fp::WordField) -> Option<i128> {
    let k1 = k.div_ceil(2);
    let m1 = pw.checked_pow(k1).filter(|&m| m < fp::WORD_LIMIT)?;
    let full = u128::from(pw)
        .checked_pow(k)
        .filter(|&m| m < 1u128 << 127)?;
    let mm = u128::from(m1);
    let um = u.rem_euclid(i128::from(m1)) as u128;
    let (mut y, mut w) = (u128::from(y0), u128::from(f.inv(f.mul(2, y0))));
    let mut j = 1u32;
    while j < k1 {
        j = (2 * j).min(k1);
        let mj = u128::from(pw.pow(j));
        let e = (y * y + mm * mm - um) % mj;
        y = (y + mj - e * w % mj) % mj;
        let t = 2 * y % mj * w % mj;
        w = w * ((2 + mj - t) % mj) % mj;
    }
    if k1 == k {
        return i128::try_from(y).ok();
    }
    // w ≡ (2y₁)⁻¹ mod p^k1 and p^(k − k1) | p^k1.
    let m2 = u128::from(pw.pow(k - k1));
    let u_full = u.rem_euclid(i128::try_from(full).ok()?) as u128;
    let y_sq = y * y % full;
    let e = (u_full + full - y_sq) % full;
    debug_assert_eq!(e % mm, 0);
    let t = (e / mm) % m2 * (w % m2) % m2;
    i128::try_from(y + mm * t).ok()
}

/// A square root of `g` modulo `p^precision` for `g ≠ 0` with `v = v_p(g)`
/// even and `< precision` and unit part `u` a square mod `p` (mod 8 at 2).
///
/// Odd `p < 2^63`: `y₀ = √u mod p` by Tonelli–Shanks in machine words, then
/// Newton–Hensel doubling [Cohen93, §1.5] `y ← y − (y² − u)·w`, with
/// `w ≡ (2y)⁻¹` kept to the current precision by `w ← w(2 − 2y·w)`;
/// finally `y·p^{v/2}`. At `p = 2` with `precision − v ≤ 62`: the unit
/// `u ≡ 1 (mod 8)` has a root lifted bit by bit in machine words (if
/// `y² ≡ u mod 2^j`, `j ≥ 3`, then `y` or `y + 2^{j−1}` is a root mod
/// `2^{j+1}` [Serre73, II.3.3]). Otherwise `crate::local::sqrt_mod_prime_power`.
fn padic_sqrt(g: &BigInt, p: &Prime, precision: u32) -> Option<BigInt> {
    if p.is_two() {
        if let Some(y) = two_adic_sqrt_word(g, precision) {
            return Some(y);
        }
    }
    let Some(pw) = p.to_u64().filter(|&v| v % 2 == 1 && v < fp::WORD_LIMIT) else {
        return sqrt_mod_prime_power(g, p, precision);
    };
    let (v, u) = split_valuation(g, p)?;
    let v = u32::try_from(v).ok()?;
    if v % 2 == 1 || v >= precision {
        return None;
    }
    let k = precision - v;
    let f = fp::WordField::new(pw);
    let y0 = fp::sqrt_word(f.reduce(&u), f)?;
    if y0 == 0 {
        return None;
    }
    let root_scale = num_traits::pow(p.get().clone(), (v / 2) as usize);
    if let Some(m) = pw.checked_pow(k).filter(|&m| m < fp::WORD_LIMIT) {
        // Everything below p^k < 2^63: products fit in u128.
        let mm = u128::from(m);
        let um = u.mod_floor(&BigInt::from(m)).to_u64()?;
        let (mut y, mut w) = (u128::from(y0), u128::from(f.inv(f.mul(2, y0))));
        let mut j = 1u32;
        while j < k {
            j = (2 * j).min(k);
            let mj = u128::from(pw.pow(j));
            let e = (y * y + mm * mm - u128::from(um)) % mj; // y² − u mod p^j
            y = (y + mj - e * w % mj) % mj;
            let t = 2 * y % mj * w % mj; // 2y·w
            w = w * ((2 + mj - t) % mj) % mj;
        }
        return Some(BigInt::from(y) * root_scale);
    }
    let mut y = BigInt::from(y0);
    let mut w = BigInt::from(f.inv(f.mul(2, y0)));
    let pb = p.get();
    let mut j = 1u32;
    while j < k {
        j = (2 * j).min(k);
        let m = num_traits::pow(pb.clone(), j as usize);
        y = (&y - (&y * &y - &u) * &w).mod_floor(&m);
        w = (&w * (BigInt::from(2) - BigInt::from(2) * &y * &w)).mod_floor(&m);
    }
    Some(y * root_scale)
}

/// The machine-word case of [`padic_sqrt`] at `p = 2`; `None` when it does
/// not apply (or `g` is not a square to this precision), and the caller
/// falls back to the general routine.
fn two_adic_sqrt_word(g: &BigInt, precision: u32) -> Option<BigInt> {
    let v = u32::try_from(g.trailing_zeros()?).ok()?;
    if v % 2 == 1 || v >= precision || precision - v > 62 {
        return None;
    }
    let k = precision - v;
    let mask = (1u64 << k) - 1;
    let u = ((g >> v) & BigInt::from(mask)).to_u64()?;
    let need = if k >= 3 { 7 } else { (1 << k) - 1 };
    if u & need != 1 & need {
        return None;
    }
    let mut y: u64 = 1;
    for j in 3..k {
        let diff = (u128::from(y) * u128::from(y)).wrapping_sub(u128::from(u));
        if diff & ((1u128 << (j + 1)) - 1) != 0 {
            y += 1 << (j - 1);
        }
    }
    Some(BigInt::from(y) << (v / 2))
}
