//! Weierstrass models over Q: coefficients, invariants, parsing and display.
//!
//! A model is E: y² + a1·xy + a3·y = x³ + a2·x² + a4·x + a6 with a_i ∈ Q.
//! Its standard quantities are [Sil09, III.1]
//!
//! ```text
//! b2 = a1² + 4a2,          b4 = 2a4 + a1a3,          b6 = a3² + 4a6,
//! b8 = a1²a6 + 4a2a6 − a1a3a4 + a2a3² − a4²,
//! c4 = b2² − 24·b4,         c6 = −b2³ + 36·b2·b4 − 216·b6,
//! Δ  = −b2²b8 − 8·b4³ − 27·b6² + 9·b2·b4·b6,      j = c4³/Δ,
//! ```
//!
//! related by 4b8 = b2b6 − b4² and 1728Δ = c4³ − c6². The model is an
//! elliptic curve iff Δ ≠ 0 [Sil09, III.1.4].
//!
//! # Text form
//! [`Display`](std::fmt::Display) writes a curve as its equation, zero
//! terms dropped and signs folded (`y^2 + xy + 3y = x^3 - 2x^2 + 5x - 7`;
//! see [`super::equation`]). [`FromStr`] reads that equation (with `^` or
//! `**`, any spacing, rational coefficients) and, as an alternative, the
//! five coefficients a1 a2 a3 a4 a6 in that order, each an integer or a
//! fraction `p/q`, separated by blanks and/or single commas:
//! `"0 -1 0 -4 4"`, `"0,0,0,-25,0"`, `"1/2, 0 0 3 -7/4"`. Printing and
//! parsing round-trip.

use std::fmt;
use std::hash::{Hash, Hasher};
use std::ops::{Add, Mul, Sub};
use std::str::FromStr;
use std::sync::OnceLock;

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, ToPrimitive, Zero};

use crate::error::{Error, Result};

/// Longest accepted numerator or denominator, in digits, when parsing.
///
/// Reducing invariants with denominators (Δ/d¹² for a model with
/// denominators d) and j = c4³/Δ (on request) to lowest terms needs gcds of
/// numbers about 12 times this long, and big-integer gcd is quadratic: at
/// 2000 digits a curve parses in a fraction of a second, at 10⁵ digits
/// that would take minutes. [`Curve::new`] itself has no cap (its cost is
/// the caller's).
pub const MAX_COEFFICIENT_DIGITS: usize = 2_000;

/// An elliptic curve over Q given by a (general) Weierstrass model, with its
/// invariants b2, b4, b6, b8, c4, c6 and Δ precomputed and j computed on
/// first use.
///
/// Invariant: Δ ≠ 0 (checked by every constructor). Equality and hashing
/// look at the five coefficients only (the invariants are functions of
/// them).
#[derive(Clone, Debug)]
pub struct Curve {
    a: [BigRational; 5],
    integral: bool,
    b2: BigRational,
    b4: BigRational,
    b6: BigRational,
    #[cfg_attr(not(test), allow(dead_code))] // read by the unit tests
    b8: BigRational,
    c4: BigRational,
    c6: BigRational,
    disc: BigRational,
    j: OnceLock<BigRational>,
}

impl PartialEq for Curve {
    fn eq(&self, other: &Self) -> bool {
        self.a == other.a
    }
}

impl Eq for Curve {}

impl Hash for Curve {
    fn hash<H: Hasher>(&self, state: &mut H) {
        self.a.hash(state);
    }
}

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

/// An `i128` whose arithmetic reports overflow by becoming `None`.
#[derive(Clone, Copy)]
struct Checked(Option<i128>);

impl From<i64> for Checked {
    fn from(n: i64) -> Self {
        Checked(Some(n as i128))
    }
}

impl Add for Checked {
    type Output = Checked;
    fn add(self, o: Checked) -> Checked {
        Checked(self.0.zip(o.0).and_then(|(x, y)| x.checked_add(y)))
    }
}

impl Sub for Checked {
    type Output = Checked;
    fn sub(self, o: Checked) -> Checked {
        Checked(self.0.zip(o.0).and_then(|(x, y)| x.checked_sub(y)))
    }
}

impl Mul for Checked {
    type Output = Checked;
    fn mul(self, o: Checked) -> Checked {
        Checked(self.0.zip(o.0).and_then(|(x, y)| x.checked_mul(y)))
    }
}

/// [b2, b4, b6, b8, c4, c6, Δ] of an integral model (module docs), in any
/// commutative ring with the needed operations.
fn invariants_in_ring<T>(a: &[T; 5]) -> [T; 7]
where
    T: Clone + Add<Output = T> + Sub<Output = T> + Mul<Output = T> + From<i64>,
{
    let k = |n: i64| T::from(n);
    let [a1, a2, a3, a4, a6] = a.clone();
    let b2 = a1.clone() * a1.clone() + k(4) * a2.clone();
    let b4 = k(2) * a4.clone() + a1.clone() * a3.clone();
    let b6 = a3.clone() * a3.clone() + k(4) * a6.clone();
    let b8 = a1.clone() * a1.clone() * a6.clone() + k(4) * a2.clone() * a6.clone()
        - a1 * a3.clone() * a4.clone()
        + a2 * a3.clone() * a3
        - a4.clone() * a4;
    let b2sq = b2.clone() * b2.clone();
    let c4 = b2sq.clone() - k(24) * b4.clone();
    let c6 = k(36) * b2.clone() * b4.clone() - b2sq.clone() * b2.clone() - k(216) * b6.clone();
    let disc = k(9) * b2.clone() * b4.clone() * b6.clone()
        - b2sq * b8.clone()
        - k(8) * b4.clone() * b4.clone() * b4.clone()
        - k(27) * b6.clone() * b6.clone();
    [b2, b4, b6, b8, c4, c6, disc]
}

/// [b2, b4, b6, b8, c4, c6, Δ] of integer coefficients: in `i128` when
/// nothing overflows, else in `BigInt`.
pub(crate) fn integer_invariants(a: [&BigInt; 5]) -> [BigInt; 7] {
    let small = a.map(|c| Checked(c.to_i128()));
    if small.iter().all(|c| c.0.is_some()) {
        let inv = invariants_in_ring(&small);
        if inv.iter().all(|c| c.0.is_some()) {
            return inv.map(|c| BigInt::from(c.0.unwrap_or_default()));
        }
    }
    invariants_in_ring(&a.map(|c| c.clone()))
}

/// The standard invariants of an integral Weierstrass model
/// [Sil86, III.1]:
/// `b2 = a1² + 4a2`, `b4 = a1a3 + 2a4`, `b6 = a3² + 4a6`,
/// `b8 = a1²a6 + 4a2a6 − a1a3a4 + a2a3² − a4²`,
/// `c4 = b2² − 24·b4`, `c6 = −b2³ + 36·b2·b4 − 216·b6`,
/// `Δ = −b2²·b8 − 8·b4³ − 27·b6² + 9·b2·b4·b6`.
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct WeierstrassInvariants {
    /// b2.
    pub b2: BigInt,
    /// b4.
    pub b4: BigInt,
    /// b6.
    pub b6: BigInt,
    /// b8.
    pub b8: BigInt,
    /// c4.
    pub c4: BigInt,
    /// c6.
    pub c6: BigInt,
    /// The discriminant Δ.
    pub discriminant: BigInt,
}

/// The invariants b2, b4, b6, b8, c4, c6, Δ of `[a1, a2, a3, a4, a6]`
/// ([Sil86, III.1]; formulas in [`WeierstrassInvariants`]).
///
/// Example: `y² + y = x³ − x` has `Δ = 37`, `c4 = 48`, `c6 = −216`.
/// ```
/// use isodescent::curve::weierstrass_invariants;
/// let i = weierstrass_invariants(&[0, 0, 1, -1, 0].map(Into::into));
/// assert_eq!(i.discriminant, 37.into());
/// assert_eq!(i.c4, 48.into());
/// assert_eq!(i.c6, (-216).into());
/// ```
pub fn weierstrass_invariants(a: &[BigInt; 5]) -> WeierstrassInvariants {
    let [b2, b4, b6, b8, c4, c6, discriminant] =
        integer_invariants([&a[0], &a[1], &a[2], &a[3], &a[4]]);
    WeierstrassInvariants {
        b2,
        b4,
        b6,
        b8,
        c4,
        c6,
        discriminant,
    }
}

impl Curve {
    /// The curve with Weierstrass coefficients `[a1, a2, a3, a4, a6]`.
    ///
    /// Computes the invariants of [Sil09, III.1] (see the module docs).
    /// Integral models are computed in integers (machine words when
    /// nothing overflows); a model with denominators is first scaled to
    /// an integral one by u = 1/d, d = lcm of the denominators (a_i ↦ d^i a_i),
    /// and the invariants are scaled back (b_i ↦ b_i/d^i, c4 ↦ c4/d⁴,
    /// c6 ↦ c6/d⁶, Δ ↦ Δ/d¹²). j = c4³/Δ is reduced to lowest terms on
    /// the first call of [`Curve::j_invariant`].
    ///
    /// # Errors
    /// [`Error::SingularCurve`] if Δ = 0 (the cubic has a node or a cusp).
    ///
    /// # Example
    /// y² = x³ − x has Δ = 64 and j = 1728:
    /// ```
    /// use isodescent::curve::Curve;
    /// let e = Curve::from_ints([0, 0, 0, -1, 0]).unwrap();
    /// assert_eq!(e.discriminant().to_string(), "64");
    /// assert_eq!(e.j_invariant().to_string(), "1728");
    /// ```
    pub fn new(a: [BigRational; 5]) -> Result<Curve> {
        let integral = a.iter().all(|c| c.is_integer());
        let inv: [BigRational; 7] = if integral {
            integer_invariants([
                a[0].numer(),
                a[1].numer(),
                a[2].numer(),
                a[3].numer(),
                a[4].numer(),
            ])
            .map(BigRational::from_integer)
        } else {
            let d = a.iter().fold(BigInt::one(), |d, c| d.lcm(c.denom()));
            let [s1, s2, s3, s4, s6] = [1u32, 2, 3, 4, 6].map(|w| {
                let c = &a[match w {
                    6 => 4,
                    w => w as usize - 1,
                }];
                c.numer() * (d.pow(w) / c.denom())
            });
            let ints = integer_invariants([&s1, &s2, &s3, &s4, &s6]);
            let weights = [2u32, 4, 6, 8, 4, 6, 12];
            let mut k = 0;
            ints.map(|v| {
                let w = weights[k];
                k += 1;
                BigRational::new(v, d.pow(w))
            })
        };
        let [b2, b4, b6, b8, c4, c6, disc] = inv;
        if disc.is_zero() {
            let reason = if c4.is_zero() {
                "discriminant is 0 and c4 = 0 (the cubic has a cusp)".to_string()
            } else {
                "discriminant is 0 (the cubic has a node)".to_string()
            };
            return Err(Error::SingularCurve { reason });
        }
        Ok(Curve {
            a,
            integral,
            b2,
            b4,
            b6,
            b8,
            c4,
            c6,
            disc,
            j: OnceLock::new(),
        })
    }

    /// The curve with integer coefficients `[a1, a2, a3, a4, a6]`.
    ///
    /// # Errors
    /// [`Error::SingularCurve`] if Δ = 0.
    pub fn from_ints(a: [i64; 5]) -> Result<Curve> {
        Curve::new(a.map(q))
    }

    /// The curve with integer coefficients given as big integers.
    ///
    /// # Errors
    /// [`Error::SingularCurve`] if Δ = 0.
    pub fn from_bigints(a: [BigInt; 5]) -> Result<Curve> {
        Curve::new(a.map(BigRational::from_integer))
    }

    /// The coefficients `[a1, a2, a3, a4, a6]`.
    pub fn coefficients(&self) -> &[BigRational; 5] {
        &self.a
    }
    /// a1.
    pub(crate) fn a1(&self) -> &BigRational {
        &self.a[0]
    }
    /// a3.
    pub(crate) fn a3(&self) -> &BigRational {
        &self.a[2]
    }
    /// a4.
    #[cfg(test)]
    pub(crate) fn a4(&self) -> &BigRational {
        &self.a[3]
    }
    /// a6.
    #[cfg(test)]
    pub(crate) fn a6(&self) -> &BigRational {
        &self.a[4]
    }
    /// b2 = a1² + 4a2.
    pub(crate) fn b2(&self) -> &BigRational {
        &self.b2
    }
    /// b4 = 2a4 + a1a3.
    pub(crate) fn b4(&self) -> &BigRational {
        &self.b4
    }
    /// b6 = a3² + 4a6.
    pub(crate) fn b6(&self) -> &BigRational {
        &self.b6
    }
    /// b8 = a1²a6 + 4a2a6 − a1a3a4 + a2a3² − a4².
    #[cfg(test)]
    pub(crate) fn b8(&self) -> &BigRational {
        &self.b8
    }
    /// c4 = b2² − 24·b4.
    pub(crate) fn c4(&self) -> &BigRational {
        &self.c4
    }
    /// c6 = −b2³ + 36·b2·b4 − 216·b6.
    pub(crate) fn c6(&self) -> &BigRational {
        &self.c6
    }
    /// Δ = −b2²b8 − 8·b4³ − 27·b6² + 9·b2·b4·b6 (nonzero).
    pub fn discriminant(&self) -> &BigRational {
        &self.disc
    }
    /// j = c4³/Δ, in lowest terms (computed on the first call, then kept).
    pub fn j_invariant(&self) -> &BigRational {
        self.j.get_or_init(|| {
            let c4 = &self.c4;
            c4 * c4 * c4 / &self.disc
        })
    }

    /// The five coefficients as integers, if the model is integral.
    pub(crate) fn integer_coefficients(&self) -> Option<[&BigInt; 5]> {
        if self.integral {
            let a = &self.a;
            Some([
                a[0].numer(),
                a[1].numer(),
                a[2].numer(),
                a[3].numer(),
                a[4].numer(),
            ])
        } else {
            None
        }
    }

    /// True iff a1 = a2 = a3 = 0 (the model is y² = x³ + a4 x + a6).
    #[cfg(test)]
    pub(crate) fn is_short(&self) -> bool {
        self.a[0].is_zero() && self.a[1].is_zero() && self.a[2].is_zero()
    }
}

impl fmt::Display for Curve {
    /// The equation, e.g. `y^2 = x^3 - x^2 - 4x + 4` or
    /// `y^2 = x^3 + (1/2)x^2 - 7/4`; the output parses back to an equal
    /// curve.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&super::equation::equation_text(&self.a))
    }
}

/// Parses one coefficient token: an optional sign, decimal digits, and an
/// optional `/` followed by decimal digits.
fn parse_token(tok: &str, input: &str) -> Result<BigRational> {
    let bad = |reason: String| Error::Parse {
        input: truncate_for_message(input),
        reason,
    };
    let (num_s, den_s) = match tok.split_once('/') {
        Some((n, d)) => (n, Some(d)),
        None => (tok, None),
    };
    let digits = |s: &str, what: &str, signed: bool| -> Result<BigInt> {
        let body = if signed {
            s.strip_prefix('-')
                .or_else(|| s.strip_prefix('+'))
                .unwrap_or(s)
        } else {
            s
        };
        if body.is_empty() || !body.bytes().all(|b| b.is_ascii_digit()) {
            return Err(bad(format!(
                "{what} {:?} is not a decimal integer",
                truncate_for_message(s)
            )));
        }
        if body.len() > MAX_COEFFICIENT_DIGITS {
            return Err(bad(format!(
                "{what} has {} digits; at most {MAX_COEFFICIENT_DIGITS} are accepted",
                body.len()
            )));
        }
        let v = BigInt::parse_bytes(body.as_bytes(), 10)
            .ok_or_else(|| bad(format!("{what} is not a decimal integer")))?;
        Ok(if s.starts_with('-') { -v } else { v })
    };
    let num = digits(num_s, "numerator", true)?;
    let den = match den_s {
        None => BigInt::one(),
        Some(d) => digits(d, "denominator", false)?,
    };
    if den.is_zero() {
        return Err(Error::ZeroDenominator {
            context: format!("coefficient {:?}", truncate_for_message(tok)),
        });
    }
    Ok(BigRational::new(num, den))
}

/// Shortens very long inputs before they are copied into an error message.
pub(crate) fn truncate_for_message(s: &str) -> String {
    const KEEP: usize = 80;
    if s.len() <= KEEP {
        s.to_string()
    } else {
        let cut = (0..=KEEP)
            .rev()
            .find(|&i| s.is_char_boundary(i))
            .unwrap_or(0);
        format!("{}… ({} bytes)", &s[..cut], s.len())
    }
}

/// Splits curve text into tokens: blanks separate, and a single comma may
/// stand between two tokens (with blanks around it or not).
fn split_tokens(s: &str) -> Result<Vec<&str>> {
    let bad = |reason: &str| Error::Parse {
        input: truncate_for_message(s),
        reason: reason.to_string(),
    };
    let mut tokens = Vec::new();
    let mut comma_pending = false;
    let mut start: Option<usize> = None;
    for (i, ch) in s.char_indices() {
        if ch == ',' || ch.is_whitespace() {
            if let Some(st) = start.take() {
                tokens.push(&s[st..i]);
                comma_pending = false;
            }
            if ch == ',' {
                if comma_pending || tokens.is_empty() {
                    return Err(bad("empty coefficient between commas or before a comma"));
                }
                comma_pending = true;
            }
        } else if start.is_none() {
            start = Some(i);
        }
    }
    if let Some(st) = start {
        tokens.push(&s[st..]);
    } else if comma_pending {
        return Err(bad("trailing comma"));
    }
    Ok(tokens)
}

impl FromStr for Curve {
    type Err = Error;

    /// Parses an equation (text containing `=`, see `super::equation`)
    /// or five coefficients `a1 a2 a3 a4 a6` (see the module docs).
    ///
    /// # Errors
    /// [`Error::Parse`] for an equation that is not a Weierstrass equation,
    /// a wrong number of coefficients, a token that is not an integer or
    /// fraction, or a numerator/denominator longer than
    /// [`MAX_COEFFICIENT_DIGITS`]; [`Error::ZeroDenominator`] for `p/0`;
    /// [`Error::SingularCurve`] if the model has Δ = 0.
    fn from_str(s: &str) -> Result<Curve> {
        // Five coefficients of at most 2·MAX digits plus a sign, a slash and
        // separators: anything far longer is rejected before scanning.
        if s.len() > 5 * (2 * MAX_COEFFICIENT_DIGITS + 2) + 4096 {
            return Err(Error::Parse {
                input: truncate_for_message(s),
                reason: format!("input of {} bytes is too long", s.len()),
            });
        }
        if s.contains('=') {
            return Curve::new(super::equation::parse_equation(s)?);
        }
        // Five coefficients: a leading byte-order mark dropped, the minus
        // sign U+2212 read as '-', and `[a1, a2, a3, a4, a6]` accepted.
        let s = s.strip_prefix('\u{feff}').unwrap_or(s).trim();
        let s = match s.strip_prefix('[').and_then(|t| t.strip_suffix(']')) {
            Some(inner) => inner,
            None => s,
        };
        let owned;
        let s = if s.contains('\u{2212}') {
            owned = s.replace('\u{2212}', "-");
            owned.as_str()
        } else {
            s
        };
        let tokens = split_tokens(s)?;
        if tokens.len() != 5 {
            return Err(Error::Parse {
                input: truncate_for_message(s),
                reason: format!(
                    "expected 5 coefficients a1 a2 a3 a4 a6, found {}",
                    tokens.len()
                ),
            });
        }
        let vals = tokens
            .iter()
            .map(|t| parse_token(t, s))
            .collect::<Result<Vec<BigRational>>>()?;
        let a: [BigRational; 5] = vals.try_into().map_err(|_| Error::Parse {
            input: truncate_for_message(s),
            reason: "expected 5 coefficients".to_string(),
        })?;
        Curve::new(a)
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    #[test]
    fn the_three_documented_text_forms_parse() {
        let e: Curve = "0 -1 0 -4 4".parse().unwrap();
        assert_eq!(e.a4(), &q(-4));
        let e: Curve = "0,0,0,-25,0".parse().unwrap();
        assert_eq!(e.a4(), &q(-25));
        let e: Curve = "1/2, 0 0 3 -7/4".parse().unwrap();
        assert_eq!(e.a1(), &BigRational::new(1.into(), 2.into()));
        assert_eq!(e.a6(), &BigRational::new((-7).into(), 4.into()));
    }

    #[test]
    fn doubled_or_dangling_commas_are_rejected() {
        for s in ["0,,0,0,-25,0", ",0,0,0,-25,0", "0,0,0,-25,0,"] {
            assert!(
                matches!(s.parse::<Curve>(), Err(Error::Parse { .. })),
                "{s}"
            );
        }
    }
}
