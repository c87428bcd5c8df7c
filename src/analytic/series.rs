//! L-values at the centre with proven error bounds.
//!
//! Let `N` be the conductor, `c = 2π/√N`, `F(t) = Σ a_n e^{−nct}` and
//! `Λ(s) = N^{s/2}(2π)^{−s}Γ(s)L(E, s) = ∫_0^∞ F(t) t^{s−1} dt`. Modularity
//! (Wiles 1995; Breuil–Conrad–Diamond–Taylor 2001) gives `Λ(s) = wΛ(2 − s)`,
//! equivalently `F(1/t) = w·t²·F(t)`, with `w = ±1`. Splitting the Mellin
//! integral at `t = 1` gives, with `x_n = nc` and
//! `G_r(x) = ∫_1^∞ e^{−xt}(log t)^r dt`,
//!
//! `Λ^{(r)}(1) = (1 + (−1)^r w) · Σ_n a_n G_r(x_n)`
//!
//! [BGZ85; Cre97, §2.11–2.13] (from memory; the derivation is the one in
//! this paragraph). `G_0(x) = e^{−x}/x`, `G_1(x) = E_1(x)/x`, and
//! `x^{−s}Γ(s, x) = ∫_1^∞ e^{−xt}t^{s−1}dt` gives, for `r ≥ 1`,
//! `G_r(x) = C_r(x) − (−1)^r r! Σ_k (−1)^k x^k/(k!(k + 1)^{r+1})` with
//! `a = −(log x + γ)`: `C_1 = a/x`, `C_2 = (a² + ζ(2))/x`,
//! `C_3 = (a³ + 3ζ(2)a − 2ζ(3))/x` (from `log Γ(1 + ε) = −γε +
//! Σ_{k≥2}(−1)^kζ(k)ε^k/k`).
//!
//! `L^{(r)}(E, 1)` follows from `L = Λ·h` with `h(s) = (2π/√N)^s/Γ(s)`:
//! `L^{(r)}(1) = Σ_k C(r, k) h^{(r−k)}(1) Λ^{(k)}(1)`, where `h(1) = c`,
//! `h' = cA`, `h'' = c(A² − ζ(2))`, `h''' = c(A³ − 3ζ(2)A + 2ζ(3))` and
//! `A = log c + γ`. This is the true derivative whether or not the lower
//! ones vanish.
//!
//! Error bounds: truncation after `M` terms uses `|a_n| ≤ d(n)√n ≤ 2n`
//! (Hasse's bound and multiplicativity; `d(n) ≤ 2√n`) and
//! `G_r(x) ≤ r!·e^{−x}/x^{r+1}` (from `log t ≤ t − 1`), so
//! `Σ_{n>M} |a_n G_r(x_n)| ≤ 2r!·e^{−(M+1)c} / (c^{r+1}(M+1)^r(1 − e^{−c}))`.
//! Rounding is carried by [`Certified`] arithmetic. `E_1` uses its power
//! series for `x ≤ 2` (alternating remainder bound) and for `x > 2` the
//! continued fraction `e^x E_1(x) = 1/(x + 1/(1 + 1/(x + 2/(1 + 2/(x +
//! …)))))` [AS64, 5.1.22] (from memory), whose successive approximants
//! bracket the value because all elements are positive (Stieltjes;
//! common practice). For `r ≥ 2`, `G_r` uses the series for `x ≤ 12`; for
//! `x > 12` only `0 ≤ G_r(x) ≤ r!e^{−x}/x^{r+1}` is used (value at the
//! midpoint, half the bound as error), so values for `r ≥ 2` carry errors
//! around `10⁻⁸ … 10⁻⁶`.

use crate::arith::certified::{euler_gamma, pi, zeta2, zeta3, Certified};
use crate::budget::Budget;
use crate::error::{Error, Result};

/// `G_r` for `r ≥ 2` uses its series below this argument only.
const SERIES_LIMIT: f64 = 12.0;

/// Recompute `q^n` directly every this many terms.
const REANCHOR: usize = 64;

/// The data of one L-series: the coefficients and the step `c = 2π/√N`.
#[derive(Debug, Clone)]
pub struct Series<'a> {
    an: &'a [i64],
    c: Certified,
}

fn spend(budget: &mut Budget, units: u64) -> Result<()> {
    budget.spend(units).map_err(|_| Error::BudgetExhausted {
        stage: "L-series sums".into(),
    })
}

impl<'a> Series<'a> {
    /// `an[n]` for `1 ≤ n < an.len()` (index 0 ignored) and the conductor.
    ///
    /// The truncation bounds assume `|a_n| ≤ d(n)√n`, true for the
    /// coefficients of an elliptic curve ([`super::dirichlet_coefficients`]); for other
    /// sequences the bounds are not proven.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] when the conductor is 0 or above 2⁵³
    /// (then it is not exact in binary64).
    pub fn new(an: &'a [i64], conductor: u64) -> Result<Series<'a>> {
        if conductor == 0 || conductor > (1u64 << 53) {
            return Err(Error::InvalidArgument {
                reason: format!("conductor {conductor} outside 1..2^53"),
            });
        }
        let n = conductor as f64;
        let c = pi().scale(2.0).div(&Certified::exact(n).sqrt());
        Ok(Series { an, c })
    }

    /// `c = 2π/√N`.
    pub(crate) fn step(&self) -> Certified {
        self.c
    }

    /// Number of terms available.
    pub fn terms(&self) -> usize {
        self.an.len().saturating_sub(1)
    }

    /// `Σ_{n ≤ M} a_n q^n·g(n)` with `q = e^{−c·t}`, plus the tail bound
    /// for `Σ_{n>M} 2n·q^n·|g(n)|` supplied by the caller.
    fn power_sum(
        &self,
        t: f64,
        weight: impl Fn(usize) -> f64,
        budget: &mut Budget,
    ) -> Result<Certified> {
        let m = self.terms();
        spend(budget, m as u64)?;
        let ct = self.c.scale(t);
        let q = ct.neg().exp();
        let mut qn = Certified::exact(1.0);
        let mut sum = Certified::exact(0.0);
        for n in 1..=m {
            if n % REANCHOR == 0 {
                qn = ct.scale(n as f64).neg().exp();
            } else {
                qn = qn.mul(&q);
            }
            let a = self.an[n];
            if a != 0 {
                sum = sum.add(&qn.scale(a as f64 * weight(n)));
            }
        }
        Ok(sum)
    }

    /// `F(t) = Σ a_n e^{−nct}` with the truncation bound
    /// `Σ_{n>M} 2n·q^n`, `q = e^{−ct}`.
    pub(crate) fn theta(&self, t: f64, budget: &mut Budget) -> Result<Certified> {
        let s = self.power_sum(t, |_| 1.0, budget)?;
        Ok(widen(s, theta_tail(&self.c, t, self.terms())))
    }

    /// `Λ(1)` computed with the splitting parameter `A`:
    /// `Σ a_n (e^{−x_nA} + w·e^{−x_n/A})/x_n`; equal to `Λ(1)` for every
    /// `A > 0` exactly when the conductor and `w` are right.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] when `split` is not a positive finite
    /// number; [`Error::BudgetExhausted`] when the budget runs out.
    pub fn completed_value_split(
        &self,
        w: i8,
        split: f64,
        budget: &mut Budget,
    ) -> Result<Certified> {
        if !crate::arith::certified::is_pos(split) || !split.is_finite() {
            return Err(Error::InvalidArgument {
                reason: format!("splitting parameter must be positive, got {split}"),
            });
        }
        let a = self.power_sum(split, |n| 1.0 / n as f64, budget)?;
        let b = self.power_sum(1.0 / split, |n| 1.0 / n as f64, budget)?;
        let s = a.add(&b.scale(f64::from(w)));
        let tail = split_tail(&self.c, split, self.terms());
        // Σ a_n q^n/n divided by c gives Σ a_n e^{−x}/x.
        Ok(widen(s, tail).div(&self.c))
    }

    /// `S_r = Σ a_n G_r(x_n)` with its truncation bound; `Λ^{(r)}(1) =
    /// (1 + (−1)^r w)·S_r`.
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] for `r > 3`; [`Error::BudgetExhausted`]
    /// when the budget runs out.
    pub fn g_sum(&self, r: usize, budget: &mut Budget) -> Result<Certified> {
        if r > 3 {
            return Err(Error::InvalidArgument {
                reason: format!("derivatives up to order 3, asked for {r}"),
            });
        }
        let m = self.terms();
        if r == 0 {
            let s = self.power_sum(1.0, |n| 1.0 / n as f64, budget)?;
            let tail = tail_bound(&self.c, 0, m);
            return Ok(widen(s.div(&self.c), tail));
        }
        spend(budget, 4 * m as u64)?;
        let mut sum = Certified::exact(0.0);
        for n in 1..=m {
            let a = self.an[n];
            if a == 0 {
                continue;
            }
            let x = self.c.scale(n as f64);
            if r >= 2 && x.lower() > SERIES_LIMIT {
                // Only 0 ≤ G_r(x) ≤ r!e^{−x}/x^{r+1}.
                let b = g_upper(r, x.lower());
                sum = sum.add(&Certified::with_radius(0.5 * b, 0.5 * b).scale(a as f64));
                continue;
            }
            let g = g_value(r, &x);
            sum = sum.add(&g.scale(a as f64));
        }
        Ok(widen(sum, tail_bound(&self.c, r, m)))
    }
}

/// The truncation bound of `F(t)` after `m` terms: `Σ_{n>M} 2n·q^n =
/// 2q^{M+1}((M+1)(1 − q) + q)/(1 − q)²`, `q = e^{−ct}`.
pub(crate) fn theta_tail(c: &Certified, t: f64, m: usize) -> f64 {
    let m = m as f64;
    let q = c.scale(t).neg().exp();
    let qm = c.scale(t * (m + 1.0)).neg().exp();
    let one_q = Certified::exact(1.0).minus(&q);
    qm.scale(2.0)
        .mul(&one_q.scale(m + 1.0).add(&q))
        .div(&one_q.mul(&one_q))
        .upper()
}

/// The truncation bound of the two sums `Σ a_n q^n/n` of
/// [`Series::completed_value_split`] after `m` terms (before the division
/// by `c`): `Σ_{t ∈ {A, 1/A}} 2q_t^{M+1}/(1 − q_t)`.
pub(crate) fn split_tail(c: &Certified, split: f64, m: usize) -> f64 {
    let m = m as f64;
    let mut tail = 0.0;
    for t in [split, 1.0 / split] {
        let q = c.scale(t).neg().exp();
        let qm = c.scale(t * (m + 1.0)).neg().exp();
        tail += qm.scale(2.0).div(&Certified::exact(1.0).minus(&q)).upper();
    }
    tail
}

/// Adds `extra ≥ 0` to the radius.
pub(crate) fn widen(x: Certified, extra: f64) -> Certified {
    if extra.is_finite() && extra >= 0.0 {
        Certified::with_radius(x.value(), x.error() + extra).add(&Certified::exact(0.0))
    } else {
        Certified::unknown()
    }
}

/// `r!·e^{−x}/x^{r+1}`, an upper bound of `G_r(x)`, rounded up.
fn g_upper(r: usize, x: f64) -> f64 {
    let e = Certified::exact(-x).exp().upper();
    let f = [1.0, 1.0, 2.0, 6.0][r];
    f * e / x.powi(r as i32 + 1) * (1.0 + 1e-12)
}

/// Truncation bound `2r!e^{−(M+1)c}/(c^{r+1}(M+1)^r(1 − e^{−c}))`.
pub(crate) fn tail_bound(c: &Certified, r: usize, m: usize) -> f64 {
    let m1 = (m + 1) as f64;
    let e = c.scale(m1).neg().exp();
    let one_q = Certified::exact(1.0).minus(&c.neg().exp());
    let mut cr = Certified::exact(1.0);
    for _ in 0..=r {
        cr = cr.mul(c);
    }
    let f = [1.0, 1.0, 2.0, 6.0][r];
    let b = e.scale(2.0 * f / m1.powi(r as i32)).div(&cr.mul(&one_q));
    b.upper()
}

/// A bound for `|G_r'(x)|` at `x ≥ lo > 0`:
/// `e^{−x}((r+1)!/x^{r+2} + r!/x^{r+1})`.
fn g_derivative_bound(r: usize, lo: f64) -> f64 {
    let e = Certified::exact(-lo).exp().upper();
    let f = [1.0, 1.0, 2.0, 6.0, 24.0];
    e * (f[r + 1] / lo.powi(r as i32 + 2) + f[r] / lo.powi(r as i32 + 1)) * (1.0 + 1e-12)
}

/// `G_r(x)` for `1 ≤ r ≤ 3` and an enclosure `x` of a positive argument.
pub(crate) fn g_value(r: usize, x: &Certified) -> Certified {
    let lo = x.lower();
    if !crate::arith::certified::is_pos(lo) {
        return Certified::unknown();
    }
    if r == 1 && x.value() > 2.0 {
        // At the midpoint by the continued fraction, then the spread.
        let mid = x.value();
        let g = e1_scaled_cf(mid)
            .mul(&Certified::exact(-mid).exp())
            .div(&Certified::exact(mid));
        let spread = x.error() * g_derivative_bound(1, lo);
        return widen(g, spread);
    }
    g_series(r, x)
}

/// `G_r(x)` by the power series (any `r ≤ 3`, `r ≥ 1`), all in
/// midpoint–radius arithmetic; the alternating tail is bounded by its
/// first omitted term.
pub(crate) fn g_series(r: usize, x: &Certified) -> Certified {
    let l = x.ln();
    let a = l.add(&euler_gamma()).neg();
    let z2 = zeta2();
    let z3 = zeta3();
    let cr = match r {
        1 => a,
        2 => a.mul(&a).add(&z2),
        _ => a
            .mul(&a)
            .mul(&a)
            .add(&z2.mul(&a).scale(3.0))
            .minus(&z3.scale(2.0)),
    }
    .div(x);
    // S = Σ_k (−1)^k x^k/(k!(k+1)^{r+1}).
    let mut term = Certified::exact(1.0); // x^k/k!
    let mut s = Certified::exact(1.0);
    let xv = x.upper();
    let mut k = 0usize;
    loop {
        k += 1;
        term = term.mul(x).scale(1.0 / k as f64);
        let d = ((k + 1) as f64).powi(r as i32 + 1);
        let t = term.scale(1.0 / d);
        s = if k % 2 == 0 { s.add(&t) } else { s.minus(&t) };
        if k as f64 > xv + 2.0 && t.upper().abs() < 1e-24 * (1.0 + s.value().abs()) {
            // Next term bounds the alternating remainder (terms decrease
            // from here on: ratio x/(k+2) < 1).
            let next = t.upper() * xv / (k + 1) as f64;
            s = widen(s, next);
            break;
        }
        if k > 2000 {
            return Certified::unknown();
        }
    }
    let fact = [1.0, 1.0, 2.0, 6.0][r];
    let sign = if r % 2 == 0 { 1.0 } else { -1.0 };
    cr.minus(&s.scale(sign * fact))
}

/// `e^x·E_1(x)` for `x > 0` by the continued fraction, bracketed by two
/// successive approximants; rounding bounded by `(2D + 4)u` relative at
/// depth `D` (positive elements only).
pub(crate) fn e1_scaled_cf(x: f64) -> Certified {
    let approx = |depth: usize| {
        let mut t = 0.0f64;
        for i in (1..=depth).rev() {
            let num = i.div_ceil(2) as f64;
            let den = if i % 2 == 1 { 1.0 } else { x };
            t = num / (den + t);
        }
        1.0 / (x + t)
    };
    let mut depth = 8;
    loop {
        let a = approx(depth);
        let b = approx(depth + 1);
        let gap = (a - b).abs();
        if gap <= 2e-16 * a || depth >= 4096 {
            let lo = a.min(b);
            let hi = a.max(b);
            let rel = (2 * depth + 8) as f64 * f64::EPSILON;
            let lo = lo * (1.0 - rel);
            let hi = hi * (1.0 + rel);
            let mid = 0.5 * (lo + hi);
            return Certified::with_radius(mid, (hi - mid).max(mid - lo) * (1.0 + f64::EPSILON));
        }
        depth *= 2;
    }
}

/// The number of terms after which the tail bound of `S_r` (in units of
/// `L`, i.e. times `2c`) drops below `target`, for the step `c`.
pub(crate) fn terms_needed(c: &Certified, r: usize, target: f64) -> u64 {
    smallest_terms(|m| tail_bound(c, r, m as usize) * 2.0 * c.upper(), target)
}

/// The smallest `m` with `bound(m) ≤ target` (doubling, then bisection).
pub(crate) fn smallest_terms(bound: impl Fn(u64) -> f64, target: f64) -> u64 {
    let mut hi = 16u64;
    while bound(hi) > target || bound(hi).is_nan() {
        hi *= 2;
        if hi > 1 << 40 {
            return u64::MAX;
        }
    }
    let mut lo = hi / 2;
    while hi - lo > 1 + hi / 64 {
        let mid = lo + (hi - lo) / 2;
        if bound(mid) <= target {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    hi
}

/// Derivatives `h^{(k)}(1)`, `k = 0..=3`, of `h(s) = (2π/√N)^s/Γ(s)`.
pub(crate) fn h_derivatives(c: &Certified) -> [Certified; 4] {
    let a = c.ln().add(&euler_gamma());
    let z2 = zeta2();
    let z3 = zeta3();
    let a2 = a.mul(&a);
    [
        *c,
        c.mul(&a),
        c.mul(&a2.minus(&z2)),
        c.mul(&a2.mul(&a).minus(&z2.mul(&a).scale(3.0)).add(&z3.scale(2.0))),
    ]
}

/// `L^{(r)}(1) = Σ_k C(r, k) h^{(r−k)}(1) Λ^{(k)}(1)` from `Λ^{(k)}(1)`,
/// `k ≤ r`.
pub(crate) fn l_derivative(r: usize, h: &[Certified; 4], lambda: &[Certified]) -> Certified {
    let binom = [
        [1.0, 0.0, 0.0, 0.0],
        [1.0, 1.0, 0.0, 0.0],
        [1.0, 2.0, 1.0, 0.0],
        [1.0, 3.0, 3.0, 1.0],
    ];
    let mut s = Certified::exact(0.0);
    for k in 0..=r {
        s = s.add(&h[r - k].mul(&lambda[k]).scale(binom[r][k]));
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    fn simpson(f: impl Fn(f64) -> f64, a: f64, b: f64, n: usize) -> f64 {
        let h = (b - a) / n as f64;
        let mut s = f(a) + f(b);
        for i in 1..n {
            s += f(a + i as f64 * h) * if i % 2 == 1 { 4.0 } else { 2.0 };
        }
        s * h / 3.0
    }

    #[test]
    fn g_functions_match_quadrature() {
        // Composite Simpson on ∫_1^T e^{−xt}(log t)^r dt (common practice)
        // as an independent approximation.
        for &x in &[0.05, 0.7, 1.9, 2.5, 6.0, 11.0] {
            for r in 1..=3 {
                let t_max = 1.0 + 60.0 / x;
                let q = simpson(
                    |t: f64| (-x * t).exp() * t.ln().powi(r as i32),
                    1.0,
                    t_max,
                    400_000,
                );
                let g = g_value(r, &Certified::exact(x));
                assert!(
                    (g.value() - q).abs() <= g.error() + 1e-9 * q.abs().max(1e-12),
                    "r={r} x={x}: {g} vs {q}"
                );
                assert!(g.error() <= 1e-10, "r={r} x={x}: {g}");
            }
        }
    }

    #[test]
    fn continued_fraction_matches_series_for_e1() {
        for &x in &[2.0, 3.5, 8.0] {
            let cf = e1_scaled_cf(x)
                .mul(&Certified::exact(-x).exp())
                .div(&Certified::exact(x));
            let se = g_series(1, &Certified::exact(x));
            assert!(cf.overlaps(&se), "x={x}: {cf} vs {se}");
        }
    }
}
