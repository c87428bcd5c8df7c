//! Lemmas P and T (module `padic`) with the class tree in machine words.
//!
//! The searches of `padic::odd_prime_witness` and
//! `padic::two_adic_witness` keep each class `t ∈ base + scale·Z_p` with
//! its class polynomial in exact integers. Here a class whose base, scale
//! and coefficients fit in `i128` is kept in words ([`WordClass`]); every
//! operation on it is checked ([`Ck`]), and a class whose child would
//! leave `i128` is handed to the `BigInt` routine of `padic` as a `BigInt`
//! class, from the same point of the tree. Classes are processed in the
//! same breadth-first order, each with the same test, so both routines
//! return the same witness and charge the budget the same units
//! (the tests in `padic_word::tests` and `padic::tests` compare them, and
//! `src/family/word_sweep.rs` compares whole families with the word paths
//! on and off).

use std::collections::VecDeque;

use num_bigint::BigInt;
use num_traits::ToPrimitive;

use super::form::Quartic;
use super::fp::{self, WordField, WordPoly};
use super::padic::{
    class_verdict_u64, odd_big_step, two_adic_big_step, Chart, Class, WordVerdict, ODD_STAGE,
    TWO_STAGE,
};
use crate::arith::word::{pow_i128, Ck};
use crate::budget::Budget;
use crate::error::Result;
use crate::local::Prime;

/// A class of `padic` in words: `t ∈ base + scale·Z_p` in `chart`, with
/// class polynomial `poly[..len]` (lowest degree first).
#[derive(Debug, Clone, Copy)]
struct WordClass {
    chart: Chart,
    base: i128,
    scale: i128,
    poly: [i128; 5],
    len: usize,
}

/// A class in words or in big integers.
enum AnyClass {
    Word(WordClass),
    Big(Class),
}

impl WordClass {
    fn to_big(self) -> Class {
        Class {
            chart: self.chart,
            base: BigInt::from(self.base),
            scale: BigInt::from(self.scale),
            poly: self.poly[..self.len]
                .iter()
                .map(|&c| BigInt::from(c))
                .collect(),
        }
    }

    /// The point `(t, 1)` or `(1, t)` for `t = base + scale·r`.
    fn witness(self, r: u64) -> (BigInt, BigInt) {
        match (Ck::new(self.base) + Ck::new(self.scale) * i128::from(r)).get() {
            Some(t) => match self.chart {
                Chart::Affine => (BigInt::from(t), BigInt::from(1)),
                Chart::Infinity => (BigInt::from(1), BigInt::from(t)),
            },
            None => self.to_big().witness(&BigInt::from(r)),
        }
    }

    /// The class `base + scale·(r + p·Z_p)` with polynomial `F(r + p s)`,
    /// or `None` when something leaves `i128`.
    fn child(&self, r: u64, p: i128) -> Option<WordClass> {
        let r = i128::from(r);
        let mut c = self.poly;
        let n = self.len;
        // With |cᵢ| < 2^B and 0 ≤ r < p < 2^P, every partial sum of the
        // Taylor shift is at most Σᵢ C(i, j)·2^B·r^(i−j) ≤ 2^(B+4+4P)
        // (n ≤ 5), and so are the scaled coefficients F(r + ps)ᵢ·pⁱ: below
        // 2^126 nothing can overflow, and the products need no checks.
        let bits = |x: i128| 128 - x.unsigned_abs().leading_zeros();
        let b = c[..n].iter().map(|&x| bits(x)).max().unwrap_or(0);
        if b + 5 + 4 * bits(p) <= 126 && r < p {
            for i in 0..n {
                for j in (i..n.saturating_sub(1)).rev() {
                    c[j] += c[j + 1] * r;
                }
            }
            let mut pw = 1i128;
            for (i, ci) in c[..n].iter_mut().enumerate() {
                if i > 0 {
                    pw *= p;
                }
                *ci *= pw;
            }
            return Some(WordClass {
                chart: self.chart,
                base: (Ck::new(self.base) + Ck::new(self.scale) * r).get()?,
                scale: (Ck::new(self.scale) * p).get()?,
                poly: c,
                len: n,
            });
        }
        for i in 0..n {
            for j in (i..n.saturating_sub(1)).rev() {
                c[j] = (Ck::new(c[j]) + Ck::new(c[j + 1]) * r).get()?;
            }
        }
        let mut pw = Ck::new(1);
        for ci in c[..n].iter_mut() {
            *ci = (Ck::new(*ci) * pw).get()?;
            pw = pw * p;
        }
        Some(WordClass {
            chart: self.chart,
            base: (Ck::new(self.base) + Ck::new(self.scale) * r).get()?,
            scale: (Ck::new(self.scale) * p).get()?,
            poly: c,
            len: n,
        })
    }
}

/// The two starting classes of `padic::initial_classes`, each in words
/// when it fits.
fn initial(q: &Quartic, p: u64) -> VecDeque<AnyClass> {
    let c = q.coeffs();
    let words: Option<[i128; 5]> = (|| {
        let mut w = [0i128; 5];
        for (o, x) in w.iter_mut().zip(c) {
            *o = x.to_i128()?;
        }
        Some(w)
    })();
    match words {
        Some(w) => initial_words(&w, p),
        None => super::padic::initial_classes(q, &BigInt::from(p))
            .into_iter()
            .map(AnyClass::Big)
            .collect(),
    }
}

/// The two starting classes for the quartic with coefficients
/// `[c4, c3, c2, c1, c0]` in words; the chart at infinity (coefficients
/// `cᵢ·pⁱ`) in `BigInt` when it leaves `i128`.
fn initial_words(w: &[i128; 5], p: u64) -> VecDeque<AnyClass> {
    let mut affine = *w;
    affine.reverse();
    let pi = i128::from(p);
    let bits = |v: i128| 128 - v.unsigned_abs().leading_zeros();
    let cb = w.iter().map(|&c| bits(c)).max().unwrap_or(0);
    let infinity: Option<[i128; 5]> = (|| {
        if cb + 4 * bits(pi) <= 126 {
            // |cᵢ·pⁱ| < 2^(C+4P): no check needed.
            let p2 = pi * pi;
            let pows = [1, pi, p2, p2 * pi, p2 * p2];
            return Some(std::array::from_fn(|i| w[i] * pows[i]));
        }
        let mut out = [0i128; 5];
        let mut pw = Ck::new(1);
        for (o, &x) in out.iter_mut().zip(w) {
            *o = (Ck::new(x) * pw).get()?;
            pw = pw * pi;
        }
        Some(out)
    })();
    let first = AnyClass::Word(WordClass {
        chart: Chart::Affine,
        base: 0,
        scale: 1,
        poly: affine,
        len: 5,
    });
    let second = match infinity {
        Some(poly) => AnyClass::Word(WordClass {
            chart: Chart::Infinity,
            base: 0,
            scale: pi,
            poly,
            len: 5,
        }),
        None => {
            let big = w.map(BigInt::from);
            match super::padic::initial_classes_of(&big, &BigInt::from(p)).pop_back() {
                Some(b) => AnyClass::Big(b),
                None => {
                    return super::padic::initial_classes_of(&big, &BigInt::from(p))
                        .into_iter()
                        .map(AnyClass::Big)
                        .collect()
                }
            }
        }
    };
    let mut queue = VecDeque::with_capacity(8);
    queue.push_back(first);
    queue.push_back(second);
    queue
}

/// Content valuation `m` and `φ = (F/p^m) mod p` of a non-zero word
/// polynomial (the twin of `padic::content_residues_word`).
fn content_residues(poly: &[i128], f: WordField) -> (u64, WordPoly) {
    let p = f.p();
    // Magnitudes below 2^64 (the common case) use u64 division; the
    // residue of a negative c is p − (|c| mod p) (or 0).
    let mut mags = [0u64; 5];
    let small =
        poly.iter()
            .zip(mags.iter_mut())
            .all(|(&c, m)| match u64::try_from(c.unsigned_abs()) {
                Ok(v) => {
                    *m = v;
                    true
                }
                Err(_) => false,
            });
    if small {
        let val = |mut x: u64| {
            let mut v = 0u64;
            while x % p == 0 {
                x /= p;
                v += 1;
            }
            v
        };
        let m = mags[..poly.len()]
            .iter()
            .filter(|&&c| c != 0)
            .map(|&c| val(c))
            .min()
            .unwrap_or(0);
        let mut res = [0u64; 5];
        for ((slot, &c), &mag) in res.iter_mut().zip(poly).zip(&mags) {
            let mut x = mag;
            for _ in 0..m {
                x /= p;
            }
            let r = x % p;
            *slot = if c < 0 && r != 0 { p - r } else { r };
        }
        return (m, WordPoly::from_slice(&res[..poly.len().min(5)]));
    }
    let q = i128::from(p);
    let val = |mut x: i128| {
        let mut v = 0u64;
        while x % q == 0 {
            x /= q;
            v += 1;
        }
        v
    };
    let m = poly
        .iter()
        .filter(|&&c| c != 0)
        .map(|&c| val(c))
        .min()
        .unwrap_or(0);
    let mut res = [0u64; 5];
    for (slot, &c) in res.iter_mut().zip(poly) {
        let mut x = c;
        for _ in 0..m {
            x /= q;
        }
        *slot = x.rem_euclid(q) as u64;
    }
    (m, WordPoly::from_slice(&res[..poly.len().min(5)]))
}

/// `padic::odd_prime_witness` with word classes (`p < 2^63`, field `f`).
pub(crate) fn odd_prime_witness_words(
    q: &Quartic,
    p: &Prime,
    f: WordField,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    odd_tree(initial(q, f.p()), p, f, budget)
}

/// [`odd_prime_witness_words`] for the quartic with coefficients
/// `[c4, c3, c2, c1, c0]` given in words (no `Quartic` needed; the caller
/// guarantees a non-zero discriminant).
pub(crate) fn odd_prime_witness_coeffs(
    coeffs: &[i128; 5],
    p: &Prime,
    f: WordField,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    odd_tree(initial_words(coeffs, f.p()), p, f, budget)
}

/// The breadth-first search of Lemma P from the starting classes `queue`.
fn odd_tree(
    mut queue: VecDeque<AnyClass>,
    p: &Prime,
    f: WordField,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    let pw = f.p();
    let pi = i128::from(pw);
    let pb = p.get();
    let mut spill = VecDeque::new();
    while let Some(class) = queue.pop_front() {
        let c = match class {
            AnyClass::Big(b) => {
                let w = odd_big_step(b, p, Some(f), &mut spill, budget)?;
                queue.extend(spill.drain(..).map(AnyClass::Big));
                if w.is_some() {
                    return Ok(w);
                }
                continue;
            }
            AnyClass::Word(c) => c,
        };
        fp::charge(budget, 1, ODD_STAGE)?;
        let (m, phi) = content_residues(&c.poly[..c.len], f);
        match class_verdict_u64(&phi, m % 2 == 0, f, budget)? {
            WordVerdict::Witness(r) => return Ok(Some(c.witness(r))),
            WordVerdict::Refine(roots) if roots.is_empty() => {}
            WordVerdict::Refine(roots) => {
                // Divide by p^(2⌊m/2⌋) (exact: every coefficient is
                // divisible by p^m, and p^m ≤ |c| for c ≠ 0).
                let e = ((m / 2) * 2) as u32;
                let mut stripped = c;
                if e > 0 {
                    let Some(pe) = pow_i128(pi, e) else {
                        push_big_children(&c.to_big(), m, &roots, pb, &mut queue);
                        continue;
                    };
                    for x in stripped.poly[..c.len].iter_mut() {
                        *x /= pe;
                    }
                }
                let mut big: Option<Class> = None;
                for &r in &roots {
                    match stripped.child(r, pi) {
                        Some(ch) => queue.push_back(AnyClass::Word(ch)),
                        None => {
                            let b = big.get_or_insert_with(|| stripped.to_big());
                            queue.push_back(AnyClass::Big(b.child(&BigInt::from(r), pb)));
                        }
                    }
                }
            }
        }
    }
    Ok(None)
}

fn push_big_children(
    c: &Class,
    m: u64,
    roots: &[u64],
    pb: &BigInt,
    queue: &mut VecDeque<AnyClass>,
) {
    let stripped = Class {
        poly: super::padic::strip_even_power(&c.poly, m, pb),
        ..c.clone()
    };
    for &r in roots {
        queue.push_back(AnyClass::Big(stripped.child(&BigInt::from(r), pb)));
    }
}

/// `(c / 2^v) mod 8` for `2^v | c`, `c ≠ 0`.
#[inline]
fn unit_mod8(c: i128, v: u32) -> u8 {
    (c >> v).rem_euclid(8) as u8
}

/// `G(s) = F(r + 2s)` in words, `None` on overflow.
fn shift_scale_two(f: &[i128], r: bool) -> Option<[i128; 5]> {
    let mut c = [0i128; 5];
    c[..f.len()].copy_from_slice(f);
    let n = f.len();
    if r {
        for i in 0..n {
            for j in (i..n.saturating_sub(1)).rev() {
                c[j] = c[j].checked_add(c[j + 1])?;
            }
        }
    }
    for (i, ci) in c[..n].iter_mut().enumerate() {
        // x·2^i without overflow iff shifting back gives x (i ≤ 4).
        let shifted = *ci << i;
        if shifted >> i != *ci {
            return None;
        }
        *ci = shifted;
    }
    Some(c)
}

/// `padic::two_adic_witness` with word classes.
pub(crate) fn two_adic_witness_words(
    q: &Quartic,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    two_adic_tree(initial(q, 2), budget)
}

/// [`two_adic_witness_words`] for the quartic with coefficients
/// `[c4, c3, c2, c1, c0]` given in words.
pub(crate) fn two_adic_witness_coeffs(
    coeffs: &[i128; 5],
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    two_adic_tree(initial_words(coeffs, 2), budget)
}

/// The breadth-first search of Lemma T from the starting classes `queue`.
fn two_adic_tree(
    mut queue: VecDeque<AnyClass>,
    budget: &mut Budget,
) -> Result<Option<(BigInt, BigInt)>> {
    let mut spill = VecDeque::new();
    while let Some(class) = queue.pop_front() {
        let c = match class {
            AnyClass::Big(b) => {
                let w = two_adic_big_step(b, &mut spill, budget)?;
                queue.extend(spill.drain(..).map(AnyClass::Big));
                if w.is_some() {
                    return Ok(w);
                }
                continue;
            }
            AnyClass::Word(c) => c,
        };
        fp::charge(budget, 1, TWO_STAGE)?;
        let poly = &c.poly[..c.len];
        let vals: [Option<u32>; 5] =
            std::array::from_fn(|i| poly.get(i).filter(|&&x| x != 0).map(|x| x.trailing_zeros()));
        let m = vals[..c.len].iter().flatten().copied().min().unwrap_or(0);
        if let Some(v0) = vals[0] {
            if v0 % 2 == 0 && unit_mod8(poly[0], v0) == 1 {
                return Ok(Some(c.witness(0)));
            }
        }
        let a0_odd = vals[0] == Some(m);
        let mu = vals[1..c.len].iter().flatten().min().map(|&v| v - m);
        if a0_odd && mu.map_or(true, |u| u >= 1) {
            let mu = mu.unwrap_or(u32::MAX);
            let a0_mod4 = unit_mod8(poly[0], m) % 4;
            if m % 2 == 1 || mu >= 3 || (mu == 2 && a0_mod4 == 3) {
                continue;
            }
        }
        let e = (m / 2) * 2;
        let mut stripped = [0i128; 5];
        for (o, &x) in stripped.iter_mut().zip(poly) {
            *o = x >> e;
        }
        for r in [false, true] {
            let child = shift_scale_two(&stripped[..c.len], r).and_then(|poly| {
                Some(WordClass {
                    chart: c.chart,
                    base: if r {
                        c.base.checked_add(c.scale)?
                    } else {
                        c.base
                    },
                    scale: c.scale.checked_mul(2)?,
                    poly,
                    len: c.len,
                })
            });
            match child {
                Some(ch) => queue.push_back(AnyClass::Word(ch)),
                None => {
                    let big = WordClass {
                        poly: stripped,
                        ..c
                    }
                    .to_big();
                    queue.push_back(AnyClass::Big(Class {
                        chart: big.chart,
                        base: if r {
                            &big.base + &big.scale
                        } else {
                            big.base.clone()
                        },
                        scale: &big.scale << 1u32,
                        poly: super::padic::shift_scale_two(&big.poly, r),
                    }));
                }
            }
        }
    }
    Ok(None)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::super::padic::{odd_prime_witness, two_adic_witness};
    use super::*;
    use crate::arith::word::set_word_paths;
    use proptest::prelude::*;

    /// Odd primes small (enumeration) and large (Weil's bound and root
    /// finding), one near 2^61 (primality: sympy 1.14 `isprime`).
    const PRIMES: [u64; 8] = [3, 5, 7, 17, 61, 101, 1_000_003, (1 << 61) - 1];

    /// Runs both routines with a budget of `units` and returns
    /// (answer, units spent) for the word path and the BigInt path.
    type Answer = (Result<Option<(BigInt, BigInt)>>, u64);
    fn both(q: &Quartic, p: Option<u64>, units: u64) -> (Answer, Answer) {
        let run = |q: &Quartic| {
            let mut budget = Budget::with_units(units);
            let w = match p {
                Some(p) => odd_prime_witness(q, &Prime::new(BigInt::from(p)).unwrap(), &mut budget),
                None => two_adic_witness(q, &mut budget),
            };
            (w, budget.spent())
        };
        let word = run(q);
        let old = set_word_paths(false);
        let big = run(q);
        set_word_paths(old);
        (word, big)
    }

    /// Coefficients `c·p^e`, `c` of `bits` bits: small ones give deep
    /// class trees, large ones cross the i128 boundary inside the tree.
    fn quartic(raw: [i64; 5], bits: u32, p: u64, exps: [u32; 5]) -> Option<Quartic> {
        let pb = BigInt::from(p);
        let coeffs: [BigInt; 5] = std::array::from_fn(|i| {
            let c = raw[i] >> (64 - bits.clamp(1, 63));
            BigInt::from(c) * num_traits::pow(pb.clone(), exps[i] as usize)
        });
        Quartic::new(coeffs).ok()
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 2000, ..ProptestConfig::default() })]

        /// Same witness (or none) and the same budget spent, at odd p.
        #[test]
        fn odd_prime_word_and_bigint_trees_agree(
            raw in any::<[i64; 5]>(),
            bits in 1u32..64,
            pi in 0usize..PRIMES.len(),
            exps in proptest::array::uniform5(0u32..6),
            units in prop_oneof![Just(u64::MAX), 1u64..40],
        ) {
            let p = PRIMES[pi];
            let Some(q) = quartic(raw, bits, p, exps) else { return Ok(()) };
            let (w, b) = both(&q, Some(p), units);
            prop_assert_eq!(w.0.is_ok(), b.0.is_ok());
            prop_assert_eq!(w.0.ok(), b.0.ok());
            prop_assert_eq!(w.1, b.1);
        }

        /// Same witness (or none) and the same budget spent, at 2.
        #[test]
        fn two_adic_word_and_bigint_trees_agree(
            raw in any::<[i64; 5]>(),
            bits in 1u32..64,
            exps in proptest::array::uniform5(0u32..12),
            units in prop_oneof![Just(u64::MAX), 1u64..40],
        ) {
            let Some(q) = quartic(raw, bits, 2, exps) else { return Ok(()) };
            let (w, b) = both(&q, None, units);
            prop_assert_eq!(w.0.is_ok(), b.0.is_ok());
            prop_assert_eq!(w.0.ok(), b.0.ok());
            prop_assert_eq!(w.1, b.1);
        }
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 1500, ..ProptestConfig::default() })]

        /// The whole local answer (witness, y and its precision) is the
        /// same with the word paths on and off, at 2 and at odd p.
        #[test]
        fn local_solubility_same_with_and_without_words(
            raw in any::<[i64; 5]>(),
            bits in 1u32..64,
            pi in 0usize..=PRIMES.len(),
            exps in proptest::array::uniform5(0u32..6),
        ) {
            let p = if pi == PRIMES.len() { 2 } else { PRIMES[pi] };
            let Some(q) = quartic(raw, bits, p, exps) else { return Ok(()) };
            let place = crate::local::Place::Finite(Prime::new(BigInt::from(p)).unwrap());
            let run = || super::super::solubility::locally_soluble(&q, &place, &mut Budget::unlimited()).unwrap();
            let on = run();
            let old = set_word_paths(false);
            let off = run();
            set_word_paths(old);
            if let Some(pt) = on.point() {
                prop_assert!(pt.verify(&q));
            }
            prop_assert_eq!(on, off);
        }
    }

    /// A tree that starts in words and crosses into BigInt: the infinity
    /// chart of a quartic with 62-bit coefficients at p = 2^61 − 1
    /// overflows i128 at once; both routes agree (and the word classes of
    /// the affine chart were used: its coefficients fit).
    #[test]
    fn crossing_the_boundary_inside_one_tree() {
        let p = (1u64 << 61) - 1;
        let c = (1i64 << 62) - 57;
        let q = Quartic::new([c, 0, 0, 0, c - 2].map(BigInt::from)).unwrap();
        assert!(matches!(initial(&q, p).back(), Some(AnyClass::Big(_))));
        assert!(matches!(initial(&q, p).front(), Some(AnyClass::Word(_))));
        let (w, b) = both(&q, Some(p), u64::MAX);
        assert_eq!(w.0.unwrap(), b.0.unwrap());
        assert_eq!(w.1, b.1);
    }
}
