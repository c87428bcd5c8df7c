//! Linear algebra over F2 on bit-packed vectors.
//!
//! A vector of length n is `⌈n/64⌉` machine words; addition is XOR, so row
//! reduction of an m × n matrix costs O(m · rank · n/64) word operations.
//! Subspaces are kept as a basis in reduced row-echelon form, which makes
//! membership, sums, intersections, kernels and preimages short loops of
//! word operations. Everything is exact and deterministic.

use std::fmt;

use crate::budget::{Budget, Exhausted};

/// A vector in F2^n, bit-packed: one machine word held inline when
/// n ≤ 64 (the common case: dim Q(S, 2) = 1 + |S|), a heap vector of
/// ⌈n/64⌉ words beyond.
#[derive(Clone)]
pub struct BitVec {
    len: usize,
    words: Words,
}

/// The words of a [`BitVec`]: `One` iff the length is at most 64 (its
/// word is unused, and zero, at length 0).
#[derive(Clone)]
enum Words {
    One(u64),
    Many(Vec<u64>),
}

// Equality, order and hashing as on (length, word slice): the same as the
// derived ones of a (usize, Vec<u64>) pair.
impl PartialEq for BitVec {
    fn eq(&self, other: &Self) -> bool {
        self.len == other.len && self.words() == other.words()
    }
}

impl Eq for BitVec {}

impl std::hash::Hash for BitVec {
    fn hash<H: std::hash::Hasher>(&self, state: &mut H) {
        self.len.hash(state);
        self.words().hash(state);
    }
}

impl PartialOrd for BitVec {
    fn partial_cmp(&self, other: &Self) -> Option<std::cmp::Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for BitVec {
    fn cmp(&self, other: &Self) -> std::cmp::Ordering {
        self.len
            .cmp(&other.len)
            .then_with(|| self.words().cmp(other.words()))
    }
}

impl BitVec {
    /// The zero vector of length `len`.
    pub(crate) fn zeros(len: usize) -> Self {
        let words = if len <= 64 {
            Words::One(0)
        } else {
            Words::Many(vec![0; len.div_ceil(64)])
        };
        BitVec { len, words }
    }

    /// The ⌈n/64⌉ words (bit i of word k is coordinate 64k + i).
    fn words(&self) -> &[u64] {
        match &self.words {
            Words::One(_) if self.len == 0 => &[],
            Words::One(w) => std::slice::from_ref(w),
            Words::Many(v) => v,
        }
    }

    /// The words, mutably.
    fn words_mut(&mut self) -> &mut [u64] {
        match &mut self.words {
            Words::One(_) if self.len == 0 => &mut [],
            Words::One(w) => std::slice::from_mut(w),
            Words::Many(v) => v,
        }
    }

    /// The i-th unit vector of length `len` (`None` if i ≥ len).
    pub(crate) fn unit(len: usize, i: usize) -> Option<Self> {
        let mut v = Self::zeros(len);
        v.set(i, true).then_some(v)
    }

    /// The vector with the given bits (bit i of `bits` is coordinate i);
    /// `len` must be at most 64.
    pub(crate) fn from_u64(len: usize, bits: u64) -> Self {
        let mut v = Self::zeros(len);
        if let Some(w) = v.words_mut().first_mut() {
            let mask = if len >= 64 {
                u64::MAX
            } else {
                (1u64 << len) - 1
            };
            *w = bits & mask;
        }
        v
    }

    /// The vector from a list of booleans.
    pub(crate) fn from_bools(bits: &[bool]) -> Self {
        let mut v = Self::zeros(bits.len());
        for (i, &b) in bits.iter().enumerate() {
            v.set(i, b);
        }
        v
    }

    /// Coordinates 0..64 as a word (bit i is coordinate i).
    pub(crate) fn low_word(&self) -> u64 {
        self.words().first().copied().unwrap_or(0)
    }

    /// Length n.
    pub fn len(&self) -> usize {
        self.len
    }

    /// True for the empty vector (length 0).
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// Coordinate i (false outside the range).
    pub fn get(&self, i: usize) -> bool {
        i < self.len && (self.words()[i / 64] >> (i % 64)) & 1 == 1
    }

    /// Sets coordinate i; returns false (and does nothing) if i ≥ len.
    pub(crate) fn set(&mut self, i: usize, bit: bool) -> bool {
        if i >= self.len {
            return false;
        }
        let m = 1u64 << (i % 64);
        if bit {
            self.words_mut()[i / 64] |= m;
        } else {
            self.words_mut()[i / 64] &= !m;
        }
        true
    }

    /// self += other (lengths must agree; extra bits of a longer `other` are ignored).
    pub(crate) fn add_assign(&mut self, other: &BitVec) {
        if let (Words::One(a), Words::One(b)) = (&mut self.words, &other.words) {
            *a ^= b;
        } else {
            for (a, b) in self.words_mut().iter_mut().zip(other.words()) {
                *a ^= b;
            }
        }
        self.trim();
    }

    /// self + other.
    pub(crate) fn add(&self, other: &BitVec) -> BitVec {
        let mut r = self.clone();
        r.add_assign(other);
        r
    }

    /// True for the zero vector.
    pub(crate) fn is_zero(&self) -> bool {
        self.words().iter().all(|&w| w == 0)
    }

    /// The standard dot product Σ x_i y_i in F2.
    pub(crate) fn dot(&self, other: &BitVec) -> bool {
        let mut acc = 0u64;
        for (a, b) in self.words().iter().zip(other.words()) {
            acc ^= a & b;
        }
        acc.count_ones() % 2 == 1
    }

    /// Index of the lowest set coordinate.
    pub(crate) fn leading(&self) -> Option<usize> {
        for (k, &w) in self.words().iter().enumerate() {
            if w != 0 {
                return Some(64 * k + w.trailing_zeros() as usize);
            }
        }
        None
    }

    /// Number of set coordinates.
    pub(crate) fn weight(&self) -> usize {
        self.words().iter().map(|w| w.count_ones() as usize).sum()
    }

    /// Indices of the set coordinates, ascending.
    pub(crate) fn ones(&self) -> impl Iterator<Item = usize> + '_ {
        (0..self.len).filter(move |&i| self.get(i))
    }

    /// Concatenation (self, other).
    pub(crate) fn concat(&self, other: &BitVec) -> BitVec {
        let mut r = BitVec::zeros(self.len + other.len);
        for i in self.ones() {
            r.set(i, true);
        }
        for i in other.ones() {
            r.set(self.len + i, true);
        }
        r
    }

    /// Coordinates [start, start + len) as a vector.
    pub(crate) fn slice(&self, start: usize, len: usize) -> BitVec {
        let mut r = BitVec::zeros(len);
        for i in 0..len {
            if self.get(start + i) {
                r.set(i, true);
            }
        }
        r
    }

    fn trim(&mut self) {
        if self.len % 64 != 0 {
            let len = self.len;
            if let Some(w) = self.words_mut().last_mut() {
                *w &= (1u64 << (len % 64)) - 1;
            }
        }
    }
}

impl fmt::Debug for BitVec {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{self}")
    }
}

impl fmt::Display for BitVec {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for i in 0..self.len {
            write!(f, "{}", u8::from(self.get(i)))?;
        }
        Ok(())
    }
}

/// A subspace of F2^n, held as a basis in reduced row-echelon form
/// (leading coordinates strictly increasing, each leading coordinate zero in
/// every other basis vector).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Subspace {
    ambient: usize,
    basis: Vec<BitVec>,
}

impl Subspace {
    /// The zero subspace of F2^n.
    pub(crate) fn zero(ambient: usize) -> Self {
        Subspace {
            ambient,
            basis: Vec::new(),
        }
    }

    /// The whole space F2^n.
    pub(crate) fn full(ambient: usize) -> Self {
        Self::span(
            ambient,
            (0..ambient).filter_map(|i| BitVec::unit(ambient, i)),
        )
    }

    /// The span of the given vectors (each of length `ambient`).
    pub(crate) fn span<I: IntoIterator<Item = BitVec>>(ambient: usize, vectors: I) -> Self {
        let mut s = Self::zero(ambient);
        for v in vectors {
            s.insert(v);
        }
        s
    }

    /// Dimension of the ambient space.
    pub(crate) fn ambient(&self) -> usize {
        self.ambient
    }

    /// Dimension of the subspace.
    pub fn dim(&self) -> usize {
        self.basis.len()
    }

    /// The echelon basis.
    pub fn basis(&self) -> &[BitVec] {
        &self.basis
    }

    /// Reduces v modulo the subspace: the result is zero iff v lies in it,
    /// and is zero at every leading coordinate of the basis.
    pub(crate) fn reduce(&self, v: &BitVec) -> BitVec {
        let mut r = v.clone();
        for b in &self.basis {
            if let Some(l) = b.leading() {
                if r.get(l) {
                    r.add_assign(b);
                }
            }
        }
        r
    }

    /// True iff v lies in the subspace.
    pub fn contains(&self, v: &BitVec) -> bool {
        self.reduce(v).is_zero()
    }

    /// Work units of one [`Subspace::reduce`]: one per machine word of
    /// every basis vector touched (the operand size), at least one.
    pub(crate) fn reduce_cost(&self) -> u64 {
        let words = self.ambient.div_ceil(64).max(1) as u64;
        (self.basis.len() as u64 + 1).saturating_mul(words)
    }

    /// [`Subspace::reduce`], charging [`Subspace::reduce_cost`] units to
    /// `budget` first (and checking its deadline).
    ///
    /// # Errors
    /// [`Exhausted`] when the budget runs out; nothing is computed then.
    pub(crate) fn try_reduce(&self, v: &BitVec, budget: &mut Budget) -> Result<BitVec, Exhausted> {
        budget.spend(self.reduce_cost())?;
        Ok(self.reduce(v))
    }

    /// [`Subspace::insert`], charging twice [`Subspace::reduce_cost`] units
    /// (the reduction and the back-substitution) first.
    ///
    /// # Errors
    /// [`Exhausted`] when the budget runs out; the subspace is unchanged.
    pub(crate) fn try_insert(&mut self, v: BitVec, budget: &mut Budget) -> Result<bool, Exhausted> {
        budget.spend(self.reduce_cost().saturating_mul(2))?;
        Ok(self.insert(v))
    }

    /// Adds v to the spanning set; returns true iff the dimension grew.
    pub(crate) fn insert(&mut self, v: BitVec) -> bool {
        let r = self.reduce(&v);
        let Some(l) = r.leading() else {
            return false;
        };
        for b in &mut self.basis {
            if b.get(l) {
                b.add_assign(&r);
            }
        }
        let pos = self
            .basis
            .iter()
            .position(|b| b.leading().is_some_and(|bl| bl > l))
            .unwrap_or(self.basis.len());
        self.basis.insert(pos, r);
        true
    }

    /// The sum U + V.
    pub(crate) fn sum(&self, other: &Subspace) -> Subspace {
        let mut s = self.clone();
        for b in &other.basis {
            s.insert(b.clone());
        }
        s
    }

    /// The intersection U ∩ V (Zassenhaus: reduce the rows (u, u) and
    /// (v, 0); rows of the form (0, w) span the intersection).
    pub(crate) fn intersection(&self, other: &Subspace) -> Subspace {
        let n = self.ambient;
        let rows = self
            .basis
            .iter()
            .map(|u| u.concat(u))
            .chain(other.basis.iter().map(|v| v.concat(&BitVec::zeros(n))));
        let big = Subspace::span(2 * n, rows);
        let vecs = big
            .basis
            .iter()
            .filter(|r| r.leading().is_some_and(|l| l >= n))
            .map(|r| r.slice(n, n));
        Subspace::span(n, vecs)
    }

    /// Every element of the subspace (2^dim of them); `None` if dim > 24.
    pub(crate) fn elements(&self) -> Option<Vec<BitVec>> {
        if self.dim() > 24 {
            return None;
        }
        let mut out = vec![BitVec::zeros(self.ambient)];
        for b in &self.basis {
            let more: Vec<BitVec> = out.iter().map(|v| v.add(b)).collect();
            out.extend(more);
        }
        Some(out)
    }

    /// The annihilator {f : f · u = 0 for all u in U}, as a subspace of the
    /// dual F2^n (identified with F2^n by the dot product).
    pub(crate) fn annihilator(&self) -> Subspace {
        let m = LinearMap::from_rows(self.ambient, self.basis.clone());
        m.kernel()
    }

    /// A basis of a complement of `self` inside `larger` (which must contain
    /// `self`): vectors whose classes form a basis of larger / self.
    pub(crate) fn complement_in(&self, larger: &Subspace) -> Vec<BitVec> {
        let mut s = self.clone();
        let mut out = Vec::new();
        for b in &larger.basis {
            if s.insert(b.clone()) {
                out.push(b.clone());
            }
        }
        out
    }
}

/// Inserts `v` into `basis`, a reduced row-echelon basis of vectors of
/// F2^n with n ≤ 64 held as single words (lowest set bit leading, sorted by
/// it): the word form of [`Subspace::insert`], with the same canonical
/// result. Returns true iff the dimension grew.
pub(crate) fn insert_word(basis: &mut Vec<u64>, v: u64) -> bool {
    let mut r = v;
    for &b in basis.iter() {
        if r & (b & b.wrapping_neg()) != 0 {
            r ^= b;
        }
    }
    if r == 0 {
        return false;
    }
    let lead = r & r.wrapping_neg();
    for b in basis.iter_mut() {
        if *b & lead != 0 {
            *b ^= r;
        }
    }
    let pos = basis.partition_point(|&b| (b & b.wrapping_neg()) < lead);
    basis.insert(pos, r);
    true
}

impl Subspace {
    /// The subspace of F2^n (n ≤ 64) with the given reduced echelon basis
    /// in words (bit i is coordinate i).
    pub(crate) fn from_echelon_words(ambient: usize, basis: &[u64]) -> Subspace {
        Subspace {
            ambient,
            basis: basis
                .iter()
                .map(|&w| BitVec::from_u64(ambient, w))
                .collect(),
        }
    }

    /// The kernel {x ∈ F2^n : r · x = 0 for every row r} for n ≤ 64 with
    /// the rows as words (bits at or above n are ignored): the same
    /// subspace, with the same canonical basis, as
    /// `LinearMap::from_rows(n, rows).kernel()`, without a heap vector per
    /// row. `None` when n > 64.
    pub(crate) fn kernel_of_word_rows(ambient: usize, rows: &[u64]) -> Option<Subspace> {
        if ambient > 64 {
            return None;
        }
        let mask = if ambient == 64 {
            u64::MAX
        } else {
            (1u64 << ambient) - 1
        };
        let mut echelon = Vec::with_capacity(ambient);
        for &r in rows {
            insert_word(&mut echelon, r & mask);
        }
        let pivots = echelon
            .iter()
            .fold(0u64, |acc, &b| acc | (b & b.wrapping_neg()));
        let mut kernel = Vec::with_capacity(ambient - echelon.len());
        for free in (0..ambient).filter(|&c| pivots >> c & 1 == 0) {
            let mut v = 1u64 << free;
            for &b in &echelon {
                if b >> free & 1 == 1 {
                    v |= b & b.wrapping_neg();
                }
            }
            insert_word(&mut kernel, v);
        }
        Some(Subspace::from_echelon_words(ambient, &kernel))
    }
}

/// A linear map F2^n → F2^m given by its m rows (each of length n): the
/// image of x has coordinate i equal to row_i · x.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LinearMap {
    source: usize,
    rows: Vec<BitVec>,
}

impl LinearMap {
    /// The map with the given rows, each a vector in F2^source.
    pub fn from_rows(source: usize, rows: Vec<BitVec>) -> Self {
        LinearMap { source, rows }
    }

    /// The map whose j-th column is `columns[j]` (all of length `target`).
    pub fn from_columns(target: usize, columns: &[BitVec]) -> Self {
        let n = columns.len();
        let rows = (0..target)
            .map(|i| BitVec::from_bools(&columns.iter().map(|c| c.get(i)).collect::<Vec<_>>()))
            .collect::<Vec<_>>();
        debug_assert!(rows.iter().all(|r| r.len() == n));
        LinearMap { source: n, rows }
    }

    /// Dimension of the source.
    pub fn source(&self) -> usize {
        self.source
    }

    /// Dimension of the target.
    pub fn target(&self) -> usize {
        self.rows.len()
    }

    /// The image of x.
    pub fn apply(&self, x: &BitVec) -> BitVec {
        BitVec::from_bools(&self.rows.iter().map(|r| r.dot(x)).collect::<Vec<_>>())
    }

    /// The rank.
    pub fn rank(&self) -> usize {
        Subspace::span(self.source, self.rows.iter().cloned()).dim()
    }

    /// The kernel {x : Ax = 0}: the annihilator of the row space, computed
    /// from the reduced echelon form (free columns give the basis).
    pub fn kernel(&self) -> Subspace {
        let echelon = Subspace::span(self.source, self.rows.iter().cloned());
        let pivots: Vec<usize> = echelon.basis.iter().filter_map(|b| b.leading()).collect();
        let mut ker = Subspace::zero(self.source);
        for free in (0..self.source).filter(|c| !pivots.contains(c)) {
            let mut v = BitVec::zeros(self.source);
            v.set(free, true);
            for (b, &p) in echelon.basis.iter().zip(&pivots) {
                if b.get(free) {
                    v.set(p, true);
                }
            }
            ker.insert(v);
        }
        ker
    }

    /// The image: the span of the columns.
    pub fn image(&self) -> Subspace {
        let m = self.target();
        Subspace::span(
            m,
            (0..self.source).filter_map(|j| BitVec::unit(self.source, j).map(|e| self.apply(&e))),
        )
    }

    /// The preimage A^{-1}(W) of a subspace W of the target.
    pub fn preimage(&self, w: &Subspace) -> Subspace {
        // x ∈ A^{-1}(W) iff f(Ax) = 0 for every f in the annihilator of W.
        let ann = w.annihilator();
        let rows: Vec<BitVec> = ann
            .basis()
            .iter()
            .map(|f| {
                let mut row = BitVec::zeros(self.source);
                for i in f.ones() {
                    if let Some(r) = self.rows.get(i) {
                        row.add_assign(r);
                    }
                }
                row
            })
            .collect();
        LinearMap::from_rows(self.source, rows).kernel()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_vector_lies_in_the_span_of_itself_and_not_of_an_independent_one() {
        let a = BitVec::from_u64(5, 0b10110);
        let b = BitVec::from_u64(5, 0b00011);
        let s = Subspace::span(5, [a.clone()]);
        assert!(s.contains(&a));
        assert!(!s.contains(&b));
        let t = Subspace::span(5, [a.clone(), b.clone(), a.add(&b)]);
        assert_eq!(t.dim(), 2);
        assert!(t.contains(&a.add(&b)));
    }

    #[test]
    fn budgeted_insertion_charges_by_size_and_stops_when_spent() {
        let mut s = Subspace::zero(130);
        let mut b = Budget::with_units(100);
        // 130 coordinates = 3 words; an empty subspace costs 2·1·3 = 6.
        assert_eq!(
            s.try_insert(BitVec::unit(130, 5).unwrap(), &mut b),
            Ok(true)
        );
        assert_eq!(b.spent(), 6);
        assert_eq!(
            s.try_reduce(&BitVec::unit(130, 5).unwrap(), &mut b)
                .map(|r| r.is_zero()),
            Ok(true)
        );
        let mut tiny = Budget::with_units(1);
        assert_eq!(
            s.try_insert(BitVec::unit(130, 7).unwrap(), &mut tiny),
            Err(Exhausted)
        );
        assert_eq!(
            s.dim(),
            1,
            "a refused insertion leaves the subspace unchanged"
        );
    }

    /// The word kernel equals `LinearMap::kernel` (same canonical basis)
    /// on random matrices with 1 to 64 columns, including full and empty
    /// row sets.
    #[test]
    fn word_kernel_matches_the_bitvec_kernel() {
        let mut x = 0x2545_F491_4F6C_DD1Du64;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            x
        };
        for n in 1..=64usize {
            for _ in 0..20 {
                let m = (next() % 70) as usize;
                let sparse = next() % 2 == 0;
                let rows: Vec<u64> = (0..m)
                    .map(|_| {
                        if sparse {
                            next() & next() & next()
                        } else {
                            next()
                        }
                    })
                    .collect();
                let bit_rows: Vec<BitVec> = rows.iter().map(|&r| BitVec::from_u64(n, r)).collect();
                let want = LinearMap::from_rows(n, bit_rows).kernel();
                let got = Subspace::kernel_of_word_rows(n, &rows).unwrap();
                assert_eq!(got, want, "n = {n}, rows {rows:x?}");
            }
        }
        assert!(Subspace::kernel_of_word_rows(65, &[]).is_none());
    }

    /// BitVec against a plain `Vec<bool>` model on both sides of the
    /// inline/heap boundary (lengths 0, 1, 63, 64, 65, 128, 130): set,
    /// get, add, dot, leading, weight, concat, slice, order and equality.
    #[test]
    fn bit_vectors_match_a_boolean_model_across_the_word_boundary() {
        let mut x = 0x9E37_79B9_7F4A_7C15u64;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            x
        };
        let lens = [0usize, 1, 63, 64, 65, 128, 130];
        for &n in &lens {
            for _ in 0..30 {
                let a: Vec<bool> = (0..n).map(|_| next() % 3 == 0).collect();
                let b: Vec<bool> = (0..n).map(|_| next() % 2 == 0).collect();
                let va = BitVec::from_bools(&a);
                let vb = BitVec::from_bools(&b);
                assert_eq!(va.len(), n);
                assert!((0..n + 2).all(|i| va.get(i) == a.get(i).copied().unwrap_or(false)));
                let sum: Vec<bool> = a.iter().zip(&b).map(|(p, q)| p ^ q).collect();
                assert_eq!(va.add(&vb), BitVec::from_bools(&sum));
                let dot = a.iter().zip(&b).filter(|(p, q)| **p && **q).count() % 2 == 1;
                assert_eq!(va.dot(&vb), dot);
                assert_eq!(va.leading(), a.iter().position(|&p| p));
                assert_eq!(va.weight(), a.iter().filter(|&&p| p).count());
                assert_eq!(va.is_zero(), a.iter().all(|&p| !p));
                let cat: Vec<bool> = a.iter().chain(&b).copied().collect();
                assert_eq!(va.concat(&vb), BitVec::from_bools(&cat));
                if n >= 2 {
                    assert_eq!(va.slice(1, n - 1), BitVec::from_bools(&a[1..]));
                }
                // Same length: the order is that of the words, i.e. of the
                // bit patterns read as little-endian numbers word by word.
                let words = |v: &[bool]| -> Vec<u64> {
                    v.chunks(64)
                        .map(|c| {
                            c.iter()
                                .rev()
                                .fold(0u64, |w, &bit| (w << 1) | u64::from(bit))
                        })
                        .collect()
                };
                assert_eq!(va.cmp(&vb), words(&a).cmp(&words(&b)));
                assert_eq!(va == vb, a == b);
            }
        }
        // Different lengths: the shorter is smaller, whatever the bits.
        let long = BitVec::zeros(65);
        let short = BitVec::from_u64(64, u64::MAX);
        assert!(short < long);
        assert_ne!(BitVec::zeros(64), BitVec::zeros(65));
    }

    #[test]
    fn rank_nullity_holds_for_a_small_map() {
        let rows = vec![
            BitVec::from_u64(4, 0b0011),
            BitVec::from_u64(4, 0b0110),
            BitVec::from_u64(4, 0b0101),
        ];
        let m = LinearMap::from_rows(4, rows);
        assert_eq!(m.rank(), 2);
        let k = m.kernel();
        assert_eq!(k.dim(), 2);
        for v in k.elements().unwrap() {
            assert!(m.apply(&v).is_zero());
        }
    }
}
