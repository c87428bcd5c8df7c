//! Changes of Weierstrass model.
//!
//! Every isomorphism between Weierstrass models over Q is a substitution
//!
//! ```text
//! x = u²x′ + r,       y = u³y′ + s·u²x′ + t,        u ∈ Q*, r, s, t ∈ Q
//! ```
//!
//! [Sil09, III.3.1(b)]. A [`ModelChange`] τ = (u, r, s, t) carries the *old*
//! model E (coordinates x, y) to the *new* model E′ (coordinates x′, y′),
//! whose coefficients are [Sil09, III.1, Table 3.1]
//!
//! ```text
//! u a1′  = a1 + 2s
//! u² a2′ = a2 − s a1 + 3r − s²
//! u³ a3′ = a3 + r a1 + 2t
//! u⁴ a4′ = a4 − s a3 + 2r a2 − (t + rs) a1 + 3r² − 2st
//! u⁶ a6′ = a6 + r a4 + r² a2 + r³ − t a3 − t² − r t a1
//! ```
//!
//! with c4′ = u⁻⁴c4, c6′ = u⁻⁶c6, Δ′ = u⁻¹²Δ and j′ = j. Points move by
//! x′ = (x − r)/u², y′ = (y − s(x − r) − t)/u³, and O ↦ O.
//!
//! Composition (first τ1 : E → E′, then τ2 : E′ → E″) is
//! (u1u2, r1 + u1²r2, s1 + u1s2, t1 + u1³t2 + s1u1²r2), and the inverse of
//! (u, r, s, t) is (1/u, −r/u², −s/u, (rs − t)/u³). Both follow by
//! substituting one change into the other.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Zero};

use super::point::Point;
use super::weierstrass::Curve;
use crate::error::{Error, Result};

/// The change of model x = u²x′ + r, y = u³y′ + s·u²x′ + t (u ≠ 0).
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct ModelChange {
    u: BigRational,
    r: BigRational,
    s: BigRational,
    t: BigRational,
}

impl ModelChange {
    /// The change (u, r, s, t).
    ///
    /// # Errors
    /// [`Error::Zero`] if u = 0.
    pub fn new(u: BigRational, r: BigRational, s: BigRational, t: BigRational) -> Result<Self> {
        if u.is_zero() {
            return Err(Error::Zero {
                what: "the scaling u of a change of model".to_string(),
            });
        }
        Ok(ModelChange { u, r, s, t })
    }

    /// The identity (1, 0, 0, 0).
    pub(crate) fn identity() -> Self {
        ModelChange {
            u: BigRational::one(),
            r: BigRational::zero(),
            s: BigRational::zero(),
            t: BigRational::zero(),
        }
    }

    /// The pure scaling (u, 0, 0, 0): x = u²x′, y = u³y′, a_i′ = a_i/u^i.
    ///
    /// # Errors
    /// [`Error::Zero`] if u = 0.
    pub(crate) fn scaling(u: BigRational) -> Result<Self> {
        ModelChange::new(
            u,
            BigRational::zero(),
            BigRational::zero(),
            BigRational::zero(),
        )
    }

    /// The pure translation (1, r, s, t).
    pub(crate) fn translation(r: BigRational, s: BigRational, t: BigRational) -> Self {
        ModelChange {
            u: BigRational::one(),
            r,
            s,
            t,
        }
    }

    /// u.
    pub fn u(&self) -> &BigRational {
        &self.u
    }
    /// r.
    pub fn r(&self) -> &BigRational {
        &self.r
    }
    /// s.
    pub fn s(&self) -> &BigRational {
        &self.s
    }
    /// t.
    pub fn t(&self) -> &BigRational {
        &self.t
    }

    /// True for (1, 0, 0, 0).
    pub fn is_identity(&self) -> bool {
        self.u.is_one() && self.r.is_zero() && self.s.is_zero() && self.t.is_zero()
    }

    /// The change "first `self`, then `then`" (module docs).
    pub fn then(&self, then: &ModelChange) -> ModelChange {
        let (u1, r1, s1, t1) = (&self.u, &self.r, &self.s, &self.t);
        let (u2, r2, s2, t2) = (&then.u, &then.r, &then.s, &then.t);
        let u1sq = u1 * u1;
        ModelChange {
            u: u1 * u2,
            r: r1 + &u1sq * r2,
            s: s1 + u1 * s2,
            t: t1 + &u1sq * u1 * t2 + s1 * &u1sq * r2,
        }
    }

    /// The inverse change (1/u, −r/u², −s/u, (rs − t)/u³).
    pub fn inverse(&self) -> ModelChange {
        let ui = self.u.recip();
        let ui2 = &ui * &ui;
        ModelChange {
            r: -&self.r * &ui2,
            s: -&self.s * &ui,
            t: (&self.r * &self.s - &self.t) * &ui2 * &ui,
            u: ui,
        }
    }

    /// The new model E′ (Table 3.1 of [Sil09, III.1]; module docs).
    pub fn apply_to_curve(&self, e: &Curve) -> Curve {
        let (u, r, s, t) = (&self.u, &self.r, &self.s, &self.t);
        let coeffs = match e.integer_coefficients() {
            Some(a) if r.is_integer() && s.is_integer() && t.is_integer() => {
                // Numerators in Z, then one division by u^i each.
                let nums = table_3_1(a, [r.numer(), s.numer(), t.numer()]);
                if u.is_one() {
                    nums.map(BigRational::from_integer)
                } else {
                    let mut i = 0;
                    nums.map(|n| {
                        let w = [1u32, 2, 3, 4, 6][i];
                        i += 1;
                        BigRational::new(n * u.denom().pow(w), u.numer().pow(w))
                    })
                }
            }
            _ => {
                let [a1, a2, a3, a4, a6] = e.coefficients();
                let two = BigRational::from_integer(BigInt::from(2));
                let three = BigRational::from_integer(BigInt::from(3));
                let ui = u.recip();
                let ui2 = &ui * &ui;
                let ui3 = &ui2 * &ui;
                let ui4 = &ui2 * &ui2;
                let ui6 = &ui3 * &ui3;
                let na1 = (a1 + &two * s) * &ui;
                let na2 = (a2 - s * a1 + &three * r - s * s) * &ui2;
                let na3 = (a3 + r * a1 + &two * t) * &ui3;
                let na4 = (a4 - s * a3 + &two * r * a2 - (t + r * s) * a1 + &three * r * r
                    - &two * s * t)
                    * &ui4;
                let na6 =
                    (a6 + r * a4 + r * r * a2 + r * r * r - t * a3 - t * t - r * t * a1) * &ui6;
                [na1, na2, na3, na4, na6]
            }
        };
        match Curve::new(coeffs) {
            Ok(c) => c,
            // Δ′ = u⁻¹²Δ ≠ 0, so this branch is unreachable; return the
            // input rather than panic.
            Err(_) => e.clone(),
        }
    }

    /// A point of the old model E, written on the new model E′:
    /// x′ = (x − r)/u², y′ = (y − s(x − r) − t)/u³.
    pub fn to_new(&self, p: &Point) -> Point {
        match p {
            Point::Infinity => Point::Infinity,
            Point::Affine { x, y } => {
                let dx = if self.r.is_zero() {
                    x.clone()
                } else {
                    x - &self.r
                };
                let mut ny = if self.s.is_zero() {
                    y.clone()
                } else {
                    y - &self.s * &dx
                };
                if !self.t.is_zero() {
                    ny -= &self.t;
                }
                if self.u.is_one() {
                    return Point::Affine { x: dx, y: ny };
                }
                let ui = self.u.recip();
                let ui2 = &ui * &ui;
                let ny = ny * &ui2 * &ui;
                Point::Affine { x: dx * ui2, y: ny }
            }
        }
    }

    /// A point of the new model E′, written on the old model E:
    /// x = u²x′ + r, y = u³y′ + s·u²x′ + t.
    pub fn to_old(&self, p: &Point) -> Point {
        match p {
            Point::Infinity => Point::Infinity,
            Point::Affine { x, y } => {
                let (u2x, u3y) = if self.u.is_one() {
                    (x.clone(), y.clone())
                } else {
                    let u2 = &self.u * &self.u;
                    (&u2 * x, &u2 * &self.u * y)
                };
                let mut ny = u3y;
                if !self.s.is_zero() {
                    ny += &self.s * &u2x;
                }
                if !self.t.is_zero() {
                    ny += &self.t;
                }
                let nx = if self.r.is_zero() { u2x } else { u2x + &self.r };
                Point::Affine { x: nx, y: ny }
            }
        }
    }
}

impl ModelChange {
    /// The new coefficients for integral old coefficients `a` and integral
    /// `r, s, t`: the integers of Table 3.1 divided by `u^i` (module docs).
    /// `None` when `r, s, t` are not integers or a new coefficient is not
    /// an integer.
    pub(crate) fn apply_to_integral(&self, a: &[BigInt; 5]) -> Option<[BigInt; 5]> {
        if !(self.r.is_integer() && self.s.is_integer() && self.t.is_integer()) {
            return None;
        }
        let nums = table_3_1(
            [&a[0], &a[1], &a[2], &a[3], &a[4]],
            [self.r.numer(), self.s.numer(), self.t.numer()],
        );
        if self.u.is_one() {
            return Some(nums);
        }
        let (un, ud) = (self.u.numer(), self.u.denom());
        let mut out: [BigInt; 5] = Default::default();
        for ((o, n), w) in out.iter_mut().zip(nums).zip([1u32, 2, 3, 4, 6]) {
            let (q, rem) = (n * ud.pow(w)).div_rem(&un.pow(w));
            if !rem.is_zero() {
                return None;
            }
            *o = q;
        }
        Some(out)
    }
}

/// The right-hand sides u^i a_i′ of Table 3.1 (module docs), in integers.
fn table_3_1(a: [&BigInt; 5], rst: [&BigInt; 3]) -> [BigInt; 5] {
    let [a1, a2, a3, a4, a6] = a;
    let [r, s, t] = rst;
    let rs = r * s;
    let r2 = r * r;
    [
        a1 + s * 2,
        a2 - s * a1 + r * 3 - s * s,
        a3 + r * a1 + t * 2,
        a4 - s * a3 + r * a2 * 2 - (t + &rs) * a1 + &r2 * 3 - s * t * 2,
        a6 + r * a4 + &r2 * a2 + &r2 * r - t * a3 - t * t - r * t * a1,
    ]
}

/// The least common multiple of the denominators of some rationals.
pub(crate) fn lcm_denominators<'a>(xs: impl IntoIterator<Item = &'a BigRational>) -> BigInt {
    let mut d = BigInt::one();
    for x in xs {
        d = d.lcm(x.denom());
    }
    d
}

/// An integral model of E and the change from E to it.
///
/// With d the least common multiple of the denominators of a1, …, a6, the
/// scaling u = 1/d gives a_i′ = d^i a_i ∈ Z ([Sil09, VII.1]: a scaling by u
/// multiplies a_i by u⁻ⁱ). An already integral model is returned with the
/// identity change. d is not minimised (that would need factoring).
///
/// Example: `1/2 0 0 3 -7/4` has d = 4 and integral model
/// `2 0 0 768 -7168`.
pub fn clear_denominators(e: &Curve) -> (Curve, ModelChange) {
    let d = lcm_denominators(e.coefficients());
    if d.is_one() {
        return (e.clone(), ModelChange::identity());
    }
    let change = ModelChange {
        u: BigRational::new(BigInt::one(), d),
        r: BigRational::zero(),
        s: BigRational::zero(),
        t: BigRational::zero(),
    };
    (change.apply_to_curve(e), change)
}
