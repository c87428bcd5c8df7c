//! Legendre's equation a X² + b Y² + c Z² = 0 over Q.
//!
//! See the [module documentation of `conic`](super) for the method and the
//! proof that it always terminates with a point when one exists.
#![allow(clippy::needless_range_loop)] // index loops mirror the formulas

use std::collections::BTreeSet;

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

use super::lattice::{echelon_basis, lll, visit_short_vectors};
use crate::arith::factor;
use crate::budget::Budget;
use crate::error::{Error, Result};
use crate::local::{hilbert_symbol_int, legendre, split_valuation, sqrt_mod_prime, Place, Prime};

/// The answer to "does this conic have a rational point?".
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ConicSolution {
    /// A nontrivial primitive integer solution (X, Y, Z): gcd 1, not all
    /// zero, first nonzero coordinate positive.
    Point([BigInt; 3]),
    /// No rational point: the conic has no point over the completion Q_v at
    /// `place` (a real or p-adic obstruction).
    Insoluble {
        /// A place where the conic is locally insoluble.
        place: Place,
    },
}

impl ConicSolution {
    /// The point, if there is one.
    pub fn point(&self) -> Option<&[BigInt; 3]> {
        match self {
            ConicSolution::Point(p) => Some(p),
            ConicSolution::Insoluble { .. } => None,
        }
    }

    /// True when the conic has a rational point.
    pub fn is_soluble(&self) -> bool {
        matches!(self, ConicSolution::Point(_))
    }
}

fn nonzero(x: &BigInt, what: &str) -> Result<()> {
    if x.is_zero() {
        Err(Error::Zero { what: what.into() })
    } else {
        Ok(())
    }
}

/// The distinct primes dividing a·b·c, ascending, found with
/// [`crate::arith::factor()`].
fn primes_of(coeffs: &[&BigInt], budget: &mut Budget) -> Result<Vec<Prime>> {
    let mut set: BTreeSet<BigInt> = BTreeSet::new();
    for c in coeffs {
        let f = factor(c, budget)?;
        for p in f.primes() {
            set.insert(p.clone());
        }
    }
    set.into_iter().map(Prime::new).collect()
}

/// Solves a X² + b Y² + c Z² = 0 over Q for nonzero integers a, b, c.
///
/// **Statement.** Returns a nontrivial primitive integer solution when one
/// exists, and otherwise a place v of Q at which the equation has no
/// nontrivial solution in Q_v. By the Hasse–Minkowski theorem
/// [Serre73, IV.3.2, Thm. 8] one of the two always happens.
///
/// **Method.** Factor a, b, c with [`crate::arith::factor()`], reduce to
/// square-free pairwise coprime coefficients, test Legendre's conditions
/// [IrelandRosen90, 17.3, Thm. 1], and find a point by lattice reduction
/// and enumeration in the lattice of solutions modulo abc, as in
/// [CremonaRusin03, §2–3]; the details and the proof are in the
/// [module documentation](super).
///
/// **Which place is reported.** The real place if a, b, c all have the same
/// sign; otherwise the smallest odd prime p at which Legendre's condition
/// fails. The prime 2 is never reported: by Hilbert reciprocity
/// [Serre73, III.2.1, Thm. 3] the set of bad places has even size, so a
/// conic insoluble at 2 is insoluble at R or at an odd prime too. Use
/// [`insoluble_places`] for the full list.
///
/// # Errors
/// [`Error::Zero`] if a coefficient is 0 (the conic is then a
/// pair of lines or degenerate; (1,0,0) or (0,1,0) would be a trivial
/// answer, which we refuse to guess); [`Error::FactorBudgetExhausted`] or
/// [`Error::BudgetExhausted`] when `budget` runs out.
///
/// **Cost.** Factoring a, b, c, plus one square root modulo each prime
/// dividing abc, plus an LLL reduction in dimension 3 of numbers of size
/// |abc|, O(log |abc|) swaps, plus about 40 enumerated lattice vectors.
/// Budget units: those of [`crate::arith::factor()`], plus one per LLL step
/// and one per enumeration node.
///
/// **Example.** X² + Y² − 5 Z² = 0 has the point (1, 2, 1); X² + Y² − 3Z² = 0
/// has none, and the obstruction is at 3.
/// ```
/// use isodescent::conic::{solve_diagonal, ConicSolution};
/// use isodescent::local::{Place, Prime};
/// use isodescent::Budget;
/// let mut b = Budget::unlimited();
/// let s = solve_diagonal(&1.into(), &1.into(), &(-5).into(), &mut b).unwrap();
/// let [x, y, z] = s.point().unwrap().clone();
/// assert_eq!(&x * &x + &y * &y, 5 * &z * &z);
/// let t = solve_diagonal(&1.into(), &1.into(), &(-3).into(), &mut b).unwrap();
/// assert_eq!(t, ConicSolution::Insoluble { place: Place::Finite(Prime::small(3).unwrap()) });
/// ```
pub fn solve_diagonal(
    a: &BigInt,
    b: &BigInt,
    c: &BigInt,
    budget: &mut Budget,
) -> Result<ConicSolution> {
    nonzero(a, "coefficient a of a X^2 + b Y^2 + c Z^2")?;
    nonzero(b, "coefficient b of a X^2 + b Y^2 + c Z^2")?;
    nonzero(c, "coefficient c of a X^2 + b Y^2 + c Z^2")?;
    let primes = primes_of(&[a, b, c], budget)?;
    solve_core([a.clone(), b.clone(), c.clone()], &primes, budget)
}

/// [`solve_diagonal`] with the primes of abc supplied by the caller, so no
/// factoring is done.
///
/// `primes` must contain every prime dividing a·b·c (extra primes are
/// harmless; order and repetitions do not matter).
///
/// # Errors
/// [`Error::Zero`] for a zero coefficient;
/// [`Error::NotPrime`] if an entry of `primes` is not prime;
/// [`Error::InvalidArgument`] if a coefficient has a prime factor missing
/// from `primes`; [`Error::BudgetExhausted`] when `budget` runs out.
///
/// **Cost.** As [`solve_diagonal`] without the factoring, plus one
/// primality test per listed prime.
///
/// ```
/// use isodescent::conic::solve_diagonal_with_primes;
/// use isodescent::Budget;
/// // 2 X² + 3 Y² − 5 Z² = 0 has the point (1, 1, 1).
/// let primes = [2.into(), 3.into(), 5.into()];
/// let s = solve_diagonal_with_primes(&2.into(), &3.into(), &(-5).into(), &primes, &mut Budget::unlimited()).unwrap();
/// let [x, y, z] = s.point().unwrap();
/// assert_eq!(2 * x * x + 3 * y * y, 5 * z * z);
/// ```
pub fn solve_diagonal_with_primes(
    a: &BigInt,
    b: &BigInt,
    c: &BigInt,
    primes: &[BigInt],
    budget: &mut Budget,
) -> Result<ConicSolution> {
    nonzero(a, "coefficient a of a X^2 + b Y^2 + c Z^2")?;
    nonzero(b, "coefficient b of a X^2 + b Y^2 + c Z^2")?;
    nonzero(c, "coefficient c of a X^2 + b Y^2 + c Z^2")?;
    let set: BTreeSet<BigInt> = primes.iter().cloned().collect();
    let ps: Vec<Prime> = set.into_iter().map(Prime::new).collect::<Result<_>>()?;
    solve_core([a.clone(), b.clone(), c.clone()], &ps, budget)
}

/// Solves a X² + b Y² + c Z² = 0 for nonzero rationals a, b, c, by
/// multiplying through by the least common denominator and calling
/// [`solve_diagonal`]. Same answers, errors and cost.
///
/// ```
/// use isodescent::conic::solve_diagonal_rational;
/// use isodescent::Budget;
/// use num_rational::BigRational;
/// let q = |n: i64, d: i64| BigRational::new(n.into(), d.into());
/// // X²/2 + Y²/2 − Z² = 0 has (1, 1, 1).
/// let s = solve_diagonal_rational(&q(1, 2), &q(1, 2), &q(-1, 1), &mut Budget::unlimited()).unwrap();
/// assert!(s.is_soluble());
/// ```
///
/// # Errors
/// As [`solve_diagonal`].
pub fn solve_diagonal_rational(
    a: &BigRational,
    b: &BigRational,
    c: &BigRational,
    budget: &mut Budget,
) -> Result<ConicSolution> {
    let d = a.denom().lcm(b.denom()).lcm(c.denom());
    let scale = |x: &BigRational| (x * BigRational::from_integer(d.clone())).to_integer();
    solve_diagonal(&scale(a), &scale(b), &scale(c), budget)
}

/// Every place of Q at which a X² + b Y² + c Z² = 0 has no nontrivial
/// solution, ascending (R first), from Hilbert symbols.
///
/// **Statement.** The conic has a nontrivial point over Q_v iff
/// (−ac, −bc)_v = 1 [Serre73, IV.2.2, Thm. 6 with n = 3: the form
/// ⟨a, b, c⟩ represents 0 iff (−1, −d)_v = ε_v, which after the change
/// ⟨a,b,c⟩ ~ c⟨ac, bc, 1⟩ is this condition]. Only v = R, 2 and the primes
/// dividing abc can be bad. The list has even length (Hilbert
/// reciprocity) and is empty iff the conic has a rational point
/// (Hasse–Minkowski).
///
/// # Errors
/// [`Error::Zero`] for a zero coefficient; factoring errors as
/// in [`solve_diagonal`].
///
/// ```
/// use isodescent::conic::insoluble_places;
/// use isodescent::local::{Place, Prime};
/// use isodescent::Budget;
/// let bad = insoluble_places(&1.into(), &1.into(), &(-3).into(), &mut Budget::unlimited()).unwrap();
/// assert_eq!(bad, vec![Place::Finite(Prime::two()), Place::Finite(Prime::small(3).unwrap())]);
/// ```
pub fn insoluble_places(
    a: &BigInt,
    b: &BigInt,
    c: &BigInt,
    budget: &mut Budget,
) -> Result<Vec<Place>> {
    nonzero(a, "coefficient a of a X^2 + b Y^2 + c Z^2")?;
    nonzero(b, "coefficient b of a X^2 + b Y^2 + c Z^2")?;
    nonzero(c, "coefficient c of a X^2 + b Y^2 + c Z^2")?;
    let mut places = vec![Place::Real, Place::Finite(Prime::two())];
    for p in primes_of(&[a, b, c], budget)? {
        if !p.is_two() {
            places.push(Place::Finite(p));
        }
    }
    let u = -(a * c);
    let w = -(b * c);
    let mut bad = Vec::new();
    for v in places {
        if hilbert_symbol_int(&u, &w, &v)? == -1 {
            bad.push(v);
        }
    }
    Ok(bad)
}

/// A coefficient in reduced form: sign times a product of distinct primes
/// from the shared prime list (indices into it).
#[derive(Clone, Debug)]
struct Reduced {
    negative: bool,
    primes: BTreeSet<usize>,
}

impl Reduced {
    fn value(&self, ps: &[Prime]) -> BigInt {
        let mut v = BigInt::one();
        for &i in &self.primes {
            v *= ps[i].get();
        }
        if self.negative {
            -v
        } else {
            v
        }
    }
}

fn product(ps: &[Prime], idx: &BTreeSet<usize>) -> BigInt {
    idx.iter().fold(BigInt::one(), |acc, &i| acc * ps[i].get())
}

/// Chinese remaindering of residues modulo distinct primes.
fn crt(residues: &[(BigInt, BigInt)]) -> BigInt {
    let mut x = BigInt::zero();
    let mut m = BigInt::one();
    for (r, p) in residues {
        // x' ≡ x mod m, x' ≡ r mod p
        let e = m.extended_gcd(p); // e.x m + e.y p = 1
        let t = ((r - &x) * &e.x).mod_floor(p);
        x += &m * t;
        m *= p;
        x = x.mod_floor(&m);
    }
    x
}

/// The core: primes `ps` (distinct, ascending) contain every prime of abc.
pub(crate) fn solve_core(
    coeffs: [BigInt; 3],
    ps: &[Prime],
    budget: &mut Budget,
) -> Result<ConicSolution> {
    // Step 1: square-free parts. coeff_i = sign · core_i · s_i².
    let (mut red, mut mult) = squarefree_split(&coeffs, ps)?;
    // Steps 2 and 3: no common factor, then pairwise coprime.
    make_coprime(&mut red, &mut mult, ps, budget)?;
    // Step 4: Legendre's conditions.
    if red.iter().all(|r| r.negative) || red.iter().all(|r| !r.negative) {
        return Ok(ConicSolution::Insoluble { place: Place::Real });
    }
    let vals: Vec<BigInt> = red.iter().map(|r| r.value(ps)).collect();
    let lam = match square_roots_at_primes(&red, &vals, ps)? {
        Roots::Found(lam) => lam,
        Roots::Insoluble(place) => return Ok(ConicSolution::Insoluble { place }),
    };
    let mods: Vec<BigInt> = vals.iter().map(|v| v.abs()).collect();

    // Step 5: find a point of the reduced equation.
    let y = find_point(&vals, &mods, &lam, budget)?;

    // Step 6: map back and normalise.
    let mut x: Vec<BigInt> = y.iter().zip(mult.iter()).map(|(a, m)| a * m).collect();
    primitive(&mut x);
    Ok(ConicSolution::Point([
        x[0].clone(),
        x[1].clone(),
        x[2].clone(),
    ]))
}

/// Step 1 of [`solve_core`]: each coefficient as a sign and a square-free
/// core over `ps` (`coeff_i = sign · core_i · s_i²`), and the multipliers:
/// an original solution is `x_i = mult_i · y_i` for a solution `y` of the
/// reduced equation.
fn squarefree_split(coeffs: &[BigInt; 3], ps: &[Prime]) -> Result<(Vec<Reduced>, Vec<BigInt>)> {
    let mut red: Vec<Reduced> = Vec::with_capacity(3);
    let mut squares: Vec<BigInt> = Vec::with_capacity(3);
    for c in coeffs {
        let mut rest = c.abs();
        let mut set = BTreeSet::new();
        let mut s = BigInt::one();
        for (i, p) in ps.iter().enumerate() {
            if let Some((v, u)) = split_valuation(&rest, p) {
                if v > 0 {
                    rest = u;
                    if v % 2 == 1 {
                        set.insert(i);
                    }
                    s *= p.get().pow((v / 2) as u32);
                }
            }
        }
        if !rest.is_one() {
            return Err(Error::InvalidArgument {
                reason: format!(
                    "coefficient {c} has the factor {rest} with no prime from the supplied list"
                ),
            });
        }
        red.push(Reduced {
            negative: c.is_negative(),
            primes: set,
        });
        squares.push(s);
    }
    let mult: Vec<BigInt> = (0..3)
        .map(|i| &squares[(i + 1) % 3] * &squares[(i + 2) % 3])
        .collect();
    Ok((red, mult))
}

/// Steps 2 and 3 of [`solve_core`]: removes the common factor of all
/// three, then makes the coefficients pairwise coprime: (a, b, c) with
/// g = gcd(a, b) becomes (a/g, b/g, cg), and y ↦ (y_a, y_b, g y_c).
fn make_coprime(
    red: &mut [Reduced],
    mult: &mut [BigInt],
    ps: &[Prime],
    budget: &mut Budget,
) -> Result<()> {
    let common: BTreeSet<usize> = red[0]
        .primes
        .intersection(&red[1].primes)
        .filter(|i| red[2].primes.contains(i))
        .copied()
        .collect();
    for r in red.iter_mut() {
        r.primes = r.primes.difference(&common).copied().collect();
    }
    loop {
        budget.spend(1).map_err(|_| Error::BudgetExhausted {
            stage: "conic reduction".into(),
        })?;
        let mut changed = false;
        for k in 0..3 {
            let (i, j) = ((k + 1) % 3, (k + 2) % 3);
            let g: BTreeSet<usize> = red[i]
                .primes
                .intersection(&red[j].primes)
                .copied()
                .collect();
            if g.is_empty() {
                continue;
            }
            changed = true;
            red[i].primes = red[i].primes.difference(&g).copied().collect();
            red[j].primes = red[j].primes.difference(&g).copied().collect();
            red[k].primes.extend(g.iter().copied());
            mult[k] *= product(ps, &g);
        }
        if !changed {
            return Ok(());
        }
    }
}

/// What Legendre's conditions at the primes give: for each coefficient
/// the square root λ (by CRT over the primes dividing it), or a place
/// where the conic is insoluble.
enum Roots {
    Found(Vec<BigInt>),
    Insoluble(Place),
}

/// Step 4 of [`solve_core`] at the finite primes: for every prime p of the
/// coefficient a_k, x_j ≡ λ x_l (mod p) with λ² ≡ −a_l / a_j.
fn square_roots_at_primes(red: &[Reduced], vals: &[BigInt], ps: &[Prime]) -> Result<Roots> {
    // owner[p] = which coefficient p divides
    let mut lambdas: Vec<Vec<(BigInt, BigInt)>> = vec![Vec::new(), Vec::new(), Vec::new()];
    let mut all: Vec<(usize, usize)> = Vec::new();
    for (k, r) in red.iter().enumerate() {
        for &i in &r.primes {
            all.push((i, k));
        }
    }
    all.sort();
    for (pi, k) in all {
        let p = &ps[pi];
        let (j, l) = ((k + 1) % 3, (k + 2) % 3);
        // x_j ≡ λ x_l (mod p) with λ² ≡ −a_l / a_j
        let lam = if p.is_two() {
            BigInt::one()
        } else {
            let target = -(&vals[l] * &vals[j]);
            if legendre(&target, p)? != 1 {
                return Ok(Roots::Insoluble(Place::Finite(p.clone())));
            }
            let inv_j = {
                let e = vals[j].mod_floor(p.get()).extended_gcd(p.get());
                e.x.mod_floor(p.get())
            };
            let rhs = (-(&vals[l]) * inv_j).mod_floor(p.get());
            match sqrt_mod_prime(&rhs, p) {
                Some(r) => r,
                None => return Ok(Roots::Insoluble(Place::Finite(p.clone()))),
            }
        };
        lambdas[k].push((lam, p.get().clone()));
    }
    Ok(Roots::Found(lambdas.iter().map(|l| crt(l)).collect()))
}

/// Divides by the content and makes the first nonzero entry positive.
pub(crate) fn primitive(x: &mut [BigInt]) {
    let g = x.iter().fold(BigInt::zero(), |g, v| g.gcd(v));
    if g.is_zero() {
        return;
    }
    let neg = x
        .iter()
        .find(|v| !v.is_zero())
        .is_some_and(|v| v.is_negative());
    for v in x.iter_mut() {
        *v = &*v / &g;
        if neg {
            *v = -&*v;
        }
    }
}

fn eval(vals: &[BigInt], v: &[BigInt]) -> BigInt {
    vals.iter().zip(v.iter()).map(|(a, x)| a * x * x).sum()
}

fn exhausted(stage: &str) -> Error {
    Error::BudgetExhausted {
        stage: stage.into(),
    }
}

/// A nonzero solution of Σ vals_i y_i² = 0, where vals are square-free,
/// pairwise coprime, not all of one sign, and Legendre's conditions hold
/// with the square roots `lam` (x_{k+1} ≡ λ_k x_{k+2} mod |a_k| solves the
/// congruence modulo a_k).
fn find_point(
    vals: &[BigInt],
    mods: &[BigInt],
    lam: &[BigInt],
    budget: &mut Budget,
) -> Result<Vec<BigInt>> {
    // the pair (i, j) of equal sign and the odd one out k
    let k = (0..3)
        .find(|&k| vals[(k + 1) % 3].is_negative() == vals[(k + 2) % 3].is_negative())
        .unwrap_or(2);
    let (i, j) = ((k + 1) % 3, (k + 2) % 3);
    if mods[i].is_one() && mods[j].is_one() {
        return two_squares_point(i, j, k, &mods[k], &lam[k], budget);
    }
    // generators of the lattice L of index |abc|
    let m: BigInt = mods.iter().product();
    let mut u1 = vec![BigInt::zero(); 3];
    let mut u2 = vec![BigInt::zero(); 3];
    for t in 0..3 {
        // modulo |a_t|: u1 ≡ e_{t+1}... we use the local basis
        // {e_t, λ_t e_{t+1} + e_{t+2}} of {x : x_{t+1} ≡ λ_t x_{t+2}}.
        let (t1, t2) = ((t + 1) % 3, (t + 2) % 3);
        let mut b1 = [BigInt::zero(), BigInt::zero(), BigInt::zero()];
        b1[t] = BigInt::one();
        let mut b2 = [BigInt::zero(), BigInt::zero(), BigInt::zero()];
        b2[t1] = lam[t].clone();
        b2[t2] = BigInt::one();
        // combine by CRT coordinatewise: u ≡ b (mod |a_t|), ≡ 0 elsewhere
        let other: BigInt = &m / &mods[t];
        let e = other.extended_gcd(&mods[t]); // e.x·other ≡ 1 (mod |a_t|)
        let idem = (&e.x * &other).mod_floor(&m);
        for c in 0..3 {
            u1[c] = (&u1[c] + &idem * &b1[c]).mod_floor(&m);
            u2[c] = (&u2[c] + &idem * &b2[c]).mod_floor(&m);
        }
    }
    let mut gens = vec![u1, u2];
    for c in 0..3 {
        let mut e = vec![BigInt::zero(); 3];
        e[c] = m.clone();
        gens.push(e);
    }
    let mut basis = echelon_basis(&gens, 3)?;
    let w: Vec<BigInt> = mods.to_vec();
    lll(&w, &mut basis, budget)?;
    let target = -(&vals[0] * &vals[1] * &vals[2]);
    let mut radius = &m * 3u32;
    let mut nodes = ConicNodes::new(budget);
    loop {
        // Streamed: at most two vectors are kept (the shortest zero of the
        // form so far, and the first vector with Q(v) = −abc), never the
        // list of candidates.
        let mut best: Option<(BigInt, Vec<BigInt>)> = None;
        let mut via_identity: Option<Vec<BigInt>> = None;
        let mut seen: u64 = 0;
        let r = visit_short_vectors(&w, &basis, &radius, nodes.budget(), &mut |v| {
            seen += 1;
            let q = eval(vals, v);
            if q.is_zero() {
                let n = eval(&w, v);
                if best.as_ref().map_or(true, |(bn, _)| &n < bn) {
                    best = Some((n, v.to_vec()));
                }
            } else if via_identity.is_none() && q == target {
                via_identity = Some(v.to_vec());
            }
            // Once a usable vector is in hand, a skewed lattice with a
            // very short vector (many candidates in the ellipsoid) is not
            // listed to its end.
            seen >= USABLE_AFTER && (best.is_some() || via_identity.is_some())
        });
        nodes.settle(r)?;
        if let Some((_, v)) = best {
            return Ok(v);
        }
        if let Some(v) = via_identity {
            // a_i(x_i x_k + a_j x_j)² + a_j(x_j x_k − a_i x_i)² + a_k(x_k² + a_i a_j)²
            //   = (x_k² + a_i a_j)(Q(x) + a_i a_j a_k) = 0
            let mut out = vec![BigInt::zero(); 3];
            out[i] = &v[i] * &v[k] + &vals[j] * &v[j];
            out[j] = &v[j] * &v[k] - &vals[i] * &v[i];
            out[k] = &v[k] * &v[k] + &vals[i] * &vals[j];
            return Ok(out);
        }
        // Not reached (see the module docs); widen the search all the same.
        nodes
            .budget()
            .spend(seen + 1)
            .map_err(|_| exhausted("conic point search"))?;
        radius *= 4u32;
    }
}

/// Candidates listed before the enumeration may stop at a usable vector
/// (module docs, §5: about 22 are expected, so ordinary conics are listed
/// to the end and keep their shortest zero).
const USABLE_AFTER: u64 = 4096;

/// Most enumeration nodes of one conic solution (a deterministic cap on
/// top of the caller's budget, which is shared by many conics): a conic
/// whose lattice needs more is given up as a budget stop, never listed for
/// minutes. With the module's lemma a usable vector exists within the
/// first radius; the nodes grow only on very skewed lattices.
pub(crate) const MAX_CONIC_NODES: u64 = 1 << 21;

/// The caller's budget with the per-conic node cap of [`MAX_CONIC_NODES`].
struct ConicNodes<'a> {
    outer: &'a mut Budget,
    local: Budget,
}

impl<'a> ConicNodes<'a> {
    fn new(outer: &'a mut Budget) -> Self {
        let units = outer
            .remaining()
            .map_or(MAX_CONIC_NODES, |r| r.min(MAX_CONIC_NODES));
        let local = Self::fresh(units, outer.deadline());
        ConicNodes { outer, local }
    }

    fn fresh(units: u64, deadline: Option<std::time::Instant>) -> Budget {
        let b = Budget::with_units(units);
        match deadline {
            Some(d) => b.with_deadline(d),
            None => b,
        }
    }

    fn budget(&mut self) -> &mut Budget {
        &mut self.local
    }

    /// Charges the nodes spent so far to the caller's budget; passes the
    /// result of an enumeration on.
    fn settle<T>(&mut self, r: Result<T>) -> Result<T> {
        let spent = self.local.spent();
        let left = if self.local.is_exhausted() {
            0
        } else {
            self.local.remaining().unwrap_or(0)
        };
        self.local = Self::fresh(left, self.outer.deadline());
        self.outer
            .spend(spent)
            .map_err(|_| exhausted("conic point search"))?;
        r.map_err(|_| exhausted("conic point search (node cap or budget)"))
    }
}

/// x_i² + x_j² = n x_k² (after scaling by the common sign): x_k = 1 and
/// (x_i, x_j) a shortest vector of {x_i ≡ λ x_j (mod n)}, λ² ≡ −1, whose
/// norm is exactly n (it is a positive multiple of n below 2n).
fn two_squares_point(
    i: usize,
    j: usize,
    k: usize,
    n: &BigInt,
    lam: &BigInt,
    budget: &mut Budget,
) -> Result<Vec<BigInt>> {
    // the condition stored for k is x_{k+1} ≡ λ x_{k+2} = x_i ≡ λ x_j
    let w = vec![BigInt::one(), BigInt::one()];
    let mut basis = vec![
        vec![lam.mod_floor(n), BigInt::one()],
        vec![n.clone(), BigInt::zero()],
    ];
    lll(&w, &mut basis, budget)?;
    let mut radius = n * 2u32 - 1u32;
    let mut nodes = ConicNodes::new(budget);
    loop {
        let mut found: Option<Vec<BigInt>> = None;
        let mut seen: u64 = 0;
        let r = visit_short_vectors(&w, &basis, &radius, nodes.budget(), &mut |v| {
            seen += 1;
            if &(&v[0] * &v[0] + &v[1] * &v[1]) == n {
                found = Some(v.to_vec());
                return true;
            }
            false
        });
        nodes.settle(r)?;
        if let Some(v) = found {
            let mut out = vec![BigInt::zero(); 3];
            out[i] = v[0].clone();
            out[j] = v[1].clone();
            out[k] = BigInt::one();
            return Ok(out);
        }
        nodes
            .budget()
            .spend(seen + 1)
            .map_err(|_| exhausted("conic point search"))?;
        radius *= 4u32;
    }
}

/// A point of `X² − dY² = ΔZ²` read off when `Δ`, `−Δ/d` or `d + Δ` is a
/// square (`(√Δ, 0, 1)`, `(0, s, 1)`, `(s, 1, 1)`); spares the general
/// solver the easy cases, which include every class on the side of a
/// curve with E[2] rational (`Δ` a square).
pub(crate) fn obvious_conic_point(d: &BigInt, delta: &BigInt) -> Option<[BigInt; 3]> {
    let root = |n: &BigInt| -> Option<BigInt> {
        if n.is_negative() {
            return None;
        }
        let r = n.sqrt();
        (&r * &r == *n).then_some(r)
    };
    if let Some(r) = root(delta) {
        return Some([r, BigInt::zero(), BigInt::one()]);
    }
    if (-delta).is_multiple_of(d) {
        if let Some(s) = root(&(-delta / d)) {
            return Some([BigInt::zero(), s, BigInt::one()]);
        }
    }
    if let Some(s) = root(&(d + delta)) {
        return Some([s, BigInt::one(), BigInt::one()]);
    }
    None
}
