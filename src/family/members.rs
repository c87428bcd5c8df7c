//! The families themselves: what their members are, in which order they
//! come, and how each member's curve is built.
//!
//! Every family is an enumeration: member number 0, 1, 2, … in a fixed
//! order that depends only on the family's parameters. The index is what
//! shards, resumed runs and merges agree on (see [`super::scan::Shard`] and
//! [`super::records`]).

use std::fmt;

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;

use crate::curve::{two_torsion_points, Curve};
use crate::error::{Error, Result};

/// Largest |parameter| accepted for a family range or box bound: 2⁴⁰.
/// True when no e-th power of a prime divides n (n ≥ 1).
fn is_power_free_u64(n: u64, e: u32) -> bool {
    if n == 0 {
        return false;
    }
    crate::arith::factor_u64(n).iter().all(|&(_, x)| x < e)
}

/// Keeps every intermediate of the enumeration inside `i128` and the
/// square-free test (trial division up to √n ≤ 2²⁰) cheap.
pub const MAX_PARAMETER: u64 = 1 << 40;

/// True iff the positive integer `n` is square-free, by trial division
/// with p² for p = 2 and every odd p ≤ √n.
///
/// Cost: O(√n) divisions in the worst case (n prime), O(1) when n has a
/// small square factor.
///
/// Example: 30 is square-free, 12 = 2²·3 and 0 are not, 1 is.
pub fn is_squarefree_u64(n: u64) -> bool {
    if n == 0 {
        return false;
    }
    let mut m = n;
    if m % 4 == 0 {
        return false;
    }
    if m % 2 == 0 {
        m /= 2;
    }
    let mut p: u64 = 3;
    while p.saturating_mul(p) <= m {
        if m % p == 0 {
            m /= p;
            if m % p == 0 {
                return false;
            }
        }
        p += 2;
    }
    true
}

/// The quadratic twist E^(d) of `e` by the nonzero integer `d`.
///
/// Statement: for y² = x³ + a₂x² + a₄x + a₆ the twist by d is
/// y² = x³ + d a₂ x² + d² a₄ x + d³ a₆, which becomes isomorphic to E over
/// Q(√d) by (x, y) ↦ (x/d, y/(d√d)) [Sil09, X.5]. A general model is first
/// brought to a₁ = a₃ = 0 by completing the square and scaling by u = 1/2,
/// y² = x³ + b₂x² + 8b₄x + 16b₆ (an integral model when E's is), and then
/// twisted the same way. Models with a₁ = a₃ = 0 are twisted as given, so
/// the twist of an integral model is integral.
///
/// # Errors
/// [`Error::Zero`] for d = 0. (A twist of a nonsingular curve is
/// nonsingular: Δ(E^(d)) = d⁶Δ(E) for the first formula, 2¹²d⁶Δ(E) for the
/// second.)
///
/// Cost: a handful of big-integer products.
///
/// Example: the twist of y² = x³ − x by d = 5 is y² = x³ − 25x, the
/// congruent-number curve for n = 5.
pub fn twist_by(e: &Curve, d: i64) -> Result<Curve> {
    if d == 0 {
        return Err(Error::Zero {
            what: "twisting parameter d".into(),
        });
    }
    let dq = BigRational::from_integer(BigInt::from(d));
    let d2 = &dq * &dq;
    let d3 = &d2 * &dq;
    let [a1, a2, a3, a4, a6] = e.coefficients();
    let zero = BigRational::zero();
    let (c2, c4, c6) = if a1.is_zero() && a3.is_zero() {
        (a2.clone(), a4.clone(), a6.clone())
    } else {
        let eight = BigRational::from_integer(BigInt::from(8));
        let sixteen = BigRational::from_integer(BigInt::from(16));
        (e.b2().clone(), e.b4() * eight, e.b6() * sixteen)
    };
    Curve::new([zero.clone(), c2 * &dq, zero, c4 * d2, c6 * d3])
}

/// What distinguishes one member of a family from the others.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum Parameter {
    /// The twisting parameter d of E^(d).
    Twist(i64),
    /// n of the congruent-number curve y² = x³ − n²x.
    Congruent(u64),
    /// (a, b) of y² = x³ + a x² + b x.
    Pair(i64, i64),
    /// k of the Mordell curve y² = x³ + k.
    Mordell(i64),
    /// n of x³ + y³ = n, the curve y² = x³ − 432n².
    CubeSum(u64),
}

impl fmt::Display for Parameter {
    /// `d=-3`, `n=5` or `a=1 b=-2`: the text stored in each output record.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Parameter::Twist(d) => write!(f, "d={d}"),
            Parameter::Congruent(n) => write!(f, "n={n}"),
            Parameter::Pair(a, b) => write!(f, "a={a} b={b}"),
            Parameter::Mordell(k) => write!(f, "k={k}"),
            Parameter::CubeSum(n) => write!(f, "cubes={n}"),
        }
    }
}

/// One member of a family: its place in the enumeration, its parameter and
/// its curve.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct Member {
    /// Position in the family's enumeration, from 0.
    pub index: u64,
    /// The family parameter.
    pub parameter: Parameter,
    /// The curve.
    pub curve: Curve,
}

impl Member {
    /// The curve as it is echoed in the `input` field of the member's
    /// record: its equation.
    pub fn line(&self) -> String {
        self.curve.to_string()
    }
}

#[derive(Clone, Debug, PartialEq, Eq)]
enum Kind {
    Twists {
        base: Box<Curve>,
        from: i64,
        to: i64,
    },
    Congruent {
        from: u64,
        to: u64,
    },
    Pairs {
        bound: i64,
    },
    Mordell {
        from: i64,
        to: i64,
    },
    CubeSums {
        from: u64,
        to: u64,
    },
}

/// A family of curves with a rational isogeny of degree 2 or 3, enumerated
/// in a fixed order.
///
/// * [`Family::quadratic_twists`]: E^(d) for square-free d ≠ 0 with
///   from ≤ d ≤ to, d ascending;
/// * [`Family::congruent_numbers`]: y² = x³ − n²x for square-free n with
///   from ≤ n ≤ to, n ascending;
/// * [`Family::pair_box`]: y² = x³ + a x² + b x for |a|, |b| ≤ B, a
///   ascending and, for each a, b ascending; the singular models (b = 0 or
///   a² = 4b) are skipped — they are not elliptic curves and get no index;
/// * [`Family::mordell`]: y² = x³ + k for sixth-power-free k ≠ 0 with
///   from ≤ k ≤ to, k ascending;
/// * [`Family::cube_sums`]: y² = x³ − 432n² (x³ + y³ = n) for cube-free n
///   with from ≤ n ≤ to, n ascending.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Family {
    kind: Kind,
}

fn check_parameter(what: &str, v: i128) -> Result<()> {
    if v.unsigned_abs() > u128::from(MAX_PARAMETER) {
        return Err(Error::InvalidArgument {
            reason: format!("{what} = {v} is larger in absolute value than {MAX_PARAMETER}"),
        });
    }
    Ok(())
}

fn check_range(from: i128, to: i128) -> Result<()> {
    check_parameter("start of the range", from)?;
    check_parameter("end of the range", to)?;
    if from > to {
        return Err(Error::InvalidArgument {
            reason: format!("empty range: start {from} is larger than end {to}"),
        });
    }
    Ok(())
}

impl Family {
    /// The quadratic twists E^(d) of `base` (see [`twist_by`]) for
    /// square-free d ≠ 0 (negative d allowed; d = 1 is `base` itself) with
    /// `from ≤ d ≤ to`.
    ///
    /// # Errors
    /// [`Error::NoTwoTorsion`] if `base` has no rational point of
    /// order 2 (nor then has any twist); [`Error::InvalidArgument`] if
    /// `from > to` or a bound exceeds `MAX_PARAMETER` in absolute value.
    ///
    /// Example: `quadratic_twists(y² = x³ − x, 1, 10)` has the seven
    /// members d = 1, 2, 3, 5, 6, 7, 10.
    pub fn quadratic_twists(base: &Curve, from: i64, to: i64) -> Result<Family> {
        check_range(i128::from(from), i128::from(to))?;
        if two_torsion_points(base).is_empty() {
            return Err(Error::NoTwoTorsion);
        }
        Ok(Family {
            kind: Kind::Twists {
                base: Box::new(base.clone()),
                from,
                to,
            },
        })
    }

    /// The congruent-number curves y² = x³ − n²x for square-free n with
    /// `from ≤ n ≤ to`.
    ///
    /// # Errors
    /// [`Error::NotPositive`] if `from` is 0;
    /// [`Error::InvalidArgument`] if `from > to` or `to` exceeds
    /// `MAX_PARAMETER`.
    ///
    /// Example: `congruent_numbers(1, 10)` has the members
    /// n = 1, 2, 3, 5, 6, 7, 10.
    pub fn congruent_numbers(from: u64, to: u64) -> Result<Family> {
        if from == 0 {
            return Err(Error::NotPositive {
                what: "start of the congruent-number range".into(),
                value: BigInt::zero(),
            });
        }
        check_range(i128::from(from), i128::from(to))?;
        Ok(Family {
            kind: Kind::Congruent { from, to },
        })
    }

    /// The curves y² = x³ + a x² + b x with |a| ≤ `bound` and |b| ≤ `bound`,
    /// singular pairs (b = 0 or a² = 4b) skipped.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] if `bound` exceeds
    /// `MAX_PARAMETER`.
    ///
    /// Example: `pair_box(1)` has the six members (a, b) = (−1, −1),
    /// (−1, 1), (0, −1), (0, 1), (1, −1), (1, 1).
    pub fn pair_box(bound: u64) -> Result<Family> {
        check_parameter("box bound", i128::from(bound))?;
        let bound = i64::try_from(bound).map_err(|_| Error::InvalidArgument {
            reason: format!("box bound {bound} does not fit"),
        })?;
        Ok(Family {
            kind: Kind::Pairs { bound },
        })
    }

    /// The Mordell curves y² = x³ + k for sixth-power-free k ≠ 0 with
    /// `from ≤ k ≤ to` (the scan uses the descent via 3-isogeny on those
    /// without a rational point of order 2).
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] if `from > to` or a bound exceeds
    /// `MAX_PARAMETER` in absolute value.
    pub fn mordell(from: i64, to: i64) -> Result<Family> {
        check_range(i128::from(from), i128::from(to))?;
        Ok(Family {
            kind: Kind::Mordell { from, to },
        })
    }

    /// The curves y² = x³ − 432n² of x³ + y³ = n for cube-free n with
    /// `from ≤ n ≤ to`.
    ///
    /// # Errors
    /// [`Error::NotPositive`] if `from` is 0; [`Error::InvalidArgument`] if
    /// `from > to` or `to` exceeds `MAX_PARAMETER`.
    pub fn cube_sums(from: u64, to: u64) -> Result<Family> {
        if from == 0 {
            return Err(Error::NotPositive {
                what: "start of the cube-sum range".into(),
                value: BigInt::zero(),
            });
        }
        check_range(i128::from(from), i128::from(to))?;
        Ok(Family {
            kind: Kind::CubeSums { from, to },
        })
    }

    /// The members in enumeration order, built lazily (memory O(1) in the
    /// size of the family).
    pub fn members(&self) -> Members {
        let state = match &self.kind {
            Kind::Mordell { from, .. } => Cursor::Int(i128::from(*from)),
            Kind::CubeSums { from, .. } => Cursor::Int(i128::from(*from)),
            Kind::Twists { from, .. } => Cursor::Int(i128::from(*from)),
            Kind::Congruent { from, .. } => Cursor::Int(i128::from(*from)),
            Kind::Pairs { bound } => Cursor::Pair(-i128::from(*bound), -i128::from(*bound)),
        };
        Members {
            family: self.clone(),
            cursor: state,
            next_index: 0,
        }
    }

    /// The number of members, by running through the enumeration without
    /// building curves (time O(size · square-free test), memory O(1)).
    pub fn count(&self) -> u64 {
        let mut m = self.members();
        let mut n = 0u64;
        while m.advance().is_some() {
            n += 1;
        }
        n
    }

    /// A one-line description, e.g. `congruent-number curves y^2 = x^3 - n^2 x,
    /// square-free n in [1, 100]`.
    pub fn describe(&self) -> String {
        match &self.kind {
            Kind::Twists { base, from, to } => format!(
                "quadratic twists of {base} by square-free d in [{from}, {to}], d != 0"
            ),
            Kind::Congruent { from, to } => format!(
                "congruent-number curves y^2 = x^3 - n^2 x, square-free n in [{from}, {to}]"
            ),
            Kind::Pairs { bound } => format!(
                "y^2 = x^3 + a x^2 + b x with |a|, |b| <= {bound}, singular (b = 0 or a^2 = 4b) skipped"
            ),
            Kind::Mordell { from, to } => format!(
                "Mordell curves y^2 = x^3 + k, sixth-power-free k in [{from}, {to}], k != 0"
            ),
            Kind::CubeSums { from, to } => format!(
                "sums of two cubes x^3 + y^3 = n (y^2 = x^3 - 432 n^2), cube-free n in [{from}, {to}]"
            ),
        }
    }

    /// The curve of the member with parameter `p` (which must belong to
    /// this kind of family).
    fn curve_for(&self, p: Parameter) -> Result<Curve> {
        match (&self.kind, p) {
            (Kind::Twists { base, .. }, Parameter::Twist(d)) => twist_by(base, d),
            (Kind::Congruent { .. }, Parameter::Congruent(n)) => {
                let n = BigInt::from(n);
                Curve::from_bigints([
                    BigInt::zero(),
                    BigInt::zero(),
                    BigInt::zero(),
                    -(&n * &n),
                    BigInt::zero(),
                ])
            }
            (Kind::Pairs { .. }, Parameter::Pair(a, b)) => Curve::from_bigints([
                BigInt::zero(),
                BigInt::from(a),
                BigInt::zero(),
                BigInt::from(b),
                BigInt::zero(),
            ]),
            (Kind::Mordell { .. }, Parameter::Mordell(k)) => Curve::from_bigints([
                BigInt::zero(),
                BigInt::zero(),
                BigInt::zero(),
                BigInt::zero(),
                BigInt::from(k),
            ]),
            (Kind::CubeSums { .. }, Parameter::CubeSum(n)) => {
                let n = BigInt::from(n);
                Curve::from_bigints([
                    BigInt::zero(),
                    BigInt::zero(),
                    BigInt::zero(),
                    BigInt::zero(),
                    BigInt::from(-432) * &n * &n,
                ])
            }
            _ => Err(Error::InvalidArgument {
                reason: format!("parameter {p} does not belong to this family"),
            }),
        }
    }
}

#[derive(Clone, Debug)]
enum Cursor {
    Int(i128),
    Pair(i128, i128),
}

/// The lazy enumeration of a [`Family`]; see [`Family::members`].
#[derive(Clone, Debug)]
pub struct Members {
    family: Family,
    cursor: Cursor,
    next_index: u64,
}

impl Members {
    /// The next member's parameter (and index), without building its curve.
    fn advance(&mut self) -> Option<(u64, Parameter)> {
        let p = match (&self.family.kind, &mut self.cursor) {
            (Kind::Twists { to, .. }, Cursor::Int(d)) => loop {
                if *d > i128::from(*to) {
                    return None;
                }
                let cur = *d;
                *d += 1;
                let ok = cur != 0 && is_squarefree_u64(u64::try_from(cur.unsigned_abs()).ok()?);
                if ok {
                    break Parameter::Twist(i64::try_from(cur).ok()?);
                }
            },
            (Kind::Congruent { to, .. }, Cursor::Int(n)) => loop {
                if *n > i128::from(*to) {
                    return None;
                }
                let cur = *n;
                *n += 1;
                let cur = u64::try_from(cur).ok()?;
                if is_squarefree_u64(cur) {
                    break Parameter::Congruent(cur);
                }
            },
            (Kind::Pairs { bound }, Cursor::Pair(a, b)) => loop {
                let bd = i128::from(*bound);
                if *a > bd {
                    return None;
                }
                let (ca, cb) = (*a, *b);
                if *b < bd {
                    *b += 1;
                } else {
                    *a += 1;
                    *b = -bd;
                }
                if cb != 0 && ca * ca != 4 * cb {
                    break Parameter::Pair(i64::try_from(ca).ok()?, i64::try_from(cb).ok()?);
                }
            },
            (Kind::Mordell { to, .. }, Cursor::Int(k)) => loop {
                if *k > i128::from(*to) {
                    return None;
                }
                let cur = *k;
                *k += 1;
                if cur != 0 && is_power_free_u64(u64::try_from(cur.unsigned_abs()).ok()?, 6) {
                    break Parameter::Mordell(i64::try_from(cur).ok()?);
                }
            },
            (Kind::CubeSums { to, .. }, Cursor::Int(n)) => loop {
                if *n > i128::from(*to) {
                    return None;
                }
                let cur = *n;
                *n += 1;
                let cur = u64::try_from(cur).ok()?;
                if is_power_free_u64(cur, 3) {
                    break Parameter::CubeSum(cur);
                }
            },
            _ => return None,
        };
        let i = self.next_index;
        self.next_index += 1;
        Some((i, p))
    }
}

impl Iterator for Members {
    type Item = Member;

    fn next(&mut self) -> Option<Member> {
        loop {
            let (index, parameter) = self.advance()?;
            // Every enumerated parameter gives a nonsingular curve (twists
            // of a nonsingular curve, n ≠ 0, b ≠ 0 and a² ≠ 4b); a failure
            // here would be an internal inconsistency, and the member is
            // then left out rather than panicking.
            if let Ok(curve) = self.family.curve_for(parameter) {
                return Some(Member {
                    index,
                    parameter,
                    curve,
                });
            }
        }
    }
}
