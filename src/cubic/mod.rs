//! Layer 4b: the arithmetic behind descent via 3-isogeny.
//!
//! * `eisenstein`: the ring Z\[ω\] of integers of K = Q(√−3), ω = (−1 + √−3)/2
//!   (class number 1, units ±ω^i), elements written (A + B√−3)/2 with
//!   A ≡ B mod 2; norms, conjugates, a prime above each p ≡ 1 mod 3
//!   (p = a² + 3b², by Cornacchia's algorithm), the cubic residue
//!   character at a split prime [IR90, 9.3] (Ireland–Rosen, "A Classical
//!   Introduction to Modern Number Theory", ch. 9).
//! * `local`: plane cubics F(u, v) = c·w³ with F a binary cubic form —
//!   the homogeneous spaces of a 3-isogeny on y² = x³ + k — and their
//!   exact solubility over Q_p, by a p-adic tree over P¹(Z_p) that
//!   decides each residue class by the cube class of F/c (units mod p,
//!   or mod 9 at p = 3) or by Hensel's lemma at a zero of F, with a
//!   witness a reader can re-check; over R every such cubic has a point
//!   (odd degree).
//! * `plane`: general plane cubics C(u, v, w) = 0 (ten coefficients), the
//!   shape of the homogeneous spaces of a 3-isogeny with α ≠ 0, and their
//!   exact solubility over Q_p by a tree over the residue classes of three
//!   charts of P²(Z_p) with Hensel's lemma, with re-checkable witnesses
//!   (not yet used by the descent).
//! * `search`: rational points on F(u, v) = c·w³ of bounded height.
//! * `quadratic`: a quadratic field Q(√D) — ideals as binary quadratic
//!   forms, reduction with its multiplier, the class group and its 3-part,
//!   the fundamental unit, and the norm-one part of K(S,3) (Cohen, "A
//!   Course in Computational Algebraic Number Theory", §5.2–5.7).

pub(crate) mod eisenstein;
pub(crate) mod local;
pub(crate) mod plane;
pub(crate) mod quadratic;
pub(crate) mod search;

pub(crate) use eisenstein::{prime_above, reduce_mod, Eisenstein};
pub use local::{solubility_at, BinaryCubicCurve, CubicLocal, CubicWitness};
pub use plane::{PlaneCubic, PlaneCubicWitness, PLANE_CUBIC_MONOMIALS};
pub use search::{search_points, CubicPoint};
