//! Generators for the descent via 3-isogeny: independent points chosen
//! from the points found (the height pairing certifies independence), and
//! the height layer's saturation turning them into generators of E(Q)
//! modulo torsion when the rank is proven and that many are known.
//!
//! Independence: a set of points is independent modulo torsion exactly
//! when the determinant of its height-pairing matrix is positive
//! (Silverman, "The Arithmetic of Elliptic Curves", 2nd ed., VIII.9,
//! Proposition 9.6 — from memory); the certified regulator of
//! [`HeightContext::regulator`] decides it when its enclosure excludes 0.
//! A point whose regulator with the chosen ones may be 0 is left out, so
//! nothing here is guessed: fewer points are kept when the enclosure is
//! too wide.
//!
//! 3-saturation by the descent. The sieve of the height layer (reduction
//! modulo auxiliary primes) cannot prove 3-saturation on many of these
//! curves (on the cube-sum curves the kernel of φ is μ₃ as a Galois
//! module, and the test stays open at p = 3). The descent proves it
//! instead, when E(Q)\[3\] = 0 and the points are exactly the points
//! found on the homogeneous spaces, one per dimension that they add to
//! the spans of images: side-0 points P_i (on E) with images independent
//! in E(Q)/φ̂E′(Q), and φ̂(Q′_j) for side-1 points Q′_j with images
//! independent in E′(Q)/φE(Q) modulo the image of E′(Q)\[φ̂\]. If
//! X = Σa_iP_i + Σb_jφ̂(Q′_j) lies in 3E(Q) + E(Q)_tors = 3E(Q) (the
//! torsion has order prime to 3), then X ∈ φ̂E′(Q), so Σa_i·img(P_i) = 0
//! and every a_i ≡ 0 (mod 3); then X = φ̂(Y), Y = Σb_jQ′_j, and X = 3R =
//! φ̂(φ(R)) gives Y − φ(R) ∈ E′(Q)\[φ̂\], so img(Y) lies in the image of
//! E′(Q)\[φ̂\] and every b_j ≡ 0 (mod 3). (The connecting maps are
//! injective on E(Q)/φ̂E′(Q) and E′(Q)/φE(Q); Schaefer–Stoll 2004, §3, from
//! memory; φ̂∘φ = \[3\] is checked in the tests.) A lattice containing a
//! 3-saturated one with index prime to 3 is 3-saturated, so the height
//! layer's divisions at other primes keep the property.

use crate::arith::Certified;
use crate::budget::Budget;
use crate::curve::{Curve, Point};
use crate::error::Error;
use crate::height::{saturate_with_context, HeightContext, Saturation, SaturationOptions};

/// At most this many of the points found are examined for independence
/// (each test is one regulator of at most rank + 1 points).
const MAX_CANDIDATES: usize = 24;

/// What [`generators`] finds.
pub(crate) struct Found {
    /// Independent points with their canonical heights.
    pub independent: Vec<(Point, Certified)>,
    /// The saturation of `independent`, when the rank is proven, positive
    /// and equal to their number.
    pub saturation: Option<Saturation>,
    /// True when the saturation left only p = 3 open (with a proven index
    /// bound) and the descent proves 3-saturation (module docs).
    pub three_by_descent: bool,
}

/// Chooses independent points among `points` (points of `curve`) and, when
/// `rank` is proven and that many are found, saturates them under
/// `options`. A budget stop leaves what was done so far (the caller marks
/// the report partial when `Err` comes back for the saturation step).
///
/// `descent_proves_three`: E(Q)\[3\] = 0 and `points` are exactly the
/// points of the finds, as many as the rank (module docs).
pub(crate) fn generators(
    curve: &Curve,
    points: &[Point],
    rank: Option<usize>,
    options: Option<&SaturationOptions>,
    descent_proves_three: bool,
    budget: &mut Budget,
) -> (Found, Option<Error>) {
    let mut found = Found {
        independent: Vec::new(),
        saturation: None,
        three_by_descent: false,
    };
    if points.is_empty() {
        return (found, None);
    }
    let ctx = match HeightContext::new(curve, budget) {
        Ok(c) => c,
        Err(e) => return (found, Some(e)),
    };
    let mut chosen: Vec<Point> = Vec::new();
    let mut heights = Vec::new();
    for p in points
        .iter()
        .filter(|p| !p.is_infinity())
        .take(MAX_CANDIDATES)
    {
        if rank.is_some_and(|r| chosen.len() >= r) {
            break;
        }
        let mut trial = chosen.clone();
        trial.push(p.clone());
        let independent = match ctx.regulator(&trial) {
            Ok(reg) => reg.lower() > 0.0,
            // Dependent points may make the enclosure useless: not chosen.
            Err(Error::InvalidArgument { .. }) => false,
            Err(e) => return (found, Some(e)),
        };
        if !independent {
            continue;
        }
        match ctx.height(p) {
            Ok(h) => {
                chosen.push(p.clone());
                heights.push(h);
            }
            Err(e) => return (found, Some(e)),
        }
    }
    found.independent = chosen.iter().cloned().zip(heights).collect();
    if let (Some(r), Some(sopts)) = (rank, options) {
        if r > 0 && chosen.len() == r {
            match saturate_with_context(&ctx, &chosen, sopts, budget) {
                Ok(s) => {
                    found.three_by_descent = descent_proves_three
                        && chosen.len() == points.len()
                        && !s.proven_saturated
                        && s.index_bound.is_some()
                        && !s.beyond_max_prime
                        && s.unresolved == [3];
                    found.saturation = Some(s);
                }
                Err(e) => return (found, Some(e)),
            }
        }
    }
    (found, None)
}
