//! Parametrising a conic with a rational point by binary quadratic forms.
#![allow(clippy::needless_range_loop)] // index loops mirror the formulas

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

use super::legendre::primitive;
#[cfg(test)]
use super::ternary::det3;
use super::ternary::TernaryForm;
use crate::error::{Error, Result};

/// A parametrisation of a non-degenerate conic q = 0 by three binary
/// quadratic forms with integer coefficients.
///
/// **Convention.** `forms[i] = [A, B, C]` is the form
/// qᵢ(u, v) = A u² + B uv + C v², and (u, v) ↦ (q₀ : q₁ : q₂)(u, v) is a
/// bijection from P¹(Q) onto the rational points of the conic. For coprime
/// integers u, v the value [`evaluate`](Self::evaluate) is an integer
/// point (not necessarily primitive); every rational point is a rational
/// multiple of exactly one such value up to the sign of (u, v).
///
/// **Construction (lines through P).** Let P be a primitive integer point
/// and complete it to a unimodular basis (P, e, f) of Z³. For a direction
/// d = u e + v f the line {sP + t d} meets the conic where
/// q(sP + td) = st·B(P, d) + t²q(d) = 0, i.e. at
/// R(d) = q(d)·P − B(P, d)·d, with B the polar form. Hence
/// qᵢ(u, v) = Pᵢ q(ue + vf) − B(P, ue + vf)(ueᵢ + vfᵢ).
/// The value is never 0 for (u, v) ≠ 0 (else P and d would span a totally
/// isotropic plane, impossible for a non-degenerate ternary form); the
/// tangent direction (B(P, d) = 0) gives P itself; and each point R ≠ P
/// comes from the direction of R − λP in span(e, f). The nine coefficients
/// are divided by their common content. (The rational parametrisation of
/// a conic with a point: [Cassels91, Ch. 1]; common practice.)
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct ConicParametrisation {
    /// `forms[i] = [A, B, C]`: the i-th coordinate is A u² + B uv + C v².
    pub forms: [[BigInt; 3]; 3],
    /// The point P (primitive).
    base: [BigInt; 3],
    /// The unimodular frame (P, e, f), det ±1, stored as rows.
    frame: [[BigInt; 3]; 3],
    /// B(P, e), B(P, f).
    polar_base: [BigInt; 2],
}

impl ConicParametrisation {
    #[cfg(test)]
    /// (q₀(u, v), q₁(u, v), q₂(u, v)).
    pub fn evaluate(&self, u: &BigInt, v: &BigInt) -> [BigInt; 3] {
        let uu = u * u;
        let uv = u * v;
        let vv = v * v;
        let f = |c: &[BigInt; 3]| &c[0] * &uu + &c[1] * &uv + &c[2] * &vv;
        [f(&self.forms[0]), f(&self.forms[1]), f(&self.forms[2])]
    }

    #[cfg(test)]
    /// The parameter (u, v), coprime, of a point R of the conic: the
    /// inverse of [`evaluate`](Self::evaluate) up to scaling. For R = P
    /// this is the tangent direction (B(P, f), −B(P, e)).
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] if R = (0, 0, 0). Membership of R in the
    /// conic is not checked (the caller holds the form); for R off the
    /// conic the answer is the direction of the line PR, and
    /// evaluate(u, v) is then the second intersection of that line with
    /// the conic rather than R.
    ///
    /// Cost: two 3×3 determinants.
    pub fn parameter_of(&self, r: &[BigInt; 3]) -> Result<(BigInt, BigInt)> {
        if r.iter().all(|x| x.is_zero()) {
            return Err(Error::InvalidArgument {
                reason: "the zero vector is not a projective point".into(),
            });
        }
        // Solve r = λP + u e + v f by Cramer's rule (the frame has det ±1).
        let [p, e, f] = &self.frame;
        let d = det3(&cols(p, e, f));
        let u = det3(&cols(p, r, f)) * &d; // d = ±1, so multiply = divide
        let v = det3(&cols(p, e, r)) * &d;
        let (u, v) = if u.is_zero() && v.is_zero() {
            (self.polar_base[1].clone(), -&self.polar_base[0])
        } else {
            (u, v)
        };
        let g = u.gcd(&v);
        Ok((&u / &g, &v / &g))
    }
}

#[cfg(test)]
/// The matrix with columns a, b, c.
fn cols(a: &[BigInt; 3], b: &[BigInt; 3], c: &[BigInt; 3]) -> [[BigInt; 3]; 3] {
    let mut m: [[BigInt; 3]; 3] = Default::default();
    for i in 0..3 {
        m[i][0] = a[i].clone();
        m[i][1] = b[i].clone();
        m[i][2] = c[i].clone();
    }
    m
}

/// A unimodular completion (e, f) of a primitive vector p:
/// det(p, e, f) = 1 (as columns).
fn complete_basis(p: &[BigInt; 3]) -> ([BigInt; 3], [BigInt; 3]) {
    let (p1, p2, p3) = (&p[0], &p[1], &p[2]);
    let g12 = p1.extended_gcd(p2); // s p1 + t p2 = g
    let g = g12.gcd.clone();
    if g.is_zero() {
        // p = (0, 0, ±1)
        let e = [BigInt::zero(), BigInt::one(), BigInt::zero()];
        let f = [BigInt::one(), BigInt::zero(), BigInt::zero()];
        // det((0,0,p3),(0,1,0),(1,0,0)) = −p3; fix the sign
        if p3 == &BigInt::one() {
            return (f, e);
        }
        return (e, f);
    }
    let (s, t) = (g12.x, g12.y);
    let gg = g.extended_gcd(p3); // σ g + τ p3 = 1 (p primitive)
    let (sigma, tau) = (gg.x, gg.y);
    let e = [-t, s, BigInt::zero()];
    let f = [-(&tau * p1 / &g), -(&tau * p2 / &g), sigma];
    (e, f)
}

/// The parametrisation of the conic q = 0 by lines through its rational
/// point `point` (see [`ConicParametrisation`] for the convention and the
/// proof that it is a bijection P¹(Q) → C(Q)).
///
/// # Errors
/// [`Error::Degenerate`] if det H = 0; [`Error::InvalidArgument`] if
/// `point` is (0, 0, 0); [`Error::PointNotOnCurve`] if q(point) ≠ 0.
///
/// Cost: O(1) big-integer operations.
///
/// Example: the circle x² + y² = z² through (1, 0, 1) (unit test
/// `the_circle_is_parametrised_through_a_rational_point`).
pub fn parametrise(q: &TernaryForm, point: &[BigInt; 3]) -> Result<ConicParametrisation> {
    if q.doubled_determinant().is_zero() {
        return Err(Error::Degenerate {
            reason: format!("the ternary form {q} has determinant 0"),
        });
    }
    if point.iter().all(|x| x.is_zero()) {
        return Err(Error::InvalidArgument {
            reason: "the zero vector is not a projective point".into(),
        });
    }
    if !q.evaluate(point).is_zero() {
        return Err(Error::PointNotOnCurve {
            point: format!("({}, {}, {})", point[0], point[1], point[2]),
            curve: format!("{q} = 0"),
        });
    }
    let mut pv = point.to_vec();
    primitive(&mut pv);
    let p = [pv[0].clone(), pv[1].clone(), pv[2].clone()];
    let (e, f) = complete_basis(&p);
    let qe = q.evaluate(&e);
    let qf = q.evaluate(&f);
    let bef = q.polar(&e, &f);
    let be = q.polar(&p, &e);
    let bf = q.polar(&p, &f);
    let mut forms: [[BigInt; 3]; 3] = Default::default();
    for i in 0..3 {
        forms[i] = [
            &p[i] * &qe - &be * &e[i],
            &p[i] * &bef - &be * &f[i] - &bf * &e[i],
            &p[i] * &qf - &bf * &f[i],
        ];
    }
    let g = forms.iter().flatten().fold(BigInt::zero(), |g, c| g.gcd(c));
    if !g.is_zero() && !g.is_one() {
        for row in forms.iter_mut() {
            for c in row.iter_mut() {
                *c = &*c / &g;
            }
        }
    }
    Ok(ConicParametrisation {
        forms,
        base: p.clone(),
        frame: [p, e, f],
        polar_base: [be, bf],
    })
}

/// [`parametrise`] for the diagonal conic a X² + b Y² + c Z² = 0.
///
/// # Errors
/// As [`parametrise`]; [`Error::Degenerate`] covers a zero coefficient.
pub fn parametrise_diagonal(
    a: &BigInt,
    b: &BigInt,
    c: &BigInt,
    point: &[BigInt; 3],
) -> Result<ConicParametrisation> {
    parametrise(
        &TernaryForm::diagonal(a.clone(), b.clone(), c.clone()),
        point,
    )
}
