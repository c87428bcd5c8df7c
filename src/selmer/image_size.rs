//! The size of the local images `W_v` from Tamagawa numbers, and the ratio
//! of the two Selmer groups of a 2-isogeny from local data alone.
//!
//! # Setting
//! `E: y² = x³ + ax² + bx` with `b(a² − 4b) ≠ 0`,
//! `E′: y² = x³ − 2ax² + (a² − 4b)x`, `φ: E → E′` with kernel
//! `{O, (0, 0)}` and `ψ = φ̂: E′ → E` its dual (formulas in
//! [`crate::curve::isogeny`]). The descent computes, place by place,
//! `W_v(E) = {d ∈ Q_v*/Q_v*² : C_d(Q_v) ≠ ∅}` by local solvability
//! ([`crate::quartic::local_image`]); `W_v(E)` is the image of
//! `E(Q_v) → Q_v*/Q_v*²`, `(x, y) ↦ x`, whose kernel is `ψ(E′(Q_v))`
//! [SilvermanTate92, III.5], so `|W_v(E)| = |E(Q_v)/ψ(E′(Q_v))|`. This
//! module predicts that number from quite different data (Tamagawa
//! numbers and minimal models from Tate's algorithm, or the shape of
//! `E(R)`), so that the two computations check each other.
//!
//! # The p-adic count [Schaefer96, Lemma 3.8], [SchaeferStoll04, Lemma 3.1]
//! For an isogeny `ψ: A → B` of elliptic curves over a finite extension
//! `K` of `Q_p` (statement from memory),
//! ```text
//! |B(K)/ψA(K)| = |A(K)[ψ]| · c(B)/c(A) · |ψ′(0)|_K^{−1},
//! ```
//! with `c` the Tamagawa numbers and `ψ′(0)` the leading coefficient of the
//! power series of `ψ` on the formal groups of *minimal* models. (Proof
//! sketch: `q(f) = |coker f|/|ker f|` is multiplicative along finite-index
//! filtrations; filter by `A⁰(K) ⊃ A¹(K)`: the component groups give
//! `c(B)/c(A)`, the reductions `Ã_ns(k)`, `B̃_ns(k)` of isogenous curves
//! have equally many points, and on the formal groups `ψ` is, after the
//! formal logarithm, multiplication by `ψ′(0)` on a small enough lattice.)
//!
//! Here `A = E′`, `B = E`, `A(K)[ψ] = {O, (0, 0)}` of order 2.
//!
//! **Leading coefficient on the given models.** With `z = −x/y`, near `O`
//! `x = z⁻² + …`, `y = −z⁻³ + …`. For `φ(x, y) = (y²/x², y(b − x²)/x²)`:
//! `X ≈ x`, `Y ≈ −y`, so `Z = −X/Y = −z + …`: `φ′(0) = −1`
//! ([`ISOGENY_LEADING_COEFFICIENT`]). For
//! `ψ(X, Y) = (Y²/(4X²), Y(b′ − X²)/(8X²))`: `x ≈ X/4 = Z⁻²/4`,
//! `y ≈ −Y/8 = Z⁻³/8`, so `z = −x/y = −2Z + …`: `ψ′(0) = −2`
//! ([`DUAL_LEADING_COEFFICIENT`]); as a check, `ψ′(0)·φ′(0) = 2 = [2]′(0)`.
//!
//! **Change to minimal models.** Let `[u, r, s, t]` take a model to a
//! minimal one, `x = u²x′ + r`, `y = u³y′ + su²x′ + t` (the convention of
//! [`crate::curve::tate`]); then `z = −x/y = z′/u + …`, i.e. `z′ = u·z` to
//! first order. With `u_E`, `u_E′` the scalings of `E` and `E′` at `p`,
//! `z′_E = u_E·z_E = u_E·(−2)·z_E′ = −2·(u_E/u_E′)·z′_E′`, so
//! ```text
//! ψ′(0) on minimal models = −2 · u_E / u_E′,
//! |ψ′(0)|_p^{−1} = p^{v_p(2) + k_E − k_E′}     (k = v_p(u)),
//! |W_p(E)| = 2 · c_p(E)/c_p(E′) · p^{v_p(2) + k_E − k_E′}.
//! ```
//! At odd `p` the two models are minimal or not together (`p² | a` and
//! `p⁴ | b` iff `p² | −2a` and `p⁴ | a² − 4b`), so the `p`-power is 1 and
//! `|W_p(E)| = 2·c_p(E)/c_p(E′)`; at `p = 2` the factor
//! `2^{1 + k_E − k_E′}` stays.
//!
//! # The real count
//! For `ψ: A → B` over `R`, the identity components `A⁰(R)`, `B⁰(R)` are
//! circles and `ψ: A⁰ → B⁰` is onto with kernel `A⁰(R)[ψ]`, so the same
//! filtration argument gives (common practice; derived here)
//! ```text
//! |B(R)/ψA(R)| = |A(R)[ψ]| · c_∞(B)/c_∞(A) / |A⁰(R)[ψ]|,
//! ```
//! with `c_∞` the number of connected components (2 when `Δ > 0`, 1 when
//! `Δ < 0`). For `A = E′`: `Δ_E = 16b²(a² − 4b)` and
//! `Δ_E′ = 256b(a² − 4b)²`; `(0, 0)` lies on the identity component of
//! `E′(R)` iff 0 is the largest real root of `X(X² − 2aX + a² − 4b)`, iff
//! the quadratic has no real root (`b < 0`) or two negative ones
//! (`b > 0`, `a² > 4b`, `a < 0`). Case by case this gives `|W_R(E)| = 2`
//! iff `b < 0`, or `a > 0` and `a² > 4b` — the elementary sign rule
//! ("`x(x² + ax + b) ≥ 0` has a solution `x < 0`"), see
//! [`real_sign_rule`].
//!
//! # Cassels' formula for the ratio of the Selmer groups
//! With `Sel^φ(E) ⊂ H¹(Q, E[φ])` cut out by the images of
//! `E′(Q_v)/φE(Q_v)` (= `W_v(E′)`, the descent's codomain side) and
//! `Sel^ψ(E′)` by those of `E(Q_v)/ψE′(Q_v)` (= `W_v(E)`, the domain side),
//! \[Cassels65\] (see also the Greenberg–Wiles formula [Wiles95, Prop. 1.6];
//! both from memory):
//! ```text
//! |Sel^φ(E)| / |Sel^ψ(E′)| = |E(Q)[φ]|/|E′(Q)[ψ]| · ∏_v |E′(Q_v)/φE(Q_v)| / |E(Q_v)[φ]|,
//! ```
//! and here `|E(Q)[φ]| = |E′(Q)[ψ]| = |E(Q_v)[φ]| = 2`, so
//! `dim Sel(codomain) − dim Sel(domain) = Σ_v (dim W_v(E′) − 1)`, the sum
//! over `R` and the primes of `2b(a² − 4b)` (each other prime adds 0).
//! [`selmer_difference_from_images`] evaluates the right side from
//! computed local images, [`selmer_difference_from_tamagawa`] from the
//! predicted sizes alone.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};

use crate::budget::Budget;
use crate::curve::tate::local_reduction;
use crate::curve::ReducedModel;
use crate::error::{Error, Result};
use crate::local::{valuation_rational, Place, Prime};
use crate::quartic::{local_image, LocalImage};

/// The leading coefficient `φ′(0)` of `φ(x, y) = (y²/x², y(b − x²)/x²)` on
/// the formal groups of the models `y² = x³ + ax² + bx` and
/// `y² = x³ − 2ax² + (a² − 4b)x`, in the parameter `z = −x/y` (derived in
/// the module docs).
pub const ISOGENY_LEADING_COEFFICIENT: i64 = -1;

/// The leading coefficient `ψ′(0)` of the dual
/// `ψ(X, Y) = (Y²/(4X²), Y(b′ − X²)/(8X²))` on the formal groups of the
/// models `y² = x³ − 2ax² + (a² − 4b)x` and `y² = x³ + ax² + bx`, in
/// `z = −x/y` (derived in the module docs; `ψ′(0)·φ′(0) = 2`).
pub const DUAL_LEADING_COEFFICIENT: i64 = -2;

/// The terms of the p-adic count of `|E(Q_p)/ψE′(Q_p)|` (module docs).
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct PadicCountTerms {
    /// The prime `p`.
    pub prime: Prime,
    /// `c_p(E)` for `E: y² = x³ + ax² + bx`.
    pub tamagawa: u64,
    /// `c_p(E′)` for `E′: y² = x³ − 2ax² + (a² − 4b)x`.
    pub tamagawa_dual: u64,
    /// `k_E = v_p(u_E)`, `u_E` the scaling from the given model of `E` to
    /// a minimal one (`x = u²x′ + r`).
    pub scaling: i64,
    /// `k_E′ = v_p(u_E′)` for `E′`.
    pub scaling_dual: i64,
    /// `v_p(ψ′(0))` on minimal models, `v_p(2) + k_E − k_E′`, so that
    /// `|ψ′(0)|_p^{−1} = p^leading_valuation`.
    pub leading_valuation: i64,
}

impl PadicCountTerms {
    /// `2 · c_p(E)/c_p(E′) · p^leading_valuation`, which must be a power
    /// of 2 dividing 4 (odd `p`) or 8 (`p = 2`).
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] if the value is not a power of two
    /// between 1 and 8 (that would be a defect in Tate's algorithm or in
    /// this formula, never a property of the input).
    pub fn size(&self) -> Result<u64> {
        let p = self.prime.get();
        let e = self.leading_valuation;
        let mut num = BigInt::from(2u32) * BigInt::from(self.tamagawa);
        let mut den = BigInt::from(self.tamagawa_dual);
        let pow = num_traits::pow(p.clone(), e.unsigned_abs() as usize);
        if e >= 0 {
            num *= pow;
        } else {
            den *= pow;
        }
        let (q, r) = num.div_rem(&den);
        let ok = r.is_zero() && [1u64, 2, 4, 8].iter().any(|&s| q == BigInt::from(s));
        if !ok {
            return Err(Error::Internal {
                check: format!(
                    "predicted |W_{p}| = {num}/{den} is not 1, 2, 4 or 8 \
                     (terms {self:?})"
                ),
            });
        }
        u64::try_from(&q).map_err(|_| Error::Internal {
            check: "predicted size out of range".into(),
        })
    }
}

/// The terms of the real count of `|E(R)/ψE′(R)|` (module docs).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct RealCountTerms {
    /// `c_∞(E)`: connected components of `E(R)` (2 iff `a² − 4b > 0`).
    pub components: u64,
    /// `c_∞(E′)` (2 iff `b > 0`).
    pub components_dual: u64,
    /// `|E′⁰(R)[ψ]|`: 2 if `(0, 0)` lies on the identity component of
    /// `E′(R)`, else 1.
    pub kernel_on_identity: u64,
}

impl RealCountTerms {
    /// `2 · c_∞(E)/c_∞(E′) / |E′⁰(R)[ψ]|`, which must be 1 or 2.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] if it is not (a defect, never input).
    pub fn size(&self) -> Result<u64> {
        let num = 2 * self.components;
        let den = self.components_dual * self.kernel_on_identity;
        if den == 0 || num % den != 0 || !matches!(num / den, 1 | 2) {
            return Err(Error::Internal {
                check: format!("real count {num}/{den} ({self:?})"),
            });
        }
        Ok(num / den)
    }
}

/// `(a′, b′) = (−2a, a² − 4b)`, the coefficients of `E′`.
fn dual_coefficients(a: &BigInt, b: &BigInt) -> (BigInt, BigInt) {
    (-(a * BigInt::from(2u32)), a * a - BigInt::from(4u32) * b)
}

/// `c_p` and `v_p(u)` of `y² = x³ + ax² + bx` at `p` from Tate's algorithm.
fn tamagawa_and_scaling(a: &BigInt, b: &BigInt, p: &Prime) -> Result<(u64, i64)> {
    let z = BigInt::zero();
    let lr = local_reduction(&[z.clone(), a.clone(), z.clone(), b.clone(), z], p)?;
    let k = valuation_rational(&lr.change[0], p).ok_or_else(|| Error::Internal {
        check: "scaling u = 0 from Tate's algorithm".into(),
    })?;
    Ok((lr.tamagawa, k))
}

/// The terms of the p-adic count of `|W_p(E)| = |E(Q_p)/ψE′(Q_p)|`.
///
/// Statement: `|W_p(E)| = 2 · c_p(E)/c_p(E′) · p^{v_p(2) + k_E − k_E′}`
/// ([Schaefer96, Lemma 3.8] with `ψ′(0) = −2·u_E/u_E′` on minimal models,
/// derived in the module docs), `c_p` and `k = v_p(u)` from Tate's
/// algorithm ([`crate::curve::tate::local_reduction`]) on the integral
/// models `[0, a, 0, b, 0]` and `[0, −2a, 0, a² − 4b, 0]`. Works for odd
/// `p` and `p = 2` alike (the maths differs only in `v_p(2)`); see
/// [`odd_prime_count`] and [`two_adic_count`].
///
/// # Errors
/// [`Error::SingularCurve`] when `b(a² − 4b) = 0`.
///
/// # Cost
/// Two runs of Tate's algorithm.
///
/// # Example
/// `y² = x³ − x` (`a = 0, b = −1`) at 2: Tate's algorithm gives
/// `c_2(E) = 2` and `c_2(E′) = 4` for `E′: y² = x³ + 4x`, both models
/// minimal, so `|W_2(E)| = 2 · 2/4 · 2 = 2` (and local solvability finds
/// `W_2 = {1, −1}`: `C_{−1}: N² = −M⁴ + e⁴` has the point `(0, 1)`).
/// ```text
/// use isodescent::selmer::image_size::padic_count_terms;
/// use isodescent::local::Prime;
/// let t = padic_count_terms(&0.into(), &(-1).into(), &Prime::two()).unwrap();
/// assert_eq!((t.tamagawa, t.tamagawa_dual, t.leading_valuation), (2, 4, 1));
/// assert_eq!(t.size().unwrap(), 2);
/// ```
pub fn padic_count_terms(model: &ReducedModel, p: &Prime) -> Result<PadicCountTerms> {
    let (a, b) = (model.a(), model.b());
    let (a2, b2) = dual_coefficients(a, b);
    let (tamagawa, scaling) = tamagawa_and_scaling(a, b, p)?;
    let (tamagawa_dual, scaling_dual) = tamagawa_and_scaling(&a2, &b2, p)?;
    let v2 = i64::from(p.is_two());
    Ok(PadicCountTerms {
        prime: p.clone(),
        tamagawa,
        tamagawa_dual,
        scaling,
        scaling_dual,
        leading_valuation: v2 + scaling - scaling_dual,
    })
}

/// `|W_p(E)|` at an odd prime: `2 · c_p(E)/c_p(E′)` (the scalings of `E`
/// and `E′` to minimal models have equal valuation at odd `p`, module
/// docs; the function still uses the computed ones).
///
/// # Errors
/// [`Error::InvalidArgument`] for `p = 2`; [`Error::SingularCurve`] when
/// `b(a² − 4b) = 0`.
///
/// # Example
/// `y² = x³ + 3x` at 3: `E` has `c_3 = 2` (type III), `E′: y² = x³ − 12x`
/// has `c_3 = 2` (type III), so `|W_3| = 2`.
/// ```text
/// use isodescent::selmer::image_size::odd_prime_count;
/// use isodescent::local::Prime;
/// assert_eq!(odd_prime_count(&0.into(), &3.into(), &Prime::small(3).unwrap()).unwrap(), 2);
/// ```
pub fn odd_prime_count(model: &ReducedModel, p: &Prime) -> Result<u64> {
    if p.is_two() {
        return Err(Error::InvalidArgument {
            reason: "odd_prime_count needs an odd prime; use two_adic_count at 2".into(),
        });
    }
    padic_count_terms(model, p)?.size()
}

/// `|W_2(E)|`: `2 · c_2(E)/c_2(E′) · 2^{1 + k_E − k_E′}` (module docs).
///
/// # Errors
/// [`Error::SingularCurve`] when `b(a² − 4b) = 0`.
///
/// # Example
/// `y² = x³ − 25x` (congruent number 5): `|W_2| = 4`, computed
/// independently by local solvability (see the tests).
/// ```text
/// use isodescent::selmer::image_size::two_adic_count;
/// assert_eq!(two_adic_count(&0.into(), &(-25).into()).unwrap(), 4);
/// ```
pub fn two_adic_count(model: &ReducedModel) -> Result<u64> {
    padic_count_terms(model, &Prime::two())?.size()
}

/// The terms of the real count (module docs): `c_∞(E)`, `c_∞(E′)` and
/// whether `(0, 0)` is on the identity component of `E′(R)`.
///
/// # Errors
/// [`Error::SingularCurve`] when `b(a² − 4b) = 0`.
///
/// # Example
/// `y² = x³ − x`: `E(R)` has two components, `E′: y² = x³ + 4x` one,
/// containing `(0, 0)`; so `|W_R| = 2·2/1/2 = 2`.
/// ```text
/// use isodescent::selmer::image_size::real_count_terms;
/// let t = real_count_terms(&0.into(), &(-1).into()).unwrap();
/// assert_eq!((t.components, t.components_dual, t.kernel_on_identity), (2, 1, 2));
/// assert_eq!(t.size().unwrap(), 2);
/// ```
pub fn real_count_terms(model: &ReducedModel) -> Result<RealCountTerms> {
    let (a, b) = (model.a(), model.b());
    let disc_part = model.quadratic_discriminant();
    // sign Δ_E = sign(a² − 4b), sign Δ_E′ = sign(b).
    let components = if disc_part.is_positive() { 2 } else { 1 };
    let components_dual = if b.is_positive() { 2 } else { 1 };
    // X² + a′X + b′ with a′ = −2a, b′ = a² − 4b has discriminant 16b.
    let (a2, b2) = dual_coefficients(a, b);
    let on_identity = b.is_negative() || (b2.is_positive() && a2.is_positive());
    Ok(RealCountTerms {
        components,
        components_dual,
        kernel_on_identity: if on_identity { 2 } else { 1 },
    })
}

/// The sign rule: `−1 ∈ W_R(E)` iff `b < 0`, or `a > 0` and `a² > 4b`.
///
/// Derivation (elementary): `−1 ∈ W_R` iff `E(R)` has a point with
/// `x < 0` (or `b < 0`, the class of `(0, 0)`), iff `x² + ax + b ≤ 0` for
/// some `x < 0`: when `b < 0` take `x` near 0; when `b > 0` both roots
/// must be real and negative, i.e. `a² > 4b` and `a > 0`.
///
/// # Errors
/// [`Error::SingularCurve`] when `b(a² − 4b) = 0`.
///
/// # Example
/// `y² = x³ + 3x² + x`: `b > 0`, `a = 3 > 0`, `9 > 4`, so `−1 ∈ W_R`
/// (indeed `x = −1/2` gives `y² = 1/8`).
/// ```text
/// use isodescent::selmer::image_size::real_sign_rule;
/// assert!(real_sign_rule(&3.into(), &1.into()).unwrap());
/// assert!(!real_sign_rule(&(-3).into(), &1.into()).unwrap());
/// ```
pub fn real_sign_rule(model: &ReducedModel) -> Result<bool> {
    let (a, b) = (model.a(), model.b());
    let disc_part = model.quadratic_discriminant();
    Ok(b.is_negative() || (a.is_positive() && disc_part.is_positive()))
}

/// The predicted size of `W_v(E) = E(Q_v)/ψE′(Q_v)` for
/// `E: y² = x³ + ax² + bx` at `place`: [`RealCountTerms::size`] at `R`,
/// [`PadicCountTerms::size`] at a prime (module docs for the formulas and
/// [Schaefer96, Lemma 3.8] for the p-adic one).
///
/// # Errors
/// [`Error::SingularCurve`] when `b(a² − 4b) = 0`.
///
/// # Cost
/// Two runs of Tate's algorithm at a prime; O(1) at `R`.
///
/// # Example
/// `y² = x³ − x`: sizes 2 at `R`, 2 at 2, 2 at 3 (good reduction).
/// ```text
/// use isodescent::selmer::image_size::predicted_local_image_size;
/// use isodescent::local::{Place, Prime};
/// let s = |v: Place| predicted_local_image_size(&0.into(), &(-1).into(), &v).unwrap();
/// assert_eq!(s(Place::Real), 2);
/// assert_eq!(s(Place::Finite(Prime::two())), 2);
/// assert_eq!(s(Place::Finite(Prime::small(3).unwrap())), 2);
/// ```
pub fn predicted_local_image_size(model: &ReducedModel, place: &Place) -> Result<u64> {
    match place {
        Place::Real => real_count_terms(model)?.size(),
        Place::Finite(p) => padic_count_terms(model, p)?.size(),
    }
}

/// `log₂` of [`predicted_local_image_size`], the predicted `dim W_v`.
///
/// # Errors
/// Those of [`predicted_local_image_size`].
pub fn predicted_local_image_dimension(model: &ReducedModel, place: &Place) -> Result<u32> {
    Ok(predicted_local_image_size(model, place)?.trailing_zeros())
}

/// The places `R` and each of `primes`, sorted, without repetitions.
fn places_for(primes: &[Prime]) -> Vec<Place> {
    let mut places = vec![Place::Real];
    places.extend(primes.iter().cloned().map(Place::Finite));
    places.sort();
    places.dedup();
    places
}

/// Compares, at `R` and at each of `primes`, the predicted
/// `|W_v(E)|` ([`predicted_local_image_size`]) with the size
/// `2^dim` of the local image computed by local solvability
/// ([`crate::quartic::local_image`]). Returns `(place, predicted,
/// computed)` for each place, `R` first, primes ascending.
///
/// The caller should pass the primes of `2b(a² − 4b)`: at every other
/// prime both numbers are 2 (and any extra prime is allowed).
///
/// # Errors
/// [`Error::SingularCurve`] when `b(a² − 4b) = 0`; those of
/// [`crate::quartic::local_image`] ([`Error::BudgetExhausted`]).
///
/// # Cost
/// `2 + 4·(odd primes) + 8` local solvability tests and two runs of
/// Tate's algorithm per prime.
///
/// # Example
/// ```text
/// use isodescent::selmer::image_size::check_local_images;
/// use isodescent::local::Prime;
/// use isodescent::Budget;
/// let primes = [Prime::two(), Prime::small(5).unwrap()];
/// let rows = check_local_images(&0.into(), &(-25).into(), &primes, &mut Budget::unlimited()).unwrap();
/// assert_eq!(rows.len(), 3);
/// assert!(rows.iter().all(|(_, p, c)| p == c));
/// ```
pub fn check_local_images(
    model: &ReducedModel,
    primes: &[Prime],
    budget: &mut Budget,
) -> Result<Vec<(Place, u64, u64)>> {
    let mut rows = Vec::new();
    for v in places_for(primes) {
        let predicted = predicted_local_image_size(model, &v)?;
        let w = local_image(model, &v, budget)?;
        rows.push((v, predicted, 1u64 << w.dimension));
    }
    Ok(rows)
}

/// True when [`check_local_images`] finds agreement at every place.
///
/// # Errors
/// Those of [`check_local_images`].
///
/// # Example
/// ```text
/// use isodescent::selmer::image_size::local_images_agree;
/// use isodescent::local::Prime;
/// use isodescent::Budget;
/// let primes = [Prime::two(), Prime::small(3).unwrap()];
/// assert!(local_images_agree(&0.into(), &3.into(), &primes, &mut Budget::unlimited()).unwrap());
/// ```
pub fn local_images_agree(
    model: &ReducedModel,
    primes: &[Prime],
    budget: &mut Budget,
) -> Result<bool> {
    Ok(check_local_images(model, primes, budget)?
        .iter()
        .all(|(_, p, c)| p == c))
}

/// True when every already computed local image of
/// `E: y² = x³ + ax² + bx` has the predicted size `2^dimension =
/// predicted_local_image_size(model, place)`; false on a mismatch or when
/// a prediction fails (singular input). Needs no budget: meant for a
/// debug assertion next to the computation of the images.
///
/// # Example
/// ```text
/// use isodescent::selmer::image_size::images_match_prediction;
/// use isodescent::quartic::local_image;
/// use isodescent::local::{Place, Prime};
/// use isodescent::Budget;
/// let (a, b) = (0.into(), (-1).into());
/// let w: Vec<_> = [Place::Real, Place::Finite(Prime::two())]
///     .iter()
///     .map(|v| local_image(&a, &b, v, &mut Budget::unlimited()).unwrap())
///     .collect();
/// assert!(images_match_prediction(&a, &b, &w));
/// ```
pub fn images_match_prediction(model: &ReducedModel, images: &[LocalImage]) -> bool {
    images.iter().all(|w| {
        matches!(predicted_local_image_size(model, &w.place),
                 Ok(s) if s == 1u64 << w.dimension)
    })
}

/// `Σ_v (dim W_v(E′) − 1)` over the given local images of the codomain
/// side `E′`: by Cassels' formula \[Cassels65\] (module docs) this equals
/// `dim Sel^φ(E) − dim Sel^ψ(E′)`, i.e. dim of the codomain side's Selmer
/// group minus dim of the domain side's, when the images cover `R` and
/// every prime of `2b(a² − 4b)`.
///
/// # Example
/// `y² = x³ − x`: `E′: y² = x³ + 4x` has `|W_R(E′)| = 1`, `|W_2(E′)| = 4`,
/// so the sum is `−1 + 1 = 0`.
/// ```text
/// use isodescent::selmer::image_size::selmer_difference_from_images;
/// use isodescent::quartic::local_image;
/// use isodescent::local::{Place, Prime};
/// use isodescent::Budget;
/// let w: Vec<_> = [Place::Real, Place::Finite(Prime::two())]
///     .iter()
///     .map(|v| local_image(&0.into(), &4.into(), v, &mut Budget::unlimited()).unwrap())
///     .collect();
/// assert_eq!(selmer_difference_from_images(&w), 0);
/// ```
pub fn selmer_difference_from_images(codomain_images: &[LocalImage]) -> i64 {
    codomain_images.iter().map(|w| w.dimension as i64 - 1).sum()
}

/// `Σ_v (log₂ |W_v(E′)| − 1)` with every `|W_v(E′)|` *predicted* from
/// Tamagawa numbers and minimal models ([`predicted_local_image_size`] on
/// `E′ = (−2a, a² − 4b)`), over `R` and `primes`: Cassels' formula
/// \[Cassels65\] then gives `dim Sel^φ(E) − dim Sel^ψ(E′)` without any
/// local solvability test, when `primes` holds the primes of
/// `2b(a² − 4b)`.
///
/// # Errors
/// [`Error::SingularCurve`] when `b(a² − 4b) = 0`.
///
/// # Example
/// `y² = x³ − x`: the codomain `y² = x³ + 4x` has predicted sizes 1 at `R`
/// and `2 · c_2(E′)/c_2(E) · 2^{1 + 0 − 1} = 2 · 4/2 = 4` at 2 (its dual
/// `y² = x³ − 16x` needs `u = 2`), so the difference is `−1 + 1 = 0`.
/// ```text
/// use isodescent::selmer::image_size::selmer_difference_from_tamagawa;
/// use isodescent::local::Prime;
/// assert_eq!(selmer_difference_from_tamagawa(&0.into(), &(-1).into(), &[Prime::two()]).unwrap(), 0);
/// ```
pub fn selmer_difference_from_tamagawa(model: &ReducedModel, primes: &[Prime]) -> Result<i64> {
    let dual = model.isogenous()?;
    let mut sum = 0i64;
    for v in places_for(primes) {
        let d = predicted_local_image_dimension(&dual, &v)?;
        sum += i64::from(d) - 1;
    }
    Ok(sum)
}
