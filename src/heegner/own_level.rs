//! Heegner points of a curve at its own level `N` (its conductor), for
//! curves of root number `−1`. See `docs/heegner.md`, section "The
//! curve's own level", for the method and its limits.
//!
//! Facts used (Gross–Zagier, *Invent. Math.* 84 (1986), §I–II; Gross,
//! "Heegner points on X₀(N)", 1984; the computation as in Cohen, *A Course
//! in Computational Algebraic Number Theory*, and Cremona, *Algorithms for
//! Modular Elliptic Curves*, §2; all from memory):
//! * for a fundamental `D < 0` with every `p | N` split in `K = Q(√D)`, the
//!   forms `[A, B, C]`, `N | A`, `B ≡ β (mod 2N)`, `B² − 4AC = D`, give
//!   one Heegner point `τ = (−B + √D)/(2A)` per ideal class;
//! * `φ(τ) = Σ a_k/k q^k` (`q = e^{2πiτ}`) is the modular parametrisation
//!   on `C/Λ_f`, `Λ_f` the period lattice of the newform; for the optimal
//!   curve (Manin constant 1) `Λ_f` is the lattice of the minimal model's
//!   invariant differential;
//! * `φ(W_N τ) = ε·φ(τ) + φ(0)` with `f|W_N = ε·f`, `w(E) = −ε`, and
//!   `φ(0) = ±L(f, 1)`; for `w(E) = −1`, `ε = +1` and `L(f, 1) = 0`, so a
//!   class reached through `W_N` adds `φ` at its `−β` form unchanged
//!   (checked numerically by a test of this module);
//! * the trace `P = Σ φ(τ_i)` lies in `E(K)`, and for `w(E) = −1` in
//!   `E(Q)` up to torsion; it has infinite order exactly when
//!   `L'(E, 1)·L(E^D, 1) ≠ 0` (Gross–Zagier). A torsion trace is detected
//!   numerically and the next `D` tried.
//!
//! When the curve is not the optimal curve of its isogeny class, `Λ_f`
//! and the curve's lattice differ by a small index, and the trace may be
//! a rational point only up to a torsion point of `E(K)`: the candidates
//! `(k·z + λ)/m` (`λ` running over `Λ/mΛ`, small `k`, `m`) are each
//! recognised and checked. **The numerics only propose; the exact check on
//! the curve decides**, and saturation proves generation.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{FromPrimitive, Signed, ToPrimitive, Zero};

use super::congruent::{phi_with, terms_for};
use super::fixed::{Cx, Fixed};
use super::forms::{self, Rep};
use crate::arith::sqrt_exact;
use crate::budget::Budget;
use crate::curve::{Curve, GlobalLocalData, ModelChange, Point};
use crate::error::{Error, Result};

fn spend(budget: &mut Budget, units: u64) -> Result<()> {
    budget.spend(units).map_err(|_| Error::BudgetExhausted {
        stage: "Heegner point (own level)".into(),
    })
}

/// Complex helpers at one precision.
fn csub(x: &Cx, y: &Cx) -> Cx {
    Cx {
        re: &x.re - &y.re,
        im: &x.im - &y.im,
    }
}

fn cscale(x: &Cx, k: i64) -> Cx {
    Cx {
        re: &x.re * k,
        im: &x.im * k,
    }
}

fn cdiv_int(x: &Cx, k: i64) -> Cx {
    Cx {
        re: &x.re / k,
        im: &x.im / k,
    }
}

/// `x/y` (`y ≠ 0`): `x·ȳ/|y|²`, a few ulp relative to `|x/y|` when `|y|`
/// is not tiny (callers keep guard bits).
fn cdiv(f: &Fixed, x: &Cx, y: &Cx) -> Cx {
    let den = f.mul(&y.re, &y.re) + f.mul(&y.im, &y.im);
    if den.is_zero() {
        return Cx::zero();
    }
    let nre = f.mul(&x.re, &y.re) + f.mul(&x.im, &y.im);
    let nim = f.mul(&x.im, &y.re) - f.mul(&x.re, &y.im);
    Cx {
        re: f.div(&nre, &den),
        im: f.div(&nim, &den),
    }
}

/// `e^{x + iy}` for `|x|, |y| ≤ 2^{20}`.
fn cexp(f: &Fixed, z: &Cx) -> Cx {
    let r = f.exp(&z.re);
    let e = f.expi(&z.im);
    Cx {
        re: f.mul(&r, &e.re),
        im: f.mul(&r, &e.im),
    }
}

/// A period lattice `ω₁Z + ω₂Z` at one precision, Gauss-reduced with
/// `Im(ω₂/ω₁) > 0`, and what `℘` needs.
pub(crate) struct Lattice {
    f: Fixed,
    pi: BigInt,
    w1: Cx,
    w2: Cx,
    tau: Cx,
    q: Cx,
    /// `b2/12` of the model (`x = ℘ − b2/12`).
    b2_12: BigInt,
}

/// The real roots of `4x³ + b2x² + 2b4x + b6` at precision `f`:
/// binary64 starting values refined by Newton's method (quadratic
/// convergence; 12 steps more than the doubling count, then one check
/// that the residual is small). `None` if refinement fails.
fn real_roots(f: &Fixed, b: [&BigInt; 3], three: bool) -> Option<Vec<BigInt>> {
    let bf = |x: &BigInt| x.to_f64().unwrap_or(f64::NAN);
    let (b2, b4, b6) = (bf(b[0]), bf(b[1]), bf(b[2]));
    if !(b2.is_finite() && b4.is_finite() && b6.is_finite()) {
        return None;
    }
    let poly = |x: f64| ((4.0 * x + b2) * x + 2.0 * b4) * x + b6;
    let bound = 1.0 + (b2.abs() / 4.0).max((b4.abs() / 2.0).max(b6.abs() / 4.0));
    let bisect = |mut lo: f64, mut hi: f64| {
        let up = poly(hi) > 0.0;
        for _ in 0..2000 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            if (poly(mid) > 0.0) == up {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        0.5 * (lo + hi)
    };
    let approx = if three {
        let disc = (4.0 * b2 * b2 - 96.0 * b4).max(0.0).sqrt();
        let c1 = (-2.0 * b2 - disc) / 24.0;
        let c2 = (-2.0 * b2 + disc) / 24.0;
        vec![bisect(-bound, c1), bisect(c1, c2), bisect(c2, bound)]
    } else {
        vec![bisect(-bound, bound)]
    };
    let bb = [f.int(b[0]), f.int(&(b[1] * 2)), f.int(b[2])];
    let four = f.int(&BigInt::from(4));
    let twelve = f.int(&BigInt::from(12));
    let mut out = Vec::new();
    for x0 in approx {
        let mut x = BigInt::from_f64(x0 * 2f64.powi(40))?.shl_or_shr(i64::from(f.p) - 40);
        let steps = 12 + 64 - (f.p.max(1)).leading_zeros();
        for _ in 0..steps {
            // f(x) = ((4x + b2)x + 2b4)x + b6, f'(x) = (12x + 2b2)x + 2b4.
            let v = f.mul(&(f.mul(&(f.mul(&four, &x) + &bb[0]), &x) + &bb[1]), &x) + &bb[2];
            let d = f.mul(&(f.mul(&twelve, &x) + &bb[0] * 2), &x) + &bb[1];
            if d.is_zero() {
                return None;
            }
            x -= f.div(&v, &d);
        }
        out.push(x);
    }
    Some(out)
}

trait ShlOrShr {
    fn shl_or_shr(self, k: i64) -> BigInt;
}

impl ShlOrShr for BigInt {
    fn shl_or_shr(self, k: i64) -> BigInt {
        if k >= 0 {
            self << k as u32
        } else {
            self >> (-k) as u32
        }
    }
}

impl Lattice {
    /// The lattice of `dx/(2y + a1x + a3)` on the integral model `model`
    /// (the formulas of `analytic::period`, with the second period: for
    /// `Δ > 0`, roots `e1 > e2 > e3`, `ω₁ = π/M(√(e1−e3), √(e1−e2))`,
    /// `ω₂ = iπ/M(√(e1−e3), √(e2−e3))`; for `Δ < 0`, `ω₁ = 2π/M(a, b)`,
    /// `ω₂ = ω₁/2 + iπ/M(a, c)` with `a = 2√R`, `b, c = √(2R ± (3e1 +
    /// b2/4))`; Cohen, Alg. 7.4.7, Cremona §3.7, from memory; checked by
    /// the tests through `℘` at the half periods).
    pub(crate) fn new(p: u32, model: &[BigInt; 5]) -> Option<Lattice> {
        let f = Fixed::new(p);
        let inv = crate::curve::weierstrass_invariants(model);
        let (b2, b4, b6) = (&inv.b2, &inv.b4, &inv.b6);
        let three = inv.discriminant.is_positive();
        let roots = real_roots(&f, [b2, b4, b6], three)?;
        let pi = f.pi();
        let (w1, w2) = if three {
            let (e1, e2, e3) = (&roots[2], &roots[1], &roots[0]);
            let a = f.sqrt(&(e1 - e3));
            let b = f.sqrt(&(e1 - e2));
            let c = f.sqrt(&(e2 - e3));
            let w1 = f.div(&pi, &f.agm(&a, &b));
            let w2 = f.div(&pi, &f.agm(&a, &c));
            (
                Cx {
                    re: w1,
                    im: BigInt::zero(),
                },
                Cx {
                    re: BigInt::zero(),
                    im: w2,
                },
            )
        } else {
            let e1 = &roots[0];
            let b2f = f.int(b2);
            let r2 = f.mul(&f.int(&BigInt::from(3)), &f.mul(e1, e1))
                + f.mul(&b2f, e1) / 2
                + f.int(b4) / 2;
            let r = f.sqrt(&r2);
            let a: BigInt = f.sqrt(&r) * 2;
            let s = e1 * 3 + &b2f / 4;
            let b = f.sqrt(&(&r * 2 + &s));
            let c = f.sqrt(&(&r * 2 - &s));
            if b.is_zero() || c.is_zero() || a.is_zero() {
                return None;
            }
            let w1 = f.div(&(&pi * 2), &f.agm(&a, &b));
            let w2i = f.div(&pi, &f.agm(&a, &c));
            (
                Cx {
                    re: w1.clone(),
                    im: BigInt::zero(),
                },
                Cx {
                    re: w1 / 2,
                    im: w2i,
                },
            )
        };
        let (w1, w2) = gauss_reduce(&f, w1, w2);
        let tau = cdiv(&f, &w2, &w1);
        let two_pi_i_tau = Cx {
            re: -f.mul(&(&pi * 2), &tau.im),
            im: f.mul(&(&pi * 2), &tau.re),
        };
        let q = cexp(&f, &two_pi_i_tau);
        let b2_12 = f.ratio(b2, &BigInt::from(12));
        Some(Lattice {
            f,
            pi,
            w1,
            w2,
            tau,
            q,
            b2_12,
        })
    }

    /// `z − (round(s)·ω₁ + round(t)·ω₂)` for `z = sω₁ + tω₂`, and `z/ω₁`
    /// reduced the same way.
    fn reduce(&self, z: &Cx) -> (Cx, Cx) {
        let f = &self.f;
        let v = cdiv(f, z, &self.w1);
        let t = f.div(&v.im, &self.tau.im);
        let s = &v.re - f.mul(&t, &self.tau.re);
        let (si, ti) = (f.round(&s), f.round(&t));
        let zr = Cx {
            re: &z.re - &self.w1.re * &si - &self.w2.re * &ti,
            im: &z.im - &self.w1.im * &si - &self.w2.im * &ti,
        };
        let vr = Cx {
            re: &v.re - f.int(&si) - &self.tau.re * &ti,
            im: &v.im - &self.tau.im * &ti,
        };
        (zr, vr)
    }

    /// True when `z` is within `2^{−p/2}` (relative to `ω₁`) of a lattice
    /// point.
    fn near_zero(&self, z: &Cx) -> bool {
        let (_, v) = self.reduce(z);
        let lim = u64::from(self.f.p / 2);
        v.re.bits() < lim && v.im.bits() < lim
    }

    /// `x = ℘(z) − b2/12` (complex). `None` at a lattice point.
    ///
    /// The q-expansion (Silverman, *Advanced Topics*, I.6.2; from memory):
    /// with `v = z/ω₁` reduced so that `|Im v| ≤ Im τ/2`, `u = e^{2πiv}`,
    /// `℘ = (2πi/ω₁)²·[1/12 + u/(1−u)² + Σ_{m≥1} (q^m u/(1−q^m u)² +
    /// q^m u⁻¹/(1−q^m u⁻¹)² − 2q^m/(1−q^m)²)]`; `|q^m u^{±1}| ≤
    /// |q|^{m−1/2}` and `|q| ≤ e^{−π√3}` for the reduced basis, so the sum
    /// stops when `|q|^{m−1/2}` is below one guard ulp.
    fn x_of(&self, z: &Cx, budget: &mut Budget) -> Result<Option<Cx>> {
        let g = Fixed::new(self.f.p + 32);
        let up = |x: &BigInt| self.f.rescale(x, g.p);
        let upc = |x: &Cx| Cx {
            re: up(&x.re),
            im: up(&x.im),
        };
        let (_, v) = self.reduce(z);
        if v.re.bits() < u64::from(self.f.p / 2) && v.im.bits() < u64::from(self.f.p / 2) {
            return Ok(None);
        }
        let v = upc(&v);
        let pi = up(&self.pi);
        let two_pi = &pi * 2;
        // u = e^{2πiv} = e^{−2π Im v}·e^{2πi Re v}.
        let u = cexp(
            &g,
            &Cx {
                re: -g.mul(&two_pi, &v.im),
                im: g.mul(&two_pi, &v.re),
            },
        );
        let one = Cx {
            re: g.one(),
            im: BigInt::zero(),
        };
        let frac = |a: &Cx| -> Cx {
            let d = csub(&one, a);
            cdiv(&g, a, &g.cmul(&d, &d))
        };
        let uinv = cdiv(&g, &one, &u);
        let q = upc(&self.q);
        let mut sum = Cx {
            re: g.ratio(&BigInt::from(1), &BigInt::from(12)),
            im: BigInt::zero(),
        }
        .add(&frac(&u));
        let mut qm = q.clone();
        let qabs = g
            .approx_f64(&(g.mul(&q.re, &q.re) + g.mul(&q.im, &q.im)))
            .sqrt();
        let limbs = u64::from(g.p / 64 + 1);
        let mut m = 1u32;
        loop {
            spend(budget, 16 * limbs)?;
            let a = g.cmul(&qm, &u);
            let b = g.cmul(&qm, &uinv);
            let t = csub(&frac(&a).add(&frac(&b)), &cscale(&frac(&qm), 2));
            sum = sum.add(&t);
            // |q|^{m+1/2} below 2^{−p−8}: the rest is below one guard ulp.
            if (f64::from(m) + 0.5) * qabs.ln() < -(f64::from(g.p) + 8.0) * std::f64::consts::LN_2
                || qm.re.is_zero() && qm.im.is_zero()
            {
                break;
            }
            qm = g.cmul(&qm, &q);
            m += 1;
        }
        // (2πi/ω₁)² = −4π²/ω₁².
        let w1 = upc(&self.w1);
        let w1sq = g.cmul(&w1, &w1);
        let k = cdiv(
            &g,
            &Cx {
                re: -g.mul(&two_pi, &two_pi),
                im: BigInt::zero(),
            },
            &w1sq,
        );
        let wp = g.cmul(&k, &sum);
        Ok(Some(Cx {
            re: g.rescale(&wp.re, self.f.p) - &self.b2_12,
            im: g.rescale(&wp.im, self.f.p),
        }))
    }
}

/// Gauss reduction of a lattice basis (decisions in binary64, operations
/// exact on the mantissas), with `Im(ω₂/ω₁) > 0`.
fn gauss_reduce(f: &Fixed, mut w1: Cx, mut w2: Cx) -> (Cx, Cx) {
    let norm = |w: &Cx| {
        let (a, b) = (f.approx_f64(&w.re), f.approx_f64(&w.im));
        a * a + b * b
    };
    for _ in 0..100 {
        if norm(&w2) < norm(&w1) {
            std::mem::swap(&mut w1, &mut w2);
        }
        let t = cdiv(f, &w2, &w1);
        let m = f.round(&t.re);
        if m.is_zero() {
            break;
        }
        w2 = Cx {
            re: &w2.re - &w1.re * &m,
            im: &w2.im - &w1.im * &m,
        };
    }
    if cdiv(f, &w2, &w1).im.is_negative() {
        w2 = Cx {
            re: -w2.re,
            im: -w2.im,
        };
    }
    (w1, w2)
}

/// The continued-fraction convergents `h/k` of `x·2^{−p}` with `k` a
/// perfect square of at most `max_bits` bits, within `2^{tol−p}` of
/// `x·2^{−p}`, and `4x³ + b2x² + 2b4x + b6` a rational square at `x = h/k`
/// (so a point of the model with this `x` is rational): the point,
/// checked on `curve` exactly.
fn recognise(
    f: &Fixed,
    x: &BigInt,
    curve: &Curve,
    b: [&BigInt; 3],
    max_bits: u64,
    tol: u32,
) -> Option<Point> {
    let [a1, _, a3, _, _] = curve.coefficients();
    super::congruent::square_convergent(f, x, (max_bits, tol), |h, k, d| {
        // k³·f(h/k) = 4h³ + b2h²k + 2b4hk² + b6k³ = F; f(h/k) = F/d⁶.
        let big_f = BigInt::from(4) * h * h * h
            + b[0] * h * h * k
            + b[1] * BigInt::from(2) * h * k * k
            + b[2] * k * k * k;
        let s = sqrt_exact(&big_f).filter(|s| !s.is_zero())?;
        let xr = BigRational::new(h.clone(), k.clone());
        // 2y + a1x + a3 = s/d³.
        let yy = BigRational::new(s, k * d);
        let y = (yy - a1 * &xr - a3) / BigRational::from_integer(BigInt::from(2));
        let p = Point::new(xr, y);
        curve.contains(&p).then_some(p)
    })
}

/// A discriminant chosen for the Heegner hypothesis at level `n`.
#[derive(Clone, Debug)]
pub(crate) struct Choice {
    pub(crate) d: i64,
    pub(crate) h: usize,
    pub(crate) reps: Vec<Rep>,
}

/// True when every prime of `n` splits in `Q(√d)` (`d` fundamental):
/// `d ≡ 1 (mod 8)` if `2 | n`, `(d/p) = 1` for odd `p | n`.
fn heegner_hypothesis(d: i64, primes: &[u64]) -> bool {
    primes.iter().all(|&p| {
        if p == 2 {
            d.rem_euclid(8) == 1
        } else {
            let r = d.rem_euclid(p as i64) as u64;
            r != 0 && pow_mod(r, (p - 1) / 2, p) == 1
        }
    })
}

fn pow_mod(b: u64, mut e: u64, m: u64) -> u64 {
    let mut r = 1u128;
    let mut bb = u128::from(b % m);
    let mm = u128::from(m);
    while e > 0 {
        if e & 1 == 1 {
            r = r * bb % mm;
        }
        bb = bb * bb % mm;
        e >>= 1;
    }
    r as u64
}

/// Up to `count` discriminants meeting the Heegner hypothesis at level
/// `n` (primes `primes`), `|D| ≤ max_d` and among the first 400 that meet
/// it, cheapest first by the series
/// cost `Σ_classes A/(N√|D|)` (the terms per bit of precision are
/// proportional to it). The candidates are first ranked by the proxy
/// `h(h+1)/(2√|D|)` (the least `A/N` of the classes grows like the small
/// ideal norms), and the exact cost is computed for the best `2·count`.
///
/// Every class needs `A ≥ N`, so `h·terms(e^{−π√|D|/N}, bits)` is a lower
/// bound of an attempt's terms; candidates above `max_terms` by it are
/// dropped before `β` (found in `O(N)`) is computed.
pub(crate) fn choose(
    n: i64,
    primes: &[u64],
    max_d: u64,
    count: usize,
    (bits, max_terms): (u32, u64),
    budget: &mut Budget,
) -> Result<Vec<Choice>> {
    let mut proxy: Vec<(f64, i64, usize)> = Vec::new();
    let mut d = -3i64;
    let mut examined = 0;
    while d.unsigned_abs() <= max_d && proxy.len() < 64 && examined < 400 {
        spend(budget, 1)?;
        if forms::is_fundamental(d) && heegner_hypothesis(d, primes) {
            examined += 1;
            spend(budget, d.unsigned_abs())?;
            let h = forms::reduced_forms(d).len();
            let qabs = (-std::f64::consts::PI * ((-d) as f64).sqrt() / n as f64).exp();
            if (h as u64).saturating_mul(terms_for(qabs, bits)) > max_terms {
                d -= 1;
                continue;
            }
            proxy.push((((h * (h + 1)) as f64) / 2.0 / ((-d) as f64).sqrt(), d, h));
        }
        d -= 1;
    }
    proxy.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut out: Vec<(f64, Choice)> = Vec::new();
    for &(_, d, h) in proxy.iter().take(2 * count) {
        spend(budget, 2 * n as u64)?;
        let Some(beta) = forms::heegner_beta(d, n) else {
            continue;
        };
        let (_, reps) = forms::heegner_cover(d, n, beta, budget)?;
        let cost: f64 = reps
            .iter()
            .map(|r| r.form().0 as f64 / n as f64)
            .sum::<f64>()
            / ((-d) as f64).sqrt();
        out.push((cost, Choice { d, h, reps }));
    }
    out.sort_by(|a, b| a.0.total_cmp(&b.0));
    Ok(out.into_iter().take(count).map(|(_, c)| c).collect())
}

/// Series terms for the classes `reps` at `bits` (with the guard bits of
/// the sum): the largest per class and the total.
pub(crate) fn planned_terms(reps: &[Rep], d: i64, bits: u32) -> (u64, u64) {
    let mut max = 0;
    let mut total = 0u64;
    for r in reps {
        let t = super::series_terms(d, r.form().0, bits);
        max = max.max(t);
        total = total.saturating_add(t);
    }
    (max, total)
}

/// What one attempt at one `D` gave.
#[allow(clippy::large_enum_variant)]
pub(crate) enum Attempt {
    /// A point `R` of the input curve, checked exactly, `m·R` (exact), and
    /// `(k, m)`: `R` was recognised at the parameter `(k·z + λ)/m`, so
    /// `m·R = k·trace + T` with `T` torsion, numerically.
    Found(Point, Point, (i64, i64), u64),
    /// The trace is numerically a torsion point.
    Torsion,
    /// Nothing recognised at this precision.
    Nothing,
}

/// The multipliers `(k, m)` tried, by increasing height factor `k²/m²`
/// at equal cost: `(k·z + λ)/m` for `λ ∈ Λ/mΛ`.
const CANDIDATES: [(i64, i64); 9] = [
    (1, 1),
    (1, 2),
    (1, 3),
    (1, 4),
    (2, 1),
    (2, 3),
    (3, 2),
    (3, 1),
    (4, 1),
];

/// One attempt: the trace at `bits` for the classes `reps`, then the
/// candidates of [`CANDIDATES`]. `an` must hold the coefficients for the
/// largest class ([`planned_terms`]).
pub(crate) fn attempt(
    curve: &Curve,
    local: &GlobalLocalData,
    an: &[i64],
    reps: &[Rep],
    d: i64,
    bits: u32,
    budget: &mut Budget,
) -> Result<Attempt> {
    let (max_terms, _) = planned_terms(reps, d, bits);
    let guard = super::guard_bits(max_terms);
    let p = bits + guard;
    let f = Fixed::new(p);
    let pi = f.pi();
    let step = 1usize;
    let mut z = Cx::zero();
    let mut terms = 0;
    for rep in reps {
        let (v, t) = phi_with(f, &pi, an, step, rep.form(), d, budget)?;
        z = z.add(&v);
        terms += t;
    }
    let model = &local.minimal_model;
    let lattice = Lattice::new(p, model).ok_or_else(|| Error::Internal {
        check: "the period lattice of the minimal model could not be computed".into(),
    })?;
    for k in 1..=12i64 {
        if lattice.near_zero(&cscale(&z, k)) {
            return Ok(Attempt::Torsion);
        }
    }
    let minimal = Curve::from_bigints(model.clone())?;
    let inv = crate::curve::weierstrass_invariants(model);
    let [u, r, s, t] = local.change.clone();
    let change = ModelChange::new(u, r, s, t)?;
    let max_bits = u64::from(p.saturating_sub(guard)) / 2;
    for (k, m) in CANDIDATES {
        let kz = cscale(&z, k);
        for i in 0..m {
            for j in 0..m {
                let w = cdiv_int(
                    &kz.add(&cscale(&lattice.w1, i)).add(&cscale(&lattice.w2, j)),
                    m,
                );
                let Some(x) = lattice.x_of(&w, budget)? else {
                    continue;
                };
                // A real x has an imaginary part at the rounding level.
                let scale = x.re.bits().max(u64::from(p));
                if x.im.bits() + u64::from(p / 3) > scale {
                    continue;
                }
                if let Some(pt) = recognise(
                    &f,
                    &x.re,
                    &minimal,
                    [&inv.b2, &inv.b4, &inv.b6],
                    max_bits,
                    guard + 16,
                ) {
                    let back = change.to_old(&pt);
                    if !curve.contains(&back) {
                        return Err(Error::Internal {
                            check: "a Heegner point moved to the input model is off the curve"
                                .into(),
                        });
                    }
                    let multiple = curve.mul(&back, &BigInt::from(m));
                    return Ok(Attempt::Found(back, multiple, (k, m), terms));
                }
            }
        }
    }
    Ok(Attempt::Nothing)
}

/// The odd and even prime factors of a conductor below 2⁶⁴ (trial
/// division: conductors reaching here are below the analytic side's
/// limit, and their primes are those of the local data).
pub(crate) fn conductor_primes(local: &GlobalLocalData) -> Vec<u64> {
    local
        .primes
        .iter()
        .filter_map(|r| r.prime.get().to_u64())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cubic_at(inv: &crate::curve::WeierstrassInvariants, x: f64) -> f64 {
        let b2 = inv.b2.to_f64().unwrap();
        let b4 = inv.b4.to_f64().unwrap();
        let b6 = inv.b6.to_f64().unwrap();
        ((4.0 * x + b2) * x + 2.0 * b4) * x + b6
    }

    #[test]
    fn half_periods_are_roots_of_the_cubic() {
        // ℘ at the three half periods ω₁/2, ω₂/2, (ω₁+ω₂)/2 gives the three
        // roots e_i of 4x³ + b2x² + 2b4x + b6 (Silverman, AEC, VI.3; from
        // memory): on one model with Δ > 0 and one with Δ < 0.
        for model in [[0i64, -73, 0, -13, 0], [0, 1, 1, -2, 0], [1, 0, 0, 5, 7]] {
            let m = model.map(BigInt::from);
            let inv = crate::curve::weierstrass_invariants(&m);
            let l = Lattice::new(160, &m).unwrap();
            let mut b = Budget::unlimited();
            for w in [
                cdiv_int(&l.w1, 2),
                cdiv_int(&l.w2, 2),
                cdiv_int(&l.w1.add(&l.w2), 2),
            ] {
                let x = l.x_of(&w, &mut b).unwrap().unwrap();
                let (xr, xi) = (l.f.approx_f64(&x.re), l.f.approx_f64(&x.im));
                // f(x) ≈ 0 for the complex x: check |f(x)| via the real
                // root test only when x is real.
                if xi.abs() < 1e-20 {
                    assert!(
                        cubic_at(&inv, xr).abs() < 1e-8 * (1.0 + xr.abs().powi(3)),
                        "{model:?}: {xr}"
                    );
                } else {
                    // complex root: the real cubic has a conjugate pair;
                    // check f(x) = 0 in complex binary64.
                    let b2 = inv.b2.to_f64().unwrap();
                    let b4 = inv.b4.to_f64().unwrap();
                    let b6 = inv.b6.to_f64().unwrap();
                    let (mut re, mut im) = (4.0 * xr + b2, 4.0 * xi);
                    let mul =
                        |(a, b): (f64, f64), (c, d): (f64, f64)| (a * c - b * d, a * d + b * c);
                    (re, im) = mul((re, im), (xr, xi));
                    re += 2.0 * b4;
                    (re, im) = mul((re, im), (xr, xi));
                    re += b6;
                    assert!(
                        re.abs() + im.abs() < 1e-8 * (1.0 + xr.abs().powi(3)),
                        "{model:?}: {re} {im}"
                    );
                }
            }
        }
    }
}

#[cfg(test)]
mod relation_tests {
    use super::*;

    #[test]
    fn atkin_lehner_leaves_phi_unchanged_for_root_number_minus_one() {
        // For w(E) = −1: φ(W_N τ) = φ(τ) + L(f, 1) = φ(τ) (module docs),
        // checked at 200 bits on y² = x³ + 4x² − 4x (conductor 128, root
        // number −1, rank 1 by this crate's descent) at the Heegner form
        // [128, 75, 11] of D = −7 and its image [128·11, −75, 1] under
        // W_128: the difference is a lattice point of the curve's lattice.
        let curve: Curve = "0 4 0 -4 0".parse().unwrap();
        let mut b = Budget::unlimited();
        let local = crate::curve::global_local_data(curve.coefficients(), &mut b).unwrap();
        assert_eq!(local.conductor, BigInt::from(128));
        let an = crate::analytic::dirichlet_coefficients(&local, 40_000, &mut b).unwrap();
        let f = Fixed::new(200);
        let pi = f.pi();
        let (v, _) = phi_with(f, &pi, &an, 1, (128, 75, 11), -7, &mut b).unwrap();
        let (w, _) = phi_with(f, &pi, &an, 1, (128 * 11, -75, 1), -7, &mut b).unwrap();
        let l = Lattice::new(200, &local.minimal_model).unwrap();
        assert!(l.near_zero(&csub(&v, &w)));
        // ... and the point itself is not torsion.
        assert!((1..=12).all(|k| !l.near_zero(&cscale(&v, k))));
    }

    #[test]
    fn discriminants_meet_the_heegner_hypothesis() {
        // Level 5248 = 2^7·41: D ≡ 1 (mod 8) and a square modulo 41.
        let primes = [2u64, 41];
        let mut b = Budget::unlimited();
        let ch = choose(5248, &primes, 2000, 3, (100, u64::MAX), &mut b).unwrap();
        assert!(!ch.is_empty());
        for c in &ch {
            assert_eq!(c.d.rem_euclid(8), 1);
            assert!((1..41).any(|x| (x * x - c.d).rem_euclid(41) == 0));
            assert_eq!(c.reps.len(), c.h);
        }
    }
}
