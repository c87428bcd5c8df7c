//! A quadratic field K = Q(√D) (D square-free, D ≠ 0, 1) for the descent
//! via 3-isogeny: ideals as binary quadratic forms, reduction with the
//! multiplier recorded, the class group by reduced forms (D < 0) or by
//! cycles of reduced forms (D > 0), its 3-part, the fundamental unit
//! (D > 0, one period of the cycle of the unit ideal, which is the
//! continued fraction of ω), and the norm-one part of the group
//! K(S,3) = {α ∈ K*/K*³ : (α) is a cube times ideals above S}.
//!
//! # Ideals and forms
//! Δ is the discriminant of K (D if D ≡ 1 mod 4, else 4D). A primitive
//! ideal is I = Z·a + Z·(b + √Δ)/2 with 4a | b² − Δ; it is the form
//! (a, b, (b² − Δ)/(4a)) (Cohen, "A Course in Computational Algebraic
//! Number Theory", §5.2 and Prop. 5.2.8, from memory). For
//! β = (b + √Δ)/2 ∈ I, the ideal (β̄/a)·I is the primitive ideal
//! Z·|c| + Z·(−b + √Δ)/2 with c = (b² − Δ)/(4a); this one step, with b
//! first moved to its normal range modulo 2a, is Gauss's reduction of a
//! definite form (Cohen §5.4, Algorithm 5.4.2) and the reduction
//! operator ρ of an indefinite one (Cohen §5.6, Definition 5.6.4), here
//! with the multiplier β̄/a kept, so that every reduced ideal comes with
//! an element λ and J = λ·I. Products of ideals are computed as Z-lattices
//! (the Hermite normal form of the four products of basis elements).
//!
//! # Class group
//! For Δ < 0 every class holds exactly one reduced form |b| ≤ a ≤ c
//! (b ≥ 0 when |b| = a or a = c) (Cohen §5.3). For Δ > 0 the reduced ideals
//! (0 < b < √Δ, √Δ − b < 2a < √Δ + b) of a class form one cycle under ρ
//! (Cohen §5.6–5.7, from memory), and the least (a, b) of the cycle names
//! the class. A class is principal when its name is the unit ideal
//! (a = 1); walking to it gives a generator. The group law is the product
//! of ideals followed by the name of the class.
//!
//! # The group K(S,3), norm one
//! Complex conjugation σ acts on K*/K*³; since 2 is invertible mod 3 the
//! group splits into the parts where σ = 1 (the image of Q*/Q*³) and
//! σ = −1, and the latter is the kernel of the norm to Q*/Q*³. With
//! h = 3^e·h′, A the 3-part of the class group, s split primes 𝔭ᵢ𝔭̄ᵢ = pᵢ
//! of S and gᵢ the class of 𝔭ᵢ·𝔭̄ᵢ², its basis is
//! * the fundamental unit ε (D > 0; −1 is a cube);
//! * for each e in a basis of W = {e ∈ F3^s : ∏ gᵢ^eᵢ ∈ Cl³}, a generator
//!   of ∏ (𝔭ᵢ𝔭̄ᵢ²)^eᵢ·𝔜³, with 𝔜 an ideal whose cube is the inverse class;
//! * for each 𝔛 in a basis of A\[3\], a generator of 𝔛³,
//!
//! from the exact sequence 0 → O_S*/O_S*³ → K(S,3) → Cl_S\[3\] → 0
//! (Cohen, "Advanced Topics in Computational Number Theory", §5.2.2, from
//! memory); the dimensions add up to rank(units) + dim W + dim A\[3\].
//! Every basis element δ has norm n³ exactly.

use std::collections::{HashMap, HashSet};

use num_bigint::BigInt;
use num_integer::{Integer, Roots};
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

use crate::arith::word::{mul_mod, pow_mod};
use crate::budget::Budget;
use crate::error::{Error, Result};
use crate::local::{legendre_u64, sqrt_mod_prime, Prime};

/// (a + b√D)/d with d > 0 and gcd(a, b, d) = 1.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub(crate) struct QElt {
    pub(crate) a: BigInt,
    pub(crate) b: BigInt,
    pub(crate) d: BigInt,
}

impl QElt {
    pub(crate) fn new(a: BigInt, b: BigInt, d: BigInt) -> QElt {
        let (mut a, mut b, mut d) = (a, b, d);
        if d.is_negative() {
            a = -a;
            b = -b;
            d = -d;
        }
        let g = a.gcd(&b).gcd(&d);
        if !g.is_zero() && !g.is_one() {
            a /= &g;
            b /= &g;
            d /= &g;
        }
        QElt { a, b, d }
    }

    pub(crate) fn one() -> QElt {
        QElt::new(BigInt::one(), BigInt::zero(), BigInt::one())
    }

    pub(crate) fn mul(&self, o: &QElt, dd: &BigInt) -> QElt {
        QElt::new(
            &self.a * &o.a + dd * &self.b * &o.b,
            &self.a * &o.b + &self.b * &o.a,
            &self.d * &o.d,
        )
    }

    /// The inverse (self ≠ 0).
    pub(crate) fn inv(&self, dd: &BigInt) -> QElt {
        let n = &self.a * &self.a - dd * &self.b * &self.b;
        QElt::new(&self.a * &self.d, -&self.b * &self.d, n)
    }

    pub(crate) fn norm(&self, dd: &BigInt) -> BigRational {
        BigRational::new(
            &self.a * &self.a - dd * &self.b * &self.b,
            &self.d * &self.d,
        )
    }

    pub(crate) fn bits(&self) -> u64 {
        self.a.bits().max(self.b.bits()).max(self.d.bits())
    }
}

/// An ideal g·(Z·a + Z·(b + √Δ)/2), primitive part (a, b).
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub(crate) struct Ideal {
    pub(crate) g: BigInt,
    pub(crate) a: BigInt,
    pub(crate) b: BigInt,
}

impl Ideal {
    pub(crate) fn norm(&self) -> BigInt {
        &self.g * &self.g * &self.a
    }
}

/// A class named by its reduced primitive ideal (a, b).
pub(crate) type Class = (BigInt, BigInt);

/// Limits on the field computations.
#[derive(Debug, Clone, Copy)]
pub(crate) struct FieldLimits {
    pub(crate) max_discriminant: u64,
    pub(crate) max_class_number: u64,
    pub(crate) max_unit_bits: u64,
}

fn exhausted(stage: String) -> Error {
    Error::BudgetExhausted { stage }
}

fn spend(budget: &mut Budget, units: u64, stage: &str) -> Result<()> {
    budget
        .spend(units)
        .map_err(|_| exhausted(stage.to_string()))
}

/// The field Q(√D) with its discriminant.
#[derive(Debug, Clone)]
pub(crate) struct QuadField {
    pub(crate) d: BigInt,
    pub(crate) disc: BigInt,
    /// √Δ = f·√D.
    f: BigInt,
    /// Δ mod 2.
    d0: BigInt,
    /// ⌊√Δ⌋ for Δ > 0.
    s: BigInt,
    limits: FieldLimits,
}

impl QuadField {
    /// Q(√D) for square-free D ∉ {0, 1}.
    pub(crate) fn new(d: BigInt, limits: FieldLimits) -> Result<QuadField> {
        if d.is_zero() || d.is_one() {
            return Err(Error::InvalidArgument {
                reason: format!("Q(√{d}) is not a quadratic field"),
            });
        }
        let (disc, f) = if d.mod_floor(&BigInt::from(4)).is_one() {
            (d.clone(), BigInt::one())
        } else {
            (&d * 4, BigInt::from(2))
        };
        if disc.abs() > BigInt::from(limits.max_discriminant) {
            return Err(exhausted(format!(
                "the class group of Q(√{d}): |disc| = {} is above the limit {}",
                disc.abs(),
                limits.max_discriminant
            )));
        }
        let d0 = disc.mod_floor(&BigInt::from(2));
        let s = if disc.is_positive() {
            disc.sqrt()
        } else {
            BigInt::zero()
        };
        Ok(QuadField {
            d,
            disc,
            f,
            d0,
            s,
            limits,
        })
    }

    fn real(&self) -> bool {
        self.disc.is_positive()
    }

    /// (b − √Δ)/(2a).
    fn step_multiplier(&self, a: &BigInt, b: &BigInt) -> QElt {
        QElt::new(b.clone(), -&self.f, a * 2)
    }

    fn c_of(&self, a: &BigInt, b: &BigInt) -> BigInt {
        (b * b - &self.disc) / (a * 4)
    }

    /// b moved to its normal range modulo 2a.
    fn normalize(&self, a: &BigInt, b: &BigInt) -> BigInt {
        let two_a: BigInt = a * 2;
        if self.real() && a <= &self.s {
            &self.s - (&self.s - b).mod_floor(&two_a)
        } else {
            let r = b.mod_floor(&two_a);
            if &r > a {
                r - two_a
            } else {
                r
            }
        }
    }

    fn is_reduced_real(&self, a: &BigInt, b: &BigInt) -> bool {
        b.is_positive() && b <= &self.s && (b + a * 2) > self.s && (a * 2 - b) <= self.s
    }

    /// One ρ step from (a, b) (b normalised): the next ideal and the
    /// multiplier.
    fn rho(&self, a: &BigInt, b: &BigInt) -> (BigInt, BigInt, QElt) {
        let c = self.c_of(a, b).abs();
        let lam = self.step_multiplier(a, b);
        let nb = self.normalize(&c, &-b);
        (c, nb, lam)
    }

    /// A reduced ideal J = λ·I, with λ when `track`.
    fn reduce(
        &self,
        i: &Ideal,
        track: bool,
        budget: &mut Budget,
    ) -> Result<(BigInt, BigInt, QElt)> {
        let mut lam = QElt::new(BigInt::one(), BigInt::zero(), i.g.clone());
        let mut a = i.a.clone();
        let mut b = self.normalize(&a, &i.b);
        loop {
            spend(budget, 1, "reduction of an ideal")?;
            if self.real() {
                if self.is_reduced_real(&a, &b) {
                    return Ok((a, b, lam));
                }
            } else {
                let c = self.c_of(&a, &b);
                if a < c || (a == c && !b.is_negative()) {
                    return Ok((a, b, lam));
                }
            }
            let (na, nb, l) = self.rho(&a, &b);
            if track {
                lam = lam.mul(&l, &self.d);
            }
            a = na;
            b = nb;
        }
    }

    /// The name of the class of `i` (see the module docs).
    pub(crate) fn class_of(&self, i: &Ideal, budget: &mut Budget) -> Result<Class> {
        let (a, b, _) = self.reduce(i, false, budget)?;
        if !self.real() {
            return Ok((a, b));
        }
        let start = (a.clone(), b.clone());
        let mut best = start.clone();
        let (mut a, mut b) = (a, b);
        loop {
            spend(budget, 1, "cycle of reduced ideals")?;
            let (na, nb, _) = self.rho(&a, &b);
            a = na;
            b = nb;
            if (a.clone(), b.clone()) == start {
                return Ok(best);
            }
            if (&a, &b) < (&best.0, &best.1) {
                best = (a.clone(), b.clone());
            }
        }
    }

    /// A generator of `i` when it is principal.
    pub(crate) fn generator(&self, i: &Ideal, budget: &mut Budget) -> Result<Option<QElt>> {
        let (mut a, mut b, mut lam) = self.reduce(i, true, budget)?;
        if a.is_one() {
            return Ok(Some(lam.inv(&self.d)));
        }
        if !self.real() {
            return Ok(None);
        }
        let start = (a.clone(), b.clone());
        loop {
            spend(budget, 1, "cycle of reduced ideals")?;
            let (na, nb, l) = self.rho(&a, &b);
            lam = lam.mul(&l, &self.d);
            let cap = self
                .limits
                .max_unit_bits
                .saturating_mul(2)
                .saturating_add(i.norm().bits())
                .saturating_add(64);
            if lam.bits() > cap {
                return Err(exhausted(format!(
                    "a generator in Q(√{}): above the height limit of {} bits",
                    self.d, self.limits.max_unit_bits
                )));
            }
            a = na;
            b = nb;
            if a.is_one() {
                return Ok(Some(lam.inv(&self.d)));
            }
            if (a.clone(), b.clone()) == start {
                return Ok(None);
            }
        }
    }

    /// The fundamental unit (Δ > 0): the multiplier of one period of the
    /// cycle of the unit ideal.
    pub(crate) fn fundamental_unit(&self, budget: &mut Budget) -> Result<QElt> {
        let start = (BigInt::one(), self.normalize(&BigInt::one(), &self.d0));
        let (mut a, mut b) = start.clone();
        let mut lam = QElt::one();
        loop {
            spend(budget, 1, "the fundamental unit")?;
            let (na, nb, l) = self.rho(&a, &b);
            lam = lam.mul(&l, &self.d);
            if lam.bits() > self.limits.max_unit_bits {
                return Err(exhausted(format!(
                    "the fundamental unit of Q(√{}): above the height limit of {} bits",
                    self.d, self.limits.max_unit_bits
                )));
            }
            a = na;
            b = nb;
            if (a.clone(), b.clone()) == start {
                break;
            }
        }
        let n = lam.norm(&self.d);
        if !(n.abs().is_one()) || !lam.d.is_one() && lam.d != BigInt::from(2) {
            return Err(Error::Internal {
                check: format!("the period multiplier of Q(√{}) is a unit", self.d),
            });
        }
        Ok(lam)
    }

    /// The unit ideal.
    pub(crate) fn unit_ideal(&self) -> Ideal {
        Ideal {
            g: BigInt::one(),
            a: BigInt::one(),
            b: self.d0.clone(),
        }
    }

    pub(crate) fn ideal_of(&self, c: &Class) -> Ideal {
        Ideal {
            g: BigInt::one(),
            a: c.0.clone(),
            b: c.1.clone(),
        }
    }

    /// The conjugate ideal.
    pub(crate) fn conj(&self, i: &Ideal) -> Ideal {
        Ideal {
            g: i.g.clone(),
            a: i.a.clone(),
            b: self.normalize(&i.a, &-&i.b),
        }
    }

    /// Basis of an ideal in coordinates (x, y) for x + y·ω,
    /// ω = (Δ mod 2 + √Δ)/2.
    fn basis(&self, i: &Ideal) -> [(BigInt, BigInt); 2] {
        let x = (&i.b - &self.d0) / 2;
        [(&i.g * &i.a, BigInt::zero()), (&i.g * x, i.g.clone())]
    }

    fn mul_coords(&self, p: &(BigInt, BigInt), q: &(BigInt, BigInt)) -> (BigInt, BigInt) {
        let w2c = (&self.disc - &self.d0) / 4; // ω² = Δ₀ω + (Δ − Δ₀)/4
        let yy = &p.1 * &q.1;
        (
            &p.0 * &q.0 + &yy * &w2c,
            &p.0 * &q.1 + &p.1 * &q.0 + &yy * &self.d0,
        )
    }

    /// The product of two ideals.
    pub(crate) fn mul(&self, i: &Ideal, j: &Ideal) -> Result<Ideal> {
        let bi = self.basis(i);
        let bj = self.basis(j);
        let mut v = Vec::with_capacity(4);
        for p in &bi {
            for q in &bj {
                v.push(self.mul_coords(p, q));
            }
        }
        self.lattice_ideal(&v)
    }

    /// The ideal spanned over Z by the given elements (coordinates on 1, ω).
    fn lattice_ideal(&self, v: &[(BigInt, BigInt)]) -> Result<Ideal> {
        // Hermite normal form Z(A, 0) + Z(B, C).
        let mut first = (BigInt::zero(), BigInt::zero());
        let mut xs: Vec<BigInt> = Vec::new();
        for w in v {
            if first.1.is_zero() && w.1.is_zero() {
                xs.push(w.0.clone());
                continue;
            }
            if first.1.is_zero() {
                xs.push(first.0.clone());
                first = w.clone();
                continue;
            }
            let e = first.1.extended_gcd(&w.1);
            let g = e.gcd;
            let nf = (&e.x * &first.0 + &e.y * &w.0, g.clone());
            let other = (&w.1 / &g) * &first.0 - (&first.1 / &g) * &w.0;
            xs.push(other);
            first = nf;
        }
        let mut a = BigInt::zero();
        for x in &xs {
            a = a.gcd(x);
        }
        if a.is_zero() || first.1.is_zero() {
            return Err(Error::Internal {
                check: "an ideal of a quadratic field has rank 2".into(),
            });
        }
        let (mut bx, mut c) = first;
        if c.is_negative() {
            c = -c;
            bx = -bx;
        }
        let bx = bx.mod_floor(&a);
        let g = a.gcd(&bx).gcd(&c);
        if c != g {
            return Err(Error::Internal {
                check: "a lattice of a quadratic field is an ideal".into(),
            });
        }
        let pa = &a / &g;
        let pb: BigInt = (&bx / &g) * 2 + &self.d0;
        if !(&pb * &pb - &self.disc).is_multiple_of(&(&pa * 4)) {
            return Err(Error::Internal {
                check: "a lattice of a quadratic field is an ideal".into(),
            });
        }
        let pb = self.normalize(&pa, &pb);
        Ok(Ideal { g, a: pa, b: pb })
    }

    /// The ideal λ·I (λ must map I into O_K; for checks).
    #[cfg(test)]
    pub(crate) fn scale(&self, lam: &QElt, i: &Ideal) -> Result<Ideal> {
        // λ = (a + b√D)/d = (x + yω)/d' in coordinates.
        let coords = |e: &QElt| -> Option<(BigInt, BigInt, BigInt)> {
            // √D = (2ω − Δ₀)/f.
            // a + b(2ω − Δ₀)/f = (a f − b Δ₀ + 2bω)/f
            let x = &e.a * &self.f - &e.b * &self.d0;
            let y = &e.b * 2;
            Some((x, y, &e.d * &self.f))
        };
        let (x, y, den) = coords(lam).ok_or_else(|| Error::Internal {
            check: "coordinates".into(),
        })?;
        let mut v = Vec::new();
        for p in &self.basis(i) {
            let q = self.mul_coords(&(x.clone(), y.clone()), p);
            if !q.0.is_multiple_of(&den) || !q.1.is_multiple_of(&den) {
                return Err(Error::Internal {
                    check: "λ·I is integral".into(),
                });
            }
            v.push((q.0 / &den, q.1 / &den));
        }
        self.lattice_ideal(&v)
    }

    /// The classes: every reduced form (Δ < 0) or the name of every cycle
    /// of reduced ideals (Δ > 0).
    pub(crate) fn classes(&self, budget: &mut Budget) -> Result<Vec<Class>> {
        let disc = self
            .disc
            .to_i64()
            .ok_or_else(|| exhausted("class group".into()))?;
        let mut out = Vec::new();
        let limit = self.limits.max_class_number;
        let too_many = |n: usize| -> Result<()> {
            if n as u64 > limit {
                return Err(exhausted(format!(
                    "the class group of Q(√{}): class number above the limit {limit}",
                    disc
                )));
            }
            Ok(())
        };
        if disc < 0 {
            let amax = ((-disc) / 3).sqrt();
            for a in 1..=amax.max(1) {
                spend(budget, (2 * a) as u64, "the class group")?;
                for b in (-a + 1)..=a {
                    if (b - disc).rem_euclid(2) != 0 {
                        continue;
                    }
                    let num = b * b - disc;
                    if num % (4 * a) != 0 {
                        continue;
                    }
                    let c = num / (4 * a);
                    if c < a || (c == a && b < 0) {
                        continue;
                    }
                    out.push((BigInt::from(a), BigInt::from(b)));
                    too_many(out.len())?;
                }
            }
            return Ok(out);
        }
        let s = disc.sqrt();
        let mut reduced: Vec<(i64, i64)> = Vec::new();
        for b in 1..=s {
            if (b - disc).rem_euclid(2) != 0 {
                continue;
            }
            let n = (disc - b * b) / 4;
            let lo = (s + 2 - b) / 2; // 2a > s − b
            let hi = (s + b) / 2; // 2a − b ≤ s
            spend(budget, (hi - lo + 1).max(1) as u64, "the class group")?;
            for a in lo.max(1)..=hi {
                if n % a == 0 {
                    reduced.push((a, b));
                }
            }
        }
        let mut seen: HashSet<(i64, i64)> = HashSet::new();
        for &(a, b) in &reduced {
            if seen.contains(&(a, b)) {
                continue;
            }
            let start = (BigInt::from(a), BigInt::from(b));
            let mut best = start.clone();
            let (mut x, mut y) = start.clone();
            loop {
                spend(budget, 1, "cycle of reduced ideals")?;
                if let (Some(xi), Some(yi)) = (x.to_i64(), y.to_i64()) {
                    seen.insert((xi, yi));
                }
                let (nx, ny, _) = self.rho(&x, &y);
                x = nx;
                y = ny;
                if (x.clone(), y.clone()) == start {
                    break;
                }
                if (&x, &y) < (&best.0, &best.1) {
                    best = (x.clone(), y.clone());
                }
            }
            out.push(best);
            too_many(out.len())?;
        }
        Ok(out)
    }

    fn class_mul(&self, x: &Class, y: &Class, budget: &mut Budget) -> Result<Class> {
        let p = self.mul(&self.ideal_of(x), &self.ideal_of(y))?;
        self.class_of(&p, budget)
    }

    fn class_pow(&self, x: &Class, e: &BigInt, budget: &mut Budget) -> Result<Class> {
        let mut r = self.class_of(&self.unit_ideal(), budget)?;
        let mut base = x.clone();
        let mut e = e.clone();
        while e.is_positive() {
            if e.is_odd() {
                r = self.class_mul(&r, &base, budget)?;
            }
            base = self.class_mul(&base, &base, budget)?;
            e >>= 1;
        }
        Ok(r)
    }

    fn class_inv(&self, x: &Class, budget: &mut Budget) -> Result<Class> {
        self.class_of(&self.conj(&self.ideal_of(x)), budget)
    }

    /// The prime ideal (p, b) above a split prime p.
    pub(crate) fn prime_above(&self, p: &BigInt) -> Result<Ideal> {
        let b = if p == &BigInt::from(2) {
            BigInt::one()
        } else {
            let pr = Prime::new(p.clone())?;
            let r = sqrt_mod_prime(&self.disc, &pr).ok_or_else(|| Error::Internal {
                check: format!("{p} splits in Q(√{})", self.d),
            })?;
            if (&r - &self.disc).is_odd() {
                r + p
            } else {
                r
            }
        };
        if !(&b * &b - &self.disc).is_multiple_of(&(p * 4)) {
            return Err(Error::Internal {
                check: format!("a prime ideal above {p} in Q(√{})", self.d),
            });
        }
        Ok(Ideal {
            g: BigInt::one(),
            a: p.clone(),
            b: self.normalize(p, &b),
        })
    }

    /// True when p splits in K.
    pub(crate) fn splits(&self, p: &BigInt) -> bool {
        if p == &BigInt::from(2) {
            return self.disc.mod_floor(&BigInt::from(8)) == BigInt::one();
        }
        crate::local::kronecker(&self.disc, p) == 1
    }
}

/// Where a basis element of the norm-one group comes from.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub(crate) enum Origin {
    Unit,
    Primes(Vec<BigInt>),
    Class,
}

/// A basis element δ = a + b√D (integers) with N(δ) = n³.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub(crate) struct MinusGen {
    pub(crate) a: BigInt,
    pub(crate) b: BigInt,
    pub(crate) n: BigInt,
    pub(crate) origin: Origin,
}

/// δ made integral (times a cube) with small cube factors removed, and n.
fn integral_form(e: &QElt, dd: &BigInt, origin: Origin) -> Result<MinusGen> {
    let d2 = &e.d * &e.d;
    let mut a = &e.a * &d2;
    let mut b = &e.b * &d2;
    for p in [2u32, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47] {
        let p3 = BigInt::from(p * p * p);
        while !(a.is_zero() && b.is_zero()) && a.is_multiple_of(&p3) && b.is_multiple_of(&p3) {
            a /= &p3;
            b /= &p3;
        }
    }
    let norm = &a * &a - dd * &b * &b;
    let n = norm.cbrt();
    if &n * &n * &n != norm || norm.is_zero() {
        return Err(Error::Internal {
            check: format!("the norm of {a} + {b}√{dd} is a cube"),
        });
    }
    Ok(MinusGen { a, b, n, origin })
}

/// The 3-part of the class group with the tables the descent needs.
struct ThreePart {
    /// A/A³ coordinates of every element of A.
    coords: HashMap<Class, Vec<u8>>,
    /// a³ ↦ a on A.
    cube_root: HashMap<Class, Class>,
    /// A basis of A\[3\].
    torsion: Vec<Class>,
    /// h = 3^e·m.
    m: BigInt,
    /// M with M ≡ 1 mod 3^e, M ≡ 0 mod m: x ↦ x^M projects onto A.
    proj: BigInt,
    /// Inverse of 3 modulo m.
    inv3: BigInt,
}

fn three_part(field: &QuadField, budget: &mut Budget) -> Result<ThreePart> {
    let classes = field.classes(budget)?;
    let h = BigInt::from(classes.len());
    let mut e = 0u32;
    let mut m = h.clone();
    while m.is_multiple_of(&BigInt::from(3)) {
        m /= 3;
        e += 1;
    }
    let t3 = BigInt::from(3).pow(e);
    // M = m·(m⁻¹ mod 3^e).
    let proj = if e == 0 {
        BigInt::zero()
    } else {
        let inv = m.extended_gcd(&t3).x.mod_floor(&t3);
        &m * inv
    };
    let inv3 = if m.is_one() {
        BigInt::zero()
    } else {
        BigInt::from(3).extended_gcd(&m).x.mod_floor(&m)
    };
    let one = field.class_of(&field.unit_ideal(), budget)?;
    let mut elems: Vec<Class> = vec![one.clone()];
    if e > 0 {
        for c in &classes {
            if c != &one && field.class_pow(c, &t3, budget)? == one {
                elems.push(c.clone());
            }
        }
    }
    let set: HashSet<Class> = elems.iter().cloned().collect();
    let mut cube_root = HashMap::new();
    let mut cubes: HashSet<Class> = HashSet::new();
    let mut torsion_set: Vec<Class> = Vec::new();
    for x in &elems {
        let c = field.class_pow(x, &BigInt::from(3), budget)?;
        if c == one {
            torsion_set.push(x.clone());
        }
        cubes.insert(c.clone());
        cube_root.insert(c, x.clone());
    }
    // A basis of A/A³ and coordinates.
    let mut basis: Vec<Class> = Vec::new();
    let mut span: HashSet<Class> = cubes.clone();
    for x in &elems {
        if span.contains(x) {
            continue;
        }
        let x2 = field.class_mul(x, x, budget)?;
        let mut next = span.clone();
        for s in &span {
            next.insert(field.class_mul(s, x, budget)?);
            next.insert(field.class_mul(s, &x2, budget)?);
        }
        span = next;
        basis.push(x.clone());
    }
    if span.len() != set.len() {
        return Err(Error::Internal {
            check: "the 3-part of the class group is spanned".into(),
        });
    }
    let r = basis.len();
    let mut coords: HashMap<Class, Vec<u8>> = HashMap::new();
    let mut combos: Vec<(Vec<u8>, Class)> = vec![(vec![0u8; r], one.clone())];
    for (i, bx) in basis.iter().enumerate() {
        let mut next = Vec::with_capacity(combos.len() * 3);
        for (v, c) in &combos {
            let mut cur = c.clone();
            for k in 0..3u8 {
                let mut w = v.clone();
                w[i] = k;
                next.push((w, cur.clone()));
                cur = field.class_mul(&cur, bx, budget)?;
            }
        }
        combos = next;
    }
    for (v, c) in &combos {
        for t in &cubes {
            coords.insert(field.class_mul(c, t, budget)?, v.clone());
        }
    }
    // A basis of A[3].
    let mut torsion: Vec<Class> = Vec::new();
    let mut tspan: HashSet<Class> = [one.clone()].into_iter().collect();
    for x in &torsion_set {
        if tspan.contains(x) {
            continue;
        }
        let x2 = field.class_mul(x, x, budget)?;
        let mut next = tspan.clone();
        for s in &tspan {
            next.insert(field.class_mul(s, x, budget)?);
            next.insert(field.class_mul(s, &x2, budget)?);
        }
        tspan = next;
        torsion.push(x.clone());
    }
    if torsion.len() != r {
        return Err(Error::Internal {
            check: "A[3] and A/A³ have the same dimension".into(),
        });
    }
    Ok(ThreePart {
        coords,
        cube_root,
        torsion,
        m,
        proj,
        inv3,
    })
}

/// A basis of the kernel of the map F3^s → F3^r given by `rows` (s rows).
pub(crate) fn f3_kernel(rows: &[Vec<u8>], r: usize) -> Vec<Vec<u8>> {
    let s = rows.len();
    // Augment [rows | I] and eliminate on the first r columns.
    let mut m: Vec<Vec<u8>> = rows
        .iter()
        .enumerate()
        .map(|(i, row)| {
            let mut v = row.clone();
            v.resize(r, 0);
            v.extend((0..s).map(|j| u8::from(i == j)));
            v
        })
        .collect();
    let mut pivot_row = 0;
    for col in 0..r {
        let Some(p) = (pivot_row..s).find(|&i| m[i][col] != 0) else {
            continue;
        };
        m.swap(pivot_row, p);
        let inv = if m[pivot_row][col] == 1 { 1 } else { 2 };
        m[pivot_row] = m[pivot_row].iter().map(|x| x * inv % 3).collect();
        for i in 0..s {
            if i != pivot_row && m[i][col] != 0 {
                let c = m[i][col];
                let piv = m[pivot_row].clone();
                m[i] = m[i]
                    .iter()
                    .zip(&piv)
                    .map(|(x, y)| (x + 3 * 3 - c * y % 3) % 3)
                    .collect();
            }
        }
        pivot_row += 1;
    }
    m[pivot_row..].iter().map(|row| row[r..].to_vec()).collect()
}

/// The basis of the norm-one part of K(S,3) (module docs), S given by
/// its rational primes.
pub(crate) fn minus_part_basis(
    field: &QuadField,
    primes: &[BigInt],
    budget: &mut Budget,
) -> Result<Vec<MinusGen>> {
    let dd = field.d.clone();
    let mut out = Vec::new();
    if field.real() {
        let eps = field.fundamental_unit(budget)?;
        out.push(integral_form(&eps, &dd, Origin::Unit)?);
    }
    let tp = three_part(field, budget)?;
    let split: Vec<&BigInt> = primes.iter().filter(|p| field.splits(p)).collect();
    let mut pieces: Vec<Ideal> = Vec::new();
    let mut rows: Vec<Vec<u8>> = Vec::new();
    let r = tp.torsion.len();
    for p in &split {
        let pp = field.prime_above(p)?;
        let pc = field.conj(&pp);
        let j = field.mul(&pp, &field.mul(&pc, &pc)?)?;
        let g = field.class_of(&j, budget)?;
        let ga = if r == 0 {
            g.clone()
        } else {
            field.class_pow(&g, &tp.proj, budget)?
        };
        let row = if r == 0 {
            Vec::new()
        } else {
            tp.coords.get(&ga).cloned().ok_or_else(|| Error::Internal {
                check: "a class of 3-power order has coordinates".into(),
            })?
        };
        rows.push(row);
        pieces.push(j);
    }
    let kernel = f3_kernel(&rows, r);
    let one = field.class_of(&field.unit_ideal(), budget)?;
    for e in &kernel {
        let mut x = field.unit_ideal();
        let mut used = Vec::new();
        for ((j, &ei), p) in pieces.iter().zip(e).zip(&split) {
            for _ in 0..ei {
                x = field.mul(&x, j)?;
            }
            if ei != 0 {
                used.push((*p).clone());
            }
        }
        let xc = field.class_of(&x, budget)?;
        let xinv = field.class_inv(&xc, budget)?;
        // y³ = x⁻¹: the 3-part from the table, the rest by 3⁻¹ mod m.
        let (ya, rest) = if r == 0 && tp.proj.is_zero() {
            (one.clone(), xinv.clone())
        } else {
            let xa = field.class_pow(&xinv, &tp.proj, budget)?;
            let ya = tp
                .cube_root
                .get(&xa)
                .cloned()
                .ok_or_else(|| Error::Internal {
                    check: "a class of 3-power order in W is a cube".into(),
                })?;
            let xa_inv = field.class_inv(&xa, budget)?;
            (ya, field.class_mul(&xinv, &xa_inv, budget)?)
        };
        let yrest = if tp.m.is_one() {
            one.clone()
        } else {
            field.class_pow(&rest, &tp.inv3, budget)?
        };
        let y = field.class_mul(&ya, &yrest, budget)?;
        let yi = field.ideal_of(&y);
        let y3 = field.mul(&yi, &field.mul(&yi, &yi)?)?;
        let ideal = field.mul(&x, &y3)?;
        let gen = field
            .generator(&ideal, budget)?
            .ok_or_else(|| Error::Internal {
                check: format!("the ideal of a W-vector of Q(√{dd}) is principal"),
            })?;
        check_generator(&gen, &ideal, &dd)?;
        out.push(integral_form(&gen, &dd, Origin::Primes(used))?);
    }
    for t in &tp.torsion {
        let ti = field.ideal_of(t);
        let t3 = field.mul(&ti, &field.mul(&ti, &ti)?)?;
        let gen = field
            .generator(&t3, budget)?
            .ok_or_else(|| Error::Internal {
                check: format!("the cube of a class of order 3 of Q(√{dd}) is principal"),
            })?;
        check_generator(&gen, &t3, &dd)?;
        out.push(integral_form(&gen, &dd, Origin::Class)?);
    }
    Ok(out)
}

fn check_generator(gen: &QElt, ideal: &Ideal, dd: &BigInt) -> Result<()> {
    let n = gen.norm(dd);
    if n.abs() != BigRational::from_integer(ideal.norm()) {
        return Err(Error::Internal {
            check: format!("a generator of an ideal of Q(√{dd}) has its norm"),
        });
    }
    Ok(())
}

/// v_𝔭(a + b√D) for integers a, b (not both 0) and the embedding
/// √D ↦ r ∈ Z_p with r ≡ r0 mod p (odd p) or r ≡ 1 mod 4 (p = 2).
pub(crate) fn split_valuation(a: &BigInt, b: &BigInt, dd: &BigInt, p: &BigInt, r0: &BigInt) -> u64 {
    let vp = |z: &BigInt| crate::cubic::local::val(z, p);
    let g = vp(a).min(vp(b));
    let pg = p.pow(g as u32);
    let (a1, b1) = (a / &pg, b / &pg);
    let n = &a1 * &a1 - dd * &b1 * &b1;
    let m = vp(&n) as u32 + 3;
    let r = padic_sqrt(dd, p, r0, m);
    let prec = p.pow(m - 1);
    let z = (&a1 + &b1 * r).mod_floor(&prec);
    g + if z.is_zero() {
        u64::from(m - 1)
    } else {
        vp(&z)
    }
}

fn padic_sqrt(dd: &BigInt, p: &BigInt, r0: &BigInt, m: u32) -> BigInt {
    let pm = p.pow(m);
    if p == &BigInt::from(2) {
        let mut r = BigInt::one();
        for j in 3..m {
            let pj1 = BigInt::one() << (j + 1);
            if !(&r * &r - dd).is_multiple_of(&pj1) {
                r += BigInt::one() << (j - 1);
            }
        }
        return r.mod_floor(&pm);
    }
    let mut r = r0.mod_floor(p);
    let mut prec = 1u32;
    while prec < m {
        prec = (prec * 2).min(m);
        let pk = p.pow(prec);
        let two_r: BigInt = &r * 2;
        let inv = two_r.extended_gcd(&pk).x;
        r = (&r - (&r * &r - dd) * inv).mod_floor(&pk);
    }
    r.mod_floor(&pm)
}

/// The cubic character of a + b√D at the prime above q (split, q ≡ 1 mod
/// 3) where √D ↦ rq, as an exponent of ζ; `None` when not a unit there.
pub(crate) fn cubic_character(a: &BigInt, b: &BigInt, q: u64, rq: u64, zeta: u64) -> Option<u8> {
    let qb = BigInt::from(q);
    let z = (a + b * BigInt::from(rq)).mod_floor(&qb).to_u64()?;
    if z == 0 {
        return None;
    }
    let c = pow_mod(z, (q - 1) / 3, q);
    if c == 1 {
        Some(0)
    } else if c == zeta {
        Some(1)
    } else if c == mul_mod(zeta, zeta, q) {
        Some(2)
    } else {
        None
    }
}

/// An auxiliary prime q ≡ 1 mod 3 split in Q(√D): (q, √D mod q, ζ).
pub(crate) fn auxiliary_prime(dd: &BigInt, q: u64) -> Option<(u64, u64)> {
    if q % 3 != 1 || !crate::arith::is_prime_u64(q) {
        return None;
    }
    let qb = BigInt::from(q);
    let dq = dd.mod_floor(&qb).to_u64()?;
    if dq == 0 || legendre_u64(dq, q) != 1 {
        return None;
    }
    let pr = Prime::small(q).ok()?;
    let rq = sqrt_mod_prime(&BigInt::from(dq), &pr)?.to_u64()?;
    let zeta = (2..q)
        .map(|g| pow_mod(g, (q - 1) / 3, q))
        .find(|&c| c != 1)?;
    Some((rq, zeta))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn limits() -> FieldLimits {
        FieldLimits {
            max_discriminant: 1_000_000,
            max_class_number: 10_000,
            max_unit_bits: 100_000,
        }
    }

    /// Class numbers (analytic class number formula, mpmath) and
    /// fundamental units (sympy's Pell solver) of Q(√D), 1 < |D| ≤ 200,
    /// computed independently by tests/data/quadratic_fields.py with
    /// sympy 1.14.0 and mpmath 1.3.0 (output committed).
    #[test]
    fn class_numbers_and_units_agree_with_an_independent_computation() {
        let data = include_str!("../../tests/data/quadratic_fields.txt");
        let mut n = 0;
        for line in data.lines().filter(|l| !l.starts_with('#')) {
            let v: Vec<i64> = line
                .split_whitespace()
                .map(|t| t.parse().unwrap())
                .collect();
            let (d, h, x, y) = (v[0], v[1], v[2], v[3]);
            if d == -3 {
                continue;
            }
            let f = QuadField::new(BigInt::from(d), limits()).unwrap();
            let mut b = Budget::unlimited();
            assert_eq!(f.classes(&mut b).unwrap().len() as i64, h, "D = {d}");
            if d > 0 {
                let e = f.fundamental_unit(&mut b).unwrap();
                let two = BigInt::from(2);
                assert_eq!(
                    (e.a.abs() * &two / &e.d, e.b.abs() * &two / &e.d),
                    (BigInt::from(x), BigInt::from(y)),
                    "D = {d}"
                );
            }
            n += 1;
        }
        assert!(n > 200);
    }

    #[test]
    fn fundamental_units_have_norm_one() {
        for d in [2i64, 3, 5, 6, 7, 13, 94] {
            let f = QuadField::new(BigInt::from(d), limits()).unwrap();
            let mut b = Budget::unlimited();
            let e = f.fundamental_unit(&mut b).unwrap();
            assert!(e.norm(&f.d).abs().is_one(), "D = {d}: {e:?}");
        }
    }

    #[test]
    fn reduction_multiplier_is_exact() {
        let f = QuadField::new(BigInt::from(-23), limits()).unwrap();
        let mut b = Budget::unlimited();
        let p = f.prime_above(&BigInt::from(2)).unwrap();
        let p3 = f.mul(&p, &f.mul(&p, &p).unwrap()).unwrap();
        let g = f.generator(&p3, &mut b).unwrap().unwrap();
        assert_eq!(g.norm(&f.d).abs(), BigRational::from_integer(8.into()));
        assert_eq!(f.scale(&g, &f.unit_ideal()).unwrap(), p3);
    }
}
