//! The second descent: 4-coverings of the homogeneous spaces `C_d`.
//!
//! # Setting
//!
//! Let `E: y² = x³ + a x² + b x` with `b(a² − 4b) ≠ 0`, let `d | b` be a
//! non-square and let
//!
//! ```text
//! C_d:  N² = d M⁴ + a M² e² + (b/d) e⁴ .
//! ```
//!
//! The first descent decides whether `C_d` is locally soluble everywhere;
//! when it is and the point search finds nothing, the class `d` is left
//! undecided. [`second_descent`] splits `C_d` further.
//!
//! # Step 1: the conic of `C_d` [Cassels91, Ch. 1], [SilvermanTate92, III.6]
//!
//! Multiplying `C_d` by `4d` and completing the square,
//!
//! ```text
//! X² − d Y² = (a² − 4b) Z²,   X = 2dM² + a e²,  Y = 2N,  Z = e² .   (Q)
//! ```
//!
//! If `C_d` is locally soluble everywhere then so is `(Q)`, hence `(Q)` has
//! a rational point (Hasse–Minkowski, [Serre73, IV.3.2, Thm. 8]), found by
//! [`crate::conic::solve_diagonal_with_primes`]. The conic layer then
//! parametrises `(Q)` by integral binary quadratic forms,
//! `(X : Y : Z) = (q₁ : q₂ : q₃)(u, v)`, a bijection `P¹(Q) → Q(Q)`.
//! Put `F = q₃` and `G = q₁ − a q₃`, so `Z = F(u, v)`, `X − aZ = G(u, v)`.
//!
//! # Step 2: the finite set of twists `λ` (Lemma Λ)
//!
//! **Lemma Λ.** If `C_d` has a rational point with `e ≠ 0`, there are
//! coprime integers `(u, v)`, a square-free integer `λ` and rationals
//! `s ≠ 0`, `t` with
//!
//! ```text
//! F(u, v) = λ s²,   G(u, v) = 2dλ t² ,                                 (D_λ)
//! ```
//!
//! and every prime dividing `λ` divides `2·d·R`, where `R = Res(F, G) ≠ 0`.
//!
//! *Proof.* The point gives `(2dM² + ae², 2N, e²) = μ·(q₁, q₂, q₃)(u, v)`
//! with `(u, v)` coprime and `μ ∈ Q*`. Then `F(u, v) = e²/μ` and
//! `G(u, v) = 2dM²/μ`; let `λ` be the square-free integer in the square
//! class of `μ` (equivalently of `F(u, v)`). Let `p | λ` be a prime with
//! `p ∤ 2d`. Then `v_p(F(u, v))` is odd, so `p | F(u, v)`, and `G(u, v)` is
//! `0` or has `v_p ≡ v_p(2dλ) ≡ 1 (mod 2)`; either way `p | G(u, v)`.
//! For binary quadratics there are linear forms `A₁, B₁, A₂, B₂` with
//! `A₁F + B₁G = R u³` and `A₂F + B₂G = R v³` (the resultant times every
//! monomial of degree `deg F + deg G − 1` lies in the ideal `(F, G)`
//! [Cohen93, §3.3], section from memory), so `gcd(F(u, v), G(u, v)) | R·gcd(u³, v³) = R`.
//! Finally `R ≠ 0`: a common root of `F` and `G` over `Q̄` would be a point
//! of `(Q)` with `Z = X = 0`, hence `d Y² = 0`, hence `Y = 0`, but the
//! parametrisation never vanishes. ∎
//!
//! So `λ` runs over the signed square-free products of the primes of
//! `2·d·R`: a set of `2^(k+1)` elements for `k` such primes.
//!
//! Conversely a point `(u, v, s, t)` of `D_λ` with `s ≠ 0` gives the point
//!
//! ```text
//! (M : e : N) = (t : s : q₂(u, v)/(2λ))   on C_d,
//! (x, y) = (d t²/s², d t N/s³)            on E,
//! ```
//!
//! because `λ(q₁, q₂, q₃)(u, v)` satisfies `λq₃ = (λs)²` and
//! `λ(q₁ − a q₃) = 2d(λt)²`, i.e. it is `(X, Y, Z)` for
//! `(M, e, N) = (λt, λs, λq₂/2)`, which is the point above after the weighted
//! scaling `(M, e, N) ↦ (M/λ, e/λ, N/λ²)`. (`s = 0` would need a rational
//! root of `F`, i.e. a rational point of `(Q)` with `Z = 0`, i.e. `d` a square.)
//!
//! # Step 3: each `D_λ`
//!
//! `D_λ` maps onto the two conics `λ s² = F(u, v)` ("the F-conic") and
//! `2dλ t² = G(u, v)` ("the G-conic"). Local solubility of a conic
//! `c s² = A u² + B uv + C v²` at a place `v` is the Hilbert symbol
//! condition `(Ac, −Ac·D)_v = 1` with `D = B² − 4AC` (when `A ≠ 0`; swap
//! `A, C` when `A = 0`; when `A = C = 0` the conic has the point
//! `(c, B, B)`): `4A·F = (2Au + Bv)² − D v²`, so the conic is
//! `U² − D V² − 4Ac S² = 0`, and [Serre73, IV.2.2, Thm. 6] gives the
//! criterion; only `R`, `2` and the primes of `A·D·c` can fail.
//!
//! * If the F-conic is soluble everywhere, it has a rational point; the
//!   conic layer parametrises it, `(u, v, s) = (r₁, r₂, r₃)(m, n)`, and the
//!   second equation becomes the quartic **4-covering**
//!   `y² = g_λ(m, n) = 2dλ·G(r₁, r₂)(m, n)` with `y = 2dλt`. A rational point
//!   of `D_λ` is a rational point of `y² = g_λ` and conversely. We divide
//!   `g_λ` by squares of its content (`g_λ ↦ g_λ/k²`, `y ↦ y/k`) and reduce
//!   it by unimodular substitutions (the point search works better on small
//!   coefficients). `g_λ` is then tested for local solubility at `R`, `2`
//!   and every prime of its discriminant — no other prime can obstruct:
//!   for odd `p ∤ Δ(g_λ)` the reduction is a smooth genus-one curve, which
//!   has an `F_p`-point by the Hasse–Weil bound [Silverman09, V.1.1], and it
//!   lifts by Hensel's lemma. The discriminant is stripped of the primes
//!   already known and the cofactor is factored with the budget.
//! * If the F-conic is insoluble at `v` but the G-conic is soluble
//!   everywhere, the same construction with the roles exchanged gives the
//!   4-covering `y² = h_λ = λ·F(r₁′, r₂′)` (`y = λs`), a model of `D_λ`
//!   with no `Q_v`-point (a `Q_v`-point would give one on the F-conic).
//!   That quartic, re-checked by [`locally_soluble`], is the evidence.
//! * If both conics are insoluble, `D_λ` has no quartic model over `Q` in
//!   general; the evidence is then the F-conic and its bad place.
//!
//! # Outcomes
//!
//! * Every `D_λ` insoluble somewhere: no rational point on `C_d`
//!   ([`SecondDescentOutcome::NoPoint`]), so `d ∉ α(E(Q))`.
//! * A point found on some `g_λ`: mapped back to `C_d` and `E`, verified on
//!   both ([`SecondDescentOutcome::Point`]).
//! * Otherwise [`SecondDescentOutcome::Undecided`], with the surviving
//!   coverings.
//!
//! # Example (hand-checkable)
//!
//! `E: y² = x³ − 68x`, `d = 2`: `C_2: N² = 2M⁴ − 34e⁴`. With
//! `X = e/M`, `Y = N/(2M²)` this is `2Y² = 1 − 17X⁴`, the curve of
//! [Lind40, Reichardt42], locally soluble everywhere without a rational
//! point. Here `(Q)` is `X² − 2Y² = 272 Z²`, `Res(F, G) = 4352 = 2⁸·17`, so
//! the twists are `λ ∈ {±1, ±2, ±17, ±34}`; each `D_λ` has a quartic model
//! insoluble over `R` or `Q_2`, so the second descent returns `NoPoint`.

use std::collections::BTreeSet;

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use crate::arith::{factor, is_perfect_square};
use crate::budget::Budget;
use crate::conic::{
    obvious_conic_point, parametrise, parametrise_diagonal, solve_diagonal_with_primes, TernaryForm,
};
use crate::curve::ReducedModel;
use crate::error::{Error, Result};
use crate::local::{hilbert_symbol_int, Place, Prime};
use crate::quartic::minimal::poly_mul;
use crate::quartic::{
    locally_soluble, search, LocalSolubility, Quartic, QuarticPoint, SearchOptions, SearchOutcome,
};

/// Knobs for [`second_descent`].
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct SecondDescentOptions {
    /// Height bound for the point search on each locally soluble 4-covering
    /// (after reduction): all coprime `(m, n)` with `max(|m|, |n|) ≤ H`.
    pub search_height: u64,
    /// Work units for the point search on one 4-covering (a search that
    /// runs out is reported, not an error).
    pub search_units: u64,
    /// Most twists `λ` examined; more (a very large `2·d·Res`) is an
    /// [`Error::BudgetExhausted`].
    pub max_twists: usize,
    /// Reduce each 4-covering first by a positive definite quadratic
    /// covariant built from its roots (Gauss reduction of
    /// `Σ |x − α_j z|²/|g′(α_j)|`), then by the greedy steps; default
    /// false (the greedy steps only).
    pub covariant_reduction: bool,
}

impl Default for SecondDescentOptions {
    fn default() -> Self {
        SecondDescentOptions {
            search_height: 64,
            search_units: 20_000_000,
            max_twists: 1 << 12,
            covariant_reduction: false,
        }
    }
}

impl SecondDescentOptions {
    /// Defaults with another search height.
    pub(crate) fn with_search_height(mut self, h: u64) -> Self {
        self.search_height = h;
        self
    }
}

/// Which of the two conics of `D_λ` a piece of evidence is built on.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum ConicSide {
    /// `λ s² = F(u, v)`, `F = q₃`.
    F,
    /// `2dλ t² = G(u, v)`, `G = q₁ − a q₃`.
    G,
}

/// The curve that carries one obstruction.
// The quartic variant carries its whole construction so that it can be
// re-checked; evidence is built once per twist, so its size does not matter.
#[allow(clippy::large_enum_variant)]
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum ObstructedCurve {
    /// A quartic model `y² = g(m, n)` of `D_λ`, `g = coeffs` (leading
    /// first). It was built by parametrising the conic on side `via` by
    /// the forms `parametrisation` (`(u, v, s_or_t) = (r₁, r₂, r₃)(m, n)`)
    /// and substituting into the other conic's equation, then dividing by
    /// `square_factor²` and applying the unimodular substitution `frame`
    /// (`(m, n)_old = frame·(m, n)_new`, rows `[[α, β], [γ, δ]]`).
    Quartic {
        /// `[g4, g3, g2, g1, g0]`.
        coeffs: [BigInt; 5],
        /// The conic that was parametrised.
        via: ConicSide,
        /// `[r₁, r₂, r₃]`, each `[A, B, C]` for `A m² + B mn + C n²`.
        parametrisation: [[BigInt; 3]; 3],
        /// `k` with `g = (other conic's form)(r₁, r₂)·c / k²` (before `frame`).
        square_factor: BigInt,
        /// The unimodular substitution applied last.
        frame: [[BigInt; 2]; 2],
    },
    /// The conic `scale·s² = A u² + B uv + C v²` (the F-conic, with
    /// `scale = λ`), when neither conic of `D_λ` is soluble.
    Conic {
        /// The coefficient of `s²`.
        scale: BigInt,
        /// `[A, B, C]`.
        form: [BigInt; 3],
    },
}

/// One twist `λ` whose covering `D_λ` has no point over `Q_v`.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct TwistObstruction {
    /// The square-free twist `λ`.
    pub lambda: BigInt,
    /// The curve (a model or image of `D_λ`) with no `Q_v`-point.
    pub curve: ObstructedCurve,
    /// The place `v`.
    pub place: Place,
}

impl TwistObstruction {
    /// The covering as five coefficients `[c4, c3, c2, c1, c0]` of
    /// `y² = c4 m⁴ + … + c0 n⁴` when it is a quartic model of `D_λ`;
    /// `None` for a conic obstruction (no quartic model was built).
    pub fn quartic_coefficients(&self) -> Option<&[BigInt; 5]> {
        match &self.curve {
            ObstructedCurve::Quartic { coeffs, .. } => Some(coeffs),
            ObstructedCurve::Conic { .. } => None,
        }
    }
}

/// A 4-covering that is locally soluble everywhere, with what the search
/// on it found (nothing, or it ran out of budget).
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct SurvivingCovering {
    /// The twist `λ`.
    pub lambda: BigInt,
    /// The reduced quartic `g_λ`.
    pub covering: [BigInt; 5],
    /// The search's outcome on it.
    pub search: SearchOutcome,
}

/// The evidence of [`SecondDescentOutcome::NoPoint`]: the parametrisation
/// of `(Q)`, the complete list of twists and one obstruction per twist.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct NoPointEvidence {
    /// `[q₁, q₂, q₃]` parametrising `X² − dY² = (a² − 4b)Z²`.
    pub conic_forms: [[BigInt; 3]; 3],
    /// `Res(F, G)` with `F = q₃`, `G = q₁ − a q₃`.
    pub resultant: BigInt,
    /// One obstruction per `λ`, in the order of the twist list.
    pub obstructions: Vec<TwistObstruction>,
}

/// What the second descent found for one class `d`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SecondDescentOutcome {
    /// A rational point of `C_d`, found on a 4-covering and verified.
    Point {
        /// `(M, e, N)` on the integral model `N² = dM⁴ + aM²e² + (b/d)e⁴`,
        /// normalised as a [`QuarticPoint`] (`x = M`, `z = e`, `y = |N|`).
        space_point: QuarticPoint,
        /// `x = d M²/e²` of the point of `E`.
        point_x: BigRational,
        /// `y = d M N/e³` of the point of `E`.
        point_y: BigRational,
        /// The twist `λ`.
        lambda: BigInt,
        /// The 4-covering the point was found on.
        covering: [BigInt; 5],
        /// The point on the covering.
        covering_point: QuarticPoint,
    },
    /// `C_d` has no rational point: every `D_λ` is locally insoluble.
    NoPoint(NoPointEvidence),
    /// Some 4-covering is soluble everywhere and the search found nothing.
    Undecided {
        /// The locally soluble coverings with their searches.
        survivors: Vec<SurvivingCovering>,
        /// The twists that are obstructed.
        obstructions: Vec<TwistObstruction>,
    },
}

impl SecondDescentOutcome {
    /// A short word: "point", "no_point" or "undecided".
    pub(crate) fn word(&self) -> &'static str {
        match self {
            SecondDescentOutcome::Point { .. } => "point",
            SecondDescentOutcome::NoPoint(_) => "no_point",
            SecondDescentOutcome::Undecided { .. } => "undecided",
        }
    }
}

// ---------------------------------------------------------------------------
// Binary forms as coefficient vectors: index i is the coefficient of
// m^(deg − i) n^i.

type Form2 = [BigInt; 3];

fn eval2(f: &Form2, u: &BigInt, v: &BigInt) -> BigInt {
    &f[0] * u * u + &f[1] * u * v + &f[2] * v * v
}

/// `f(r₁, r₂)` for a binary quadratic `f` and binary quadratics `r₁, r₂`:
/// a binary quartic.
fn compose(f: &Form2, r1: &Form2, r2: &Form2) -> [BigInt; 5] {
    let a = poly_mul(r1, r1);
    let b = poly_mul(r1, r2);
    let c = poly_mul(r2, r2);
    let mut out: [BigInt; 5] = Default::default();
    for i in 0..5 {
        out[i] = &f[0] * &a[i] + &f[1] * &b[i] + &f[2] * &c[i];
    }
    out
}

fn disc2(f: &Form2) -> BigInt {
    &f[1] * &f[1] - BigInt::from(4) * &f[0] * &f[2]
}

/// The resultant of two binary quadratics:
/// `(a₁c₂ − a₂c₁)² − (a₁b₂ − a₂b₁)(b₁c₂ − b₂c₁)` (common practice).
fn resultant2(f: &Form2, g: &Form2) -> BigInt {
    let (a1, b1, c1) = (&f[0], &f[1], &f[2]);
    let (a2, b2, c2) = (&g[0], &g[1], &g[2]);
    let x = a1 * c2 - a2 * c1;
    &x * &x - (a1 * b2 - a2 * b1) * (b1 * c2 - b2 * c1)
}

/// Machine words of the largest entry of `xs` (at least 1).
fn words<'a>(xs: impl IntoIterator<Item = &'a BigInt>) -> u64 {
    xs.into_iter().map(|x| x.bits() / 64 + 1).max().unwrap_or(1)
}

/// The quartic `g(α m + β n, γ m + δ n)`, charged by operand size: about
/// 50 products of a coefficient-sized by a substitution-sized number, so
/// `50 · words(g) · words(t)` units (schoolbook cost, common practice).
fn transform4(g: &[BigInt; 5], t: &[[BigInt; 2]; 2], budget: &mut Budget) -> Result<[BigInt; 5]> {
    let wt = words(t.iter().flatten());
    let units = 50u64
        .saturating_mul(words(g.iter()).saturating_add(4 * wt))
        .saturating_mul(wt);
    spend(budget, units, "transforming a 4-covering")?;
    Ok(transform4_raw(g, t))
}

fn transform4_raw(g: &[BigInt; 5], t: &[[BigInt; 2]; 2]) -> [BigInt; 5] {
    crate::quartic::minimal::substitute(g, t)
}

fn mat_mul(a: &[[BigInt; 2]; 2], b: &[[BigInt; 2]; 2]) -> [[BigInt; 2]; 2] {
    let e = |i: usize, j: usize| &a[i][0] * &b[0][j] + &a[i][1] * &b[1][j];
    [[e(0, 0), e(0, 1)], [e(1, 0), e(1, 1)]]
}

fn identity2() -> [[BigInt; 2]; 2] {
    [
        [BigInt::one(), BigInt::zero()],
        [BigInt::zero(), BigInt::one()],
    ]
}

/// The sum of squared coefficients, charged `5 · words(g)²` units.
fn size4(g: &[BigInt; 5], budget: &mut Budget) -> Result<BigInt> {
    let w = words(g.iter());
    spend(
        budget,
        5u64.saturating_mul(w).saturating_mul(w),
        "reducing a 4-covering",
    )?;
    Ok(g.iter().map(|c| c * c).sum())
}

/// A complex number for the root finder of [`covariant_frame`].
#[derive(Clone, Copy, Debug)]
struct Cx(f64, f64);

impl Cx {
    fn add(self, o: Cx) -> Cx {
        Cx(self.0 + o.0, self.1 + o.1)
    }
    fn sub(self, o: Cx) -> Cx {
        Cx(self.0 - o.0, self.1 - o.1)
    }
    fn mul(self, o: Cx) -> Cx {
        Cx(self.0 * o.0 - self.1 * o.1, self.0 * o.1 + self.1 * o.0)
    }
    fn div(self, o: Cx) -> Cx {
        let n = o.0 * o.0 + o.1 * o.1;
        Cx(
            (self.0 * o.0 + self.1 * o.1) / n,
            (self.1 * o.0 - self.0 * o.1) / n,
        )
    }
    fn abs(self) -> f64 {
        self.0.hypot(self.1)
    }
}

/// The coefficients of `g` as `f64`, all divided by the same power of two
/// so that the largest is about 1 (`None` if `g = 0`).
fn scaled_f64(g: &[BigInt; 5]) -> Option<[f64; 5]> {
    use num_traits::ToPrimitive;
    let bits = g.iter().map(|c| c.bits()).max()?;
    if bits == 0 {
        return None;
    }
    let shift = bits.saturating_sub(60);
    let out = g.clone().map(|c| {
        let v = (&c >> shift).to_f64().unwrap_or(0.0);
        v / 2f64.powi(60.min(bits) as i32)
    });
    out.iter().all(|v| v.is_finite()).then_some(out)
}

/// The roots of `c0 t⁴ + c1 t³ + c2 t² + c3 t + c4` (`c0 ≠ 0`) by the
/// Durand–Kerner iteration (common practice); `None` if it does not settle.
fn quartic_roots(c: &[f64; 5]) -> Option<[Cx; 4]> {
    if c[0] == 0.0 {
        return None;
    }
    let m: Vec<f64> = c.iter().map(|x| x / c[0]).collect();
    let p = |z: Cx| {
        let mut v = Cx(1.0, 0.0);
        for &mi in &m[1..] {
            v = v.mul(z).add(Cx(mi, 0.0));
        }
        v
    };
    let radius = 1.0 + m[1..].iter().fold(0.0f64, |a, x| a.max(x.abs()));
    let seed = Cx(0.4, 0.9);
    let mut z = [Cx(radius, 0.0); 4];
    let mut w = Cx(1.0, 0.0);
    for zi in z.iter_mut() {
        w = w.mul(seed);
        *zi = Cx(w.0 * radius, w.1 * radius);
    }
    for _ in 0..500 {
        let mut moved = 0.0f64;
        for i in 0..4 {
            let mut den = Cx(1.0, 0.0);
            for j in 0..4 {
                if i != j {
                    den = den.mul(z[i].sub(z[j]));
                }
            }
            if den.abs() == 0.0 {
                return None;
            }
            let step = p(z[i]).div(den);
            z[i] = z[i].sub(step);
            moved = moved.max(step.abs() / (1.0 + z[i].abs()));
        }
        if moved < 1e-14 {
            break;
        }
    }
    z.iter()
        .all(|r| r.0.is_finite() && r.1.is_finite())
        .then_some(z)
}

/// A unimodular frame `T` (old = T·new) that reduces the positive definite
/// quadratic form `Q = Σ_j |x − α_j z|²/|g′(α_j)|` over the roots `α_j` of
/// `g(t, 1)` by Gauss's steps (`|B| ≤ A ≤ C`). The weights make `Q` follow
/// the substitutions applied to `g` (for a quartic `g′(α_j)` picks up the
/// square of the factor `|x − α_j z|` loses; common practice for reduction
/// covariants of binary forms), so a reduced `Q` means a quartic whose
/// points of small height have `x` and `z` of the same size. Floating
/// point only chooses `T`; any unimodular `T` keeps the points in
/// bijection, so nothing proven depends on it. The identity when the roots
/// cannot be found (leading coefficient 0, or no convergence).
fn covariant_frame(g: &[BigInt; 5]) -> [[BigInt; 2]; 2] {
    let id = identity2();
    let Some(c) = scaled_f64(g) else { return id };
    let Some(roots) = quartic_roots(&c) else {
        return id;
    };
    let dg = |z: Cx| {
        let mut v = Cx(4.0 * c[0], 0.0);
        for (k, &ck) in c[1..4].iter().enumerate() {
            v = v.mul(z).add(Cx((3 - k) as f64 * ck, 0.0));
        }
        v
    };
    let (mut a, mut b, mut cc) = (0.0f64, 0.0f64, 0.0f64);
    for r in roots {
        let d = dg(r).abs();
        if !(d.is_finite() && d > 0.0) {
            return id;
        }
        let t = 1.0 / d;
        a += t;
        b -= 2.0 * t * r.0;
        cc += t * (r.0 * r.0 + r.1 * r.1);
    }
    if !(a > 0.0 && cc > 0.0 && 4.0 * a * cc > b * b) {
        return id;
    }
    let mut t = [[1i64, 0i64], [0i64, 1i64]];
    for _ in 0..200 {
        if b.abs() > a {
            let k = (b / (2.0 * a)).round();
            if k.is_nan() || k.abs() >= 1e12 {
                return id;
            }
            // x = m − k n, z = n
            cc += a * k * k - b * k;
            b -= 2.0 * k * a;
            let k = k as i64;
            let (Some(t01), Some(t11)) = (
                t[0][1].checked_sub(k.saturating_mul(t[0][0])),
                t[1][1].checked_sub(k.saturating_mul(t[1][0])),
            ) else {
                return id;
            };
            t[0][1] = t01;
            t[1][1] = t11;
        } else if a > cc {
            // x = −n, z = m
            std::mem::swap(&mut a, &mut cc);
            b = -b;
            t = [[t[0][1], -t[0][0]], [t[1][1], -t[1][0]]];
        } else {
            break;
        }
    }
    t.map(|row| row.map(BigInt::from))
}

/// Greedy reduction of a binary quartic by the substitutions
/// `m ↦ m + k n` (with `k` from the shift that kills `g₃`, and `±1`) and
/// `m ↔ n`, each accepted only if it lowers the sum of squared
/// coefficients (common practice; any unimodular substitution keeps the
/// rational points in bijection). Returns the new quartic and the frame.
/// Every transform and size is charged by operand size (at most 200 rounds
/// of at most 9 candidate moves).
fn reduce_quartic(g: &[BigInt; 5], budget: &mut Budget) -> Result<([BigInt; 5], [[BigInt; 2]; 2])> {
    let mut cur = g.clone();
    let mut frame = identity2();
    let mut best = size4(&cur, budget)?;
    for _ in 0..200 {
        let mut moves: Vec<[[BigInt; 2]; 2]> = Vec::new();
        let z = BigInt::zero;
        let o = BigInt::one;
        moves.push([[z(), o()], [o(), z()]]);
        for k in [BigInt::one(), -BigInt::one()] {
            moves.push([[o(), k.clone()], [z(), o()]]);
            moves.push([[o(), z()], [k, o()]]);
        }
        if !cur[0].is_zero() {
            let k = (-&cur[1]).div_floor(&(BigInt::from(4) * &cur[0]));
            if !k.is_zero() {
                moves.push([[o(), k.clone()], [z(), o()]]);
                moves.push([[o(), k + 1], [z(), o()]]);
            }
        }
        if !cur[4].is_zero() {
            let k = (-&cur[3]).div_floor(&(BigInt::from(4) * &cur[4]));
            if !k.is_zero() {
                moves.push([[o(), z()], [k.clone(), o()]]);
                moves.push([[o(), z()], [k + 1, o()]]);
            }
        }
        let mut improved = false;
        for t in moves {
            let cand = transform4(&cur, &t, budget)?;
            let s = size4(&cand, budget)?;
            if s < best {
                best = s;
                cur = cand;
                frame = mat_mul(&frame, &t);
                improved = true;
                break;
            }
        }
        if !improved {
            break;
        }
    }
    Ok((cur, frame))
}

fn spend(budget: &mut Budget, units: u64, stage: &str) -> Result<()> {
    budget.spend(units).map_err(|_| Error::BudgetExhausted {
        stage: stage.into(),
    })
}

/// The distinct primes of `n ≠ 0`, added to `into`.
fn add_primes(n: &BigInt, budget: &mut Budget, into: &mut BTreeSet<BigInt>) -> Result<()> {
    if n.is_zero() {
        return Ok(());
    }
    let f = factor(n, budget)?;
    into.extend(f.primes().cloned());
    Ok(())
}

/// The places `R`, `2` and the given primes.
fn places_of(primes: &BTreeSet<BigInt>) -> Result<Vec<Place>> {
    let mut out = vec![Place::Real, Place::Finite(Prime::two())];
    for p in primes {
        if p != &BigInt::from(2) {
            out.push(Place::Finite(Prime::new(p.clone())?));
        }
    }
    Ok(out)
}

/// Does `c s² = f(u, v)` have a nontrivial solution over `Q_v`? (The
/// Hilbert-symbol criterion of the module docs.) `f` must have non-zero
/// discriminant and `c ≠ 0`.
fn conic_soluble_at(f: &Form2, c: &BigInt, place: &Place) -> Result<bool> {
    let d = disc2(f);
    let lead = if !f[0].is_zero() {
        &f[0]
    } else if !f[2].is_zero() {
        &f[2]
    } else {
        return Ok(true);
    };
    let x = lead * c;
    let y = -(&x * &d);
    Ok(hilbert_symbol_int(&x, &y, place)? == 1)
}

/// The primes at which `c s² = f(u, v)` can be insoluble, besides `R`, `2`
/// and the primes of `c`: those of `A·D` (`A` the leading coefficient used
/// by [`conic_soluble_at`]).
fn conic_primes(f: &Form2, budget: &mut Budget) -> Result<BTreeSet<BigInt>> {
    let mut s = BTreeSet::new();
    let lead = if !f[0].is_zero() { &f[0] } else { &f[2] };
    add_primes(lead, budget, &mut s)?;
    add_primes(&disc2(f), budget, &mut s)?;
    Ok(s)
}

/// A rational point `(u, v, s)` of `c s² = f(u, v)`, known to be locally
/// soluble everywhere, and the parametrisation of the conic through it.
fn parametrise_binary_conic(
    f: &Form2,
    c: &BigInt,
    primes: &BTreeSet<BigInt>,
    budget: &mut Budget,
) -> Result<[[BigInt; 3]; 3]> {
    let d = disc2(f);
    let point: [BigInt; 3] = if f[0].is_zero() && f[2].is_zero() {
        [c.clone(), f[1].clone(), f[1].clone()]
    } else {
        let swap = f[0].is_zero();
        let (a, b) = if swap { (&f[2], &f[1]) } else { (&f[0], &f[1]) };
        // U² − D V² − 4Ac S² = 0 with U = 2A u + B v, V = v (u, v swapped
        // when A = 0).
        let mut ps: Vec<BigInt> = primes.iter().cloned().collect();
        ps.push(BigInt::from(2));
        let sol = solve_diagonal_with_primes(
            &BigInt::one(),
            &(-&d),
            &(-(BigInt::from(4) * a * c)),
            &ps,
            budget,
        )?;
        let Some([uu, vv, ss]) = sol.point().cloned() else {
            return Err(Error::Internal {
                check: format!("the conic {c}·s² = {f:?} was expected to be soluble"),
            });
        };
        let x = &uu - b * &vv;
        let y = BigInt::from(2) * a * &vv;
        let s = BigInt::from(2) * a * &ss;
        if swap {
            [y, x, s]
        } else {
            [x, y, s]
        }
    };
    let form = TernaryForm::new(
        f[0].clone(),
        f[2].clone(),
        -c.clone(),
        BigInt::zero(),
        BigInt::zero(),
        f[1].clone(),
    );
    let par = parametrise(&form, &point)?;
    Ok(par.forms)
}

/// Removes from `n` every prime of `known`; returns the cofactor (≥ 1).
fn strip_known(n: &BigInt, known: &BTreeSet<BigInt>) -> BigInt {
    let mut m = n.abs();
    for p in known {
        if p <= &BigInt::one() {
            continue;
        }
        while !m.is_zero() && m.is_multiple_of(p) {
            m /= p;
        }
    }
    m
}

/// The square-free twists: ±(products of subsets of `primes`).
fn twists(primes: &[BigInt], max: usize) -> Result<Vec<BigInt>> {
    let k = primes.len();
    if k + 1 >= 63 || (1usize << (k + 1)) > max {
        return Err(Error::BudgetExhausted {
            stage: format!("second descent: 2^{} twists exceed the limit {max}", k + 1),
        });
    }
    let mut out = Vec::with_capacity(1 << (k + 1));
    for mask in 0u64..(1u64 << k) {
        let mut l = BigInt::one();
        for (i, p) in primes.iter().enumerate() {
            if (mask >> i) & 1 == 1 {
                l *= p;
            }
        }
        out.push(l.clone());
        out.push(-l);
    }
    Ok(out)
}

/// The largest `k` built from `known` primes with `k² | content(g)`.
fn square_content(g: &[BigInt; 5], known: &BTreeSet<BigInt>) -> BigInt {
    let mut c = g.iter().fold(BigInt::zero(), |acc, x| acc.gcd(x));
    let mut k = BigInt::one();
    if c.is_zero() {
        return k;
    }
    for p in known {
        let p2 = p * p;
        while c.is_multiple_of(&p2) {
            c /= &p2;
            k *= p;
        }
    }
    k
}

/// The input checks shared by [`second_descent`] and [`verify_obstruction`].
fn check_input(a: &BigInt, b: &BigInt, d: &BigInt) -> Result<BigInt> {
    if d.is_zero() {
        return Err(Error::Zero {
            what: "the class d of the homogeneous space".into(),
        });
    }
    let delta = a * a - BigInt::from(4) * b;
    if b.is_zero() || delta.is_zero() {
        return Err(Error::SingularCurve {
            reason: format!("b(a² − 4b) = 0 for y² = x³ + {a}x² + {b}x"),
        });
    }
    if !b.is_multiple_of(d) {
        return Err(Error::InvalidArgument {
            reason: format!("d = {d} does not divide b = {b}"),
        });
    }
    if !d.is_negative() && is_perfect_square(d) {
        return Err(Error::InvalidArgument {
            reason: format!(
                "d = {d} is a square: its class is the image of the identity, nothing to decide"
            ),
        });
    }
    Ok(delta)
}

/// Everything [`second_descent`] builds before looking at the twists.
struct Setup {
    delta: BigInt,
    /// The base point of the parametrisation of `(Q)`.
    base: [BigInt; 3],
    forms: [[BigInt; 3]; 3],
    f: Form2,
    g: Form2,
    resultant: BigInt,
    lambdas: Vec<BigInt>,
    known: BTreeSet<BigInt>,
    /// Reduce the 4-coverings by the root covariant first.
    covariant: bool,
}

/// `max = 0`: build no twist list (the caller names its twists);
/// `given`: the point of `(Q)` to parametrise from (checked), if any.
fn setup(
    a: &BigInt,
    b: &BigInt,
    d: &BigInt,
    check_local: bool,
    max: usize,
    given: Option<&[BigInt; 3]>,
    budget: &mut Budget,
) -> Result<Setup> {
    let delta = check_input(a, b, d)?;
    let mut known = BTreeSet::new();
    known.insert(BigInt::from(2));
    add_primes(b, budget, &mut known)?;
    add_primes(&delta, budget, &mut known)?;
    if check_local {
        let space = Quartic::two_isogeny_space(d, a, b)?;
        for v in places_of(&known)? {
            if let LocalSolubility::Insoluble { place } = locally_soluble(&space, &v, budget)? {
                return Err(Error::InvalidArgument {
                    reason: format!(
                        "C_d for d = {d} on y² = x³ + {a}x² + {b}x has no point over Q_{place}; \
                         the second descent needs a class that is locally soluble everywhere"
                    ),
                });
            }
        }
    }
    if let Some([x, y, z]) = given {
        if x * x - d * y * y != &delta * z * z || (x.is_zero() && y.is_zero() && z.is_zero()) {
            return Err(Error::InvalidArgument {
                reason: format!(
                    "({x}, {y}, {z}) is not a point of X² − dY² = (a² − 4b)Z² for d = {d}"
                ),
            });
        }
    }
    let pt = match given.cloned().or_else(|| obvious_conic_point(d, &delta)) {
        Some(pt) => pt,
        None => {
            let ps: Vec<BigInt> = known.iter().cloned().collect();
            let sol = solve_diagonal_with_primes(&BigInt::one(), &(-d), &(-&delta), &ps, budget)?;
            let Some(pt) = sol.point().cloned() else {
                return Err(Error::InvalidArgument {
                    reason: format!("C_d for d = {d} is not locally soluble everywhere (its conic X² − dY² = (a² − 4b)Z² is insoluble)"),
                });
            };
            pt
        }
    };
    let par = parametrise_diagonal(&BigInt::one(), &(-d), &(-&delta), &pt)?;
    let forms = par.forms;
    let f: Form2 = forms[2].clone();
    let g: Form2 = [0, 1, 2].map(|i| &forms[0][i] - a * &forms[2][i]);
    let resultant = resultant2(&f, &g);
    if resultant.is_zero() || disc2(&f).is_zero() || disc2(&g).is_zero() {
        return Err(Error::Degenerate {
            reason: "internal: the parametrisation of X² − dY² = (a² − 4b)Z² gave dependent forms"
                .into(),
        });
    }
    let mut lam_primes = BTreeSet::new();
    lam_primes.insert(BigInt::from(2));
    add_primes(d, budget, &mut lam_primes)?;
    // The twist list only grows with the primes of the resultant: refuse
    // before factoring it when the primes of 2d alone exceed the limit.
    let k = lam_primes.len();
    if max > 0 && (k + 1 >= 63 || (1usize << (k + 1)) > max) {
        return Err(Error::BudgetExhausted {
            stage: format!(
                "second descent: at least 2^{} twists exceed the limit {max}",
                k + 1
            ),
        });
    }
    add_primes(&resultant, budget, &mut lam_primes)?;
    let lp: Vec<BigInt> = lam_primes.iter().cloned().collect();
    let lambdas = if max > 0 {
        twists(&lp, max)?
    } else {
        Vec::new()
    };
    known.extend(lam_primes);
    Ok(Setup {
        delta,
        base: pt,
        forms,
        f,
        g,
        resultant,
        lambdas,
        known,
        covariant: false,
    })
}

/// The verdict on one twist.
enum TwistVerdict {
    Obstructed(TwistObstruction),
    /// A quartic locally soluble everywhere, with the data to map back.
    Soluble {
        coeffs: [BigInt; 5],
        par: [[BigInt; 3]; 3],
        k: BigInt,
        frame: [[BigInt; 2]; 2],
    },
}

/// A quartic model with its construction: coefficients, the conic's
/// parametrisation, the square factor removed and the reduction frame.
type Model = ([BigInt; 5], [[BigInt; 3]; 3], BigInt, [[BigInt; 2]; 2]);

/// Builds the quartic of `D_λ` by parametrising `side`'s conic.
fn quartic_for(
    side: ConicSide,
    lambda: &BigInt,
    d: &BigInt,
    s: &Setup,
    conic_ps: &BTreeSet<BigInt>,
    budget: &mut Budget,
) -> Result<Model> {
    let two_d_l = BigInt::from(2) * d * lambda;
    let (param_form, param_c, other_form, other_c) = match side {
        ConicSide::F => (&s.f, lambda.clone(), &s.g, two_d_l),
        ConicSide::G => (&s.g, two_d_l, &s.f, lambda.clone()),
    };
    let mut ps = conic_ps.clone();
    add_primes(&param_c, budget, &mut ps)?;
    let par = parametrise_binary_conic(param_form, &param_c, &ps, budget)?;
    let raw = compose(other_form, &par[0], &par[1]).map(|x| x * &other_c);
    let mut known = s.known.clone();
    known.extend(ps);
    let k = square_content(&raw, &known);
    let k2 = &k * &k;
    let scaled = raw.map(|x| x / &k2);
    let (coeffs, frame) = if s.covariant {
        let t = covariant_frame(&scaled);
        let moved = transform4(&scaled, &t, budget)?;
        let (coeffs, polish) = reduce_quartic(&moved, budget)?;
        (coeffs, mat_mul(&t, &polish))
    } else {
        reduce_quartic(&scaled, budget)?
    };
    Ok((coeffs, par, k, frame))
}

fn examine_twist(
    lambda: &BigInt,
    d: &BigInt,
    s: &Setup,
    f_ps: &BTreeSet<BigInt>,
    g_ps: &BTreeSet<BigInt>,
    budget: &mut Budget,
) -> Result<TwistVerdict> {
    let two_d_l = BigInt::from(2) * d * lambda;
    let mut lp = BTreeSet::new();
    add_primes(&two_d_l, budget, &mut lp)?;
    let mut fp = f_ps.clone();
    fp.extend(lp.iter().cloned());
    let mut gp = g_ps.clone();
    gp.extend(lp.iter().cloned());
    let mut f_bad = None;
    for v in places_of(&fp)? {
        spend(budget, 1, "second descent: conic tests")?;
        if !conic_soluble_at(&s.f, lambda, &v)? {
            f_bad = Some(v);
            break;
        }
    }
    let mut g_bad = None;
    for v in places_of(&gp)? {
        spend(budget, 1, "second descent: conic tests")?;
        if !conic_soluble_at(&s.g, &two_d_l, &v)? {
            g_bad = Some(v);
            break;
        }
    }
    match (f_bad, g_bad) {
        (Some(v), Some(_)) => Ok(TwistVerdict::Obstructed(TwistObstruction {
            lambda: lambda.clone(),
            curve: ObstructedCurve::Conic {
                scale: lambda.clone(),
                form: s.f.clone(),
            },
            place: v,
        })),
        (Some(v), None) => {
            let (coeffs, par, k, frame) = quartic_for(ConicSide::G, lambda, d, s, g_ps, budget)?;
            let q = Quartic::new(coeffs.clone())?;
            if locally_soluble(&q, &v, budget)?.is_soluble() {
                return Err(Error::Internal {
                    check: format!("the G-model of D_λ, λ = {lambda}, is soluble at {v} although the F-conic is not"),
                });
            }
            Ok(TwistVerdict::Obstructed(TwistObstruction {
                lambda: lambda.clone(),
                curve: ObstructedCurve::Quartic {
                    coeffs,
                    via: ConicSide::G,
                    parametrisation: par,
                    square_factor: k,
                    frame,
                },
                place: v,
            }))
        }
        (None, g_bad) => {
            let (coeffs, par, k, frame) = quartic_for(ConicSide::F, lambda, d, s, f_ps, budget)?;
            let q = Quartic::new(coeffs.clone())?;
            let obstructed = |place: Place, coeffs: [BigInt; 5], par, k, frame| {
                TwistVerdict::Obstructed(TwistObstruction {
                    lambda: lambda.clone(),
                    curve: ObstructedCurve::Quartic {
                        coeffs,
                        via: ConicSide::F,
                        parametrisation: par,
                        square_factor: k,
                        frame,
                    },
                    place,
                })
            };
            if let Some(v) = g_bad {
                if locally_soluble(&q, &v, budget)?.is_soluble() {
                    return Err(Error::Internal {
                    check: format!("the F-model of D_λ, λ = {lambda}, is soluble at {v} although the G-conic is not"),
                    });
                }
                return Ok(obstructed(v, coeffs, par, k, frame));
            }
            // Places: R, 2 and the primes of the discriminant.
            let disc = q.discriminant();
            let mut ps = s.known.clone();
            ps.extend(f_ps.iter().cloned());
            ps.extend(lp.iter().cloned());
            let rest = strip_known(&disc, &ps);
            let mut disc_primes: BTreeSet<BigInt> = BTreeSet::new();
            add_primes(&rest, budget, &mut disc_primes)?;
            for p in &ps {
                if disc.is_multiple_of(p) {
                    disc_primes.insert(p.clone());
                }
            }
            for v in places_of(&disc_primes)? {
                if let LocalSolubility::Insoluble { place } = locally_soluble(&q, &v, budget)? {
                    return Ok(obstructed(place, coeffs, par, k, frame));
                }
            }
            Ok(TwistVerdict::Soluble {
                coeffs,
                par,
                k,
                frame,
            })
        }
    }
}

/// The second descent on the class `d` of `E: y² = x³ + a x² + b x`.
///
/// **Statement.** Let `d | b` be a non-square with `C_d` locally soluble
/// everywhere. Then `C_d(Q) ≠ ∅` iff some `D_λ(Q) ≠ ∅`, `λ` running over
/// the finite set of Lemma Λ (module docs); this function decides each
/// `D_λ` locally (conics by Hilbert symbols, quartic models by
/// [`locally_soluble`]) and searches the locally soluble quartic models for
/// points. Theorems used: Hasse–Minkowski for conics [Serre73, IV.3.2],
/// the resultant bound (Lemma Λ), Hasse–Weil and Hensel for the good
/// primes of a quartic [Silverman09, V.1.1].
///
/// **Answer.** [`SecondDescentOutcome::Point`] (a verified point of `C_d`
/// and of `E`), [`SecondDescentOutcome::NoPoint`] (one obstruction per
/// twist; re-check with [`verify_obstruction`]), or
/// [`SecondDescentOutcome::Undecided`].
///
/// # Errors
/// [`Error::Zero`] for `d = 0`; [`Error::SingularCurve`] when
/// `b(a² − 4b) = 0`; [`Error::InvalidArgument`] when `d ∤ b`, when `d` is a
/// square (the identity's class), or when `C_d` has no point over some
/// `Q_v` (the caller should pass only classes of the Selmer group);
/// [`Error::FactorBudgetExhausted`] / [`Error::BudgetExhausted`] when
/// `budget` runs out, or when there are more than `options.max_twists`
/// twists. Each point search has its own allowance of
/// `options.search_units` units, also charged to `budget`.
///
/// **Cost.** Factoring `b`, `a² − 4b`, `Res(F, G)`, and per twist a few
/// Hilbert symbols; per locally soluble twist one conic solution, the
/// discriminant's unknown cofactor, local tests at its primes and a search
/// of about `1.2·H²` pairs.
///
/// **Example.** Lind's curve: `a = 0, b = −68, d = 2` gives `NoPoint`
/// (eight twists, each obstructed at `R` or 2). On `y² = x³ + 4·53²x`
/// (2-isogenous to the congruent-number curve of 53) the class `d = 53` has
/// no point of height ≤ 128 on `C_53`, but a 4-covering yields
/// `(M, e) = (119, 143)`, i.e. `x = 53·119²/143² = 750533/20449`.
/// ```
/// use isodescent::second::{second_descent, SecondDescentOptions, SecondDescentOutcome};
/// use isodescent::curve::ReducedModel;
/// use isodescent::Budget;
/// use num_bigint::BigInt;
/// let e = ReducedModel::new(BigInt::from(0), BigInt::from(-68)).unwrap();
/// let out = second_descent(&e, &BigInt::from(2),
///     &SecondDescentOptions::default(), &mut Budget::unlimited()).unwrap();
/// assert!(matches!(out, SecondDescentOutcome::NoPoint(_)));
/// ```
pub fn second_descent(
    model: &ReducedModel,
    d: &BigInt,
    options: &SecondDescentOptions,
    budget: &mut Budget,
) -> Result<SecondDescentOutcome> {
    let (a, b) = (model.a(), model.b());
    let mut s = setup(a, b, d, true, options.max_twists, None, budget)?;
    s.covariant = options.covariant_reduction;
    let f_ps = conic_primes(&s.f, budget)?;
    let g_ps = conic_primes(&s.g, budget)?;
    let mut obstructions = Vec::new();
    let mut soluble = Vec::new();
    for lambda in &s.lambdas {
        match examine_twist(lambda, d, &s, &f_ps, &g_ps, budget)? {
            TwistVerdict::Obstructed(o) => obstructions.push(o),
            TwistVerdict::Soluble {
                coeffs,
                par,
                k,
                frame,
            } => soluble.push((lambda.clone(), coeffs, par, k, frame)),
        }
    }
    if soluble.is_empty() {
        return Ok(SecondDescentOutcome::NoPoint(NoPointEvidence {
            conic_forms: s.forms.clone(),
            resultant: s.resultant.clone(),
            obstructions,
        }));
    }
    let mut survivors = Vec::new();
    for (lambda, coeffs, par, k, frame) in soluble {
        let mut covering = SolubleCovering {
            lambda,
            coeffs,
            par,
            k,
            frame,
        };
        if s.covariant {
            covering = minimise_covering(a, b, covering, budget)?;
        }
        match search_covering(a, b, d, &s, covering, options, budget)? {
            Ok(point) => return Ok(point),
            Err(survivor) => survivors.push(survivor),
        }
    }
    Ok(SecondDescentOutcome::Undecided {
        survivors,
        obstructions,
    })
}

/// The second descent on the class `d` restricted to chosen twists: for
/// each square-free `λ_h` in the normalisation of
/// [`super::pairing`] (the class of the tangent form `h` at a
/// point of `C_d`), the twist of Lemma Λ is `λ = κ·λ_h` with `κ` the square
/// class of the binary form `X₀q₁ − dY₀q₂ − ΔZ₀q₃` (the tangent form at the
/// base point `(X₀, Y₀, Z₀)` = `conic_point` of the parametrisation, a
/// constant times a square: docs/second_descent.md §9). `conic_point` must
/// be the point the classes `λ_h` were computed with
/// ([`super::pairing::ClassLift::conic_point`]). The twists that lift `d` to
/// everywhere locally soluble 2-coverings are a coset computed by linear
/// algebra ([`super::pairing::soluble_twists`]), so the caller hands
/// in a few of them instead of all `2^(k+1)`.
///
/// **Answer.** [`SecondDescentOutcome::Point`] or
/// [`SecondDescentOutcome::Undecided`] (never `NoPoint`: not every twist is
/// examined).
///
/// # Errors
/// As [`second_descent`]; [`Error::Internal`]
/// if a named twist turns out locally insoluble
/// (it contradicts the pairing).
pub fn second_descent_on_twists(
    model: &ReducedModel,
    d: &BigInt,
    conic_point: &[BigInt; 3],
    lambda_h: &[BigInt],
    options: &SecondDescentOptions,
    budget: &mut Budget,
) -> Result<SecondDescentOutcome> {
    let (a, b) = (model.a(), model.b());
    let mut s = setup(a, b, d, false, 0, Some(conic_point), budget)?;
    s.covariant = options.covariant_reduction;
    let [x0, y0, z0] = &s.base;
    let phi: Form2 = [0, 1, 2]
        .map(|i| x0 * &s.forms[0][i] - d * y0 * &s.forms[1][i] - &s.delta * z0 * &s.forms[2][i]);
    if &phi[1] * &phi[1] != BigInt::from(4) * &phi[0] * &phi[2] {
        return Err(Error::Internal {
            check: format!("the tangent form of C_{d} is not a constant times a square"),
        });
    }
    let kappa = if phi[0].is_zero() {
        phi[2].clone()
    } else {
        phi[0].clone()
    };
    if kappa.is_zero() {
        return Err(Error::Internal {
            check: format!("the tangent form of C_{d} vanishes"),
        });
    }
    let f_ps = conic_primes(&s.f, budget)?;
    let g_ps = conic_primes(&s.g, budget)?;
    let mut obstructions = Vec::new();
    let mut survivors = Vec::new();
    for lh in lambda_h {
        let raw = &kappa * lh;
        // square-free part over the known primes; the rest must be a square
        let mut lambda = if raw.is_negative() {
            -BigInt::one()
        } else {
            BigInt::one()
        };
        let mut rest = raw.abs();
        for p in &s.known {
            let mut parity = false;
            while !rest.is_zero() && rest.is_multiple_of(p) {
                rest /= p;
                parity = !parity;
            }
            if parity {
                lambda *= p;
            }
        }
        if !is_perfect_square(&rest) {
            return Err(Error::Internal {
                check: format!("twist {raw} of C_{d} has a prime outside 2·d·Res(F, G)"),
            });
        }
        match examine_twist(&lambda, d, &s, &f_ps, &g_ps, budget)? {
            TwistVerdict::Obstructed(o) => {
                obstructions.push(o);
                return Err(Error::Internal {
                    check: format!(
                        "twist {lambda} of C_{d} is locally insoluble, against the pairing"
                    ),
                });
            }
            TwistVerdict::Soluble {
                coeffs,
                par,
                k,
                frame,
            } => {
                let mut covering = SolubleCovering {
                    lambda: lambda.clone(),
                    coeffs,
                    par,
                    k,
                    frame,
                };
                if s.covariant {
                    covering = minimise_covering(a, b, covering, budget)?;
                }
                // Two twists may give the same quartic up to x ↔ z and
                // x ↦ −x; those substitutions keep the searched box, so
                // the second search would see the same pairs.
                let key = equivalence_key(&covering.coeffs);
                if let Some(seen) = survivors
                    .iter()
                    .find(|sv: &&SurvivingCovering| equivalence_key(&sv.covering) == key)
                {
                    let search = seen.search.clone();
                    survivors.push(SurvivingCovering {
                        lambda,
                        covering: covering.coeffs,
                        search,
                    });
                    continue;
                }
                match search_covering(a, b, d, &s, covering, options, budget)? {
                    Ok(point) => return Ok(point),
                    Err(survivor) => survivors.push(survivor),
                }
            }
        }
    }
    Ok(SecondDescentOutcome::Undecided {
        survivors,
        obstructions,
    })
}

/// The least of `g(x, z)`, `g(z, x)`, `g(−x, z)` and `g(−z, x)` as
/// coefficient vectors: equal keys mean the quartics differ by one of the
/// substitutions `x ↔ z`, `x ↦ −x`, which map the pairs of height ≤ H
/// onto themselves and the points of one curve onto those of the other.
fn equivalence_key(g: &[BigInt; 5]) -> [BigInt; 5] {
    let rev = |c: &[BigInt; 5]| [0, 1, 2, 3, 4].map(|i| c[4 - i].clone());
    let neg =
        |c: &[BigInt; 5]| [0, 1, 2, 3, 4].map(|i| if i % 2 == 1 { -&c[i] } else { c[i].clone() });
    let variants = [g.clone(), rev(g), neg(g), rev(&neg(g))];
    variants.into_iter().min().unwrap_or_else(|| g.clone())
}

/// The 4-covering minimised at the primes where its invariants exceed
/// those of `E: y² = x³ + a x² + b x` (`crate::quartic::minimal`), then
/// reduced again (root covariant, then the greedy steps). Its points map
/// back as before: the frame becomes `frame·T·R` (no longer unimodular) and
/// `k` becomes `k·ν`, where `g′ = g∘T/ν²` (`map_back` divides by the common
/// factor of `(M, e)` and checks the point on `C_d` and `E`).
///
/// Which primes: a 2-covering of `E` with Jacobian `E` has invariants
/// `(I, J) = (μ⁴·c₄, 2μ⁶·c₆)` for a rational `μ` (`c₄ = 16(a² − 3b)`,
/// `c₆ = 32a(9b − 2a²)` of this model; common practice, checked on the
/// coverings of docs/deep_search.md), so only the primes of the numerator of `μ`
/// can be removed. When `μ` is not found as an exact root (it always is
/// for a covering of `E`) the covering is left as it is.
fn minimise_covering(
    a: &BigInt,
    b: &BigInt,
    c: SolubleCovering,
    budget: &mut Budget,
) -> Result<SolubleCovering> {
    let q = Quartic::new(c.coeffs.clone())?;
    let c4 = BigInt::from(16) * (a * a - BigInt::from(3) * b);
    let c6 = BigInt::from(32) * a * (BigInt::from(9) * b - BigInt::from(2) * a * a);
    let ratio_root = |num: &BigInt, den: &BigInt, k: u32| -> Option<BigInt> {
        if num.is_zero() || den.is_zero() {
            return None;
        }
        let r = BigRational::new(num.clone(), den.clone());
        let n = crate::arith::roots::exact_root(&r.numer().abs(), k)?;
        crate::arith::roots::exact_root(r.denom(), k)?;
        Some(n)
    };
    let mu = ratio_root(&q.invariant_i(), &c4, 4)
        .or_else(|| ratio_root(&q.invariant_j(), &(BigInt::from(2) * &c6), 6));
    let Some(mu) = mu else { return Ok(c) };
    if mu.is_one() {
        return Ok(c);
    }
    let primes: Vec<BigInt> = factor(&mu, budget)?.primes().cloned().collect();
    let m = crate::quartic::minimal::minimise(&c.coeffs, &primes, budget)?;
    if m.scale.is_one() {
        return Ok(c);
    }
    let t = covariant_frame(&m.coeffs);
    let moved = transform4(&m.coeffs, &t, budget)?;
    let (coeffs, polish) = reduce_quartic(&moved, budget)?;
    let frame = mat_mul(&mat_mul(&c.frame, &m.frame), &mat_mul(&t, &polish));
    Ok(SolubleCovering {
        lambda: c.lambda,
        coeffs,
        par: c.par,
        k: &c.k * &m.scale,
        frame,
    })
}

/// A locally soluble 4-covering D_λ with what maps its points back to C_d.
struct SolubleCovering {
    lambda: BigInt,
    coeffs: [BigInt; 5],
    par: [[BigInt; 3]; 3],
    k: BigInt,
    frame: [[BigInt; 2]; 2],
}

/// Searches one soluble covering (its own search budget, charged to
/// `budget`): the point of C_d and E if one is found and maps back, else
/// the covering as a survivor with its search.
fn search_covering(
    a: &BigInt,
    b: &BigInt,
    d: &BigInt,
    s: &Setup,
    c: SolubleCovering,
    options: &SecondDescentOptions,
    budget: &mut Budget,
) -> Result<std::result::Result<SecondDescentOutcome, SurvivingCovering>> {
    let mut sub = Budget::with_units(options.search_units);
    let outcome = search(
        &c.coeffs,
        &SearchOptions::up_to(options.search_height),
        &mut sub,
    )?;
    spend(
        budget,
        sub.spent().min(options.search_units),
        "second descent: covering searches",
    )?;
    if let SearchOutcome::Found(cp) = &outcome {
        if let Some((space_point, x, y)) = map_back(a, b, d, s, &c, cp)? {
            return Ok(Ok(SecondDescentOutcome::Point {
                space_point,
                point_x: x,
                point_y: y,
                lambda: c.lambda,
                covering: c.coeffs,
                covering_point: cp.clone(),
            }));
        }
    }
    Ok(Err(SurvivingCovering {
        lambda: c.lambda,
        covering: c.coeffs,
        search: outcome,
    }))
}

/// Maps a point of the covering `g_λ` back to `C_d` and `E`, and verifies
/// it on both. `None` if it is a point with `e = 0` (impossible for
/// non-square `d`, kept for safety).
fn map_back(
    a: &BigInt,
    b: &BigInt,
    d: &BigInt,
    s: &Setup,
    covering: &SolubleCovering,
    cp: &QuarticPoint,
) -> Result<Option<(QuarticPoint, BigRational, BigRational)>> {
    let (lambda, par) = (&covering.lambda, &covering.par);
    let (k, frame) = (&covering.k, &covering.frame);
    let m = &frame[0][0] * &cp.x + &frame[0][1] * &cp.z;
    let n = &frame[1][0] * &cp.x + &frame[1][1] * &cp.z;
    let u = eval2(&par[0], &m, &n);
    let v = eval2(&par[1], &m, &n);
    let sv = eval2(&par[2], &m, &n);
    if sv.is_zero() {
        return Ok(None);
    }
    let two_d_l = BigInt::from(2) * d * lambda;
    let q = |x: BigInt| BigRational::from_integer(x);
    // t = y·k/(2dλ); s = r₃(m, n); N = q₂(u, v)/(2λ).
    let t = BigRational::new(&cp.y * k, two_d_l.clone());
    let e = q(sv);
    let nn = BigRational::new(eval2(&s.forms[1], &u, &v), BigInt::from(2) * lambda);
    // Integral coordinates: scale (M, e) by the denominator of t.
    let l = t.denom().clone();
    let mi = (&t * q(l.clone())).to_integer();
    let ei = (&e * q(l.clone())).to_integer();
    let ni = &nn * q(&l * &l);
    let gcd = mi.gcd(&ei);
    let (mi, ei, ni) = (&mi / &gcd, &ei / &gcd, ni / q(&gcd * &gcd));
    let rhs = d * num_traits::pow(mi.clone(), 4)
        + a * &mi * &mi * &ei * &ei
        + (b / d) * num_traits::pow(ei.clone(), 4);
    if !ni.is_integer() || &ni.numer().clone() * ni.numer() != rhs {
        return Err(Error::Internal {
            check: format!("the point from D_λ (λ = {lambda}) is not on C_d"),
        });
    }
    let nint = ni.to_integer();
    let dq = q(d.clone());
    let (mq, eq) = (q(mi.clone()), q(ei.clone()));
    let x = &dq * &mq * &mq / (&eq * &eq);
    let y = &dq * &mq * q(nint.clone()) / (&eq * &eq * &eq);
    let (aq, bq) = (q(a.clone()), q(b.clone()));
    if &y * &y != &x * &x * &x + &aq * &x * &x + &bq * &x {
        return Err(Error::Internal {
            check: format!("the point from D_λ (λ = {lambda}) is not on E"),
        });
    }
    let _ = &s.delta;
    // Normalise as a QuarticPoint: z > 0 (e ≠ 0 here), y ≥ 0.
    let (xm, ze) = if ei.is_negative() {
        (-mi, -ei)
    } else {
        (mi, ei)
    };
    Ok(Some((
        QuarticPoint {
            x: xm,
            z: ze,
            y: nint.abs(),
        },
        x,
        y,
    )))
}

/// Re-checks [`SecondDescentOutcome::NoPoint`] evidence for the class `d`
/// of `y² = x³ + a x² + b x` from scratch: true iff
///
/// 1. `conic_forms` parametrise `X² − dY² = (a² − 4b)Z²`: the identity
///    `q₁² − d q₂² − (a² − 4b) q₃² = 0` holds as binary quartics and the
///    forms are not all proportional (so the map `P¹ → (Q)` is an
///    isomorphism);
/// 2. `resultant = Res(q₃, q₁ − a q₃) ≠ 0`, and the twists of Lemma Λ
///    (signed square-free products of the primes of `2·d·resultant`,
///    refactored here) each have an obstruction;
/// 3. each obstruction holds: a conic `λ s² = F(u, v)` with `F = q₃` whose
///    Hilbert symbol at the place is −1, or a quartic that is
///    `c·H(r₁, r₂)/k²` transformed by the unimodular `frame`, where
///    `(r₁, r₂, r₃)` parametrise the conic on side `via`
///    (`F(r₁, r₂) = λ r₃²`, resp. `G(r₁, r₂) = 2dλ r₃²`, forms not all
///    proportional), `(H, c)` is the other side's form and scale, and
///    [`locally_soluble`] finds no point at the place.
///
/// Returns false (never an error) on anything that does not check out,
/// including budget exhaustion inside `budget`.
pub fn verify_obstruction(
    model: &ReducedModel,
    d: &BigInt,
    evidence: &NoPointEvidence,
    budget: &mut Budget,
) -> bool {
    let (a, b) = (model.a(), model.b());
    verify_inner(a, b, d, evidence, budget).unwrap_or(false)
}

fn not_proportional(forms: &[[BigInt; 3]; 3]) -> bool {
    for i in 0..3 {
        for j in 0..i {
            for x in 0..3 {
                for y in 0..x {
                    if &forms[i][x] * &forms[j][y] != &forms[i][y] * &forms[j][x] {
                        return true;
                    }
                }
            }
        }
    }
    false
}

fn square_form(f: &Form2) -> Vec<BigInt> {
    poly_mul(f, f)
}

fn verify_inner(
    a: &BigInt,
    b: &BigInt,
    d: &BigInt,
    ev: &NoPointEvidence,
    budget: &mut Budget,
) -> Result<bool> {
    let delta = check_input(a, b, d)?;
    let [q1, q2, q3] = &ev.conic_forms;
    let (s1, s2, s3) = (square_form(q1), square_form(q2), square_form(q3));
    for i in 0..5 {
        if !(&s1[i] - d * &s2[i] - &delta * &s3[i]).is_zero() {
            return Ok(false);
        }
    }
    if !not_proportional(&ev.conic_forms) {
        return Ok(false);
    }
    let f: Form2 = q3.clone();
    let g: Form2 = [0, 1, 2].map(|i| &q1[i] - a * &q3[i]);
    if resultant2(&f, &g) != ev.resultant || ev.resultant.is_zero() {
        return Ok(false);
    }
    let mut ps = BTreeSet::new();
    ps.insert(BigInt::from(2));
    add_primes(d, budget, &mut ps)?;
    add_primes(&ev.resultant, budget, &mut ps)?;
    let lp: Vec<BigInt> = ps.into_iter().collect();
    let lambdas = twists(&lp, usize::MAX >> 1)?;
    for lambda in &lambdas {
        let two_d_l = BigInt::from(2) * d * lambda;
        let mut ok = false;
        for o in ev.obstructions.iter().filter(|o| &o.lambda == lambda) {
            if check_one(o, &f, &g, lambda, &two_d_l, budget)? {
                ok = true;
                break;
            }
        }
        if !ok {
            return Ok(false);
        }
    }
    Ok(true)
}

fn check_one(
    o: &TwistObstruction,
    f: &Form2,
    g: &Form2,
    lambda: &BigInt,
    two_d_l: &BigInt,
    budget: &mut Budget,
) -> Result<bool> {
    match &o.curve {
        ObstructedCurve::Conic { scale, form } => {
            if scale != lambda || form != f {
                return Ok(false);
            }
            Ok(!conic_soluble_at(f, lambda, &o.place)?)
        }
        ObstructedCurve::Quartic {
            coeffs,
            via,
            parametrisation,
            square_factor,
            frame,
        } => {
            let (pf, pc, of, oc) = match via {
                ConicSide::F => (f, lambda, g, two_d_l),
                ConicSide::G => (g, two_d_l, f, lambda),
            };
            let [r1, r2, r3] = parametrisation;
            // pf(r1, r2) − pc·r3² = 0 identically.
            let lhs = compose(pf, r1, r2);
            let r3s = square_form(r3);
            if (0..5).any(|i| lhs[i] != pc * &r3s[i]) || !not_proportional(parametrisation) {
                return Ok(false);
            }
            let det = &frame[0][0] * &frame[1][1] - &frame[0][1] * &frame[1][0];
            if det.abs() != BigInt::one() || square_factor.is_zero() {
                return Ok(false);
            }
            let raw = compose(of, r1, r2).map(|x| x * oc);
            let k2 = square_factor * square_factor;
            if raw.iter().any(|x| !x.is_multiple_of(&k2)) {
                return Ok(false);
            }
            let expect = transform4(&raw.map(|x| x / &k2), frame, budget)?;
            if &expect != coeffs {
                return Ok(false);
            }
            let q = Quartic::new(coeffs.clone())?;
            Ok(!locally_soluble(&q, &o.place, budget)?.is_soluble())
        }
    }
}
