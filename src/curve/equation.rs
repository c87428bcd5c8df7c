//! Curves as equations: the text a person reads and writes.
//!
//! A model E: y² + a1·xy + a3·y = x³ + a2·x² + a4·x + a6 is written as its
//! equation with the zero terms dropped and the signs folded,
//!
//! ```text
//! y^2 + xy + 3y = x^3 - 2x^2 + 5x - 7        (a1 a2 a3 a4 a6 = 1 -2 3 5 -7)
//! y^2 = x^3 - 30x^2 + 3x                     (0 -30 0 3 0)
//! y^2 = x^3 + (1/2)x^2 - 7/4                 (0 1/2 0 0 -7/4)
//! ```
//!
//! A coefficient ±1 in front of a monomial is dropped, and a fraction in
//! front of a monomial is put in parentheses so that `(1/2)x^2` cannot be
//! read as 1/(2x²). The same text parses back ([`parse_equation`]): the
//! parser accepts `^` or `**` for powers, optional `*` between a
//! coefficient and a monomial or between x and y, any spacing, terms in any
//! order on either side of `=`, and repeated monomials (they add up). The
//! monomials of a Weierstrass model are the only ones allowed, and after
//! moving every term to the left the coefficient of y² must be 1 and that
//! of x³ must be −1, or the other way round (`x^3 - 36x = y^2`; common
//! practice: the model is monic in y² and x³). Typographic forms are read
//! too: the minus sign `−` (U+2212), the superscripts `²` and `³`, upper
//! case, and a leading byte-order mark. Error messages give positions in
//! characters of the caller's own line, counted from 1.

use std::collections::BTreeMap;

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use crate::error::{Error, Result};

/// Monomial x^i y^j as (i, j).
type Monomial = (u32, u32);

/// The coefficient of a term as text: `""` for 1, `(p/q)` for a fraction
/// in front of a monomial, the plain value otherwise.
fn coefficient_text(c: &BigRational, has_monomial: bool) -> String {
    if has_monomial && c.is_one() {
        String::new()
    } else if c.denom().is_one() {
        c.numer().to_string()
    } else if has_monomial {
        format!("({}/{})", c.numer(), c.denom())
    } else {
        format!("{}/{}", c.numer(), c.denom())
    }
}

/// Writes the signed terms `(coefficient, monomial text)` of one side of an
/// equation, dropping zeros and folding signs; `leading` is the first term,
/// written without a sign.
fn side_text(leading: &str, terms: &[(&BigRational, &str)]) -> String {
    let mut s = leading.to_string();
    for (c, mono) in terms {
        if c.is_zero() {
            continue;
        }
        s.push_str(if c.is_negative() { " - " } else { " + " });
        s.push_str(&coefficient_text(&c.abs(), !mono.is_empty()));
        s.push_str(mono);
    }
    s
}

/// The equation of the model with coefficients `[a1, a2, a3, a4, a6]`
/// (module docs), e.g. `y^2 + xy + 3y = x^3 - 2x^2 + 5x - 7`.
pub fn equation_text(a: &[BigRational; 5]) -> String {
    let left = side_text("y^2", &[(&a[0], "xy"), (&a[2], "y")]);
    let right = side_text("x^3", &[(&a[1], "x^2"), (&a[3], "x"), (&a[4], "")]);
    format!("{left} = {right}")
}

/// The equation of y² = x³ + a x² + b x with integers a, b.
pub fn reduced_equation_text(a: &BigInt, b: &BigInt) -> String {
    let z = BigRational::zero();
    equation_text(&[
        z.clone(),
        BigRational::from_integer(a.clone()),
        z.clone(),
        BigRational::from_integer(b.clone()),
        z,
    ])
}

/// The quartic N² = c0 M⁴ + c1 M³e + c2 M²e² + c3 Me³ + c4 e⁴ written
/// out from `[c0, c1, c2, c3, c4]`, e.g. `N^2 = -3M^4 + 60M^2e^2 - 296e^4`
/// for the homogeneous space C_-3 of y² = x³ + 60x² + 888x.
pub fn quartic_text(c: &[BigInt; 5]) -> String {
    const MONOMIALS: [&str; 5] = ["M^4", "M^3e", "M^2e^2", "Me^3", "e^4"];
    let mut first = true;
    let mut s = String::from("N^2 =");
    for (c, mono) in c.iter().zip(MONOMIALS) {
        if c.is_zero() {
            continue;
        }
        if first {
            s.push(' ');
            if c.is_negative() {
                s.push('-');
            }
            first = false;
        } else {
            s.push_str(if c.is_negative() { " - " } else { " + " });
        }
        let m = c.abs();
        if !m.is_one() {
            s.push_str(&m.to_string());
        }
        s.push_str(mono);
    }
    if first {
        s.push_str(" 0");
    }
    s
}

/// A parse error for equation text.
fn bad(input: &str, reason: impl Into<String>) -> Error {
    Error::Parse {
        input: super::weierstrass::truncate_for_message(input),
        reason: reason.into(),
    }
}

/// One side of an equation after normalisation: ASCII bytes (whitespace
/// removed, lower case) with, for each, the position of the character it
/// came from in the caller's line (1-based, counted in characters).
struct Side<'a> {
    s: &'a [u8],
    pos: &'a [usize],
    input: &'a str,
}

impl Side<'_> {
    /// The caller's character position of byte `i` (one past the last
    /// character at the end).
    fn at(&self, i: usize) -> usize {
        match self.pos.get(i) {
            Some(&p) => p,
            None => self.pos.last().map_or(1, |p| p + 1),
        }
    }

    fn bad(&self, reason: impl Into<String>) -> Error {
        bad(self.input, reason)
    }
}

/// Parses the digits of an unsigned integer starting at `i`; returns the
/// value and the index after it.
fn digits_at(t: &Side<'_>, mut i: usize) -> Result<(BigInt, usize)> {
    let s = t.s;
    let start = i;
    while i < s.len() && s[i].is_ascii_digit() {
        i += 1;
    }
    let len = i - start;
    if len == 0 {
        return Err(t.bad(format!("expected a number at character {}", t.at(start))));
    }
    if len > super::weierstrass::MAX_COEFFICIENT_DIGITS {
        return Err(t.bad(format!(
            "a number has {len} digits; at most {} are accepted",
            super::weierstrass::MAX_COEFFICIENT_DIGITS
        )));
    }
    let v = BigInt::parse_bytes(&s[start..i], 10).ok_or_else(|| t.bad("malformed number"))?;
    Ok((v, i))
}

/// Parses an unsigned rational `p`, `p/q` or `(p/q)` at `i`, if one starts
/// there.
fn rational_at(t: &Side<'_>, i: usize) -> Result<Option<(BigRational, usize)>> {
    let s = t.s;
    let paren = s.get(i) == Some(&b'(');
    let j = if paren { i + 1 } else { i };
    if !s.get(j).is_some_and(u8::is_ascii_digit) {
        if paren {
            return Err(t.bad(format!(
                "expected a number after '(' at character {}",
                t.at(i)
            )));
        }
        return Ok(None);
    }
    let (num, mut j) = digits_at(t, j)?;
    let mut den = BigInt::one();
    if s.get(j) == Some(&b'/') {
        let (d, k) = digits_at(t, j + 1)?;
        den = d;
        j = k;
    }
    if paren {
        if s.get(j) != Some(&b')') {
            return Err(t.bad(format!("expected ')' at character {}", t.at(j))));
        }
        j += 1;
    }
    if den.is_zero() {
        return Err(Error::ZeroDenominator {
            context: "coefficient in the equation".to_string(),
        });
    }
    Ok(Some((BigRational::new(num, den), j)))
}

/// Parses an optional power `^n` or `**n` at `i` (n a small integer).
fn power_at(t: &Side<'_>, i: usize) -> Result<(u32, usize)> {
    let s = t.s;
    let j = if s.get(i) == Some(&b'^') {
        i + 1
    } else if s.get(i) == Some(&b'*') && s.get(i + 1) == Some(&b'*') {
        i + 2
    } else {
        return Ok((1, i));
    };
    let start = j;
    let mut k = j;
    while k < s.len() && s[k].is_ascii_digit() && k - start < 3 {
        k += 1;
    }
    let text = std::str::from_utf8(&s[start..k]).unwrap_or("");
    let n: u32 = text
        .parse()
        .map_err(|_| t.bad(format!("expected an exponent at character {}", t.at(start))))?;
    Ok((n, k))
}

/// Adds the terms of one side into `poly`, each multiplied by `sign`.
fn parse_side(t: &Side<'_>, sign: i32, poly: &mut BTreeMap<Monomial, BigRational>) -> Result<()> {
    let s = t.s;
    if s.is_empty() {
        return Err(t.bad("one side of the equation is empty"));
    }
    let mut i = 0;
    let mut first = true;
    while i < s.len() {
        let mut negative = false;
        match s[i] {
            b'+' => i += 1,
            b'-' => {
                negative = true;
                i += 1;
            }
            _ if first => {}
            c => {
                return Err(t.bad(format!(
                    "expected '+' or '-' before a term at character {}, found '{}'",
                    t.at(i),
                    c as char
                )))
            }
        }
        first = false;
        let mut coeff = BigRational::one();
        let mut saw_factor = false;
        if let Some((c, j)) = rational_at(t, i)? {
            coeff = c;
            i = j;
            saw_factor = true;
        }
        let (mut ex, mut ey) = (0u32, 0u32);
        loop {
            // An optional '*' between factors (but not the '**' of a power).
            let mut j = i;
            if saw_factor && s.get(j) == Some(&b'*') && s.get(j + 1) != Some(&b'*') {
                j += 1;
            }
            match s.get(j) {
                Some(&c @ (b'x' | b'y')) => {
                    let (n, k) = power_at(t, j + 1)?;
                    if c == b'x' {
                        ex = ex.saturating_add(n);
                    } else {
                        ey = ey.saturating_add(n);
                    }
                    i = k;
                    saw_factor = true;
                }
                _ => break,
            }
        }
        if !saw_factor {
            return Err(t.bad(format!("expected a term at character {}", t.at(i))));
        }
        if negative {
            coeff = -coeff;
        }
        if sign < 0 {
            coeff = -coeff;
        }
        let slot = poly.entry((ex, ey)).or_insert_with(BigRational::zero);
        *slot += coeff;
    }
    Ok(())
}

/// The equation text as ASCII bytes, each with the 1-based character
/// position it came from: whitespace and a leading byte-order mark
/// dropped, upper case lowered, the minus sign U+2212 read as `-` and the
/// superscripts `²`, `³` as `^2`, `^3`.
///
/// # Errors
/// [`Error::Parse`] naming any other non-ASCII character and its position.
fn normalise(input: &str) -> Result<(Vec<u8>, Vec<usize>)> {
    let mut bytes = Vec::with_capacity(input.len());
    let mut pos = Vec::with_capacity(input.len());
    for (n, ch) in input.chars().enumerate() {
        let col = n + 1;
        let mut push = |b: u8| {
            bytes.push(b);
            pos.push(col);
        };
        match ch {
            '\u{feff}' if n == 0 => {}
            c if c.is_whitespace() => {}
            '\u{2212}' => push(b'-'),
            '\u{b2}' => {
                push(b'^');
                push(b'2');
            }
            '\u{b3}' => {
                push(b'^');
                push(b'3');
            }
            c if c.is_ascii() => push(c.to_ascii_lowercase() as u8),
            c => {
                return Err(bad(
                    input,
                    format!("unexpected character '{c}' at character {col}"),
                ))
            }
        }
    }
    Ok((bytes, pos))
}

/// Parses a Weierstrass equation (module docs) into `[a1, a2, a3, a4, a6]`.
///
/// # Errors
/// [`Error::Parse`] when the text is not an equation in x and y, has a
/// monomial that a Weierstrass model does not have (x⁴, x²y, y³, …), or is
/// not monic in y² and x³ (after moving every term to the left, y² must
/// have coefficient 1 and x³ coefficient −1); [`Error::ZeroDenominator`]
/// for a fraction p/0.
pub fn parse_equation(input: &str) -> Result<[BigRational; 5]> {
    let (compact, pos) = normalise(input)?;
    let eq = match compact.iter().filter(|&&b| b == b'=').count() {
        1 => compact.iter().position(|&b| b == b'=').unwrap_or(0),
        _ => return Err(bad(input, "an equation needs exactly one '='")),
    };
    let left = Side {
        s: &compact[..eq],
        pos: &pos[..eq],
        input,
    };
    let right = Side {
        s: &compact[eq + 1..],
        pos: &pos[eq + 1..],
        input,
    };
    let mut poly = BTreeMap::new();
    parse_side(&left, 1, &mut poly)?;
    parse_side(&right, -1, &mut poly)?;
    // `x^3 + … = y^2` is the same equation with the sides swapped.
    if poly.get(&(0, 2)).is_some_and(|c| *c == -BigRational::one())
        && poly.get(&(3, 0)).is_some_and(BigRational::is_one)
    {
        for c in poly.values_mut() {
            *c = -c.clone();
        }
    }
    let take = |poly: &mut BTreeMap<Monomial, BigRational>, m: Monomial| {
        poly.remove(&m).unwrap_or_else(BigRational::zero)
    };
    let y2 = take(&mut poly, (0, 2));
    let x3 = take(&mut poly, (3, 0));
    if !y2.is_one() || x3 != -BigRational::one() {
        return Err(bad(
            input,
            "the equation must read y^2 + a1xy + a3y = x^3 + a2x^2 + a4x + a6 \
             (coefficient 1 on y^2 and on x^3)",
        ));
    }
    let a1 = take(&mut poly, (1, 1));
    let a3 = take(&mut poly, (0, 1));
    let a2 = -take(&mut poly, (2, 0));
    let a4 = -take(&mut poly, (1, 0));
    let a6 = -take(&mut poly, (0, 0));
    if let Some(((i, j), _)) = poly.iter().find(|(_, c)| !c.is_zero()) {
        let mono = match (i, j) {
            (i, 0) => format!("x^{i}"),
            (0, j) => format!("y^{j}"),
            (i, j) => format!("x^{i}y^{j}"),
        };
        return Err(bad(
            input,
            format!("the monomial {mono} does not occur in a Weierstrass equation"),
        ));
    }
    Ok([a1, a2, a3, a4, a6])
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(n: i64) -> BigRational {
        BigRational::from_integer(n.into())
    }

    #[test]
    fn zero_terms_are_dropped_and_signs_folded() {
        let a = [q(1), q(-2), q(3), q(5), q(-7)];
        assert_eq!(equation_text(&a), "y^2 + xy + 3y = x^3 - 2x^2 + 5x - 7");
        let a = [q(0), q(-30), q(0), q(3), q(0)];
        assert_eq!(equation_text(&a), "y^2 = x^3 - 30x^2 + 3x");
        let half = BigRational::new(1.into(), 2.into());
        let a = [
            q(0),
            half,
            q(0),
            q(0),
            BigRational::new((-7).into(), 4.into()),
        ];
        assert_eq!(equation_text(&a), "y^2 = x^3 + (1/2)x^2 - 7/4");
    }

    #[test]
    fn the_printed_forms_parse_back() {
        for a in [
            [q(1), q(-1), q(1), q(-10), q(-20)],
            [q(0), q(-30), q(0), q(3), q(0)],
            [q(-1), q(0), q(-1), q(1), q(1)],
        ] {
            assert_eq!(parse_equation(&equation_text(&a)).unwrap(), a);
        }
    }

    #[test]
    fn spacing_powers_and_order_are_free() {
        let want = [q(1), q(-1), q(1), q(-10), q(-20)];
        for s in [
            "y**2+x*y+y=x**3-x**2-10*x-20",
            "y^2 + y + yx = -20 - 10x - x^2 + x^3",
            "Y^2+XY+Y = X^3-X^2-10X-20",
            "y^2 + xy + y + 20 = x^3 - x^2 - 10x",
        ] {
            assert_eq!(parse_equation(s).unwrap(), want, "{s}");
        }
    }

    #[test]
    fn non_weierstrass_text_is_a_parse_error() {
        for s in [
            "y^2 = x^4 + 1",
            "2y^2 = x^3 + 1",
            "y^2 = x^3 +",
            "y^2 = x^3 = 1",
            "y^2 = 2x^3 + 1",
            "z^2 = x^3 + 1",
            "y^2 = x^3 + (1/2x",
        ] {
            assert!(matches!(parse_equation(s), Err(Error::Parse { .. })), "{s}");
        }
    }

    #[test]
    fn homogeneous_spaces_are_written_out() {
        let c = |v: [i64; 5]| v.map(BigInt::from);
        let t = quartic_text(&c([-3, 0, 60, 0, -296]));
        assert_eq!(t, "N^2 = -3M^4 + 60M^2e^2 - 296e^4");
        assert_eq!(quartic_text(&c([1, 0, 0, 0, -1])), "N^2 = M^4 - e^4");
        assert_eq!(quartic_text(&c([0, 2, 0, -1, 0])), "N^2 = 2M^3e - Me^3");
    }
}
