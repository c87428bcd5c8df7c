//! General plane cubics C(u, v, w) = 0 over Z and their solubility over
//! Q_p: the homogeneous spaces of a 3-isogeny with α ≠ 0 are of this kind
//! (the cubic G(u, v) + αn(u² − Dv²)w + βw³ = 0, docs/descent3.md), not of
//! the form F(u, v) = c·w³ that [`super::solubility_at`] decides.
//!
//! # The method
//! A point of P²(Q_p) has a primitive representative in Z_p³, which lies
//! in one of the charts (s, t, 1), (s, 1, p·t), (1, p·s, p·t) with
//! s, t ∈ Z_p. On each chart g(s, t) is an integer polynomial of degree ≤ 3
//! and the search runs over the residue classes (s₀, t₀) + p^n Z_p². With
//! the Taylor coefficients T_ab = ∂^a_s ∂^b_t g(s₀, t₀)/(a!b!) (integers),
//! g(s₀ + p^n h, t₀ + p^n k) − g(s₀, t₀) has valuation at least
//! B = min over (a, b) ≠ (0, 0) of n(a + b) + v(T_ab). If v(g(s₀, t₀)) < B,
//! g has no zero on the class. If v(g(s₀, t₀)) > 2·v(T₁₀) (or 2·v(T₀₁)),
//! Hensel's lemma in s (or t) gives a zero in the class (common practice;
//! Serre, "A Course in Arithmetic", II.2, for Hensel's lemma). Otherwise
//! the class splits into p² classes, of which only those where
//! G(h, k) = g(s₀ + pⁿh, t₀ + pⁿk)/p^c (c the least valuation of its
//! coefficients) vanishes mod p are kept: on the others the valuation
//! stays c, below their bound. On a smooth cubic every branch ends:
//! at a zero the gradient of C does not vanish (Euler's relation carries
//! this to the chart), away from the zeros the value is eventually fixed.
//! A singular cubic may not end; the budget bounds the work.
//!
//! # Witnesses
//! A soluble verdict carries a primitive integer triple (u, v, w) with
//! C(u, v, w) = 0, or v_p(C) > 2·v_p(∂C/∂x) for one of the variables x
//! (Hensel's lemma along x; the lifted triple stays primitive), checked by
//! [`PlaneCubicWitness::verify`].

use num_bigint::BigInt;
use num_traits::{One, Signed, ToPrimitive, Zero};

use super::local::val;
use crate::budget::Budget;
use crate::error::{Error, Result};
use crate::local::Prime;

/// The exponents (i, j, k) of u^i v^j w^k, in the order of the
/// coefficients of a [`PlaneCubic`].
pub const PLANE_CUBIC_MONOMIALS: [(u32, u32, u32); 10] = [
    (3, 0, 0),
    (2, 1, 0),
    (2, 0, 1),
    (1, 2, 0),
    (1, 1, 1),
    (1, 0, 2),
    (0, 3, 0),
    (0, 2, 1),
    (0, 1, 2),
    (0, 0, 3),
];

/// A ternary cubic form C(u, v, w) = Σ c_m·u^i v^j w^k over Z, the
/// monomials in the order of [`PLANE_CUBIC_MONOMIALS`].
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct PlaneCubic {
    c: [BigInt; 10],
}

/// Why a plane cubic has a point over Q_p (module docs).
#[derive(Debug, Clone, PartialEq, Eq)]
#[non_exhaustive]
pub struct PlaneCubicWitness {
    /// The primitive triple (u, v, w).
    pub point: [BigInt; 3],
}

impl PlaneCubic {
    /// The cubic with these coefficients.
    ///
    /// # Errors
    /// [`Error::Zero`] when every coefficient is 0.
    pub fn new(c: [BigInt; 10]) -> Result<PlaneCubic> {
        if c.iter().all(|x| x.is_zero()) {
            return Err(Error::Zero {
                what: "the plane cubic".into(),
            });
        }
        Ok(PlaneCubic { c })
    }

    /// The coefficients.
    pub fn coefficients(&self) -> &[BigInt; 10] {
        &self.c
    }

    /// C(u, v, w).
    pub fn eval(&self, x: &[BigInt; 3]) -> BigInt {
        let mut s = BigInt::zero();
        for (c, &(i, j, k)) in self.c.iter().zip(PLANE_CUBIC_MONOMIALS.iter()) {
            if !c.is_zero() {
                s += c * x[0].pow(i) * x[1].pow(j) * x[2].pow(k);
            }
        }
        s
    }

    /// ∂C/∂u, ∂C/∂v, ∂C/∂w at (u, v, w).
    pub(crate) fn gradient(&self, x: &[BigInt; 3]) -> [BigInt; 3] {
        let mut g = [BigInt::zero(), BigInt::zero(), BigInt::zero()];
        for (c, &(i, j, k)) in self.c.iter().zip(PLANE_CUBIC_MONOMIALS.iter()) {
            if c.is_zero() {
                continue;
            }
            let e = [i, j, k];
            for (var, gv) in g.iter_mut().enumerate() {
                if e[var] == 0 {
                    continue;
                }
                let mut term = c * BigInt::from(e[var]);
                for (o, &eo) in e.iter().enumerate() {
                    let pw = if o == var { eo - 1 } else { eo };
                    term *= x[o].pow(pw);
                }
                *gv += term;
            }
        }
        g
    }

    /// Exact solubility over Q_p, with a witness when soluble.
    ///
    /// Cost: one budget unit per residue class visited and p² per split.
    ///
    /// # Errors
    /// [`Error::BudgetExhausted`] when the budget runs out, or when a class
    /// must be split at a prime p ≥ 2³¹ (the verdict is then unknown;
    /// nothing is guessed).
    pub fn soluble_at(&self, p: &Prime, budget: &mut Budget) -> Result<Option<PlaneCubicWitness>> {
        let pv = p.get();
        for chart in 0..3 {
            let g = self.chart(chart, pv);
            if let Some((s, t)) = tree(&g, pv, budget)? {
                let point = match chart {
                    0 => [s, t, BigInt::one()],
                    1 => [s, BigInt::one(), pv * t],
                    _ => [BigInt::one(), pv * s, pv * t],
                };
                let w = PlaneCubicWitness { point };
                if !w.verify(self, pv) {
                    return Err(Error::Internal {
                        check: "a local witness of a plane cubic re-checks".into(),
                    });
                }
                return Ok(Some(w));
            }
        }
        Ok(None)
    }

    /// g(s, t) on a chart, as coefficients g\[a\]\[b\] of s^a t^b.
    fn chart(&self, chart: usize, p: &BigInt) -> [[BigInt; 4]; 4] {
        let mut g: [[BigInt; 4]; 4] = Default::default();
        for (c, &(i, j, k)) in self.c.iter().zip(PLANE_CUBIC_MONOMIALS.iter()) {
            let (a, b, scale) = match chart {
                0 => (i, j, 0),
                1 => (i, k, k),
                _ => (j, k, j + k),
            };
            g[a as usize][b as usize] += c * p.pow(scale);
        }
        g
    }
}

impl PlaneCubicWitness {
    /// Re-checks the witness for `cubic` at `p`, exactly (module docs).
    pub fn verify(&self, cubic: &PlaneCubic, p: &BigInt) -> bool {
        if self.point.iter().all(|x| (x % p).is_zero()) {
            return false;
        }
        let z = cubic.eval(&self.point);
        if z.is_zero() {
            return true;
        }
        let vz = val(&z, p);
        cubic
            .gradient(&self.point)
            .iter()
            .any(|d| !d.is_zero() && vz > 2 * val(d, p))
    }
}

fn binom(n: usize, k: usize) -> i64 {
    match (n, k) {
        (_, 0) => 1,
        (n, k) if k == n => 1,
        (2, 1) => 2,
        (3, 1) | (3, 2) => 3,
        _ => 0,
    }
}

/// The Taylor coefficients T_ab of g at (s, t).
fn taylor(g: &[[BigInt; 4]; 4], s: &BigInt, t: &BigInt) -> [[BigInt; 4]; 4] {
    let sp: Vec<BigInt> = (0..4).map(|e| s.pow(e)).collect();
    let tp: Vec<BigInt> = (0..4).map(|e| t.pow(e)).collect();
    let mut out: [[BigInt; 4]; 4] = Default::default();
    for a in 0..4 {
        for b in 0..4 - a {
            let mut acc = BigInt::zero();
            for i in a..4 {
                for j in b..4 - i {
                    if g[i][j].is_zero() {
                        continue;
                    }
                    acc += &g[i][j] * binom(i, a) * binom(j, b) * &sp[i - a] * &tp[j - b];
                }
            }
            out[a][b] = acc;
        }
    }
    out
}

/// The tree of one chart: a class (s₀, t₀) holding a zero of g, or None.
fn tree(g: &[[BigInt; 4]; 4], p: &BigInt, budget: &mut Budget) -> Result<Option<(BigInt, BigInt)>> {
    let exhausted = || Error::BudgetExhausted {
        stage: "local solubility of a plane cubic".into(),
    };
    let pu = p.to_u64().unwrap_or(u64::MAX);
    let mut stack: Vec<(BigInt, BigInt, u32)> = vec![(BigInt::zero(), BigInt::zero(), 0)];
    while let Some((s0, t0, n)) = stack.pop() {
        budget.spend(1).map_err(|_| exhausted())?;
        let tc = taylor(g, &s0, &t0);
        let g0 = &tc[0][0];
        if g0.is_zero() {
            return Ok(Some((s0, t0)));
        }
        let v0 = val(g0, p);
        let mut bound = u64::MAX;
        for (a, row) in tc.iter().enumerate() {
            for (b, c) in row.iter().enumerate() {
                if (a, b) != (0, 0) && a + b <= 3 && !c.is_zero() {
                    bound = bound.min(u64::from(n) * (a + b) as u64 + val(c, p));
                }
            }
        }
        if v0 < bound {
            continue;
        }
        let hensel = [&tc[1][0], &tc[0][1]]
            .iter()
            .any(|d| !d.is_zero() && v0 > 2 * val(d, p));
        if hensel {
            return Ok(Some((s0, t0)));
        }
        budget
            .spend(pu.saturating_mul(pu))
            .map_err(|_| exhausted())?;
        let step = p.pow(n);
        // g(s₀ + pⁿh, t₀ + pⁿk) = p^c·G(h, k) with G primitive; a child
        // (h, k) ≡ (i, j) mod p with G(i, j) ≢ 0 mod p keeps the valuation
        // c below its bound (at least c + 1), so only the zeros of G mod p
        // are kept (at most 6p of them; the test runs in machine words
        // for p < 2^31).
        if pu >= 1 << 31 {
            return Err(Error::BudgetExhausted {
                stage: format!("local solubility of a plane cubic at the large prime {p}"),
            });
        }
        let gm = shifted_mod_p(&tc, p, n);
        let pw = u128::from(pu);
        for ii in 0..pu {
            let h = column(&gm, ii, pu);
            let s = &s0 + BigInt::from(ii) * &step;
            for jj in 0..pu {
                let x = u128::from(jj);
                if (((h[3] * x + h[2]) % pw * x + h[1]) % pw * x + h[0]) % pw == 0 {
                    stack.push((s.clone(), &t0 + BigInt::from(jj) * &step, n + 1));
                }
            }
        }
    }
    Ok(None)
}

/// The coefficients G_ab mod p of G(h, k) = g(s₀ + pⁿh, t₀ + pⁿk)/p^c
/// (c the least valuation of its coefficients), from the Taylor
/// coefficients T_ab of g at (s₀, t₀); p < 2^31.
fn shifted_mod_p(tc: &[[BigInt; 4]; 4], p: &BigInt, n: u32) -> [[u128; 4]; 4] {
    let mut scaled: [[BigInt; 4]; 4] = Default::default();
    let mut c = u64::MAX;
    for a in 0..4 {
        for b in 0..4 - a {
            let x = &tc[a][b] * p.pow(n * (a + b) as u32);
            if !x.is_zero() {
                c = c.min(val(&x, p));
            }
            scaled[a][b] = x;
        }
    }
    let pc = p.pow(u32::try_from(c).unwrap_or(0));
    let mut out = [[0u128; 4]; 4];
    for a in 0..4 {
        for b in 0..4 - a {
            let r = (&scaled[a][b] / &pc) % p;
            let r = if r.is_negative() { r + p } else { r };
            out[a][b] = r.to_u64().map_or(0, u128::from);
        }
    }
    out
}

/// The coefficients in k of G(i, k) mod p.
fn column(gm: &[[u128; 4]; 4], i: u64, p: u64) -> [u128; 4] {
    let pw = u128::from(p);
    let x = u128::from(i);
    let ip = [1, x % pw, x * x % pw, x * x % pw * x % pw];
    let mut h = [0u128; 4];
    for (a, row) in gm.iter().enumerate() {
        for (b, &c) in row.iter().enumerate() {
            if a + b <= 3 {
                h[b] = (h[b] + c * ip[a]) % pw;
            }
        }
    }
    h
}
