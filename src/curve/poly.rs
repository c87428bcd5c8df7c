//! Dense integer polynomials and their integer roots (crate-internal).
//!
//! The curves layer needs the *integer* roots of a handful of integer
//! polynomials: the 2-division cubic, the division polynomials ψ_ℓ and the
//! "division by ℓ" polynomials φ_ℓ − x_Q ψ_ℓ² of an integral short
//! Weierstrass model. By the Nagell–Lutz theorem [Sil09, VIII.7.2] the
//! x-coordinate of a rational torsion point on such a model is an integer,
//! so integer roots are all that is ever wanted.
//!
//! # Method: p-adic lifting from a prime of squarefree reduction
//! Let f ∈ Z[x] be squarefree over Q with leading coefficient a_n. For all
//! but finitely many primes p (those dividing a_n · disc f), the reduction
//! f mod p is squarefree of the same degree, hence every root of f mod p is
//! simple and, by Hensel's lemma [Ser73, II.2.2], lifts to exactly one root
//! of f in Z_p. An integer root R of f reduces to a root mod p, so R is the
//! lift of one of the at most n roots mod p. Each lift is computed modulo
//! p^k > 2·B, where B bounds |R| (R ≠ 0 divides the constant term), and the
//! balanced residue is tested exactly. The answer is therefore exact; the
//! cost is a brute-force root search mod a small p plus n Newton lifts.
//!
//! Polynomials of degree 1 or 2 (after removing a factor x^k) are solved
//! directly: a division, or the quadratic formula with an exact integer
//! square root of the discriminant.
//!
//! A polynomial of degree ≥ 3 that is not squarefree (never the case for the callers in
//! this layer, which pass polynomials whose roots are proved distinct) is
//! replaced by its squarefree part f / gcd(f, f′) after a few dozen primes
//! fail, which restores the hypothesis.

use crate::arith::word::pow_mod;
use crate::budget::{Budget, Exhausted};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};

/// A dense polynomial with integer coefficients, constant term first.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct ZPoly(pub Vec<BigInt>);

impl ZPoly {
    /// Builds a polynomial and strips leading zeros.
    pub fn new(mut c: Vec<BigInt>) -> ZPoly {
        while c.last().is_some_and(|x| x.is_zero()) {
            c.pop();
        }
        ZPoly(c)
    }

    /// The polynomial `x`.
    pub fn x() -> ZPoly {
        ZPoly(vec![BigInt::zero(), BigInt::one()])
    }

    /// A constant.
    pub fn constant(c: BigInt) -> ZPoly {
        ZPoly::new(vec![c])
    }

    /// Degree; `None` for the zero polynomial.
    pub fn degree(&self) -> Option<usize> {
        if self.0.is_empty() {
            None
        } else {
            Some(self.0.len() - 1)
        }
    }

    /// True for the zero polynomial.
    pub fn is_zero(&self) -> bool {
        self.0.is_empty()
    }

    /// Horner evaluation at an integer.
    pub fn eval(&self, x: &BigInt) -> BigInt {
        let mut acc = BigInt::zero();
        for c in self.0.iter().rev() {
            acc = acc * x + c;
        }
        acc
    }

    /// Horner evaluation modulo `m` (result in [0, m)).
    pub fn eval_mod(&self, x: &BigInt, m: &BigInt) -> BigInt {
        let mut acc = BigInt::zero();
        for c in self.0.iter().rev() {
            acc = (acc * x + c).mod_floor(m);
        }
        acc
    }

    /// Sum.
    pub fn add(&self, o: &ZPoly) -> ZPoly {
        let n = self.0.len().max(o.0.len());
        let mut c = vec![BigInt::zero(); n];
        for (i, x) in self.0.iter().enumerate() {
            c[i] += x;
        }
        for (i, x) in o.0.iter().enumerate() {
            c[i] += x;
        }
        ZPoly::new(c)
    }

    /// Difference.
    pub fn sub(&self, o: &ZPoly) -> ZPoly {
        self.add(&o.scale(&BigInt::from(-1)))
    }

    /// Product.
    pub fn mul(&self, o: &ZPoly) -> ZPoly {
        if self.is_zero() || o.is_zero() {
            return ZPoly(Vec::new());
        }
        let mut c = vec![BigInt::zero(); self.0.len() + o.0.len() - 1];
        for (i, x) in self.0.iter().enumerate() {
            if x.is_zero() {
                continue;
            }
            for (j, y) in o.0.iter().enumerate() {
                c[i + j] += x * y;
            }
        }
        ZPoly::new(c)
    }

    /// Multiplication by an integer.
    pub fn scale(&self, k: &BigInt) -> ZPoly {
        ZPoly::new(self.0.iter().map(|x| x * k).collect())
    }

    /// Formal derivative.
    pub fn derivative(&self) -> ZPoly {
        ZPoly::new(
            self.0
                .iter()
                .enumerate()
                .skip(1)
                .map(|(i, c)| c * BigInt::from(i))
                .collect(),
        )
    }

    /// The gcd of the coefficients (0 for the zero polynomial).
    fn content(&self) -> BigInt {
        let mut g = BigInt::zero();
        for c in &self.0 {
            g = g.gcd(c);
        }
        g
    }

    /// Divides by the content and makes the leading coefficient positive.
    fn primitive(&self) -> ZPoly {
        let g = self.content();
        if g.is_zero() {
            return self.clone();
        }
        let mut p = ZPoly::new(self.0.iter().map(|c| c / &g).collect());
        if p.0.last().is_some_and(|c| c.is_negative()) {
            p = p.scale(&BigInt::from(-1));
        }
        p
    }

    /// Pseudo-remainder of `self` by `d` (d nonzero).
    fn pseudo_rem(&self, d: &ZPoly) -> ZPoly {
        let mut r = self.clone();
        let (Some(dd), Some(lc)) = (d.degree(), d.0.last()) else {
            return r;
        };
        while let Some(rd) = r.degree() {
            if rd < dd {
                break;
            }
            let Some(rl) = r.0.last().cloned() else { break };
            // r <- lc * r - rl * x^(rd-dd) * d
            let mut c: Vec<BigInt> = r.0.iter().map(|x| x * lc).collect();
            for (i, y) in d.0.iter().enumerate() {
                c[i + rd - dd] -= &rl * y;
            }
            c.pop();
            r = ZPoly::new(c).primitive();
        }
        r
    }

    /// Primitive gcd over Z[x] (content ignored), by primitive remainder
    /// sequences.
    fn gcd_primitive(&self, o: &ZPoly) -> ZPoly {
        let mut a = self.primitive();
        let mut b = o.primitive();
        while !b.is_zero() {
            let r = a.pseudo_rem(&b);
            a = b;
            b = r.primitive();
        }
        a.primitive()
    }

    /// Exact quotient by a primitive divisor `d` that divides `self` in
    /// Q[x] (so the quotient is integral by Gauss's lemma).
    fn exact_div(&self, d: &ZPoly) -> ZPoly {
        let (Some(n), Some(m), Some(lc)) = (self.degree(), d.degree(), d.0.last()) else {
            return self.clone();
        };
        if n < m {
            return ZPoly(Vec::new());
        }
        let mut r = self.0.clone();
        let mut q = vec![BigInt::zero(); n - m + 1];
        for k in (0..=n - m).rev() {
            let coef = &r[k + m] / lc;
            for (i, y) in d.0.iter().enumerate() {
                r[k + i] -= &coef * y;
            }
            q[k] = coef;
        }
        ZPoly::new(q)
    }

    /// The squarefree part f / gcd(f, f′), primitive.
    fn squarefree_part(&self) -> ZPoly {
        let g = self.gcd_primitive(&self.derivative());
        if g.degree().unwrap_or(0) == 0 {
            return self.primitive();
        }
        self.primitive().exact_div(&g).primitive()
    }

    /// Reduction mod a small prime, constant term first, leading zeros
    /// stripped.
    fn mod_small(&self, p: u64) -> Vec<u64> {
        let pb = BigInt::from(p);
        let mut v: Vec<u64> = self
            .0
            .iter()
            .map(|c| c.mod_floor(&pb).to_u64().unwrap_or(0))
            .collect();
        while v.last() == Some(&0) {
            v.pop();
        }
        v
    }
}

/// Degree of gcd(a, b) in F_p[x] (a, b reduced, leading zeros stripped);
/// `None` if both are zero.
fn gcd_degree_mod_p(a: &[u64], b: &[u64], p: u64) -> Option<usize> {
    let mut a = a.to_vec();
    let mut b = b.to_vec();
    loop {
        if b.is_empty() {
            return if a.is_empty() {
                None
            } else {
                Some(a.len() - 1)
            };
        }
        // a <- a mod b
        let lb = *b.last().unwrap_or(&1);
        let inv = pow_mod(lb, p - 2, p);
        while a.len() >= b.len() {
            let Some(&la) = a.last() else { break };
            let coef = (la as u128 * inv as u128 % p as u128) as u64;
            let shift = a.len() - b.len();
            for (i, &y) in b.iter().enumerate() {
                let sub = (coef as u128 * y as u128 % p as u128) as u64;
                a[i + shift] = (a[i + shift] + p - sub) % p;
            }
            while a.last() == Some(&0) {
                a.pop();
            }
        }
        std::mem::swap(&mut a, &mut b);
    }
}

fn is_small_prime(n: u64) -> bool {
    if n < 2 {
        return false;
    }
    let mut d = 2u64;
    while d * d <= n {
        if n % d == 0 {
            return false;
        }
        d += 1;
    }
    true
}

/// Primes 3, 5, 7, 11, … in order.
pub(crate) fn odd_primes() -> impl Iterator<Item = u64> {
    (3u64..).step_by(2).filter(|&n| is_small_prime(n))
}

/// The integer roots of `f` in increasing order, each once.
///
/// Exact (see the module docs). The zero polynomial and constants have no
/// roots by convention here (callers never pass the zero polynomial).
/// No budget: see [`integer_roots_with_budget`].
pub(crate) fn integer_roots(f: &ZPoly) -> Vec<BigInt> {
    // An unlimited budget never runs out, so the error arm is unreachable.
    integer_roots_with_budget(f, &mut Budget::unlimited()).unwrap_or_default()
}

/// [`integer_roots`] charging `budget` by operand size, and stopping when
/// it runs out (units or deadline).
///
/// Budget units: one per 64-bit word product, counted as in schoolbook
/// multiplication (an upper bound for num-bigint's sub-quadratic
/// products on large operands); a
/// Newton step modulo `m` costs about `(2·deg f + 6)·words(m)²` units,
/// the evaluations of `f` at a candidate `deg f · words(f)·words(root)`,
/// the squarefree reduction `words²` per pseudo-remainder step.
///
/// Method note: the Newton iteration lifts the inverse of `f′(r)` along
/// with `r` (`v ← v·(2 − f′(r)·v) mod m²`), so no extended gcd is
/// computed on the huge moduli: each step is a few multiplications.
///
/// # Errors
/// [`Exhausted`] when the budget runs out.
pub(crate) fn integer_roots_with_budget(
    f: &ZPoly,
    budget: &mut Budget,
) -> Result<Vec<BigInt>, Exhausted> {
    let mut roots = Vec::new();
    let mut g = f.clone();
    if g.degree().unwrap_or(0) == 0 {
        return Ok(roots);
    }
    // Strip the factor x^k.
    if g.0.first().is_some_and(|c| c.is_zero()) {
        roots.push(BigInt::zero());
        let k = g.0.iter().take_while(|c| c.is_zero()).count();
        g = ZPoly::new(g.0[k..].to_vec());
    }
    match g.degree().unwrap_or(0) {
        0 => return Ok(roots),
        1 | 2 => {
            let w = g.0.iter().map(|c| c.bits().div_ceil(64)).max().unwrap_or(1);
            budget.spend(8 * w * w)?;
            roots.extend(low_degree_roots(&g));
            roots.sort();
            roots.dedup();
            return Ok(roots);
        }
        _ => {}
    }
    let mut tried = 0usize;
    let mut reduced_to_squarefree = false;
    let mut primes = odd_primes();
    let p = loop {
        let Some(p) = primes.next() else {
            return Ok(roots);
        };
        tried += 1;
        if tried == 48 && !reduced_to_squarefree {
            let w = g.0.iter().map(|c| c.bits().div_ceil(64)).max().unwrap_or(1);
            let n = g.0.len() as u64;
            budget.spend(n * n * w * w * 4)?;
            g = g.squarefree_part();
            reduced_to_squarefree = true;
            if g.degree().unwrap_or(0) == 0 {
                return Ok(roots);
            }
        }
        let gm = g.mod_small(p);
        if gm.len() != g.0.len() {
            continue; // p divides the leading coefficient
        }
        let dm = g.derivative().mod_small(p);
        if gcd_degree_mod_p(&gm, &dm, p) == Some(0) {
            break p;
        }
    };
    let gm = g.mod_small(p);
    let dm = g.derivative().mod_small(p);
    let bound = root_bound(&g);
    let two_b = &bound * 2u32 + 1u32;
    let pb = BigInt::from(p);
    let deriv = g.derivative();
    let deg = g.0.len() as u64;
    let eval_small = |c: &[u64], r0: u64| {
        let mut acc = 0u128;
        for &x in c.iter().rev() {
            acc = (acc * r0 as u128 + x as u128) % p as u128;
        }
        acc as u64
    };
    for r0 in 0..p {
        if eval_small(&gm, r0) != 0 {
            continue;
        }
        // f′(r0) ≢ 0 mod p: the root is simple (p was chosen so).
        let d0 = eval_small(&dm, r0);
        if d0 == 0 {
            continue;
        }
        let mut v = BigInt::from(pow_mod(d0, p - 2, p)); // f′(r)⁻¹ mod m
        let mut r = BigInt::from(r0);
        let mut m = pb.clone();
        while m <= two_b {
            m = &m * &m;
            let w = m.bits().div_ceil(64).max(1);
            budget.spend((2 * deg + 6) * w * w)?;
            let fr = g.eval_mod(&r, &m);
            r = (r - fr * &v).mod_floor(&m);
            let dr = deriv.eval_mod(&r, &m);
            v = (&v * (BigInt::from(2) - (dr * &v).mod_floor(&m))).mod_floor(&m);
        }
        let cand = if &r * 2u32 > m { &r - &m } else { r };
        if cand.abs() <= bound {
            let w = cand.bits().div_ceil(64).max(1);
            let wf = g.0.iter().map(|c| c.bits().div_ceil(64)).max().unwrap_or(1);
            budget.spend(deg * deg * w * (wf + deg * w))?;
            if g.eval(&cand).is_zero() && !roots.contains(&cand) {
                roots.push(cand);
            }
        }
    }
    roots.sort();
    Ok(roots)
}

fn low_degree_roots(g: &ZPoly) -> Vec<BigInt> {
    let mut out = Vec::new();
    match g.0.as_slice() {
        [c0, c1] => {
            let (q, r) = (-c0).div_rem(c1);
            if r.is_zero() {
                out.push(q);
            }
        }
        [c0, c1, c2] => {
            let disc: BigInt = c1 * c1 - c2 * c0 * 4u32;
            if let Some(s) = crate::arith::sqrt_exact(&disc) {
                let den: BigInt = c2 * 2u32;
                for num in [-c1 - &s, -c1 + &s] {
                    let (q, r) = num.div_rem(&den);
                    if r.is_zero() {
                        out.push(q);
                    }
                }
            }
        }
        _ => {}
    }
    out
}

/// A bound B with |R| ≤ B for every nonzero integer root R of g (g(0) ≠ 0):
/// the smaller of |g(0)| and the Cauchy bound 1 + max |a_i| / |a_n|.
fn root_bound(g: &ZPoly) -> BigInt {
    let a0 = g.0.first().map(|c| c.abs()).unwrap_or_default();
    let Some(an) = g.0.last().map(|c| c.abs()) else {
        return a0;
    };
    let mut m = BigInt::zero();
    for c in &g.0[..g.0.len() - 1] {
        let q = c.abs().div_ceil(&an);
        if q > m {
            m = q;
        }
    }
    let cauchy = m + 1u32;
    if a0.is_zero() {
        cauchy
    } else {
        a0.min(cauchy)
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;

    fn p(c: &[i64]) -> ZPoly {
        ZPoly::new(c.iter().map(|&x| BigInt::from(x)).collect())
    }

    #[test]
    fn integer_roots_of_a_split_cubic_are_found_in_order() {
        // (x - 3)(x + 5)(2x - 1) = 2x^3 + 3x^2 - 32x + 15
        let f = p(&[15, -32, 3, 2]);
        assert_eq!(integer_roots(&f), vec![BigInt::from(-5), BigInt::from(3)]);
    }

    #[test]
    fn repeated_roots_are_still_found() {
        // (x - 7)^2 (x + 2) = x^3 - 12x^2 + 21x + 98
        let f = p(&[98, 21, -12, 1]);
        assert_eq!(integer_roots(&f), vec![BigInt::from(-2), BigInt::from(7)]);
    }

    #[test]
    fn linear_and_quadratic_roots_are_solved_directly() {
        // 6x^2 - x - 2 = (2x + 1)(3x - 2): no integer roots.
        assert!(integer_roots(&p(&[-2, -1, 6])).is_empty());
        // x^2 - 2x + 1 = (x - 1)^2: one root, listed once.
        assert_eq!(integer_roots(&p(&[1, -2, 1])), vec![BigInt::from(1)]);
        // 3x + 12 and 3x + 13.
        assert_eq!(integer_roots(&p(&[12, 3])), vec![BigInt::from(-4)]);
        assert!(integer_roots(&p(&[13, 3])).is_empty());
        // x^2 + 1 has no real roots.
        assert!(integer_roots(&p(&[1, 0, 1])).is_empty());
    }

    #[test]
    fn zero_is_a_root_when_the_constant_term_vanishes() {
        let f = p(&[0, -4, 0, 1]);
        assert_eq!(
            integer_roots(&f),
            vec![BigInt::from(-2), BigInt::from(0), BigInt::from(2)]
        );
    }

    #[test]
    fn huge_roots_are_lifted_exactly() {
        let r: BigInt = "123456789012345678901234567890123456789".parse().unwrap();
        let s: BigInt = "-98765432109876543210987654321".parse().unwrap();
        let f = ZPoly::new(vec![-r.clone(), BigInt::one()])
            .mul(&ZPoly::new(vec![-s.clone(), BigInt::one()]))
            .mul(&p(&[1, 0, 1]));
        assert_eq!(integer_roots(&f), vec![s, r]);
    }
}
