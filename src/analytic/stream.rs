//! The streamed route for large conductors: `a_n` in machine words from a
//! multiplicative sieve, and the sums of the `series` module in plain
//! binary64 with compensated accumulation and one a-priori error bound per
//! sum, instead of midpoint–radius arithmetic term by term.
//!
//! # Coefficients
//! `a_n` for all `n ≤ M` in one `i32` array (4 bytes per term, plus one bit
//! per term for the prime sieve): start from `a_n = 1`, and for every prime
//! `p` and every `p^k ≤ M` multiply `a_j` by `a_{p^k}` for the `j` with
//! `p^k ∥ j` (multiplicativity [Sil94, II.10; Cre97, §2.8]; the prime powers
//! by the recursions of `coefficients`). `|a_n| ≤ d(n)√n < 2³¹` for
//! `n < 2³¹` (`d(n) ≤ 1600` there, common practice), and every partial
//! product is a product of the prime-power factors of `n`, so bounded the
//! same way: no overflow.
//!
//! **Quadratic twists of `y² = x³ − x`.** When the short model of the
//! global minimal model is `y² = x³ − s²x` (`c6 = 0` and `27·c4 = s²`; the
//! congruent-number curves `y² = x³ − n²x` have `s = 36n`), then at every
//! prime `p ≥ 5` of good reduction `a_p(E) = (s/p)·a_p(E₁)`, `E₁: y² = x³ − x`.
//! Proof: over F_p, `x = sX`, `y = s√s·Y` maps `E₁` onto `E`, so `E` is `E₁`
//! twisted by `s`; `#E(F_p) + #E₁^{s}(F_p) = 2p + 2` gives
//! `a_p(E) = (s/p)·a_p(E₁)` (common practice; Silverman, *The Arithmetic of
//! Elliptic Curves*, X.2 for twists). And `a_p(E₁) = 0` for `p ≡ 3 (mod 4)`,
//! `a_p(E₁) = 2a` for `p = a² + b²`, `b` even, `a + b ≡ 1 (mod 4)`, `p ≡ 1
//! (mod 4)` (the closed form of `cm` with `D = 1`, checked there against
//! point counts; Ireland–Rosen, Ch. 18 §4, Theorem 5, from memory). The
//! representations `p = a² + b²` of all primes `p ≤ M` come from one sweep
//! over the pairs `(a, b)` with `a² + b² ≤ M`: no per-prime exponentiation.
//! At the bad primes of `E` the values of Tate's algorithm are used, at 2
//! and 3 a direct count; a good `p ≥ 5` with `p | s` (impossible for a
//! minimal model, but not assumed) falls back to the per-prime route.
//!
//! # Sums
//! Each sum `Σ_{n≤M} a_n w(n)` is accumulated with Knuth's TwoSum into a
//! pair (`hi`, `lo`): `hi + lo` carries the rounding error of every
//! addition to `hi` exactly [Knuth, TAOCP vol. 2, §4.2.2, Thm B; Higham02,
//! §4.3]; only the recursive sum `lo` of the `M` correction terms `e_i`,
//! `|e_i| ≤ u·A` with `A = Σ|a_n ŵ_n|`, is rounded, by at most
//! `γ_M·M·u·A` [Higham02, (4.4)], `u = 2⁻⁵³`, `γ_k = ku/(1 − ku)`.
//! The weights `ŵ_n` are computed in binary64 for the binary64 number
//! `ĉ` nearest `c = 2π/√N`, each with a proven relative error `η` (below);
//! the move from `ĉ` to the true `c`, `|c − ĉ| ≤ ε`, changes
//! `e^{−ctn}` by a relative `≤ 1.01·tnε` and `G_1(cn)` by `≤ 1.01·(x + 2)ε/ĉ`
//! (`|d log G_1/dx| ≤ 1 + 2/x`, from `e^{−x}/E_1(x) ≤ x + 1`). So
//! `|Σ a_n w(n) − value| ≤ (η + sensitivity)·A·(1 + small) + γ_M·M·u·A + u|value|`.
//!
//! * `e^{−ĉtn}`: anchors `e^{−ĉtn₀}` every 64 terms and a table of
//!   `e^{−ĉtj}`, `j < 64`, all by `exp_with_error` (proven relative error
//!   `ρ`), one product each: relative error `≤ 1.01(2ρ + u + 3.02u·ĉtM)`
//!   (the arguments `ĉ·t·n₀` rounded twice, and `t` itself the rounded
//!   reciprocal for the second half of the theta and split tests).
//! * `G_1(x) = e^{−x}f(x)/x`, `f(x) = e^xE_1(x) = ∫_0^∞ e^{−xt}/(1 + t) dt`,
//!   so `f ≥ 1/(x + 1)` (as `1/(1 + t) ≥ e^{−t}`), `(−1)^k f^{(k)} ≥ 0`,
//!   `|f^{(k)}| ≤ k!/x^{k+1}`, and `f^{(k)} = f^{(k−1)} + (−1)^k(k−1)!/x^k`
//!   (from `f' = f − 1/x`). For `n ≥ 2048`, blocks of `B ≤ n₀/1024` terms
//!   use the Taylor polynomial of degree 6 of `f` at `x₀ = ĉn₀`, remainder
//!   `≤ Δ⁷/x₀⁸` on `[x₀, x₀ + Δ]`, the coefficients certified (from `f(x₀)` by
//!   the continued fraction or the series of `series`), Horner's rounding
//!   `≤ γ₁₂Σ|m_k|Δ^k` [Higham02, (5.3)] at the exact offsets `x̂_n − x₀`
//!   (Sterbenz); below 2048 terms `G_1` is the certified value of `series`.

use super::coefficients::ApTable;
use super::series::{e1_scaled_cf, g_series, g_value};
use crate::arith::certified::{exp_with_error, Certified};
use crate::budget::Budget;
use crate::curve::tate::GlobalLocalData;
use crate::error::{Error, Result};
use crate::local::legendre_u64;
use num_bigint::BigInt;
use num_traits::{Signed, ToPrimitive, Zero};

/// Unit roundoff of binary64.
const U: f64 = f64::EPSILON / 2.0;

/// Anchors of the powers `e^{−ĉtn}` every this many terms.
const BLOCK: usize = 64;

/// `G_1` is evaluated term by term below this index.
const DIRECT_G1_BELOW: usize = 2048;

/// Degree of the Taylor polynomials of `f = e^xE_1(x)`.
const TAYLOR_DEGREE: usize = 6;

/// Longest block sharing one Taylor polynomial.
const MAX_G1_BLOCK: usize = 4096;

/// Budget units are charged in chunks of this many terms.
const CHUNK: usize = 1 << 16;

/// The largest number of terms of the streamed route (`a_n` in `i32`).
pub(crate) const MAX_STREAMED_TERMS: u64 = (1 << 31) - 2;

fn gamma(k: f64) -> f64 {
    k * U / (1.0 - k * U)
}

fn spend(budget: &mut Budget, units: u64, stage: &str) -> Result<()> {
    budget.spend(units).map_err(|_| Error::BudgetExhausted {
        stage: stage.into(),
    })
}

/// `s > 0` when the short model of the minimal model is `y² = x³ − s²x`
/// (a quadratic twist of `y² = x³ − x`) and `s` fits a machine word.
pub(crate) fn twist_of_x3_minus_x(local: &GlobalLocalData) -> Option<u64> {
    let inv = crate::curve::weierstrass_invariants(&local.minimal_model);
    if !inv.c6.is_zero() || !inv.c4.is_positive() {
        return None;
    }
    let d: BigInt = &inv.c4 * 27;
    let s = d.sqrt();
    if &s * &s != d {
        return None;
    }
    s.to_u64()
}

/// Bits of a sieve of Eratosthenes: `is_prime(k)` for `k ≤ m`.
struct PrimeBits {
    bits: Vec<u64>,
}

impl PrimeBits {
    fn new(m: usize) -> PrimeBits {
        let words = m / 64 + 1;
        let mut bits = vec![!0u64; words];
        let clear = |bits: &mut Vec<u64>, k: usize| bits[k / 64] &= !(1u64 << (k % 64));
        clear(&mut bits, 0);
        if m >= 1 {
            clear(&mut bits, 1);
        }
        let mut i = 2usize;
        while i * i <= m {
            if bits[i / 64] >> (i % 64) & 1 == 1 {
                let mut j = i * i;
                while j <= m {
                    clear(&mut bits, j);
                    j += i;
                }
            }
            i += 1;
        }
        PrimeBits { bits }
    }

    fn is_prime(&self, k: usize) -> bool {
        self.bits[k / 64] >> (k % 64) & 1 == 1
    }
}

/// `a_1, …, a_m` (index 0 holds 0) in machine words, `m ≤ MAX_STREAMED_TERMS`.
/// `twist`: `s` of [`twist_of_x3_minus_x`], when the curve is such a twist.
pub(crate) fn coefficients(
    local: &GlobalLocalData,
    m: u64,
    twist: Option<u64>,
    budget: &mut Budget,
) -> Result<Vec<i32>> {
    if m > MAX_STREAMED_TERMS {
        return Err(Error::InvalidArgument {
            reason: format!("at most {MAX_STREAMED_TERMS} streamed terms, asked for {m}"),
        });
    }
    let stage = "L-series coefficients";
    spend(budget, m, stage)?;
    let m = m as usize;
    let table = ApTable::new(local);
    let primes = PrimeBits::new(m);
    let mut a = vec![1i32; m + 1];
    a[0] = 0;
    if twist.is_some() {
        // a_p(E₁) at p ≡ 1 (mod 4) stored at index p, from p = x² + y².
        let mut x = 1usize;
        while x * x < m {
            let mut y = 2usize;
            while x * x + y * y <= m {
                let v = x * x + y * y;
                if primes.is_prime(v) {
                    let ap = if (x + y) % 4 == 1 {
                        2 * x as i64
                    } else {
                        -2 * (x as i64)
                    };
                    a[v] = ap as i32;
                }
                y += 2;
            }
            x += 2;
        }
    }
    for p in 2..=m {
        if !primes.is_prime(p) {
            continue;
        }
        let pu = p as u64;
        let bad = table.bad_ap_of(pu);
        let ap: i64 = match (bad, twist) {
            (Some(v), _) => v,
            (None, Some(s)) if pu >= 5 => {
                let base = if pu % 4 == 1 { i64::from(a[p]) } else { 0 };
                match legendre_u64(s % pu, pu) {
                    0 => per_prime(&table, pu, budget)?,
                    chi => i64::from(chi) * base,
                }
            }
            _ => per_prime(&table, pu, budget)?,
        };
        a[p] = 1;
        let good = bad.is_none();
        // a_{p^k} for k = 1, 2, …; multiply a_j for p^k ∥ j.
        let (mut pk, mut prev, mut cur) = (p, 1i64, ap);
        loop {
            if cur != 1 {
                let f = cur;
                let mut cofactor = 1usize; // j / p^k mod p, stepped
                let mut j = pk;
                while j <= m {
                    if cofactor != 0 {
                        a[j] = (i64::from(a[j]) * f) as i32;
                    }
                    cofactor += 1;
                    if cofactor == p {
                        cofactor = 0;
                    }
                    j += pk;
                }
            }
            if pk > m / p {
                break;
            }
            pk *= p;
            let next = if good {
                ap * cur - pu as i64 * prev
            } else {
                ap * cur
            };
            prev = cur;
            cur = next;
        }
    }
    Ok(a)
}

/// `a_p` by the per-prime route of `coefficients` (closed forms, counts,
/// baby-step giant-step), charged like `dirichlet_coefficients`.
fn per_prime(table: &ApTable, p: u64, budget: &mut Budget) -> Result<i64> {
    let cost = if p < 230 {
        p
    } else {
        4 * (p as f64).sqrt().sqrt() as u64 + 40
    };
    spend(budget, cost, "L-series coefficients")?;
    table.ap_unchecked(p).ok_or_else(|| Error::BudgetExhausted {
        stage: format!("a_p at p = {p}"),
    })
}

/// A compensated accumulator: `hi + lo` is the sum up to the rounding of
/// `lo`; `abs` is `Σ|p_i|` (recursive, rounded).
#[derive(Clone, Copy, Default)]
struct Acc {
    hi: f64,
    lo: f64,
    abs: f64,
}

impl Acc {
    #[inline]
    fn add(&mut self, p: f64) {
        let s = self.hi + p;
        let bp = s - self.hi;
        let e = (self.hi - (s - bp)) + (p - bp);
        self.hi = s;
        self.lo += e;
        self.abs += p.abs();
    }

    /// The certified sum: `eta` the relative error of every weight (all
    /// sources), `extra` an absolute error already bounded, `m` the number
    /// of terms.
    fn finish(&self, eta: f64, extra: f64, m: usize) -> Certified {
        let mf = m as f64 + 1.0;
        let g = gamma(mf);
        // Σ|p_i| ≥ (1 − γ)·exact, and each p_i within (η + u) of a_n w(n).
        let abs = self.abs * (1.0 + 2.0 * g) / (1.0 - eta - U);
        let value = self.hi + self.lo;
        let radius = (eta + U) * abs + g * mf * U * abs * (1.0 + g) + 2.0 * U * value.abs() + extra;
        if !value.is_finite() || !radius.is_finite() || eta >= 0.01 {
            return Certified::unknown();
        }
        Certified::with_radius(value, radius * (1.0 + 8.0 * U) + f64::MIN_POSITIVE)
    }
}

/// The powers `e^{−ĉtn}`: an anchor every [`BLOCK`] terms times a table.
struct Powers {
    ct: f64,
    table: [f64; BLOCK],
    anchor: f64,
    rho: f64,
}

impl Powers {
    fn new(c_hat: f64, t: f64) -> Powers {
        let ct = c_hat * t;
        let mut table = [0.0; BLOCK];
        let mut rho: f64 = 0.0;
        for (j, v) in table.iter_mut().enumerate() {
            let (e, r) = exp_with_error(-(ct * j as f64));
            *v = e;
            rho = rho.max(r);
        }
        Powers {
            ct,
            table,
            anchor: 1.0,
            rho,
        }
    }

    fn set_anchor(&mut self, n0: usize) {
        let (e, r) = exp_with_error(-(self.ct * n0 as f64));
        self.anchor = e;
        self.rho = self.rho.max(r);
    }

    #[inline]
    fn at(&self, j: usize) -> f64 {
        self.anchor * self.table[j]
    }

    /// Relative error of every value `at` returned, for `n ≤ m`, plus the
    /// move from `ĉ` (error `eps`) to the true `c`.
    fn eta(&self, m: usize, t: f64, c_hat: f64, eps: f64) -> f64 {
        let x = c_hat * t * (m as f64 + 1.0) * (1.0 + 4.0 * U);
        let own = 1.01 * (2.0 * self.rho + U + 3.02 * U * x);
        let sensitivity = 1.01 * t * (m as f64 + 1.0) * eps;
        own + sensitivity
    }
}

/// One power sum `Σ_{n≤M} a_n e^{−ctn}/n^k`, `k ∈ {0, 1}`.
#[derive(Debug, Clone, Copy)]
pub(crate) struct PowerSum {
    /// The parameter `t > 0`.
    pub t: f64,
    /// Divide by `n`.
    pub over_n: bool,
}

/// The sums `Σ_{n≤M} a_n e^{−ctn}/n^k` for each spec, `c` enclosed by
/// `c` (certified), `M = a.len() − 1`, in one pass. No tail is included.
pub(crate) fn power_sums(
    a: &[i32],
    c: &Certified,
    specs: &[PowerSum],
    budget: &mut Budget,
) -> Result<Vec<Certified>> {
    let m = a.len().saturating_sub(1);
    let c_hat = c.value();
    let eps = c.error();
    let mut ts: Vec<f64> = Vec::new();
    let index: Vec<usize> = specs
        .iter()
        .map(|s| match ts.iter().position(|&t| t == s.t) {
            Some(i) => i,
            None => {
                ts.push(s.t);
                ts.len() - 1
            }
        })
        .collect();
    let mut powers: Vec<Powers> = ts.iter().map(|&t| Powers::new(c_hat, t)).collect();
    let mut acc = vec![Acc::default(); specs.len()];
    let mut e = vec![0.0f64; ts.len()];
    let mut n0 = 1usize;
    while n0 <= m {
        if (n0 - 1) % CHUNK == 0 {
            spend(budget, (CHUNK * specs.len()) as u64, "L-series sums")?;
        }
        for p in powers.iter_mut() {
            p.set_anchor(n0);
        }
        let end = (n0 + BLOCK).min(m + 1);
        for (n, &an) in a.iter().enumerate().take(end).skip(n0) {
            if an == 0 {
                continue;
            }
            let j = n - n0;
            for (k, p) in powers.iter().enumerate() {
                e[k] = p.at(j);
            }
            let af = f64::from(an);
            let nf = n as f64;
            for (s, spec) in specs.iter().enumerate() {
                let w = e[index[s]];
                let w = if spec.over_n { w / nf } else { w };
                acc[s].add(af * w);
            }
        }
        n0 = end;
    }
    Ok(specs
        .iter()
        .enumerate()
        .map(|(s, spec)| {
            let p = &powers[index[s]];
            let eta = p.eta(m, spec.t, c_hat, eps) + if spec.over_n { 1.01 * U } else { 0.0 };
            acc[s].finish(eta, 0.0, m)
        })
        .collect())
}

/// A Taylor block of `f = e^xE_1(x)` at `x₀`.
struct TaylorBlock {
    x0: f64,
    coef: [f64; TAYLOR_DEGREE + 1],
    /// Relative error bound of the value of `f` on the block.
    eta: f64,
}

/// `f(x₀) = e^{x₀}E_1(x₀)`, certified, for `x₀ > 0`.
fn f_at(x0: f64) -> Certified {
    if x0 > 2.0 {
        e1_scaled_cf(x0)
    } else {
        let x = Certified::exact(x0);
        g_series(1, &x).mul(&x).mul(&x.exp())
    }
}

impl TaylorBlock {
    /// The block at `x₀ = x̂_{n₀}` whose offsets reach at most `delta`.
    fn new(x0: f64, delta: f64) -> TaylorBlock {
        let xc = Certified::exact(x0);
        let mut deriv = f_at(x0);
        let mut coef = [0.0; TAYLOR_DEGREE + 1];
        let mut err = [0.0; TAYLOR_DEGREE + 1];
        let mut fact = 1.0f64; // (k−1)!, then k!
        let mut xk = Certified::exact(1.0); // x₀^k
        coef[0] = deriv.value();
        err[0] = deriv.error();
        for k in 1..=TAYLOR_DEGREE {
            xk = xk.mul(&xc);
            let sign = if k % 2 == 0 { 1.0 } else { -1.0 };
            deriv = deriv.add(&Certified::exact(sign * fact).div(&xk));
            fact *= k as f64; // now k!
            let mut ck = deriv.scale(1.0 / fact);
            // A priori: (−1)^k c_k ∈ [0, 1/x₀^{k+1}].
            let cap = 1.0 / (xk.lower() * x0) * (1.0 + 8.0 * U);
            if ck.error().is_nan() || ck.error() > 0.5 * cap {
                ck = Certified::with_radius(sign * 0.5 * cap, 0.5 * cap * (1.0 + 4.0 * U));
            }
            coef[k] = ck.value();
            err[k] = ck.error();
        }
        let mut horner = 0.0;
        let mut coeff_err = 0.0;
        let mut dk = 1.0;
        for k in 0..=TAYLOR_DEGREE {
            horner += coef[k].abs() * dk;
            coeff_err += err[k] * dk;
            dk *= delta;
        }
        // dk = Δ^{d+1}; remainder ≤ Δ^{d+1}/x₀^{d+2}.
        let remainder = dk / (x0.powi(TAYLOR_DEGREE as i32 + 2) * (1.0 - 16.0 * U));
        let abs =
            (gamma(2.0 * TAYLOR_DEGREE as f64) * horner + coeff_err + remainder) * (1.0 + 16.0 * U);
        // f ≥ 1/(x + 1) on the block.
        let f_low = (1.0 - 8.0 * U) / (x0 + delta + 1.0);
        let eta = abs / f_low;
        TaylorBlock {
            x0,
            coef,
            eta: if eta.is_finite() { eta } else { f64::INFINITY },
        }
    }

    #[inline]
    fn eval(&self, x: f64) -> f64 {
        let t = x - self.x0;
        let mut p = self.coef[TAYLOR_DEGREE];
        for k in (0..TAYLOR_DEGREE).rev() {
            p = p * t + self.coef[k];
        }
        p
    }
}

/// `Σ_{n≤M} a_n G_1(cn)` (no tail), `G_1(x) = E_1(x)/x`.
pub(crate) fn g1_sum(a: &[i32], c: &Certified, budget: &mut Budget) -> Result<Certified> {
    let m = a.len().saturating_sub(1);
    let c_hat = c.value();
    let eps = c.error();
    let mut powers = Powers::new(c_hat, 1.0);
    let mut acc = Acc::default();
    let mut direct_err = 0.0f64;
    let mut eta_f: f64 = 0.0;
    let mut block: Option<TaylorBlock> = None;
    let mut block_end = 0usize;
    let mut n0 = 1usize;
    while n0 <= m {
        if (n0 - 1) % CHUNK == 0 {
            spend(budget, (4 * CHUNK) as u64, "L-series sums")?;
        }
        powers.set_anchor(n0);
        let end = (n0 + BLOCK).min(m + 1);
        for (n, &an) in a.iter().enumerate().take(end).skip(n0) {
            if an == 0 {
                continue;
            }
            let af = f64::from(an);
            let x = c_hat * n as f64;
            if n < DIRECT_G1_BELOW {
                let g = g_value(1, &Certified::exact(x));
                if !g.is_finite() {
                    return Ok(Certified::unknown());
                }
                acc.add(af * g.value());
                direct_err += af.abs() * g.error();
                continue;
            }
            if n >= block_end {
                let len = (n >> 10).clamp(1, MAX_G1_BLOCK);
                block_end = n + len;
                let last = c_hat * (block_end - 1) as f64;
                let b = TaylorBlock::new(x, last - x);
                eta_f = eta_f.max(b.eta);
                block = Some(b);
            }
            let f = match &block {
                Some(b) => b.eval(x),
                None => return Ok(Certified::unknown()),
            };
            let w = powers.at(n - n0) * f / x;
            acc.add(af * w);
        }
        n0 = end;
    }
    // Relative errors: e^{−ĉn}; f̂ against f(x̂) (η_f); f(x̂) against f(ĉn)
    // (|f'/f| ≤ (x + 1)/x², argument moved by ≤ u·x); 1/x̂ against 1/(ĉn);
    // two roundings (product, quotient); and ĉ → c.
    let x_min = c_hat * DIRECT_G1_BELOW as f64 * (1.0 - 4.0 * U);
    let x_max = c_hat * (m as f64 + 1.0) * (1.0 + 4.0 * U);
    let eta_e = powers.eta(m, 1.0, c_hat, 0.0);
    let eta_arg = 1.01 * U * (1.0 + 1.0 / x_min)
        + 1.01 * U * (x_max.min(2.0 * DIRECT_G1_BELOW as f64 * c_hat) + 2.0);
    let sensitivity = 1.01 * (x_max + 2.0) * eps / (c_hat * (1.0 - 4.0 * U));
    let eta = (eta_e + eta_f + eta_arg + 3.0 * U + sensitivity) * 1.01;
    Ok(acc.finish(eta, direct_err * (1.0 + 4.0 * U), m))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn taylor_blocks_match_the_continued_fraction() {
        for &x0 in &[0.004, 0.3, 1.7, 2.5, 9.0, 40.0] {
            let delta = x0 / 1024.0;
            let b = TaylorBlock::new(x0, delta);
            assert!(b.eta < 1e-12, "x0 = {x0}: eta {}", b.eta);
            for k in 0..=8 {
                let x = x0 + delta * k as f64 / 8.0;
                let direct = f_at(x);
                let v = b.eval(x);
                let tol = b.eta * direct.value() + direct.error() + 4.0 * U * v.abs();
                assert!(
                    (v - direct.value()).abs() <= tol,
                    "x = {x}: {v} vs {direct}"
                );
            }
        }
    }
}

#[cfg(test)]
mod coefficient_tests {
    use super::*;
    use crate::curve::Curve;

    fn local_of(a: [i64; 5]) -> GlobalLocalData {
        let e = Curve::from_ints(a).expect("curve");
        e.tate_data(&mut Budget::unlimited()).expect("local data")
    }

    /// `a_p = p + 1 − #E(F_p)` for `y² = x³ + Ax` by counting: for each `x`
    /// the number of `y` is `1 + (f(x)/p)` (the definition; common practice).
    fn counted(a4: i64, p: u64) -> i64 {
        let pi = p as i64;
        let mut points = 1i64;
        for x in 0..pi {
            let f = ((x * x % pi * x + a4.rem_euclid(pi) * x) % pi) as u64;
            points += 1 + i64::from(legendre_u64(f, p));
        }
        pi + 1 - points
    }

    #[test]
    fn twist_coefficients_equal_point_counts() {
        // Congruent-number curves y² = x³ − n²x (s = 36n) and two other
        // twists y² = x³ − s²x: every prime below 2000, good and bad.
        for n in [1i64, 2, 5, 6, 7, 15, 34, 210, 1767, 30030] {
            let local = local_of([0, 0, 0, -n * n, 0]);
            let s = twist_of_x3_minus_x(&local).expect("a twist of y^2 = x^3 - x");
            assert_eq!(s, 36 * n as u64, "n = {n}");
            let a = coefficients(&local, 2000, Some(s), &mut Budget::unlimited()).unwrap();
            for p in 3..=2000u64 {
                if crate::arith::is_prime_u64(p) {
                    assert_eq!(
                        i64::from(a[p as usize]),
                        counted(-n * n, p),
                        "n = {n}, p = {p}"
                    );
                }
            }
            assert_eq!(a[2], 0, "additive at 2");
        }
        // Not twists of y² = x³ − x: y² = x³ + x (−s² would be 1), y² = x³ − 2x.
        assert_eq!(twist_of_x3_minus_x(&local_of([0, 0, 0, 1, 0])), None);
        assert_eq!(twist_of_x3_minus_x(&local_of([0, 0, 0, -2, 0])), None);
        assert_eq!(twist_of_x3_minus_x(&local_of([0, 0, 1, -1, 0])), None);
    }

    #[test]
    fn sieved_coefficients_equal_the_stored_route() {
        // a_n for all n ≤ 30000 against `dirichlet_coefficients` (the per-prime route with
        // the Hecke recursion), on twists and on curves without CM.
        for a in [
            [0, 0, 0, -1, 0],
            [0, 0, 0, -49, 0],
            [0, 0, 0, -(1767 * 1767), 0],
            [0, 0, 1, -1, 0],
            [1, -1, 1, -4, 3],
            [0, 3, 0, -5, 0],
        ] {
            let local = local_of(a);
            let twist = twist_of_x3_minus_x(&local);
            let m = 30_000;
            let streamed = coefficients(&local, m, twist, &mut Budget::unlimited()).unwrap();
            let stored =
                super::super::dirichlet_coefficients(&local, m, &mut Budget::unlimited()).unwrap();
            assert_eq!(streamed.len(), stored.len());
            for (k, (x, y)) in streamed.iter().zip(&stored).enumerate() {
                assert_eq!(i64::from(*x), *y, "{a:?}: a_{k}");
            }
        }
    }

    #[test]
    fn power_sums_enclose_a_slow_careful_sum() {
        // Σ a_n e^{−ctn}/n^k against the same sum in midpoint–radius
        // arithmetic term by term (the stored route's arithmetic).
        let local = local_of([0, 0, 0, -25, 0]);
        let a = coefficients(&local, 5000, Some(180), &mut Budget::unlimited()).unwrap();
        let c = Certified::exact(0.01);
        for (t, over_n) in [(1.0, true), (1.1, false), (1.0 / 1.1, true)] {
            let s =
                power_sums(&a, &c, &[PowerSum { t, over_n }], &mut Budget::unlimited()).unwrap()[0];
            let mut slow = Certified::exact(0.0);
            for (n, &an) in a.iter().enumerate().skip(1) {
                let w = c.scale(t * n as f64).neg().exp();
                let w = if over_n { w.scale(1.0 / n as f64) } else { w };
                slow = slow.add(&w.scale(f64::from(an)));
            }
            assert!(s.overlaps(&slow), "t = {t}: {s} vs {slow}");
            assert!(s.error() < 1e-10, "{s}");
        }
        let g = g1_sum(&a, &c, &mut Budget::unlimited()).unwrap();
        let mut slow = Certified::exact(0.0);
        for (n, &an) in a.iter().enumerate().skip(1) {
            slow = slow.add(&g_value(1, &c.scale(n as f64)).scale(f64::from(an)));
        }
        assert!(g.overlaps(&slow) && g.error() < 1e-10, "{g} vs {slow}");
    }
}
