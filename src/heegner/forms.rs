//! Positive definite binary quadratic forms `[a, b, c] = ax² + bxy + cy²`
//! of a negative discriminant `D = b² − 4ac`: reduction, the class
//! number, and Heegner forms of level `N`.
//!
//! A form is reduced when `|b| ≤ a ≤ c` and `b ≥ 0` whenever `|b| = a` or
//! `a = c`; every primitive form is `SL₂(Z)`-equivalent to exactly one
//! reduced form, and the reduced primitive forms are in bijection with
//! the class group of the order of discriminant `D`, so their number is
//! the class number `h(D)` (Cohen, *A Course in Computational Algebraic
//! Number Theory*, §5.3, Alg. 5.3.5 and Prop. 5.3.3; from memory).
//!
//! Heegner forms (Gross, "Heegner points on X₀(N)", 1984; Gross–Zagier
//! 1986, §II.1; from memory): for a fundamental `D` with `β² ≡ D (mod 4N)`,
//! the forms `[A, B, C]` with `N | A` and `B ≡ β (mod 2N)` give the points
//! `τ = (−B + √D)/(2A)` of `X₀(N)` with CM by the maximal order. Their
//! `Γ₀(N)`-classes correspond one-to-one with the class group via the
//! `SL₂(Z)`-class of `[A, B, C]`, so one form per class suffices.
//! [`heegner_forms`] takes for each class the form with the smallest `A`
//! (largest `Im τ = √|D|/(2A)`, fastest series).

use std::collections::HashMap;

use num_integer::Integer;

use crate::budget::Budget;
use crate::error::{Error, Result};

/// A form `[a, b, c]`.
pub(crate) type Form = (i64, i64, i64);

/// The reduced form equivalent to `[a, b, c]` (`a > 0`, `D < 0`).
pub(crate) fn reduce(mut a: i64, mut b: i64, mut c: i64) -> Form {
    loop {
        if b > a || b <= -a {
            // b ↦ b + 2ak into (−a, a]: [a, b, c] ~ [a, b + 2ak, …].
            let k = (a - b).div_euclid(2 * a);
            let nb = b + 2 * a * k;
            c += (i128::from(nb) * i128::from(nb) - i128::from(b) * i128::from(b)) as i64 / (4 * a);
            b = nb;
            continue;
        }
        if c < a {
            // [a, b, c] ~ [c, −b, a].
            std::mem::swap(&mut a, &mut c);
            b = -b;
            continue;
        }
        if a == c && b < 0 {
            b = -b;
        }
        return (a, b, c);
    }
}

/// The reduced primitive forms of discriminant `d < 0`, `d ≡ 0, 1 (mod 4)`.
pub(crate) fn reduced_forms(d: i64) -> Vec<Form> {
    let mut out = Vec::new();
    let amax = ((-d) as f64 / 3.0).sqrt() as i64 + 1;
    for a in 1..=amax {
        for b in -a + 1..=a {
            let num = i128::from(b) * i128::from(b) - i128::from(d);
            if num % (4 * i128::from(a)) != 0 {
                continue;
            }
            let c = (num / (4 * i128::from(a))) as i64;
            if c < a || (a == c && b < 0) {
                continue;
            }
            if a.gcd(&b).gcd(&c) != 1 {
                continue;
            }
            out.push((a, b, c));
        }
    }
    out
}

/// True when `d` is a fundamental discriminant (`d ≡ 1 mod 4` square-free,
/// or `d = 4m` with `m ≡ 2, 3 mod 4` square-free).
pub(crate) fn is_fundamental(d: i64) -> bool {
    let squarefree = |m: i64| {
        let m = m.unsigned_abs();
        let mut k = 2u64;
        while k * k <= m {
            if m % (k * k) == 0 {
                return false;
            }
            k += 1;
        }
        true
    };
    match d.rem_euclid(4) {
        1 => squarefree(d),
        0 => {
            let m = d / 4;
            matches!(m.rem_euclid(4), 2 | 3) && squarefree(m)
        }
        _ => false,
    }
}

/// The least `β ∈ [0, 2N)` with `β² ≡ D (mod 4N)`, if any.
pub(crate) fn heegner_beta(d: i64, n: i64) -> Option<i64> {
    (0..2 * n).find(|&b| {
        (i128::from(b) * i128::from(b) - i128::from(d)).rem_euclid(4 * i128::from(n)) == 0
    })
}

#[cfg(test)]
/// One Heegner form `[A, B, C]` of level `n` and residue `β` per class of
/// discriminant `d`, each with the least `A` in its class; also `h(d)`.
/// One budget unit per candidate `B`.
///
/// # Errors
/// [`Error::BudgetExhausted`] when the budget runs out;
/// [`Error::Internal`] if some class has no Heegner form with
/// `A ≤ N·|D|`. (The least `A/N` of a class is the least norm of an ideal
/// `𝔞` in a given class with `𝔞𝔫` primitive, `𝔫` of norm `N`; it can
/// exceed `√(|D|/3)` — `D = −367`, `N = 32` needs `A/N = 46` — but an
/// ideal of norm below `|D|` coprime to `N` exists in every class.)
pub(crate) fn heegner_forms(
    d: i64,
    n: i64,
    beta: i64,
    budget: &mut Budget,
) -> Result<(usize, Vec<Form>)> {
    first_per_class(d, n, beta, budget, |f, _| vec![(reduce(f.0, f.1, f.2), f)])
}

/// Runs over the level-`n` primitive Heegner forms `[A, B, C]` of
/// discriminant `d` with `B ≡ β (mod 2N)`, `A = N·a₁` upwards and `B` in
/// `(−A, A]`; `keys(F, a₁)` names the classes `F` reaches with what stands
/// for each, and the first of each class is kept, until all `h(d)` are
/// reached. One budget unit per candidate `B`.
fn first_per_class<T: Copy>(
    d: i64,
    n: i64,
    beta: i64,
    budget: &mut Budget,
    keys: impl Fn(Form, i64) -> Vec<(Form, T)>,
) -> Result<(usize, Vec<T>)> {
    let h = reduced_forms(d).len();
    let mut seen: HashMap<Form, T> = HashMap::with_capacity(h);
    let mut order = Vec::with_capacity(h);
    let limit = -d + 1;
    let mut a1 = 1;
    while seen.len() < h {
        if a1 > limit {
            return Err(Error::Internal {
                check: format!(
                    "no Heegner form of level {n} found for every class of discriminant {d}"
                ),
            });
        }
        let a = n * a1;
        // B ≡ β (mod 2N) in (−A, A].
        let mut b = beta - 2 * n * ((beta + a - 1).div_euclid(2 * n));
        while b <= a {
            budget.spend(1).map_err(|_| Error::BudgetExhausted {
                stage: "Heegner forms".into(),
            })?;
            let num = i128::from(b) * i128::from(b) - i128::from(d);
            if b > -a && num % (4 * i128::from(a)) == 0 {
                let c = (num / (4 * i128::from(a))) as i64;
                if level_primitive((a, b, c), n) {
                    for (key, rep) in keys((a, b, c), a1) {
                        if let std::collections::hash_map::Entry::Vacant(e) = seen.entry(key) {
                            e.insert(rep);
                            order.push(rep);
                        }
                    }
                }
            }
            b += 2 * n;
        }
        a1 += 1;
    }
    Ok((h, order))
}

/// True when `[A, B, C]` and `[A/N, B, CN]` are both primitive: `τ` and
/// `Nτ` then have complex multiplication by the same order (the Heegner
/// condition for orders; Gross 1984, §1, from memory). For a fundamental
/// `D` this holds for every form with `N | A`.
pub(crate) fn level_primitive((a, b, c): Form, n: i64) -> bool {
    a.gcd(&b).gcd(&c) == 1 && (a / n).gcd(&b).gcd(&(c * n)) == 1
}

/// How a class is represented in a trace: `Direct(F)` adds `φ(τ_F)`;
/// `Flipped(F)` stands for the class of the Heegner form `W_N(F)` and adds
/// `c − ε·φ(τ_F)` with `φ(W_N τ) = ε·φ(τ) + c` (the Atkin–Lehner
/// relation, `ε = −w(E)`; the caller supplies `ε` and `c` for its curve).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Rep {
    /// `φ` at the form itself (`B ≡ β`).
    Direct(Form),
    /// `φ` at this `−β` form, whose `W_N` image lies in the class.
    Flipped(Form),
}

impl Rep {
    /// The form at which `φ` is evaluated.
    pub(crate) fn form(&self) -> Form {
        match *self {
            Rep::Direct(f) | Rep::Flipped(f) => f,
        }
    }
}

/// One representative per class of level-`n` Heegner forms of residue
/// `β` and discriminant `d` (any order: `d` need not be fundamental),
/// each evaluated where `Im τ` is largest, and `h(d)`.
///
/// For a Heegner form `F = [A, B, C]` (`B ≡ β mod 2N`) the conjugate
/// `F̄ = [A, −B, C]` is a `−β` form, and `W_N(τ_F̄) = −1/(Nτ_F̄)` is the
/// point of `[NC, B, A/N]`, a `β` form again (`−1/(Nτ) = (B + √D)/(2NC)`
/// for `τ = (B + √D)/(2A)`). So a class is reached either directly by the
/// least `A` among its forms, or through `W_N` by the least `A` of a form
/// `F` with `[NC, B, A/N]` in the class; `A` runs upwards, and the first
/// way found is the one with the largest `Im τ = √|D|/(2A)` among both.
/// One budget unit per candidate `B`.
///
/// # Errors
/// [`Error::BudgetExhausted`]; [`Error::Internal`] if some class is not
/// reached with `A ≤ N·(|D| + 1)`.
pub(crate) fn heegner_cover(
    d: i64,
    n: i64,
    beta: i64,
    budget: &mut Budget,
) -> Result<(usize, Vec<Rep>)> {
    first_per_class(d, n, beta, budget, |(a, b, c), a1| {
        vec![
            (reduce(a, b, c), Rep::Direct((a, b, c))),
            (reduce(n * c, b, a1), Rep::Flipped((a, -b, c))),
        ]
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reduction_is_idempotent_and_keeps_the_discriminant() {
        for (a, b, c) in [(32, 11, 1), (96, 83, 18), (7, 100, 400)] {
            let d = b * b - 4 * a * c;
            let r = reduce(a, b, c);
            assert_eq!(r.1 * r.1 - 4 * r.0 * r.2, d);
            assert_eq!(reduce(r.0, r.1, r.2), r);
            assert!(r.1.abs() <= r.0 && r.0 <= r.2);
        }
    }

    #[test]
    fn small_class_numbers() {
        // h(D) for D = −3, −4, −7, −8, −15, −20, −23, −47, −71, −163
        // (Cohen, Table B.1 of imaginary quadratic class numbers; from memory).
        for (d, h) in [
            (-3, 1),
            (-4, 1),
            (-7, 1),
            (-8, 1),
            (-15, 2),
            (-20, 2),
            (-23, 3),
            (-47, 5),
            (-71, 7),
            (-163, 1),
        ] {
            assert_eq!(reduced_forms(d).len(), h, "D = {d}");
        }
    }
}
