//! Rational 3-isogenies of any Weierstrass model: detection from the
//! 3-division polynomial, Vélu's formulas for the isogeny and its dual, and
//! the model y² = x³ + D(αx + β)² with the kernel at x = 0.
//!
//! # Detection
//! The x-coordinates of the points of order 3 are the roots of the
//! 3-division polynomial ψ₃ = 3x⁴ + b₂x³ + 3b₄x² + 3b₆x + b₈ [Sil09,
//! Exercise 3.7]. A rational root x₀ gives the subgroup {O, (x₀, ±y₀)},
//! stable under Galois (y₀ lies in Q or in Q(√D), D the square-free part of
//! y₀²), hence a 3-isogeny defined over Q (common practice). The roots are
//! found on the integral short model y² = x³ + Ax + B of the curve, where
//! ψ₃ = 3x⁴ + 6Ax² + 12Bx − A² and X = 3x is an integer root of the monic
//! X⁴ + 18AX² + 108BX − 27A²; each root is carried back to the given
//! model and ψ₃ of the given model is checked to vanish there exactly.
//!
//! # Vélu's formulas
//! On y² = x³ + Ax + B with kernel {O, ±Q}, Q = (x₀, y₀) of order 3, put
//! v = 2(3x₀² + A), u = 4y₀², w = u + x₀v (all rational: only y₀² enters).
//! The isogenous curve is y² = x³ + (A − 5v)x + (B − 7w), and
//!
//! ```text
//! φ(x, y) = ( x + v/(x − x₀) + u/(x − x₀)²,  y·(1 − v/(x − x₀)² − 2u/(x − x₀)³) )
//! ```
//!
//! (Vélu, "Isogénies entre courbes elliptiques", C. R. Acad. Sci. Paris 273
//! (1971); Washington, "Elliptic Curves: Number Theory and Cryptography",
//! §12.3 — both from memory). The y-part is y·dX/dx, so φ*(dX/2Y) = dx/2y:
//! the isogeny is normalized. The dual is Vélu's isogeny of the codomain
//! with kernel φ(E\[3\]), followed by the scaling x = x″/9, y = y″/27: the
//! composite of two normalized isogenies pulls ω back to ω, and \[3\] pulls
//! it back to 3ω, so the composite lands on the model with A″ = 81A,
//! B″ = 729B and the scaling u = 1/3 brings it back (common practice).
//! The root of ψ₃ of the codomain that gives the dual is the one whose
//! Vélu curve is exactly (81A, 729B).
//!
//! Both maps are checked exactly when the isogeny is built, as identities
//! of polynomials over Q: with X = N(x)/(x − x₀)² and Y = y·M(x)/(x − x₀)³,
//! (x³ + Ax + B)·M² = N³ + A′N(x − x₀)⁴ + B′(x − x₀)⁶ (φ sends points of E
//! to points of E′), the same for the dual, and the x-part of φ̂∘φ equals
//! that of \[3\], x − ψ₂ψ₄/ψ₃² with ψ₂ψ₄ = 8(x³ + Ax + B)(x⁶ + 5Ax⁴ + 20Bx³
//! − 5A²x² − 4ABx − 8B² − A³) (Washington §3.2, from memory). A map with
//! the x-part of \[3\] is ±\[3\]; both y-parts are y·(1 + O(1/x)), so the
//! composite is y/27·(1 + O(1/x)), which is \[3\] and not −\[3\] (in the
//! parameter z = −x/y, \[3\] is 3z + …).
//!
//! # The model y² = x³ + D(αx + β)²
//! Moving x₀ to 0 gives y² = x³ + 3x₀x² + (3x₀² + A)x + y₀². The tangent
//! at the kernel point (0, y₀) is an inflexion tangent y = λx + y₀, so the
//! cubic is x³ + (λx + y₀)²: λ² = 3x₀ and 2λy₀ = 3x₀² + A, which is
//! ψ₃(x₀) = 0. With y₀² = Dβ₀², D square-free, λx + y₀ = √D(α₀x + β₀),
//! α₀ = (3x₀² + A)/(2Dβ₀). A scaling makes α, β integers with no prime p
//! such that p | α and p³ | β, and β > 0; this normal form is unique for
//! the kernel (Cohen and Pazuki, "Elementary 3-descent with a 3-isogeny",
//! Acta Arith. 140 (2009), §2 — from memory). The isogenous curve has the
//! model of the dual kernel with D′ the square-free part of −3D (same
//! source, from memory), which is checked exactly: y₁²/D′ is a rational
//! square at the dual kernel x₁.
//!
//! j = 0 curves y² = x³ + k have the kernel x₀ = 0 with α = 0 and Dβ² = k
//! (sixth-power free), the case of `descent3`; other roots x³ = −4k occur
//! when −4k is a cube.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use super::model::{lcm_denominators, ModelChange};
use super::point::Point;
use super::poly::{integer_roots_with_budget, ZPoly};
use super::two_torsion::short_integral_model;
use super::weierstrass::Curve;
use crate::arith::{factor, rational_sqrt_exact, squarefree_part_rational};
use crate::budget::Budget;
use crate::error::{Error, Result};

/// A rational 3-isogeny φ: E → E′ with kernel {O, (x₀, ±y₀)} (module
/// docs), with its dual φ̂ (φ̂∘φ = \[3\], checked when built).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Isogeny3 {
    domain: Curve,
    to_short: ModelChange,
    a: BigRational,
    b: BigRational,
    kernel: Velu,
    codomain: Curve,
    dual: Velu,
    model: Isogeny3Model,
    codomain_model: Isogeny3Model,
}

/// The model y² = x³ + D(αx + β)² of a curve with a rational 3-isogeny,
/// with the kernel {O, (0, ±β√D)}, and the change of model that reaches it.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct Isogeny3Model {
    /// D, square-free (1 when the kernel points are rational).
    pub d: BigInt,
    /// α (0 exactly when j = 0 and the kernel lies above x = 0 of
    /// y² = x³ + k).
    pub alpha: BigInt,
    /// β > 0; no prime p has p | α and p³ | β.
    pub beta: BigInt,
    /// The change of model from the curve it was computed for to this
    /// model.
    pub change: ModelChange,
}

impl Isogeny3Model {
    /// The curve y² = x³ + Dα²x² + 2Dαβx + Dβ².
    ///
    /// # Errors
    /// [`Error::SingularCurve`] if the data give a singular curve (never
    /// for a model built here); the size limit of [`Curve::new`].
    pub fn curve(&self) -> Result<Curve> {
        flex_curve(&self.d, &self.alpha, &self.beta)
    }
}

/// The curve y² = x³ + D(αx + β)² = x³ + Dα²x² + 2Dαβx + Dβ² (for
/// [`Isogeny3Model::curve`] and the sides of the descent).
pub(crate) fn flex_curve(d: &BigInt, alpha: &BigInt, beta: &BigInt) -> Result<Curve> {
    let z = BigInt::zero;
    Curve::from_bigints([
        z(),
        d * alpha * alpha,
        z(),
        BigInt::from(2) * d * alpha * beta,
        d * beta * beta,
    ])
}

/// Vélu's data of a kernel {O, ±Q} on a short model (module docs).
#[derive(Clone, Debug, PartialEq, Eq)]
struct Velu {
    x0: BigRational,
    v: BigRational,
    u: BigRational,
    /// The short coefficients (A′, B′) of the image curve.
    image: (BigRational, BigRational),
}

impl Velu {
    fn new(a: &BigRational, b: &BigRational, x0: BigRational) -> Velu {
        let three = rat(3);
        let y0sq = &x0 * &x0 * &x0 + a * &x0 + b;
        let v = rat(2) * (&three * &x0 * &x0 + a);
        let u = rat(4) * &y0sq;
        let w = &u + &x0 * &v;
        let image = (a - rat(5) * &v, b - rat(7) * &w);
        Velu { x0, v, u, image }
    }

    /// N(x) = x(x − x₀)² + v(x − x₀) + u, so X = N/(x − x₀)².
    fn numerator(&self) -> QPoly {
        let t = QPoly::linear(-&self.x0);
        QPoly::x()
            .mul(&t.mul(&t))
            .add(&t.scale(&self.v))
            .add(&QPoly::constant(self.u.clone()))
    }

    /// M(x) = (x − x₀)³ − v(x − x₀) − 2u, so Y = y·M/(x − x₀)³.
    fn y_factor(&self) -> QPoly {
        let t = QPoly::linear(-&self.x0);
        t.mul(&t)
            .mul(&t)
            .sub(&t.scale(&self.v))
            .sub(&QPoly::constant(rat(2) * &self.u))
    }

    /// The map on an affine point (x, y) of the short model.
    fn map(&self, x: &BigRational, y: &BigRational) -> Point {
        let t = x - &self.x0;
        if t.is_zero() {
            return Point::Infinity;
        }
        let t2 = &t * &t;
        let t3 = &t2 * &t;
        let nx = x + &self.v / &t + &self.u / &t2;
        let ny = y * (BigRational::one() - &self.v / &t2 - rat(2) * &self.u / &t3);
        Point::new(nx, ny)
    }

    /// (x³ + Ax + B)·M² = N³ + A′N(x − x₀)⁴ + B′(x − x₀)⁶ over Q\[x\].
    fn maps_to_image(&self, a: &BigRational, b: &BigRational) -> bool {
        let f = cubic(a, b);
        let n = self.numerator();
        let m = self.y_factor();
        let t = QPoly::linear(-&self.x0);
        let t2 = t.mul(&t);
        let t4 = t2.mul(&t2);
        let t6 = t4.mul(&t2);
        let lhs = f.mul(&m).mul(&m);
        let rhs = n
            .mul(&n)
            .mul(&n)
            .add(&n.mul(&t4).scale(&self.image.0))
            .add(&t6.scale(&self.image.1));
        lhs == rhs
    }
}

fn rat(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

/// x³ + Ax + B.
fn cubic(a: &BigRational, b: &BigRational) -> QPoly {
    QPoly::new(vec![b.clone(), a.clone(), BigRational::zero(), rat(1)])
}

/// The x-part of φ̂∘φ (with the scaling by 1/9) equals x − ψ₂ψ₄/ψ₃² on
/// y² = x³ + Ax + B (module docs), as a polynomial identity.
fn composite_is_triplication(a: &BigRational, b: &BigRational, phi: &Velu, dual: &Velu) -> bool {
    let n1 = phi.numerator();
    let t = QPoly::linear(-&phi.x0);
    let d1 = t.mul(&t);
    // N₁ − x₁D₁ and the homogenized N₂(N₁, D₁).
    let e = n1.sub(&d1.scale(&dual.x0));
    let n_tilde = n1
        .mul(&e)
        .mul(&e)
        .add(&e.mul(&d1).mul(&d1).scale(&dual.v))
        .add(&d1.mul(&d1).mul(&d1).scale(&dual.u));
    let psi3 = QPoly::new(vec![
        -(a * a),
        rat(12) * b,
        rat(6) * a,
        BigRational::zero(),
        rat(3),
    ]);
    let g = QPoly::new(vec![
        -rat(8) * b * b - a * a * a,
        -rat(4) * a * b,
        -rat(5) * a * a,
        rat(20) * b,
        rat(5) * a,
        BigRational::zero(),
        rat(1),
    ]);
    let psi3sq = psi3.mul(&psi3);
    let x3_num = QPoly::x()
        .mul(&psi3sq)
        .sub(&cubic(a, b).mul(&g).scale(&rat(8)));
    let lhs = n_tilde.mul(&psi3sq);
    let rhs = x3_num.mul(&d1).mul(&e).mul(&e).scale(&rat(9));
    lhs == rhs
}

/// The rational roots of ψ₃ = 3x⁴ + 6Ax² + 12Bx − A² of y² = x³ + Ax + B
/// (A, B rational), increasing.
fn psi3_roots(a: &BigRational, b: &BigRational, budget: &mut Budget) -> Result<Vec<BigRational>> {
    // x = x′/L²: (L⁴A, L⁶B) integral.
    let l = lcm_denominators([a, b]);
    let l2 = &l * &l;
    let ai = (a * BigRational::from_integer(&l2 * &l2)).to_integer();
    let bi = (b * BigRational::from_integer(&l2 * &l2 * &l2)).to_integer();
    // X = 3x′ is an integer root of X⁴ + 18A X² + 108B X − 27A².
    let f = ZPoly::new(vec![
        BigInt::from(-27) * &ai * &ai,
        BigInt::from(108) * &bi,
        BigInt::from(18) * &ai,
        BigInt::zero(),
        BigInt::one(),
    ]);
    let roots = integer_roots_with_budget(&f, budget).map_err(|_| Error::BudgetExhausted {
        stage: "the rational roots of the 3-division polynomial".into(),
    })?;
    let den = BigInt::from(3) * &l2;
    Ok(roots
        .into_iter()
        .map(|x| BigRational::new(x, den.clone()))
        .collect())
}

/// The rational 3-isogenies of `e`, one for each rational root of its
/// 3-division polynomial, with their duals and models (module docs).
///
/// # Errors
/// [`Error::BudgetExhausted`] or [`Error::FactorBudgetExhausted`] when the
/// budget runs out (root finding, the square-free part of y₀², the
/// normal form of the model); the size limit of [`Curve::new`] on the
/// isogenous curve; [`Error::Internal`] if an exact check of the module
/// docs fails.
pub fn rational_3_isogenies(e: &Curve, budget: &mut Budget) -> Result<Vec<Isogeny3>> {
    let (ai, bi, _short, to_short) = short_integral_model(e);
    let a = BigRational::from_integer(ai);
    let b = BigRational::from_integer(bi);
    let mut out = Vec::new();
    for x0 in psi3_roots(&a, &b, budget)? {
        out.push(Isogeny3::build(e, &to_short, &a, &b, x0, budget)?);
    }
    Ok(out)
}

impl Isogeny3 {
    fn build(
        e: &Curve,
        to_short: &ModelChange,
        a: &BigRational,
        b: &BigRational,
        x0: BigRational,
        budget: &mut Budget,
    ) -> Result<Isogeny3> {
        let internal = |check: &str| Error::Internal {
            check: check.to_string(),
        };
        // ψ₃ of the given model vanishes at the kernel's x (b₈ from
        // 4b₈ = b₂b₆ − b₄², Silverman III.1).
        let xg = to_short.u() * to_short.u() * &x0 + to_short.r();
        let psi3 = rat(3) * xg.pow(4)
            + e.b2() * xg.pow(3)
            + rat(3) * e.b4() * &xg * &xg
            + rat(3) * e.b6() * &xg
            + (e.b2() * e.b6() - e.b4() * e.b4()) / rat(4);
        if !psi3.is_zero() {
            return Err(internal(
                "the 3-division polynomial of the given model vanishes at the kernel",
            ));
        }
        let kernel = Velu::new(a, b, x0);
        let z = BigRational::zero;
        let codomain = Curve::new([
            z(),
            z(),
            z(),
            kernel.image.0.clone(),
            kernel.image.1.clone(),
        ])?;
        if !kernel.maps_to_image(a, b) {
            return Err(internal("Vélu's map sends the curve to its image"));
        }
        // The dual: the kernel on the codomain whose Vélu curve is (81A, 729B).
        let (a1, b1) = kernel.image.clone();
        let target = (rat(81) * a, rat(729) * b);
        let mut dual = None;
        for x1 in psi3_roots(&a1, &b1, budget)? {
            let cand = Velu::new(&a1, &b1, x1);
            if cand.image == target && composite_is_triplication(a, b, &kernel, &cand) {
                dual = Some(cand);
                break;
            }
        }
        let dual = dual.ok_or_else(|| internal("the dual 3-isogeny has a rational kernel"))?;
        if !dual.maps_to_image(&a1, &b1) {
            return Err(internal("the dual map sends the image back"));
        }
        let y0sq = &kernel.u / rat(4);
        let d = squarefree_part_rational(&y0sq, budget)?;
        let model = flex_model(a, b, &kernel.x0, &d, budget)?;
        let model = Isogeny3Model {
            change: to_short.then(&model.change),
            ..model
        };
        if model.change.apply_to_curve(e) != model.curve()? {
            return Err(internal(
                "the change of model gives y^2 = x^3 + D(αx + β)^2",
            ));
        }
        let d1 = if (&d % 3u32).is_zero() {
            -&d / 3
        } else {
            BigInt::from(-3) * &d
        };
        let codomain_model = flex_model(&a1, &b1, &dual.x0, &d1, budget)?;
        if codomain_model.change.apply_to_curve(&codomain) != codomain_model.curve()? {
            return Err(internal(
                "the change of model of the isogenous curve gives y^2 = x^3 + D'(α'x + β')^2",
            ));
        }
        Ok(Isogeny3 {
            domain: e.clone(),
            to_short: to_short.clone(),
            a: a.clone(),
            b: b.clone(),
            kernel,
            codomain,
            dual,
            model,
            codomain_model,
        })
    }

    /// The curve E as given.
    pub fn domain(&self) -> &Curve {
        &self.domain
    }

    /// The isogenous curve E′: y² = x³ + A′x + B′, Vélu's model over the
    /// integral short model of E.
    pub fn codomain(&self) -> &Curve {
        &self.codomain
    }

    /// The x-coordinate of the kernel points on the given model.
    pub fn kernel_x(&self) -> BigRational {
        self.to_short.u() * self.to_short.u() * &self.kernel.x0 + self.to_short.r()
    }

    /// True when the kernel points are rational (points of order 3 of
    /// E(Q)), i.e. D = 1.
    pub fn kernel_rational(&self) -> bool {
        self.model.d.is_one()
    }

    /// The model y² = x³ + D(αx + β)² of E, with the change from the
    /// given model.
    pub fn model(&self) -> &Isogeny3Model {
        &self.model
    }

    /// The model y² = x³ + D′(α′x + β′)² of E′ for the dual kernel
    /// (D′ the square-free part of −3D), with the change from
    /// [`Isogeny3::codomain`].
    pub fn codomain_model(&self) -> &Isogeny3Model {
        &self.codomain_model
    }

    /// (A, B) of the short model y² = x³ + Ax + B that φ starts from
    /// (φ*ω′ = ω for dx/2y on it and on [`Isogeny3::codomain`]).
    pub(crate) fn short_coefficients(&self) -> (&BigRational, &BigRational) {
        (&self.a, &self.b)
    }

    /// φ(P) for P on the given curve.
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`] if P is not on E.
    pub fn image(&self, p: &Point) -> Result<Point> {
        self.domain.check_point(p)?;
        Ok(match self.to_short.to_new(p) {
            Point::Infinity => Point::Infinity,
            Point::Affine { x, y } => self.kernel.map(&x, &y),
        })
    }

    /// φ̂(Q) for Q on the isogenous curve, on the given model of E.
    ///
    /// # Errors
    /// [`Error::PointNotOnCurve`] if Q is not on E′.
    pub fn dual_image(&self, q: &Point) -> Result<Point> {
        self.codomain.check_point(q)?;
        Ok(match q {
            Point::Infinity => Point::Infinity,
            Point::Affine { x, y } => match self.dual.map(x, y) {
                Point::Infinity => Point::Infinity,
                Point::Affine { x, y } => {
                    let short = Point::new(x / rat(9), y / rat(27));
                    self.to_short.to_old(&short)
                }
            },
        })
    }
}

/// The normal form y² = x³ + D(αx + β)² of y² = x³ + Ax + B with the
/// kernel at x₀ and y₀² in D·Q*² (module docs); the change is from the
/// short model.
fn flex_model(
    a: &BigRational,
    b: &BigRational,
    x0: &BigRational,
    d: &BigInt,
    budget: &mut Budget,
) -> Result<Isogeny3Model> {
    let internal = |check: &str| Error::Internal {
        check: check.to_string(),
    };
    let dq = BigRational::from_integer(d.clone());
    let y0sq = x0 * x0 * x0 + a * x0 + b;
    let beta0 = rational_sqrt_exact(&(&y0sq / &dq))
        .ok_or_else(|| internal("y0^2 lies in the square class of D"))?;
    let alpha0 = (rat(3) * x0 * x0 + a) / (rat(2) * &dq * &beta0);
    // x = μ²x″ + x₀, y = μ³y″: α = α₀/μ, β = β₀/μ³; start with μ = 1/N.
    let n = alpha0.denom() * beta0.denom();
    let nq = BigRational::from_integer(n.clone());
    let mut alpha = (&alpha0 * &nq).to_integer();
    let mut beta = (&beta0 * &nq * &nq * &nq).to_integer();
    let mut mu = BigRational::new(BigInt::one(), n);
    let g = alpha.gcd(&beta);
    if g > BigInt::one() {
        let fac = factor(&g, budget)?;
        for (p, _) in fac.factors() {
            let p3 = p * p * p;
            while (&alpha % p).is_zero() && (&beta % &p3).is_zero() {
                alpha /= p;
                beta /= &p3;
                mu *= BigRational::from_integer(p.clone());
            }
        }
    }
    if beta.is_negative() {
        alpha = -alpha;
        beta = -beta;
        mu = -mu;
    }
    let change = ModelChange::new(mu, x0.clone(), BigRational::zero(), BigRational::zero())?;
    Ok(Isogeny3Model {
        d: d.clone(),
        alpha,
        beta,
        change,
    })
}

/// Dense polynomials over Q, constant term first, as integer numerators
/// over one common denominator (no gcds in the products; only what the
/// exact checks need).
#[derive(Clone, Debug)]
struct QPoly {
    num: Vec<BigInt>,
    den: BigInt,
}

impl PartialEq for QPoly {
    fn eq(&self, o: &QPoly) -> bool {
        let n = self.num.len().max(o.num.len());
        let z = BigInt::zero();
        (0..n).all(|i| {
            self.num.get(i).unwrap_or(&z) * &o.den == o.num.get(i).unwrap_or(&z) * &self.den
        })
    }
}

impl QPoly {
    fn new(c: Vec<BigRational>) -> QPoly {
        let den = lcm_denominators(c.iter());
        let num = c.iter().map(|x| x.numer() * (&den / x.denom())).collect();
        QPoly { num, den }
    }
    fn x() -> QPoly {
        QPoly::new(vec![BigRational::zero(), BigRational::one()])
    }
    fn constant(c: BigRational) -> QPoly {
        QPoly::new(vec![c])
    }
    /// x + c.
    fn linear(c: BigRational) -> QPoly {
        QPoly::new(vec![c, BigRational::one()])
    }
    fn add(&self, o: &QPoly) -> QPoly {
        let n = self.num.len().max(o.num.len());
        let z = BigInt::zero();
        let num = (0..n)
            .map(|i| {
                self.num.get(i).unwrap_or(&z) * &o.den + o.num.get(i).unwrap_or(&z) * &self.den
            })
            .collect();
        QPoly {
            num,
            den: &self.den * &o.den,
        }
    }
    fn sub(&self, o: &QPoly) -> QPoly {
        self.add(&o.scale(&rat(-1)))
    }
    fn scale(&self, k: &BigRational) -> QPoly {
        QPoly {
            num: self.num.iter().map(|c| c * k.numer()).collect(),
            den: &self.den * k.denom(),
        }
    }
    fn mul(&self, o: &QPoly) -> QPoly {
        if self.num.is_empty() || o.num.is_empty() {
            return QPoly {
                num: Vec::new(),
                den: BigInt::one(),
            };
        }
        let mut c = vec![BigInt::zero(); self.num.len() + o.num.len() - 1];
        for (i, a) in self.num.iter().enumerate() {
            if a.is_zero() {
                continue;
            }
            for (j, b) in o.num.iter().enumerate() {
                c[i + j] += a * b;
            }
        }
        QPoly {
            num: c,
            den: &self.den * &o.den,
        }
    }
}
