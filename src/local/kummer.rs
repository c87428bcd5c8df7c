//! The local image of the 2-isogeny descent at an odd prime, in closed
//! form from valuations and residues.
//!
//! # Statement
//! Let `p` be an odd prime, `E: y² = x³ + ax² + bx` over `Q_p` with
//! `b(a² − 4b) ≠ 0`, `f(x) = x² + ax + b`. The image of the connecting map
//! `E(Q_p) → Q_p*/Q_p*²`, `(x, y) ↦ x`, `(0, 0) ↦ b`, `O ↦ 1`
//! [SilvermanTate92, III.5] is
//! ```text
//! W_p = {1, b} ∪ {x : f(x) = 0} ∪ {x ∈ Q_p* : x·f(x) ∈ Q_p*²}   (as classes).
//! ```
//! [`odd_image_members`] decides it valuation by valuation. Write
//! `x = p^k w` with `w` a unit; the three terms `x²`, `ax`, `b` of `f` have
//! valuations `2k`, `α + k`, `β` (`α = v(a)`, absent for `a = 0`,
//! `β = v(b)`). Let `m` be the least of them and `g` the residue
//! polynomial of `F(w) = p^{−m} f(p^k w) ∈ Z_p[w]` (the terms of valuation
//! `m`, reduced mod `p`). Then, for the units `w` above a residue `w̄ ≠ 0`:
//!
//! 1. `g(w̄) ≠ 0`: `F(w) ∈ g(w̄)·(1 + pZ_p)`, so `x·f(x)` is a square iff
//!    `k + m` is even and `w̄·g(w̄)` is a square mod `p`; the class reached
//!    is that of `p^k w̄`.
//! 2. `w̄` a simple root of `g`: by Hensel's lemma `F(w) = (w − w_e)·G(w)`
//!    with `w_e ≡ w̄` a root and `G(w) ≡ g′(w̄) ≢ 0`; `w − w_e` runs through
//!    all of `pZ_p`, so some `w` makes `x·f(x)` a square, and the class
//!    reached is that of `p^k w̄` (the 2-torsion point `(p^k w_e, 0)` has
//!    it too).
//! 3. `w̄ = w₀` a double root of `g` (only when all three terms tie,
//!    `k = α`, `β = 2α`, and `δ = v(a² − 4b) > 2k`): the class of `x` is
//!    fixed, `c = p^k w₀`, and `y = x + a/2` runs through `p^{k+1}Z_p`, with
//!    `f(x) = y² − D/4`, `D = a² − 4b = p^δ D_u`. Then `f(x) ∈ c·Q_p*²` or
//!    `f(x) = 0` for some such `y` iff (a) `c = 1` and `2k + 2 < δ` (take
//!    `v(y) < δ/2`: `f(x) ∈ y²(1 + pZ_p)`); or (b) `c = −D` (take
//!    `v(y) > δ/2`, e.g. `y = 0`); or (c) `δ` even, `δ ≥ 2k + 2`, and
//!    either `D_u` is a square mod `p` (a root of `f`) or `c = p^δ·(s² −
//!    D_u/4)` for some unit `s` (`v(y) = δ/2`).
//!
//! Only finitely many `k` behave differently: the order of the three
//! valuations changes at `k = α`, `β/2`, `β − α`, and beyond them only the
//! parities of `k` and `k + m` matter, so every `k` from two below the
//! least to two above the greatest of these is examined. (All of this is
//! elementary `p`-adic analysis, common practice; the shape of the answer
//! — `W_p` is unramified of order 2 at good reduction, and contains the
//! images of the 2-torsion — is [Silverman09, X.4.1], [SilvermanTate92,
//! III.5].)
//!
//! # Residue counts
//! Which unit classes case 1 reaches: for `p < 17` every residue is tried.
//! For `p ≥ 17`: with one term, `g = w²` reaches the squares only, `g = āw`
//! everything or nothing by `(ā/p)`, `g = b̄` the class of `b̄`. With two or
//! three terms and `g` without a double root both classes are reached: the
//! number of `w ≠ 0, g(w) ≠ 0` with `(w/p) = ε` and `(w·g(w)/p) = 1` is
//! `(p − 2 − ε(−c/p) − ε′(c/p) − εε′)/4 ≥ (p − 5)/4` for `g` of degree
//! one or `g = w(w + c)` (Jacobsthal's count of consecutive residues,
//! [IrelandRosen90, Ch. 5 §3] from memory; re-derived here), and at least
//! `(p − 7 − 2√p)/4 > 0` for `w·g(w)` a cubic with three distinct roots,
//! by the Hasse–Weil bound for `y² = w·g(w)` [Silverman09, V.1.1]. For a
//! double root, `w·(w − w₀)²` is a square iff `w` is (`w ≠ w₀`). In case
//! 3(c) `s² − N` (`N` a non-residue) takes both kinds of values on
//! `s ≠ 0` when `p ≥ 5` (the conic `t² = s² − N` has `p − 1` affine
//! points); below 17 the residues are tried.
//!
//! The test `odd_closed_form_agrees_with_the_class_trees` compares the
//! result with the local solubility tests of the quartic layer on many
//! thousands of `(a, b, p)` with deep valuations, every case above.
//!
//! # Witnesses
//! [`OddWitnesses::witness`] turns cases 1 and 2 into a point of the
//! homogeneous space `C_d`: an `x = d·s²` with `s = p^j·t₁/t₂` small and
//! `x·f(x)` a non-zero square, so the quartic layer needs no class tree
//! for those classes (case 3, double roots, is left to the tree). Case 2
//! is made explicit in [`OddWitnesses::near_root`]: Newton's method gives
//! the root and `√(w_e/d)` modulo `p^{r+1}` (`r ≤ 2`), and rational
//! reconstruction keeps `t₁, t₂ ≤ p^{3/2}`. The quartic layer re-checks
//! every such point exactly; the test
//! `quartic::image_word::tests::direct_witnesses_are_points_of_their_spaces`
//! checks the construction itself (without that fallback) on thousands of
//! models.

use crate::arith::word::{inv_mod, isqrt_u128, jacobi_u64, mul_mod, sqrt_mod};

/// Below this the residue counts are done by trying every residue (the
/// counts of the module docs need `p ≥ 17`).
const TRY_EVERY_RESIDUE_BELOW: u64 = 17;

/// `(v_p(x), (x/p^v) mod p)` for `x ≠ 0`.
fn split(mut x: i128, p: u64) -> (i64, u64) {
    if let Ok(mut m) = u64::try_from(x.unsigned_abs()) {
        // The common case in u64 arithmetic; the residue of −m is p − m.
        let mut v = 0;
        while m % p == 0 {
            m /= p;
            v += 1;
        }
        let r = m % p;
        return (v, if x < 0 { p - r } else { r });
    }
    let q = i128::from(p);
    let mut v = 0;
    while x % q == 0 {
        x /= q;
        v += 1;
    }
    (v, x.rem_euclid(q) as u64)
}

/// The Legendre symbol of a residue (`0 < x < p`); below 64 from a bit
/// mask of the squares.
fn chi(x: u64, p: u64) -> i8 {
    if p < 64 {
        return if SQUARES[p as usize] >> x & 1 == 1 {
            1
        } else {
            -1
        };
    }
    jacobi_u64(x, p)
}

/// Bit `x` of `SQUARES[m]` is set iff `x ≡ y² (mod m)` for some `y ≠ 0`.
const SQUARES: [u64; 64] = {
    let mut t = [0u64; 64];
    let mut m = 1;
    while m < 64 {
        let mut y = 1;
        while y < m {
            t[m] |= 1 << (y * y % m);
            y += 1;
        }
        m += 1;
    }
    t
};

/// `x·y mod p` (plain u64 arithmetic below 2^32).
fn mulp(x: u64, y: u64, p: u64) -> u64 {
    if p < 1 << 32 {
        x * y % p
    } else {
        mul_mod(x, y, p)
    }
}

/// The mask of the class `p^k·w` (`w` a unit with Legendre symbol `s`) in
/// the basis `{p, n}` of `crate::local::square_class`.
fn class_of(k: i64, s: i8) -> u8 {
    (k & 1) as u8 | if s < 0 { 2 } else { 0 }
}

/// `c2·w² + c1·w + c0 mod p`.
fn eval(g: [u64; 3], w: u64, p: u64) -> u64 {
    let [c0, c1, c2] = g;
    let t = (mulp(c2, w, p) + c1) % p;
    (mulp(t, w, p) + c0) % p
}

/// The roots of the residue polynomial `g` in `F_p*`.
enum Roots {
    /// Simple roots: the first `n` of the array (`n ≤ 2`).
    Simple([u64; 2], usize),
    /// One double root.
    Double(u64),
}

/// The roots of `g` in `F_p*`; the square root of the discriminant is
/// taken only when `rational` is `None` (with `rational` the classes of
/// the roots of `f` at this valuation are given instead, see
/// [`odd_image_members`]).
fn nonzero_roots(g: [u64; 3], p: u64, rational: Option<([u64; 2], usize)>) -> Option<Roots> {
    let [c0, c1, c2] = g;
    let neg = |x: u64| (p - x) % p;
    match (c2 != 0, c1 != 0, c0 != 0) {
        // Monomials: the only root is 0.
        (true, false, false) | (false, true, false) | (false, false, true) => {
            Some(Roots::Simple([0; 2], 0))
        }
        (false, true, true) => Some(Roots::Simple([mulp(neg(c0), inv_mod(c1, p)?, p), 0], 1)),
        (true, true, false) => Some(Roots::Simple([neg(c1), 0], 1)),
        (true, _, true) => {
            let disc = (mulp(c1, c1, p) + neg(mulp(4 % p, c0, p))) % p;
            let half = inv_mod(2, p)?;
            if disc == 0 {
                return Some(Roots::Double(mulp(neg(c1), half, p)));
            }
            if let Some((rs, n)) = rational {
                return Some(Roots::Simple(rs, n));
            }
            if chi(disc, p) < 0 {
                return Some(Roots::Simple([0; 2], 0));
            }
            let s = sqrt_mod(disc, p)?;
            let r1 = mulp((neg(c1) + s) % p, half, p);
            let r2 = mulp((neg(c1) + neg(s)) % p, half, p);
            Some(Roots::Simple([r1, r2], 2))
        }
        (false, false, false) => None,
    }
}

/// Which Legendre symbols `(w/p)` occur among the units `w` with
/// `g(w) ≠ 0` and `w·g(w)` a non-zero square: `(+1 occurs, −1 occurs)`.
fn unit_classes_reached(g: [u64; 3], p: u64) -> (bool, bool) {
    if p < TRY_EVERY_RESIDUE_BELOW {
        let (mut plus, mut minus) = (false, false);
        for w in 1..p {
            let gw = eval(g, w, p);
            if gw != 0 && chi(mulp(w, gw, p), p) > 0 {
                if chi(w, p) > 0 {
                    plus = true;
                } else {
                    minus = true;
                }
            }
        }
        return (plus, minus);
    }
    let [c0, c1, c2] = g;
    match (c2 != 0, c1 != 0, c0 != 0) {
        (true, false, false) => (true, false),
        (false, true, false) => {
            let s = chi(c1, p) > 0;
            (s, s)
        }
        (false, false, true) => {
            let s = chi(c0, p) > 0;
            (s, !s)
        }
        _ => match nonzero_roots(g, p, None) {
            Some(Roots::Double(_)) => (true, false),
            _ => (true, true),
        },
    }
}

/// Case 3 of the module docs: is the class `c` of `p^k w₀` reached?
fn double_root_reaches(c: u8, k: i64, delta: i64, du: u64, p: u64) -> bool {
    // (a) f(x) a square times y², x of class 1.
    if c == 0 && delta > 2 * k + 2 {
        return true;
    }
    // (b) f(x) ∈ −D·(1 + pZ_p).
    if c == class_of(delta, chi((p - du) % p, p)) {
        return true;
    }
    // (c) v(y) = δ/2.
    if delta % 2 != 0 || delta < 2 * k + 2 {
        return false;
    }
    if chi(du, p) > 0 {
        return true;
    }
    if c & 1 != 0 {
        return false;
    }
    let (qr, nqr) = if p < TRY_EVERY_RESIDUE_BELOW {
        let Some(quarter) = inv_mod(4, p) else {
            return false;
        };
        let n = mulp(du, quarter, p);
        let (mut qr, mut nqr) = (false, false);
        for s in 1..p {
            let t = (mulp(s, s, p) + p - n) % p;
            if t != 0 {
                if chi(t, p) > 0 {
                    qr = true;
                } else {
                    nqr = true;
                }
            }
        }
        (qr, nqr)
    } else {
        (true, true)
    };
    if c == 0 {
        qr
    } else {
        nqr
    }
}

/// The classes of `W_p` for `y² = x³ + ax² + bx` at the odd prime `p`, as
/// a set of masks (bit `c` set iff the class with mask `c` — bits `v odd`,
/// `u non-residue` — lies in `W_p`), by the closed form of the module
/// docs. `None` when `p` is not an odd word below `2^63`, `b(a² − 4b) = 0`,
/// or `a² − 4b` leaves `i128`. `p` must be prime (not checked).
pub(crate) fn odd_image_members(a: i128, b: i128, p: u64) -> Option<u8> {
    if p < 3 || p % 2 == 0 || p >= 1 << 63 || b == 0 {
        return None;
    }
    let d = a.checked_mul(a)?.checked_sub(b.checked_mul(4)?)?;
    if d == 0 {
        return None;
    }
    let (beta, bu) = split(b, p);
    let alpha = (a != 0).then(|| split(a, p));
    let (delta, du) = split(d, p);
    // When a² − 4b is a square in Z, the roots e = (−a ± r)/2 of f are
    // rational: their valuations and unit residues come from 2e = −a ± r
    // (2 is a unit), with no square root mod p. (`None` when r or −a ± r
    // leaves the words.)
    let rational: Option<[(i64, u64); 2]> = u128::try_from(d).ok().and_then(|du| {
        let r = i128::try_from(isqrt_u128(du)).ok()?;
        if r.checked_mul(r)? != d {
            return None;
        }
        let half = inv_mod(2, p)?;
        let root = |t: i128| {
            let (v, u) = split(t, p);
            (v, mulp(u, half, p))
        };
        Some([root((-a).checked_add(r)?), root((-a).checked_sub(r)?)])
    });
    let (mut lo, mut hi) = (beta.div_euclid(2), (beta + 1).div_euclid(2));
    if let Some((al, _)) = alpha {
        lo = lo.min(al).min(beta - al);
        hi = hi.max(al).max(beta - al);
    }
    let mut members = 0u8;
    for k in lo - 2..=hi + 2 {
        // Valuation k reaches only the two classes of parity k.
        let level = 1 << class_of(k, 1) | 1 << class_of(k, -1);
        if members & level == level {
            continue;
        }
        let (m, g) = residue_poly(k, beta, bu, alpha);
        if (k + m).rem_euclid(2) == 0 {
            let (plus, minus) = unit_classes_reached(g, p);
            if plus {
                members |= 1 << class_of(k, 1);
            }
            if minus {
                members |= 1 << class_of(k, -1);
            }
        }
        // The roots of f of valuation k, as roots of g (they are the
        // residues of e/p^k).
        let at_k = rational.map(|rs| {
            let mut out = ([0u64; 2], 0);
            for (v, u) in rs {
                if v == k {
                    out.0[out.1] = u;
                    out.1 += 1;
                }
            }
            out
        });
        match nonzero_roots(g, p, at_k)? {
            Roots::Simple(rs, n) => {
                for &r in &rs[..n] {
                    members |= 1 << class_of(k, chi(r, p));
                }
            }
            Roots::Double(w0) => {
                let c = class_of(k, chi(w0, p));
                if double_root_reaches(c, k, delta, du, p) {
                    members |= 1 << c;
                }
            }
        }
    }
    Some(members)
}

/// At most this many units `t` are tried per valuation by
/// [`OddWitnesses::witness`] before the caller runs its class tree.
const DIRECT_TRIES: u64 = 48;

/// `(m, g)` of the module docs at valuation `k`: the least of the
/// valuations `2k`, `α + k`, `β` of the terms `x²`, `ax`, `b` of `f(p^k w)`,
/// and the residue polynomial `[g₀, g₁, g₂]` (`g₂w² + g₁w + g₀`) of the
/// terms of that valuation.
fn residue_poly(k: i64, beta: i64, bu: u64, alpha: Option<(i64, u64)>) -> (i64, [u64; 3]) {
    let t2 = alpha.map(|(al, au)| (al + k, au));
    let m = (2 * k).min(beta).min(t2.map_or(i64::MAX, |t| t.0));
    let g = [
        if beta == m { bu } else { 0 },
        t2.filter(|t| t.0 == m).map_or(0, |t| t.1),
        u64::from(2 * k == m),
    ];
    (m, g)
}

/// A witness of [`OddWitnesses::witness`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct DirectWitness {
    /// The point `(X, Z)` of `C_d`.
    pub(crate) point: (i128, i128),
    /// Residues and roots tried (charged like the class tree's tests).
    pub(crate) tries: u64,
    /// Built near a simple root of `g` (case 2), else by case 1.
    pub(crate) near_root: bool,
}

/// Most valuations `k` that [`OddWitnesses`] keeps (the range of the
/// module docs is usually a handful).
const MAX_LEVELS: usize = 24;

/// What case 1 and case 2 of the module docs say at one valuation `k`.
#[derive(Debug, Clone, Copy, Default)]
struct Level {
    k: i64,
    m: i64,
    g: [u64; 3],
    /// Case 1 reaches units `w` with `(w/p) = +1` / `−1` (both false when
    /// `k + m` is odd).
    plus: bool,
    minus: bool,
    /// The simple non-zero roots of `g` (none for a double root).
    roots: [u64; 2],
    nroots: usize,
}

/// The valuations and residues of `y² = x³ + ax² + bx` at an odd prime
/// that [`OddWitnesses::witness`] needs, computed once per local image:
/// for every valuation `k` of the module docs' range (widened to hold
/// `v(d) ∈ {0, 1}` of the class representatives), `m`, `g`, the unit
/// classes case 1 reaches and the simple roots of `g`.
#[derive(Debug, Clone, Copy)]
pub(crate) struct OddWitnesses {
    p: u64,
    a: i128,
    b: i128,
    beta: i64,
    alpha: Option<(i64, u64)>,
    levels: [Level; MAX_LEVELS],
    nlevels: usize,
}

impl OddWitnesses {
    /// `None` when `p` is not an odd word below `2^63`, `b = 0`, or the
    /// range of valuations is unusually long (more than 24).
    pub(crate) fn new(a: i128, b: i128, p: u64) -> Option<OddWitnesses> {
        if p < 3 || p % 2 == 0 || p >= 1 << 63 || b == 0 {
            return None;
        }
        let (beta, bu) = split(b, p);
        let alpha = (a != 0).then(|| split(a, p));
        let (mut lo, mut hi) = (beta.div_euclid(2), (beta + 1).div_euclid(2));
        if let Some((al, _)) = alpha {
            lo = lo.min(al).min(beta - al);
            hi = hi.max(al).max(beta - al);
        }
        let (kl, kh) = (lo.min(0) - 2, hi.max(1) + 2);
        let n = usize::try_from(kh - kl + 1).ok()?;
        if n > MAX_LEVELS {
            return None;
        }
        let mut levels = [Level::default(); MAX_LEVELS];
        for (slot, k) in levels.iter_mut().zip(kl..=kh) {
            let (m, g) = residue_poly(k, beta, bu, alpha);
            let (plus, minus) = if (k + m).rem_euclid(2) == 0 {
                unit_classes_reached(g, p)
            } else {
                (false, false)
            };
            let (roots, nroots) = match nonzero_roots(g, p, None) {
                Some(Roots::Simple(rs, n)) => (rs, n),
                _ => ([0; 2], 0),
            };
            *slot = Level {
                k,
                m,
                g,
                plus,
                minus,
                roots,
                nroots,
            };
        }
        Some(OddWitnesses {
            p,
            a,
            b,
            beta,
            alpha,
            levels,
            nlevels: n,
        })
    }

    /// A point of the homogeneous space `C_d` over `Q_p` built from case 1
    /// or case 2 of the module docs, without a class tree: `(X, Z)` with
    /// `X/Z = s = p^j·t` (`t` a unit), such that `x = d·s²` has `x·f(x)` a
    /// non-zero square in `Q_p`, with the number of residues and roots
    /// tried. `None` when neither case reaches the class of `d`
    /// this way (it may still be in `W_p`: case 3), or something leaves
    /// the words.
    ///
    /// Why it is a point: `x = p^k·w` with `k = v(d) + 2j` and
    /// `w = (d/p^{v(d)})·t²`, so `w̄ = d̄·t̄²`; in case 1 (`t ≤ 48` an
    /// integer), when `k + m` is even, `g(w̄) ≠ 0` and `w̄·g(w̄)` is a
    /// non-zero square mod `p`, `x·f(x)` is a non-zero square; case 2 is
    /// [`OddWitnesses::near_root`]. For the integral model
    /// `g_d(X, Z) = d·d₁²X⁴ + a·d₁²X²Z² + (b/h)·d₁Z⁴` (`h = gcd(d, b)`,
    /// `d = d₁h`) of `C_d`, `g_d(X, Z) = d₁²Z⁴·f(x)/d` with `x = d(X/Z)²`
    /// (expand: `d₁²(dX⁴ + aX²Z² + (b/d)Z⁴)` and `d₁²/d = d₁/h`), and
    /// `f(x)/d = x·f(x)/(d·s)²`: a non-zero square in `Q_p`. `(X, Z)` is
    /// `(p^j·t₁, t₂)` for `j ≥ 0` and `(t₁, p^{−j}·t₂)` for `j < 0`
    /// (`t = t₁/t₂`, both prime to `p`), so `p` does not divide both.
    /// (Elementary, common practice.) The caller still checks the square
    /// exactly (`finish` of the quartic layer) and falls back to the class
    /// tree when the check fails, so the witness never rests on this
    /// derivation alone.
    pub(crate) fn witness(&self, d: i128) -> Option<DirectWitness> {
        let p = self.p;
        if d == 0 {
            return None;
        }
        let (e, du) = split(d, p);
        let want_plus = chi(du, p) > 0;
        let levels = &self.levels[..self.nlevels];
        let k0 = levels.first()?.k;
        // Valuations k ≡ v(d) (mod 2), nearest to v(d) first (the smallest
        // witnesses).
        let ks = || {
            (0..=self.nlevels as i64)
                .flat_map(move |dist| {
                    [e - 2 * dist, e + 2 * dist]
                        .into_iter()
                        .take(1 + usize::from(dist > 0))
                })
                .filter_map(move |k| usize::try_from(k - k0).ok().and_then(|i| levels.get(i)))
        };
        let limit = ((p - 1) / 2).min(DIRECT_TRIES);
        let mut tries = 0u64;
        for lv in ks() {
            if !(if want_plus { lv.plus } else { lv.minus }) {
                continue;
            }
            for t in 1..=limit {
                tries += 1;
                let w = mulp(du, mulp(t, t, p), p);
                let gw = eval(lv.g, w, p);
                if gw != 0 && chi(mulp(w, gw, p), p) > 0 {
                    return self
                        .point(lv.k - e, (i128::from(t), 1))
                        .map(|point| DirectWitness {
                            point,
                            tries,
                            near_root: false,
                        });
                }
            }
        }
        if p >= 1 << 20 {
            return None;
        }
        for lv in ks() {
            for &root in &lv.roots[..lv.nroots] {
                tries += 1;
                if (chi(root, p) > 0) != want_plus {
                    continue;
                }
                if let Some(st) = self.near_root(d, lv.k, lv.m, lv.g, root) {
                    return self.point(lv.k - e, st).map(|point| DirectWitness {
                        point,
                        tries,
                        near_root: true,
                    });
                }
            }
        }
        None
    }

    /// `(X, Z)` for `X/Z = p^j·t₁/t₂` (module docs of [`OddWitnesses::witness`]).
    fn point(&self, two_j: i64, (t1, t2): (i128, i128)) -> Option<(i128, i128)> {
        let j = two_j / 2;
        let pj = i128::from(self.p).checked_pow(u32::try_from(j.unsigned_abs()).ok()?)?;
        Some(if j >= 0 {
            (pj.checked_mul(t1)?, t2)
        } else {
            (t1, pj.checked_mul(t2)?)
        })
    }

    /// Case 2 of the module docs, made explicit: a unit `t = t₁/t₂` such
    /// that `x = d·(p^j t)²` (`k = v(d) + 2j`) has `x·f(x)` a non-zero
    /// square, near the root `w_e ≡ root` of `F(w) = p^{−m} f(p^k w)`.
    ///
    /// With `w = d_u·t²` (`d_u = d/p^{v(d)}`) and `w − w_e = p^r·η`
    /// (`η` a unit), `F(w) = (w − w_e)·G(w)` with `G(w) ≡ g′(root)
    /// (mod p)` (Hensel: the root is simple), so `x·f(x) =
    /// p^{k+m+r}·w·η·G(w)` is a square iff `k + m + r` is even and
    /// `root·η̄·g′(root)` is a square mod `p`. Take `r ∈ {1, 2}` of the
    /// right parity, `w_e` and `τ` with `d_u·τ² ≡ w_e` modulo `P = p^{r+1}`
    /// (Newton's method; `τ̄` exists since `root` and `d_u` have the same
    /// Legendre symbol), and `t ≡ τ + p^r·z (mod P)`: then `w − w_e ≡
    /// p^r·2d_u·τ·z (mod P)` (the term `p^{2r}` vanishes as `2r ≥ r + 1`),
    /// so `z` is chosen with `(2d_u·τ·z/p)` the symbol wanted. Finally
    /// `t₁/t₂ ≡ t (mod P)` with `|t₁|, t₂ ≤ √P` by rational reconstruction
    /// (the extended Euclidean algorithm stopped halfway, common
    /// practice), both prime to `p`, so the witness stays small.
    fn near_root(&self, d: i128, k: i64, m: i64, g: [u64; 3], root: u64) -> Option<(i128, i128)> {
        let p = self.p;
        let r: u32 = if (k + m).rem_euclid(2) == 0 { 2 } else { 1 };
        let big = p.checked_pow(r + 1)?;
        let pr = p.pow(r);
        let pow_or_zero = |e: i64| -> u64 {
            u32::try_from(e)
                .ok()
                .and_then(|e| p.checked_pow(e))
                .map_or(0, |v| v % big)
        };
        // F = F₂w² + F₁w + F₀ modulo P.
        let f2 = pow_or_zero(2 * k - m);
        let f1 = match self.alpha {
            Some((al, _)) => mul_mod(unit_mod(self.a, p, big), pow_or_zero(al + k - m), big),
            None => 0,
        };
        let f0 = mul_mod(unit_mod(self.b, p, big), pow_or_zero(self.beta - m), big);
        let eval_big = |w: u64| {
            let t = (mul_mod(f2, w, big) + f1) % big;
            (mul_mod(t, w, big) + f0) % big
        };
        let deriv = |w: u64| (mul_mod(2 * f2 % big, w, big) + f1) % big;
        // Newton's method from precision p: one step reaches p², two reach
        // p⁴ ⊇ P; the step at precision p^i needs the inverse only mod p^i.
        let steps = if r == 1 { 1 } else { 2 };
        let newton = |x0: u64, val: &dyn Fn(u64) -> u64, der: &dyn Fn(u64) -> u64| {
            let mut x = x0;
            let mut inv = inv_mod(der(x) % p, p)?;
            for step in 0..steps {
                x = (x + big - mul_mod(val(x), inv, big)) % big;
                if step + 1 < steps {
                    // inv ← inv·(2 − der(x)·inv): now exact mod p².
                    let t = mul_mod(der(x), inv, big);
                    inv = mul_mod(inv, (2 + big - t) % big, big);
                }
            }
            Some(x)
        };
        let we = newton(root, &eval_big, &deriv)?;
        let du = unit_mod(d, p, big);
        let q = mul_mod(we, inv_mod(du, big)?, big);
        let tau0 = sqrt_mod(q % p, p)?;
        let sq = |x: u64| (mul_mod(x, x, big) + big - q) % big;
        let twice = |x: u64| mul_mod(2, x, big);
        let tau = newton(tau0, &sq, &twice)?;
        if tau % p == 0 || eval_big(we) != 0 || sq(tau) != 0 {
            return None;
        }
        // The symbol wanted for η̄: that of root·g′(root).
        let [_, g1, g2] = g;
        let gd = (mulp(2 * g2 % p, root, p) + g1) % p;
        let want = chi(mulp(root, gd, p), p);
        let base = mulp(mulp(2, du % p, p), tau % p, p);
        let mut z = 1u64;
        while chi(mulp(base, z, p), p) != want {
            z += 1;
            if z >= p {
                return None;
            }
        }
        let t = (tau + mul_mod(pr, z, big)) % big;
        reconstruct(t, big, p)
    }
}

/// `x/p^{v(x)} mod m` for `x ≠ 0` (`p | m`, so the result is a unit mod
/// `p`).
fn unit_mod(mut x: i128, p: u64, m: u64) -> u64 {
    if let Ok(small) = i64::try_from(x) {
        // The common case in u64 division.
        let mut mag = small.unsigned_abs();
        while mag != 0 && mag % p == 0 {
            mag /= p;
        }
        let r = mag % m;
        return if small < 0 && r != 0 { m - r } else { r };
    }
    let q = i128::from(p);
    while x != 0 && x % q == 0 {
        x /= q;
    }
    x.rem_euclid(i128::from(m)) as u64
}

/// `(t₁, t₂)` with `t₁ ≡ t·t₂ (mod m)`, `0 < t₂`, `|t₁|, t₂ ≤ √m`, both
/// prime to `p`: the extended Euclidean algorithm on `(m, t)` stopped at
/// the first remainder below `√m` (rational reconstruction, common
/// practice); `None` when that fraction has `p` in it.
fn reconstruct(t: u64, m: u64, p: u64) -> Option<(i128, i128)> {
    // m < 2^63: remainders and cofactors stay below m in absolute value.
    let m = i64::try_from(m).ok()?;
    let bound = isqrt_u128(m as u128) as i64;
    let (mut r0, mut r1) = (m, i64::try_from(t).ok()?);
    let (mut s0, mut s1) = (0i64, 1i64);
    while r1 > bound {
        let q = r0 / r1;
        (r0, r1) = (r1, r0 - q * r1);
        (s0, s1) = (s1, s0 - q * s1);
    }
    let (t1, t2) = if s1 < 0 { (-r1, -s1) } else { (r1, s1) };
    let q = i64::try_from(p).ok()?;
    (t2 != 0 && t1 % q != 0 && t2 % q != 0).then_some((i128::from(t1), i128::from(t2)))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Good reduction: the unramified classes {1, n} (masks 0 and 2),
    /// [Silverman09, X.4.1] (the statement quoted in `quartic::image`).
    #[test]
    fn good_reduction_gives_the_unramified_classes() {
        for (a, b) in [(1i128, 1i128), (0, -1), (3, 1), (-5, 7)] {
            for p in [5u64, 7, 11, 101, 1_000_003] {
                let d = a * a - 4 * b;
                if (b * d) % i128::from(p) == 0 {
                    continue;
                }
                assert_eq!(odd_image_members(a, b, p), Some(0b0101), "{a} {b} {p}");
            }
        }
    }

    /// The table of squares below 64 against the Jacobi symbol (binary
    /// reciprocity, a separate computation).
    #[test]
    fn the_square_table_agrees_with_the_jacobi_symbol() {
        for p in [
            3u64, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61,
        ] {
            for x in 1..p {
                assert_eq!(chi(x, p), jacobi_u64(x, p), "({x}/{p})");
            }
        }
    }

    /// Declined inputs.
    #[test]
    fn singular_or_even_inputs_are_declined() {
        assert_eq!(odd_image_members(2, 1, 3), None); // a² = 4b
        assert_eq!(odd_image_members(2, 0, 3), None);
        assert_eq!(odd_image_members(1, 1, 2), None);
        assert_eq!(odd_image_members(i128::MAX, 1, 3), None);
    }
}
