//! Re-checking a report's evidence without rerunning the search.
//!
//! [`verify_report`] takes a [`DescentReport`] (however it was produced)
//! and checks, from the data in the report alone:
//! 1. every returned point lies on the input curve; every point image lies
//!    on its side's curve, is α of that point (x-coordinate, or b for
//!    (0, 0)) up to squares, and the point on the homogeneous space
//!    satisfies its quartic;
//! 2. every local witness (a soluble class) passes
//!    [`crate::quartic::LocalPoint::verify`]: an exact check that g(x, z) is
//!    a nonzero square in Q_v; every insoluble class is re-decided by the
//!    local-solvability algorithm (a recomputation, cheap compared with the
//!    search);
//! 3. the local images are subgroups, and the Selmer group recomputed from
//!    them by linear algebra equals the one in the report;
//! 4. torsion images and point images lie in the Selmer group, the point
//!    images are independent modulo the torsion images, and the rank bounds
//!    follow from the dimensions by the exact sequence;
//! 5. each "proven not an image" class has its second-descent evidence
//!    re-checked by [`verify_obstruction`]: the twists λ are the complete
//!    list, and each covering is insoluble at the place named; the printed
//!    obstructions are those of the evidence, each quartic has non-zero
//!    discriminant and no point at its place, and each conic (a twist with
//!    no quartic model) has Hilbert symbol −1 at its place.
//!
//! The result lists every check with its outcome, so a reader sees what
//! was checked, not only a yes/no.

use super::exact_sequence::rank_bounds;
use super::isogeny_side::{
    connecting_value, covering_obstruction, ClassStatus, SelmerElement, SelmerSide,
};
use super::report::DescentReport;
use crate::budget::Budget;
use crate::curve::Curve;
use crate::error::{Error, Result};
use crate::quartic::{locally_soluble, LocalSolubility, Quartic};
use crate::second::covering::verify_obstruction;
use crate::selmer::f2::Subspace;
use crate::selmer::group::{selmer_from_local_images, LocalCondition};

/// One check and whether it passed.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct Check {
    /// What was checked.
    pub what: String,
    /// Whether it held.
    pub passed: bool,
}

/// The outcome of [`verify_report`].
#[derive(Clone, Debug, Default, PartialEq, Eq)]
#[non_exhaustive]
pub struct Verification {
    /// Every check made, in order.
    pub checks: Vec<Check>,
}

impl Verification {
    /// True iff every check passed.
    pub fn all_passed(&self) -> bool {
        self.checks.iter().all(|c| c.passed)
    }

    /// The checks that failed.
    pub fn failures(&self) -> Vec<&Check> {
        self.checks.iter().filter(|c| !c.passed).collect()
    }

    fn record(&mut self, what: impl Into<String>, passed: bool) {
        self.checks.push(Check {
            what: what.into(),
            passed,
        });
    }
}

/// Work units that [`verify_report_default`] allows: enough to re-check
/// the reports of the default descent options on curves with coefficients
/// of a few dozen digits (the tests re-check every report they make with
/// at most this; common practice: about ten times the largest they need).
pub const DEFAULT_VERIFY_UNITS: u64 = 100_000_000;

/// [`verify_report`] with [`DEFAULT_VERIFY_UNITS`].
///
/// # Errors
/// As [`verify_report`].
pub fn verify_report_default(report: &DescentReport) -> Result<Verification> {
    verify_report(report, DEFAULT_VERIFY_UNITS)
}

/// Re-checks the evidence in `report`; see the module docs for the list.
/// `units` bounds the work of re-deciding insoluble classes, re-checking
/// 4-coverings and refactoring (each of those steps gets at most `units`);
/// [`verify_report_default`] passes [`DEFAULT_VERIFY_UNITS`].
///
/// # Errors
/// [`Error::BudgetExhausted`] (or [`Error::FactorBudgetExhausted`]) when
/// `units` run out before every check is made: a check cut short is an
/// error, never a failed check.
pub fn verify_report(report: &DescentReport, units: u64) -> Result<Verification> {
    let mut out = Verification::default();
    let mut budget = Budget::with_units(units);
    for p in report.descent_points() {
        out.record(
            format!("returned point {p:?} lies on the input curve"),
            report.curve().contains(p),
        );
    }
    out.record(
        "number of returned points equals the descent's lower bound",
        report.descent_points().len() == report.descent_bounds().lower
            && report.descent_points().len()
                >= report
                    .isogenies()
                    .iter()
                    .map(|d| d.rank_lower)
                    .max()
                    .unwrap_or(0),
    );
    for (i, d) in report.isogenies().iter().enumerate() {
        let tag = format!("isogeny {}", i + 1);
        out.record(
            format!("{tag}: kernel point lies on the input curve"),
            report.curve().contains(&d.kernel_point),
        );
        verify_side(
            &mut out,
            &format!("{tag}, E"),
            &d.domain,
            d.model.curve(),
            &mut budget,
        )?;
        verify_side(
            &mut out,
            &format!("{tag}, E'"),
            &d.codomain,
            d.isogeny.codomain(),
            &mut budget,
        )?;
        let (lo, hi) = rank_bounds(
            (d.domain.image_lower(), d.codomain.image_lower()),
            (d.domain.image_upper, d.codomain.image_upper),
        );
        out.record(
            format!("{tag}: rank bounds follow from the dimensions"),
            (lo, hi) == (d.rank_lower, d.rank_upper),
        );
        out.record(
            format!("{tag}: torsion images have dimensions adding up to 2"),
            d.domain.torsion_dim + d.codomain.torsion_dim == 2,
        );
    }
    let lo = report
        .isogenies()
        .iter()
        .map(|d| d.rank_lower)
        .max()
        .unwrap_or(0);
    let hi = report
        .isogenies()
        .iter()
        .map(|d| {
            d.rank_upper
                .min(d.selmer_rank_bound().unwrap_or(usize::MAX))
        })
        .min()
        .unwrap_or(lo)
        .max(lo);
    // Points found by the deep search (independent by their classes) may
    // raise the lower bound above every single isogeny's.
    let lo = lo.max(report.descent_points().len());
    // With no isogeny (every first descent stopped), the bound from the
    // supports of the classes, recomputed here.
    let hi = if report.isogenies().is_empty() {
        divisor_bound_again(report, units)?.unwrap_or(hi)
    } else {
        hi
    };
    out.record(
        "overall bounds are the sharpest of the isogenies, their 2-Selmer ranks and the points found",
        (lo, hi) == (report.descent_bounds().lower, report.descent_bounds().upper),
    );
    Ok(out)
}

/// The smallest `super::divisor_rank_bound` over the rational 2-torsion
/// points of the report's curve, recomputed under `units` of factoring.
fn divisor_bound_again(report: &DescentReport, units: u64) -> Result<Option<usize>> {
    let options = super::DescentOptions {
        factor_units: units,
        ..super::DescentOptions::default()
    };
    let ctx = super::DescentContext::new(&options, std::time::Instant::now()).with_deadline(None);
    let mut known = crate::local::known_primes::KnownPrimes::default();
    let mut best: Option<usize> = None;
    let mut budget = Budget::with_units(units);
    for t in crate::curve::two_torsion_points_with_budget(report.curve(), &mut budget)? {
        let model = super::reduced_model_for(report.curve(), &t, &ctx)?;
        let u = super::divisor_rank_bound(&model, &ctx, &mut known)?;
        best = Some(best.map_or(u, |b| b.min(u)));
    }
    Ok(best)
}

fn verify_side(
    out: &mut Verification,
    tag: &str,
    side: &SelmerSide,
    curve: &Curve,
    budget: &mut Budget,
) -> Result<()> {
    let conditions = verify_local_images(out, tag, side, budget)?;
    let group = selmer_from_local_images(&side.qs2, &conditions)?;
    out.record(
        format!("{tag}: Selmer group recomputed from the local images agrees"),
        group == side.group,
    );
    let mut spans = ImageSpans {
        torsion: Subspace::zero(side.qs2.dim()),
        all: Subspace::zero(side.qs2.dim()),
    };
    for el in &side.elements {
        verify_element(out, tag, side, curve, el, &mut spans, budget)?;
    }
    out.record(
        format!("{tag}: torsion image dimension as stated"),
        spans.torsion.dim() == side.torsion_dim,
    );
    out.record(
        format!("{tag}: known image dimension as stated"),
        spans.all.dim() == side.image_lower(),
    );
    Ok(())
}

/// The spans of the classes met so far: images of torsion, and all images.
struct ImageSpans {
    torsion: Subspace,
    all: Subspace,
}

/// Re-checks every local image of `side` (subgroup, witnesses, insoluble
/// classes re-decided) and returns them as local conditions.
fn verify_local_images(
    out: &mut Verification,
    tag: &str,
    side: &SelmerSide,
    budget: &mut Budget,
) -> Result<Vec<LocalCondition>> {
    let mut conditions = Vec::new();
    for w in &side.local_images {
        out.record(
            format!("{tag}: W_{} is a subgroup", w.place),
            w.is_subgroup(),
        );
        for ev in &w.evidence {
            let q = Quartic::two_isogeny_space(&ev.representative, side.a(), side.b())?;
            match &ev.solubility {
                LocalSolubility::Soluble(pt) => out.record(
                    format!(
                        "{tag}: witness for class {} at {} checks out",
                        ev.representative, w.place
                    ),
                    pt.place == w.place && pt.verify(&q) && w.contains(ev.mask),
                ),
                LocalSolubility::Insoluble { place } => {
                    let again = locally_soluble(&q, place, budget)?;
                    out.record(
                        format!(
                            "{tag}: class {} re-decided insoluble at {}",
                            ev.representative, place
                        ),
                        !again.is_soluble() && place == &w.place && !w.contains(ev.mask),
                    );
                }
            }
        }
        conditions.push(LocalCondition::from_masks(w.place.clone(), &w.members));
    }
    Ok(conditions)
}

/// Re-checks one Selmer element: membership, and the evidence of its status.
fn verify_element(
    out: &mut Verification,
    tag: &str,
    side: &SelmerSide,
    curve: &Curve,
    el: &SelmerElement,
    spans: &mut ImageSpans,
    budget: &mut Budget,
) -> Result<()> {
    let v = side.qs2.vector(&el.class)?;
    out.record(
        format!("{tag}: class {} lies in the Selmer group", el.class),
        side.group.contains(&v),
    );
    match &el.status {
        ClassStatus::TorsionImage { point } => {
            let ok = curve.contains(point)
                && connecting_value(side.b(), point)
                    .map(|x| same_class(&side.qs2.vector_rational(&x).ok(), &v))
                    .unwrap_or(false);
            out.record(
                format!("{tag}: class {} is α of a torsion point", el.class),
                ok,
            );
            spans.torsion.insert(v.clone());
            spans.all.insert(v);
        }
        ClassStatus::PointImage {
            point,
            space,
            on_space,
        } => {
            let on_curve = curve.contains(point);
            let alpha_ok = connecting_value(side.b(), point)
                .map(|x| same_class(&side.qs2.vector_rational(&x).ok(), &v))
                .unwrap_or(false);
            let space_ok = Quartic::two_isogeny_space(space, side.a(), side.b())
                .map(|q| on_space.lies_on(q.coeffs()))
                .unwrap_or(false);
            out.record(
                format!(
                    "{tag}: class {} is α of a point on the curve found on C_{}",
                    el.class, space
                ),
                on_curve && alpha_ok && space_ok,
            );
            out.record(
                format!(
                    "{tag}: class {} is independent of the earlier images",
                    el.class
                ),
                spans.all.insert(v),
            );
        }
        ClassStatus::ProvenNotImage { .. } => verify_not_image(out, tag, side, el, budget)?,
        ClassStatus::Undecided => {}
    }
    Ok(())
}

/// Re-checks the evidence of a class proven not to be an image: the
/// 4-coverings re-check insoluble, and the printed obstructions are the
/// evidence's, each re-checking from its own data.
fn verify_not_image(
    out: &mut Verification,
    tag: &str,
    side: &SelmerSide,
    el: &SelmerElement,
    budget: &mut Budget,
) -> Result<()> {
    let ClassStatus::ProvenNotImage {
        space,
        obstructions,
        evidence,
    } = &el.status
    else {
        return Ok(());
    };
    let ok = space == &el.class && verify_obstruction(&side.model, space, evidence, budget);
    if !ok && budget.is_exhausted() {
        return Err(Error::BudgetExhausted {
            stage: format!(
                "verify_report: re-checking the 4-coverings of class {}",
                el.class
            ),
        });
    }
    out.record(
        format!(
            "{tag}: class {}: every 4-covering of C_{} re-checks insoluble at its place",
            el.class, space
        ),
        ok,
    );
    // The printed list is the evidence's, entry by entry, and
    // each entry re-checks from its own data: a quartic with
    // non-zero discriminant insoluble at its place, or a conic
    // whose Hilbert symbol at its place is −1.
    let derived: Option<Vec<_>> = evidence
        .obstructions
        .iter()
        .map(|o| covering_obstruction(o).ok())
        .collect();
    let same = derived.as_ref() == Some(obstructions);
    let each = obstructions.iter().all(|o| o.recheck(budget));
    out.record(
        format!(
            "{tag}: class {}: the printed obstructions of C_{} are the evidence's; each quartic is a genuine 4-covering insoluble at its place, each conic has Hilbert symbol -1 there",
            el.class, space
        ),
        same && each,
    );
    Ok(())
}

fn same_class(a: &Option<crate::selmer::f2::BitVec>, b: &crate::selmer::f2::BitVec) -> bool {
    a.as_ref() == Some(b)
}

#[cfg(test)]
mod tampering {
    use super::*;
    use crate::curve::{Curve, Point};
    use crate::descent::{descend, DescentOptions};
    use num_bigint::BigInt;
    use num_rational::BigRational;

    fn report(coeffs: &str) -> DescentReport {
        let c: Curve = coeffs.parse().unwrap();
        descend(&c, &DescentOptions::default()).unwrap()
    }

    #[test]
    fn a_moved_point_is_caught() {
        let mut r = report("0 0 0 -36 0");
        assert!(!r.descent_points().is_empty());
        let q = |n: i64| BigRational::from_integer(BigInt::from(n));
        r.points[0] = Point::new(q(1), q(1));
        let v = verify_report(&r, 10_000_000).unwrap();
        assert!(!v.all_passed());
    }

    #[test]
    fn an_inflated_rank_bound_is_caught() {
        let mut r = report("0 0 0 -1 0");
        r.isogenies[0].rank_upper += 1;
        let v = verify_report(&r, 10_000_000).unwrap();
        assert!(!v.all_passed());
    }

    #[test]
    fn a_forged_local_image_is_caught() {
        let mut r = report("0 0 0 -36 0");
        // find a place whose local image is not everything, and claim it is
        let side = &mut r.isogenies[0].domain;
        let w = side
            .local_images
            .iter_mut()
            .find(|w| w.members.len() < 1 << crate::local::class_dimension(&w.place))
            .expect("some proper local image");
        let n = 1u8 << crate::local::class_dimension(&w.place);
        w.members = (0..n).collect();
        let v = verify_report(&r, 10_000_000).unwrap();
        let failed: Vec<String> = v.failures().iter().map(|c| c.what.clone()).collect();
        assert!(
            failed
                .iter()
                .any(|f| f.contains("re-decided insoluble") || f.contains("recomputed")),
            "{failed:?}"
        );
    }
}
