//! Layer 4: rational conics — Legendre's equation, zeros of ternary
//! quadratic forms, and parametrisations by binary quadratic forms.
//!
//! # 1. The problem
//! Given nonzero integers a, b, c, decide whether
//!
//! > a X² + b Y² + c Z² = 0  (★)
//!
//! has a nontrivial rational solution, and find one. By the
//! Hasse–Minkowski theorem [Serre73, IV.3.2, Thm. 8] (★) is soluble over Q
//! iff it is soluble over every completion Q_v, and over Q_v iff the Hilbert
//! symbol (−ac, −bc)_v is 1 [Serre73, IV.2.2, Thm. 6]. So every answer is
//! either a point or a place of local insolubility ([`ConicSolution`]).
//!
//! # 2. Reduction ([`solve_diagonal`])
//! Factor a, b, c. Writing each coefficient as (square-free) · (square)
//! and absorbing the squares into the variables, and dividing by
//! gcd(a, b, c), we may assume a, b, c square-free with gcd 1. If a prime
//! set g divides a and b, multiplying (★) by g and substituting X = X′/g,
//! Y = Y′/g turns (a, b, c) into (a/g, b/g, cg) [IrelandRosen90, 17.3];
//! |abc| drops by g, so a few such steps make a, b, c pairwise coprime.
//! Every step is a rational change of variables, so points map back
//! exactly and local solubility is unchanged. The primes of the reduced
//! coefficients all come from the original factorisations: no new
//! factoring is ever needed.
//!
//! # 3. Legendre's conditions
//! For square-free pairwise coprime a, b, c, (★) is soluble iff a, b, c do
//! not all have the same sign and −bc, −ca, −ab are squares modulo |a|, |b|,
//! |c| respectively (Legendre's theorem [IrelandRosen90, 17.3, Thm. 1]).
//! The first failing condition is reported: the real place, or the odd
//! prime p (Legendre symbol via [`crate::local::legendre`]).
//!
//! # 4. The lattice of solutions modulo abc
//! For each odd p | a let λ be a square root of −c/b modulo p
//! (`local::sqrt_mod_prime`, crate-private); for p = 2, λ = 1. Glue by the
//! Chinese remainder theorem to λ_a modulo |a|, and likewise λ_b, λ_c. Put
//!
//! > L = { (X, Y, Z) ∈ Z³ : Y ≡ λ_a Z (mod a), Z ≡ λ_b X (mod b),
//! >   X ≡ λ_c Y (mod c) }.
//!
//! For v ∈ L and p | a, a X² + b Y² + c Z² ≡ Z²(bλ_a² + c) ≡ 0 (mod p), so
//! abc divides Q(v) := aX² + bY² + cZ². L has index |abc| in Z³ (one
//! linear condition modulo each prime of abc); a basis is computed from the
//! generators by an echelon form.
//!
//! # 5. Finding the point ([CremonaRusin03, §3] uses the same lattice)
//! Exactly one pair of coefficients has equal signs; call it (a, b) (after
//! permuting), so that after multiplying by −1 we may take a, b > 0 > c.
//!
//! **Lemma.** If (a, b) ≠ (1, 1), some nonzero v ∈ L with
//! N(v) := |a|X² + |b|Y² + |c|Z² ≤ 3|abc| has Q(v) ∈ {0, −abc}.
//!
//! *Proof.* The box |X| ≤ √(b|c|), |Y| ≤ √(a|c|), |Z| ≤ √(ab) has volume
//! 8|abc| = 2³·covol(L), so by Minkowski's convex body theorem (common
//! practice) it holds a nonzero v ∈ L, and N(v) ≤ 3|abc| there. On the box,
//! −|abc| ≤ −|c|Z² ≤ Q(v) ≤ aX² + bY² ≤ 2|abc|. Equality on the left
//! forces X = Y = 0 and Z² = ab, impossible for coprime square-free
//! (a, b) ≠ (1, 1); on the right it forces b|c| and a|c| to be squares,
//! i.e. a = b = |c| = 1. As |abc| divides Q(v), Q(v) ∈ {0, |abc|} and
//! |abc| = −abc. ∎
//!
//! The identity (checked by expanding)
//!
//! > a(XZ + bY)² + b(YZ − aX)² + c(Z² + ab)² = (Z² + ab)(Q(v) + abc)
//!
//! turns a vector with Q(v) = −abc into a zero of (★), nontrivial because
//! Z² + ab > 0. So the algorithm LLL-reduces a basis of L for the
//! positive form N (\[LLL82\], all-integer version [Cohen93, Alg. 2.6.7]),
//! lists every v ∈ L with N(v) ≤ 3|abc| by Fincke–Pohst enumeration
//! \[FinckePohst85\] in exact integer arithmetic (about (4π/3)·3^{3/2} ≈ 22
//! vectors up to sign, by volume), and takes the shortest zero, or else
//! applies the identity. (Should neither exist — the lemma says it cannot
//! — the radius is widened; every abc·w for a solution w lies in L, so the
//! loop ends. The budget bounds it in any case.)
//!
//! In the excluded case a = b = 1, (★) reads X² + Y² = nZ² with n = |c|.
//! The lattice {(X, Y) : X ≡ λY (mod n)}, λ² ≡ −1, has determinant n; an
//! LLL-reduced basis has first vector with X² + Y² ≤ √2·n < 2n, a positive
//! multiple of n, hence = n, and (X, Y, 1) is a point (Gauss's proof of the
//! two-squares theorem in lattice form; common practice).
//!
//! # 6. General ternary forms and parametrisations
//! `solve_ternary` diagonalises an integral ternary form over Q with
//! Jacobi's leading minors and solves the diagonal form (the factors of
//! the minors are supplied, so nothing larger is factored).
//! `parametrise` turns one point P into binary quadratic forms
//! (q₀, q₁, q₂) parametrising all rational points by the lines through P
//! (`ConicParametrisation`; both are crate-private, used by the second descent and checked by the unit tests in `src/conic/tests/`).
//!
//! # 7. Cost
//! After factoring: one square root modulo each prime of abc, an LLL
//! reduction in dimension 3 of entries of size |abc| (O(log|abc|) swaps),
//! and about 40 enumeration nodes. Measured figures are in
//! docs/performance.md, section "Conics".
//!
//! # References
//! \[Serre73\], \[IrelandRosen90\], \[CremonaRusin03\], \[LLL82\], \[Cohen93\],
//! \[FinckePohst85\], \[Cassels91\]; see docs/references.md.
pub(crate) mod lattice;
pub(crate) mod legendre;
pub(crate) mod param;
pub(crate) mod ternary;
pub(crate) use legendre::obvious_conic_point;
pub use legendre::{
    insoluble_places, solve_diagonal, solve_diagonal_rational, solve_diagonal_with_primes,
    ConicSolution,
};
pub(crate) use param::{parametrise, parametrise_diagonal};
#[cfg(test)]
pub(crate) use ternary::solve_ternary;
pub(crate) use ternary::TernaryForm;

#[cfg(test)]
mod tests;
