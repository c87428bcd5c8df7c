//! Layer 3b: canonical heights, the height pairing, the regulator, and saturation
//! of a set of independent points (the Mordell–Weil lattice).
//!
//! # Normalisation
//! `ĥ(P) = lim_{n→∞} h(x(2ⁿP))/4ⁿ` with `h(a/b) = log max(|a|, |b|)` for
//! `x = a/b` in lowest terms: so `ĥ(P) ≈ h(x(P))`. This is the
//! normalisation in which the Birch–Swinnerton-Dyer formula holds with
//! the regulator `det(⟨Pᵢ, Pⱼ⟩)` and the pairing
//! `⟨P, Q⟩ = (ĥ(P + Q) − ĥ(P) − ĥ(Q))/2`, `⟨P, P⟩ = ĥ(P)`.
//! Silverman (Math. Comp. 51 (1988)) uses half of this height, `ĥ_S =
//! ĥ/2`, and the pairing `ĥ_S(P + Q) − ĥ_S(P) − ĥ_S(Q)`; that pairing is
//! the same bilinear form, so both conventions give the same regulator.
//! `docs/heights.md` has the details and the references.
//!
//! # Error bounds
//! Every value is a [`Certified`] `value ± error`. The error is the sum of
//! (a) a proven bound on the truncation of Tate's series, from bounds on
//! `log z` over `E(R)` certified once per curve (exact rational sign tests
//! for the real roots, adaptive bisection with Taylor's theorem for `z`),
//! and (b) an a-priori estimate of the rounding (the series runs in
//! double-double arithmetic, the logarithms in f64), with safety factors
//! of 4 and 16 over the standard model of floating-point arithmetic.
//! Part (b) is an estimate, not an interval proof; `docs/heights.md` says
//! so, and the tests check the enclosures against exact identities.
//!
//! # Layout
//! - `projective` (crate-internal): exact Jacobian integer arithmetic for
//!   points with hundreds of digits, behind [`HeightContext::multiple`] and
//!   [`HeightContext::combination`];
//! - `local`: the archimedean and non-archimedean local heights;
//! - `naive_vs_canonical`: naive/canonical height difference bounds and a proven
//!   lower bound for `ĥ` on non-torsion points;
//! - `lll`: LLL reduction for the height pairing;
//! - `saturate`: index bounds and p-saturation.
//!
//! The guide below is `docs/heights.md`, included verbatim.
#![doc = include_str!("../../docs/heights.md")]
// Matrix code reads best with explicit indices.
#![allow(clippy::needless_range_loop)]

mod lll;
mod local_terms;
pub(crate) mod lower_bound;
pub(crate) mod naive_vs_canonical;
mod projective;
pub(crate) mod saturate;
#[cfg(test)]
mod tests;

use num_bigint::BigInt;
use num_traits::Signed;

pub(crate) use crate::arith::Certified;
use crate::budget::Budget;
use crate::curve::tate::{GlobalLocalData, ReductionKind};
use crate::curve::{Curve, ModelChange, Point};
use crate::error::{Error, Result};

pub use lower_bound::{cremona_siksek_bound, CremonaSiksekBound};
pub use naive_vs_canonical::{
    difference_bounds, height_lower_bound, DifferenceBounds, HeightLowerBound,
};
pub(crate) use saturate::saturate_with_context;
pub use saturate::{saturate, LowerBoundSource, Saturation, SaturationOptions};

use local_terms::{Archimedean, BadPrime};
use projective::{Jac, ShortModel};

/// Default requested absolute precision of a canonical height.
pub(crate) const DEFAULT_PRECISION: f64 = 1e-12;

/// Finest absolute precision accepted (the f64 arithmetic reaches about
/// 1e-14 on points of moderate height).
pub(crate) const FINEST_PRECISION: f64 = 1e-14;

/// Work units for factoring the discriminant when the caller gives no
/// budget (the same scale as the curve layer's default for reductions).
pub(crate) const DEFAULT_HEIGHT_UNITS: u64 = 200_000_000;

/// Everything about one curve that the heights of its points share: the
/// minimal model, its bad primes, the archimedean series data and the
/// short model for exact arithmetic. Build it once per curve.
#[derive(Clone, Debug)]
pub struct HeightContext {
    input: Curve,
    minimal: Curve,
    /// Input model → minimal model.
    to_min: ModelChange,
    a: [BigInt; 5],
    b: [BigInt; 4],
    disc: BigInt,
    bad: Vec<BadPrime>,
    arch: Archimedean,
    short: ShortModel,
}

fn ints(c: &Curve) -> Result<[BigInt; 5]> {
    let ints = c
        .integer_coefficients()
        .ok_or_else(|| Error::InvalidArgument {
            reason: "minimal model is not integral".into(),
        })?;
    Ok(ints.map(|v| v.clone()))
}

impl HeightContext {
    /// Factors the discriminant (charged to `budget`), finds the global
    /// minimal model and prepares the local heights.
    ///
    /// # Errors
    /// [`Error::BudgetExhausted`]/[`Error::FactorBudgetExhausted`] when
    /// factoring Δ runs out of budget; [`Error::InvalidArgument`] when the
    /// invariants of the minimal model exceed the f64 range (about 10^70
    /// for the coefficients).
    pub fn new(curve: &Curve, budget: &mut Budget) -> Result<HeightContext> {
        let data = curve.tate_data(budget)?;
        Self::from_local_data(curve, &data)
    }

    /// The context from the curve's local data computed elsewhere (a
    /// descent report's, say), so that Tate's algorithm runs once per
    /// curve. `data` must be `curve`'s own ([`Curve::tate_data`]); its
    /// minimal model is checked to be integral and its change of model
    /// to be invertible.
    ///
    /// # Errors
    /// As [`HeightContext::new`], without the factoring errors.
    pub(crate) fn from_local_data(curve: &Curve, data: &GlobalLocalData) -> Result<HeightContext> {
        let [u, r, s, t] = data.change.clone();
        let to_min = ModelChange::new(u, r, s, t)?;
        let a: [BigInt; 5] = data.minimal_model.clone();
        let minimal = Curve::from_bigints(a.clone())?;
        let [a1, a2, a3, a4, a6] = &a;
        let b2 = a1 * a1 + a2 * 4;
        let b4 = a1 * a3 + a4 * 2;
        let b6 = a3 * a3 + a6 * 4;
        let b8 = a1 * a1 * a6 + a2 * a6 * 4 - a1 * a3 * a4 + a2 * a3 * a3 - a4 * a4;
        ints(&minimal)?;
        let disc = minimal.discriminant().to_integer();
        let arch = Archimedean::new(&b2, &b4, &b6, &b8, &disc)?;
        let mut bad = Vec::new();
        for lr in &data.primes {
            if lr.reduction == ReductionKind::Good {
                continue;
            }
            let mut bp = BadPrime::new(
                lr.prime.clone(),
                lr.disc_valuation,
                lr.reduction,
                lr.kodaira,
            );
            bp.tamagawa = lr.tamagawa;
            bad.push(bp);
        }
        Ok(HeightContext {
            input: curve.clone(),
            short: ShortModel::new(a.clone()),
            minimal,
            to_min,
            a,
            b: [b2, b4, b6, b8],
            disc,
            bad,
            arch,
        })
    }

    /// The curve as given.
    pub fn curve(&self) -> &Curve {
        &self.input
    }

    /// The reduced global minimal model on which heights are computed.
    pub(crate) fn minimal_model(&self) -> &Curve {
        &self.minimal
    }

    /// The change of model from the input curve to its global minimal model.
    pub fn to_minimal(&self) -> &ModelChange {
        &self.to_min
    }

    pub(crate) fn discriminant(&self) -> &BigInt {
        &self.disc
    }

    pub(crate) fn short(&self) -> &ShortModel {
        &self.short
    }

    pub(crate) fn arch(&self) -> &Archimedean {
        &self.arch
    }

    pub(crate) fn bad(&self) -> &[BadPrime] {
        &self.bad
    }

    pub(crate) fn b_invariants(&self) -> &[BigInt; 4] {
        &self.b
    }

    pub(crate) fn a_invariants(&self) -> &[BigInt; 5] {
        &self.a
    }

    /// A point of the input model, checked and moved to the minimal model.
    pub(crate) fn to_min_point(&self, p: &Point) -> Result<Point> {
        self.input.check_point(p)?;
        Ok(self.to_min.to_new(p))
    }

    /// A point of the minimal model, moved back to the input model.
    pub(crate) fn point_on_input(&self, p: &Point) -> Point {
        self.to_min.to_old(p)
    }

    /// `ĥ(P)` to absolute precision 10⁻¹² for a point of the input model.
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`] if `p` is not on the curve.
    pub fn height(&self, p: &Point) -> Result<Certified> {
        self.height_to(p, DEFAULT_PRECISION)
    }

    /// `ĥ(P)` with the series truncated for absolute error `precision/2`;
    /// the returned error adds the rounding estimate and may exceed
    /// `precision` only when the f64 rounding alone does (points with
    /// thousands of digits).
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`]; [`Error::InvalidArgument`] if
    /// `precision` is not a finite number ≥ 10⁻¹⁴.
    pub fn height_to(&self, p: &Point, precision: f64) -> Result<Certified> {
        check_precision(precision)?;
        let q = self.to_min_point(p)?;
        Ok(self.height_minimal(&q, precision))
    }

    /// `ĥ` of a point already on the minimal model (not checked).
    pub(crate) fn height_minimal(&self, p: &Point, precision: f64) -> Certified {
        let Point::Affine { x, y } = p else {
            return Certified::exact(0.0);
        };
        let (xn, xd) = (x.numer(), x.denom());
        // log d² + Λ∞(P) in one piece (see local_terms::Archimedean::lambda).
        let (mut value, trunc, rounding) = self.arch.lambda(xn, xd, precision * 0.5);
        let mut err = trunc + rounding;
        for bp in &self.bad {
            let (num, den) = bp.correction(&self.a, &self.b, x, y);
            if num != 0 {
                let c = num as f64 / den as f64 * bp.log_p;
                value += c;
                err += 4.0 * local_terms::EPS * (c.abs() + value.abs());
            }
        }
        Certified::with_radius(value, err)
    }

    /// `[n]P` on the input model, by exact Jacobian arithmetic, under a
    /// budget of 2·10⁸ units: each doubling or addition costs
    /// `(w + 1)²` units, `w` the size in 64-bit words of the coordinates so
    /// far, so the budget bounds the size of the result as well as the work
    /// (`[n]P` has about n² times the digits of P; the default allows
    /// results of up to about 10⁴ words per coordinate).
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`]; [`Error::BudgetExhausted`] when the
    /// result would be too large for the budget.
    pub fn multiple(&self, p: &Point, n: &BigInt) -> Result<Point> {
        self.multiple_with_budget(p, n, &mut Budget::with_units(DEFAULT_HEIGHT_UNITS))
    }

    /// [`HeightContext::multiple`] under `budget`: each doubling or
    /// addition costs `(w + 1)²` units, `w` the size in 64-bit words of the
    /// coordinates so far, so the budget bounds the size of the result as
    /// well as the work (`[n]P` has about n² times the digits of P).
    /// [`HeightContext::multiple`] uses 2·10⁸ units (results
    /// of up to about 10⁴ words per coordinate).
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`]; [`Error::BudgetExhausted`] when the
    /// budget or its deadline runs out.
    pub(crate) fn multiple_with_budget(
        &self,
        p: &Point,
        n: &BigInt,
        budget: &mut Budget,
    ) -> Result<Point> {
        let q = self.to_min_point(p)?;
        let j = self.short.mul_budgeted(&self.short.to_jac(&q), n, budget)?;
        Ok(self.point_on_input(&self.short.to_point(&j)))
    }

    /// `Σ nᵢPᵢ` on the input model, by exact Jacobian arithmetic, under a
    /// budget of 2·10⁸ units.
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`]; [`Error::InvalidArgument`] when the
    /// lengths differ; [`Error::BudgetExhausted`] when the result would be
    /// too large for the budget.
    pub fn combination(&self, points: &[Point], coefficients: &[BigInt]) -> Result<Point> {
        self.combination_with_budget(
            points,
            coefficients,
            &mut Budget::with_units(DEFAULT_HEIGHT_UNITS),
        )
    }

    /// [`HeightContext::combination`] under `budget`, charged as
    /// `multiple_with_budget` (the default form uses
    /// 2·10⁸ units).
    ///
    /// # Errors
    /// As [`HeightContext::combination`]; [`Error::BudgetExhausted`] when
    /// the budget or its deadline runs out.
    pub(crate) fn combination_with_budget(
        &self,
        points: &[Point],
        coefficients: &[BigInt],
        budget: &mut Budget,
    ) -> Result<Point> {
        let js = points
            .iter()
            .map(|p| Ok(self.short.to_jac(&self.to_min_point(p)?)))
            .collect::<Result<Vec<Jac>>>()?;
        let j = self.short.combination_budgeted(&js, coefficients, budget)?;
        Ok(self.point_on_input(&self.short.to_point(&j)))
    }

    /// Sum on the minimal model (exact).
    pub(crate) fn add_minimal(&self, p: &Point, q: &Point) -> Point {
        let j = self.short.add(&self.short.to_jac(p), &self.short.to_jac(q));
        self.short.to_point(&self.short.normalise(&j))
    }

    /// The matrix `(⟨Pᵢ, Pⱼ⟩)` of the height pairing (normalisation of the
    /// module docs: `⟨P, P⟩ = ĥ(P)`).
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`].
    pub fn pairing_matrix(&self, points: &[Point]) -> Result<Vec<Vec<Certified>>> {
        let pts = points
            .iter()
            .map(|p| self.to_min_point(p))
            .collect::<Result<Vec<_>>>()?;
        Ok(self.pairing_matrix_minimal(&pts, DEFAULT_PRECISION))
    }

    pub(crate) fn pairing_matrix_minimal(
        &self,
        pts: &[Point],
        precision: f64,
    ) -> Vec<Vec<Certified>> {
        let r = pts.len();
        let h: Vec<Certified> = pts
            .iter()
            .map(|p| self.height_minimal(p, precision))
            .collect();
        let mut m = vec![vec![Certified::exact(0.0); r]; r];
        for i in 0..r {
            m[i][i] = h[i];
            for j in i + 1..r {
                let s = self.height_minimal(&self.add_minimal(&pts[i], &pts[j]), precision);
                let v = 0.5 * (s.value() - h[i].value() - h[j].value());
                let e = 0.5 * (s.error() + h[i].error() + h[j].error())
                    + 2.0
                        * local_terms::EPS
                        * (s.value().abs() + h[i].value().abs() + h[j].value().abs());
                m[i][j] = Certified::with_radius(v, e);
                m[j][i] = m[i][j];
            }
        }
        m
    }

    /// The regulator `det(⟨Pᵢ, Pⱼ⟩)` (1 for no points).
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`].
    pub fn regulator(&self, points: &[Point]) -> Result<Certified> {
        Ok(determinant(&self.pairing_matrix(points)?))
    }
}

fn check_precision(precision: f64) -> Result<()> {
    if !(precision.is_finite() && precision >= FINEST_PRECISION) {
        return Err(Error::InvalidArgument {
            reason: format!(
                "height precision must be a finite number ≥ {FINEST_PRECISION:e}, got {precision:e}"
            ),
        });
    }
    Ok(())
}

/// Determinant of a matrix of enclosures.
///
/// The value is Gaussian elimination with partial pivoting; the error is
/// the perturbation bound `Σᵢ ‖eᵢ‖·∏_{j≠i}(‖aⱼ‖ + ‖eⱼ‖)` (rows `aⱼ`, row
/// errors `eⱼ`, Euclidean norms: multilinearity of det in the rows and
/// Hadamard's inequality, common practice) plus an estimate
/// `4n³·EPS·∏‖aⱼ‖` of the elimination's rounding.
pub(crate) fn determinant(m: &[Vec<Certified>]) -> Certified {
    let n = m.len();
    if n == 0 {
        return Certified::exact(1.0);
    }
    let mut a: Vec<Vec<f64>> = m
        .iter()
        .map(|r| r.iter().map(|c| c.value()).collect())
        .collect();
    let norms: Vec<f64> = a
        .iter()
        .map(|r| r.iter().map(|v| v * v).sum::<f64>().sqrt())
        .collect();
    let enorms: Vec<f64> = m
        .iter()
        .map(|r| r.iter().map(|c| c.error() * c.error()).sum::<f64>().sqrt())
        .collect();
    let mut det = 1.0;
    for c in 0..n {
        let piv = (c..n)
            .max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))
            .unwrap_or(c);
        if a[piv][c] == 0.0 {
            det = 0.0;
            break;
        }
        if piv != c {
            a.swap(piv, c);
            det = -det;
        }
        det *= a[c][c];
        for i in c + 1..n {
            let f = a[i][c] / a[c][c];
            for k in c..n {
                a[i][k] -= f * a[c][k];
            }
        }
    }
    let mut err = 0.0;
    for i in 0..n {
        let mut prod = enorms[i];
        for j in 0..n {
            if j != i {
                prod *= norms[j] + enorms[j];
            }
        }
        err += prod;
    }
    let prod_norms: f64 = norms.iter().product();
    err += 4.0 * (n * n * n) as f64 * local_terms::EPS * prod_norms;
    Certified::with_radius(det, err)
}

/// `ĥ(P)` to absolute precision 10⁻¹² for a point `p` of `curve` (any
/// model): builds a [`HeightContext`] with a budget of
/// 2·10⁸ units. Use a context directly for many points.
///
/// ```
/// use isodescent::curve::{Curve, Point};
/// use isodescent::height::canonical_height;
/// // y² + y = x³ − x, P = (0, 0): ĥ(P) = 0.05111140823996884… in the
/// // x-normalisation (computed independently with mpmath by
/// // tests/data/gen_curve_values.py), and ĥ(2P) = 4ĥ(P).
/// let e = Curve::from_ints([0, 0, 1, -1, 0]).unwrap();
/// let p = Point::from_ints(0, 0);
/// let h = canonical_height(&e, &p).unwrap();
/// assert!((h.value() - 0.05111140823996884).abs() <= h.error() + 1e-16 && h.error() < 1e-12);
/// let h2 = canonical_height(&e, &e.add(&p, &p)).unwrap();
/// assert!((h2.value() - 4.0 * h.value()).abs() <= h2.error() + 4.0 * h.error());
/// ```
///
/// # Errors
/// Those of [`HeightContext::new`] and [`HeightContext::height`].
pub fn canonical_height(curve: &Curve, p: &Point) -> Result<Certified> {
    canonical_height_to(curve, p, DEFAULT_PRECISION)
}

/// `ĥ(P)` to the requested absolute precision (see
/// [`HeightContext::height_to`]).
///
/// # Errors
/// Those of [`HeightContext::new`] and [`HeightContext::height_to`].
pub(crate) fn canonical_height_to(curve: &Curve, p: &Point, precision: f64) -> Result<Certified> {
    check_precision(precision)?;
    curve.check_point(p)?;
    let ctx = HeightContext::new(curve, &mut Budget::with_units(DEFAULT_HEIGHT_UNITS))?;
    ctx.height_to(p, precision)
}

/// The height-pairing matrix of `points` (see
/// [`HeightContext::pairing_matrix`]).
///
/// # Errors
/// Those of [`HeightContext::new`] and [`HeightContext::pairing_matrix`].
pub(crate) fn height_gram_matrix(curve: &Curve, points: &[Point]) -> Result<Vec<Vec<Certified>>> {
    for p in points {
        curve.check_point(p)?;
    }
    let ctx = HeightContext::new(curve, &mut Budget::with_units(DEFAULT_HEIGHT_UNITS))?;
    ctx.pairing_matrix(points)
}

/// The regulator of `points`: `det(⟨Pᵢ, Pⱼ⟩)`.
///
/// # Errors
/// Those of [`HeightContext::new`] and [`HeightContext::pairing_matrix`].
pub fn regulator(curve: &Curve, points: &[Point]) -> Result<Certified> {
    Ok(determinant(&height_gram_matrix(curve, points)?))
}

/// The naive height `h(x(P)) = log max(|a|, |b|)` of a point on any model,
/// with its rounding bound (0 for O).
pub fn naive_height(p: &Point) -> Certified {
    match p.x() {
        None => Certified::exact(0.0),
        Some(x) => {
            let n = x.numer().abs();
            let d = x.denom().abs();
            let m = if n > d { n } else { d };
            let v = local_terms::ln_abs(&m);
            Certified::with_radius(v, 8.0 * local_terms::EPS * v.abs().max(1.0))
        }
    }
}
