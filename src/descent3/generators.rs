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
}

/// Chooses independent points among `points` (points of `curve`) and, when
/// `rank` is proven and that many are found, saturates them under
/// `options`. A budget stop leaves what was done so far (the caller marks
/// the report partial when `Err` comes back for the saturation step).
pub(crate) fn generators(
    curve: &Curve,
    points: &[Point],
    rank: Option<usize>,
    options: Option<&SaturationOptions>,
    budget: &mut Budget,
) -> (Found, Option<Error>) {
    let mut found = Found {
        independent: Vec::new(),
        saturation: None,
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
                Ok(s) => found.saturation = Some(s),
                Err(e) => return (found, Some(e)),
            }
        }
    }
    (found, None)
}
