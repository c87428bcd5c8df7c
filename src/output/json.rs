//! The one JSON schema of a report (`docs/report.schema.json`), produced
//! with serde. Exact rationals are strings `"p/q"` or `"p"`; square-free
//! classes and big integers are decimal strings.

use std::collections::BTreeMap;

use serde::Serialize;

use super::text::{evidence_summary, rational_text, side_names};
use super::Detail;
use crate::curve::equation::{equation_text, quartic_text, reduced_equation_text};
use crate::curve::tate::ReductionKind;
use crate::curve::Point;
use crate::descent::isogeny_side::{
    ClassStatus, CoveringObstruction, SearchRecord, SelmerElement, SelmerSide,
};
use crate::descent::report::{Completion, DescentReport};
use crate::local::class_representatives;
use crate::quartic::search::SearchOutcome;

/// The schema version written in every line as `format_version`.
pub const FORMAT_VERSION: u32 = 4;

#[derive(Serialize)]
struct PointView {
    x: String,
    y: String,
}

fn point_view(p: &Point) -> Option<PointView> {
    Some(PointView {
        x: rational_text(p.x()?),
        y: rational_text(p.y()?),
    })
}

fn points_view(ps: &[Point]) -> Vec<PointView> {
    ps.iter().filter_map(point_view).collect()
}

/// A returned point with its canonical height (when computed).
#[derive(Serialize)]
struct HeightPointView {
    x: String,
    y: String,
    height: Option<String>,
    height_error: Option<String>,
}

fn height_points_view(ps: &[Point], heights: &[crate::height::Certified]) -> Vec<HeightPointView> {
    ps.iter()
        .enumerate()
        .filter_map(|(i, p)| {
            Some(HeightPointView {
                x: rational_text(p.x()?),
                y: rational_text(p.y()?),
                height: heights
                    .get(i)
                    .map(|h| value_and_error(h.value(), h.error()).0),
                height_error: heights
                    .get(i)
                    .map(|h| value_and_error(h.value(), h.error()).1),
            })
        })
        .collect()
}

#[derive(Serialize)]
struct OrderView {
    bound: &'static str,
    order: usize,
}

#[derive(Serialize)]
struct TorsionView {
    order: u32,
    cyclic_factors: Vec<u32>,
    generators: Vec<PointView>,
}

#[derive(Serialize)]
struct ReductionView {
    kind: &'static str,
    kodaira: String,
    conductor_exponent: u32,
    tamagawa: u64,
    disc_valuation: u64,
}

#[derive(Serialize)]
struct SpacePointView {
    #[serde(rename = "M")]
    m: String,
    e: String,
    #[serde(rename = "N")]
    n: String,
}

#[derive(Serialize)]
struct ClassView {
    class: String,
    status: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    point: Option<PointView>,
    #[serde(skip_serializing_if = "Option::is_none")]
    space: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    space_point: Option<SpacePointView>,
}

#[derive(Serialize)]
struct LocalImageView {
    place: String,
    classes: Vec<String>,
}

#[derive(Serialize)]
struct SpaceView {
    class: String,
    equation: String,
    coefficients: Vec<String>,
    outcome: &'static str,
    height: Option<u64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    point: Option<SpacePointView>,
}

/// One twist's obstruction: a 4-covering `{quartic, insoluble_at}`, or,
/// when no quartic model exists, `{conic, hilbert_symbol, insoluble_at}`.
#[derive(Serialize)]
#[serde(untagged)]
enum CoveringView {
    Quartic {
        quartic: Vec<String>,
        insoluble_at: String,
    },
    Conic {
        /// `[c, A, B, C]` for `c·s² = A u² + B uv + C v²`.
        conic: Vec<String>,
        /// `[x, D]` with Hilbert symbol `(x, D)` = −1 at the place.
        hilbert_symbol: Vec<String>,
        insoluble_at: String,
    },
}

#[derive(Serialize)]
struct CoveringsView {
    class: String,
    coverings: Vec<CoveringView>,
}

#[derive(Serialize)]
struct EvidenceView {
    local_images: Vec<LocalImageView>,
    spaces: Vec<SpaceView>,
    four_coverings: Vec<CoveringsView>,
}

#[derive(Serialize)]
struct SideView {
    equation: String,
    selmer_group: &'static str,
    sha_group: &'static str,
    dimension: usize,
    image_lower: usize,
    image_upper: usize,
    torsion_image_dimension: usize,
    sha_dimension_lower: usize,
    sha_dimension_upper: usize,
    elements: Vec<ClassView>,
    evidence_summary: String,
    #[serde(skip_serializing_if = "Option::is_none")]
    evidence: Option<EvidenceView>,
}

#[derive(Serialize)]
struct IsogenyView {
    kernel_point: Option<PointView>,
    decides_rank: bool,
    rank_lower: usize,
    rank_upper: usize,
    reduced_model: String,
    curve: SideView,
    isogenous: SideView,
}

#[derive(Serialize)]
struct CertifiedView {
    value: String,
    error: String,
}

fn certified(value: f64, error: f64) -> CertifiedView {
    let (value, error) = value_and_error(value, error);
    CertifiedView { value, error }
}

#[derive(Serialize)]
struct LValueView {
    order: usize,
    value: String,
    error: String,
}

#[derive(Serialize)]
struct AnalyticView {
    conductor: String,
    root_number_route: Option<&'static str>,
    real_period: Option<CertifiedView>,
    real_components: Option<u8>,
    l_values: Vec<LValueView>,
    terms: u64,
    theorem: Option<&'static str>,
    skipped: Option<&'static str>,
}

#[derive(Serialize)]
struct SaturationView {
    index_bound: Option<u64>,
    index_found: u64,
    primes_checked: Vec<u64>,
    unresolved: Vec<u64>,
    height_lower_bound: Option<String>,
}

#[derive(Serialize)]
struct LedgerView {
    sha: CertifiedView,
    nearest_square: Option<u64>,
    square_within_error: bool,
    sha2_dimension_from_descent: Option<usize>,
    two_adic_valuation: Option<u32>,
}

#[derive(Serialize)]
struct HeegnerView {
    outcome: &'static str,
    discriminant: Option<i64>,
    conductor: Option<u32>,
    class_number: Option<usize>,
    level: Option<u32>,
    index: Option<u64>,
    trace_factor: Option<u32>,
    trace_point: Option<PointView>,
    precision_bits: Option<u32>,
    terms: Option<u64>,
    exact_check: Option<&'static str>,
    reason: Option<String>,
}

fn heegner_view(o: &crate::heegner::HeegnerOutcome) -> HeegnerView {
    use crate::heegner::HeegnerOutcome as H;
    let mut v = HeegnerView {
        outcome: "not_applicable",
        discriminant: None,
        conductor: None,
        class_number: None,
        level: None,
        index: None,
        trace_factor: None,
        trace_point: None,
        precision_bits: None,
        terms: None,
        exact_check: None,
        reason: None,
    };
    match o {
        H::Found(h) => {
            v.outcome = "found";
            v.discriminant = Some(h.discriminant);
            v.conductor = Some(h.conductor);
            v.class_number = Some(h.class_number);
            v.level = Some(h.level);
            v.index = Some(h.index);
            v.trace_factor = Some(h.trace_factor);
            v.trace_point = point_view(&h.trace_point);
            v.precision_bits = Some(h.precision_bits);
            v.terms = Some(h.terms);
            v.exact_check = Some(if num_traits::Zero::is_zero(&h.n) {
                "point and trace point on the curve in exact rationals; trace point = index·point by exact multiplication; trace_factor·trace = ±trace point + torsion only to the working precision"
            } else {
                "trace point on the curve in exact rationals; trace = ±index·point + torsion by exact multiplication"
            });
        }
        H::Torsion {
            discriminant,
            class_number,
        } => {
            v.outcome = "torsion";
            v.discriminant = Some(*discriminant);
            v.class_number = Some(*class_number);
        }
        H::NotRecognised {
            discriminant,
            class_number,
            bits,
        } => {
            v.outcome = "not_recognised";
            v.discriminant = Some(*discriminant);
            v.class_number = Some(*class_number);
            v.precision_bits = Some(*bits);
        }
        H::NotApplicable(why) => v.reason = Some(why.clone()),
    }
    v
}

#[derive(Serialize)]
struct StopView {
    step: String,
    reason: String,
}

/// A full line: the report fields, or nulls and an error.
#[derive(Serialize)]
struct LineView<'a> {
    format_version: u32,
    input: std::borrow::Cow<'a, str>,
    curve: Option<String>,
    status: &'static str,
    stopped: Option<StopView>,
    rank_lower: Option<usize>,
    rank_upper: Option<usize>,
    points: Vec<HeightPointView>,
    points_from: Option<&'static str>,
    heegner: Option<HeegnerView>,
    torsion: Option<TorsionView>,
    selmer2_rank: Option<usize>,
    rank_settled_by: Option<&'static str>,
    regulator: Option<String>,
    regulator_error: Option<String>,
    points_generate: bool,
    saturation: Option<SaturationView>,
    root_number: Option<i8>,
    analytic_order: Option<OrderView>,
    analytic: Option<AnalyticView>,
    ledger: Option<LedgerView>,
    conflict: Option<String>,
    conductor: Option<String>,
    minimal_model: Option<String>,
    reduction: BTreeMap<String, ReductionView>,
    selmer: Vec<IsogenyView>,
    isogeny3: Option<Isogeny3View>,
    /// Only on lines of the descent via a 3-isogeny with α ≠ 0 (absent,
    /// not null, on every other line).
    #[serde(skip_serializing_if = "Option::is_none")]
    isogeny3_general: Option<Isogeny3GeneralView>,
    error: Option<&'a str>,
}

#[derive(Serialize)]
struct ChangeView {
    u: String,
    r: String,
    s: String,
    t: String,
}

#[derive(Serialize)]
struct CubicWitnessView {
    class: Vec<u8>,
    prime: String,
    kind: &'static str,
    u: String,
    v: String,
}

#[derive(Serialize)]
struct CubicFindView {
    class: Vec<u8>,
    u: String,
    v: String,
    w: String,
    x: String,
    y: String,
}

#[derive(Serialize)]
struct Side3View {
    k: String,
    field: String,
    generators: Vec<String>,
    primes: Vec<String>,
    selmer_dim: usize,
    selmer_basis: Vec<Vec<u8>>,
    image_dim: usize,
    witnesses: Vec<CubicWitnessView>,
    finds: Vec<CubicFindView>,
}

#[derive(Serialize)]
struct CasselsView {
    selmer_ratio: String,
    tamagawa_side: String,
    equal: bool,
}

/// The 3-isogeny part of a line (null on lines of the 2-isogeny descent).
#[derive(Serialize)]
struct Isogeny3View {
    model_k: String,
    model_change: ChangeView,
    sides: Vec<Side3View>,
    cassels: Option<CasselsView>,
    theorem: Option<&'static str>,
    sha_dim: Option<usize>,
    saturation_at_3_from_descent: bool,
}

fn field_word(f: &crate::descent3::SideField) -> String {
    use crate::descent3::SideField as F;
    match f {
        F::Rational => "Q".to_string(),
        F::Eisenstein => "Q(sqrt(-3))".to_string(),
        F::Quadratic { d } => format!("Q(sqrt({d}))"),
    }
}

fn isogeny3_view(r: &crate::descent3::Isogeny3Report, detail: Detail) -> Isogeny3View {
    use crate::cubic::CubicWitness;
    let sides = r
        .sides
        .iter()
        .map(|s| Side3View {
            k: s.k.to_string(),
            field: field_word(&s.field),
            generators: s.generators.iter().map(|g| g.to_string()).collect(),
            primes: s.primes.iter().map(|p| p.to_string()).collect(),
            selmer_dim: s.selmer_dim(),
            selmer_basis: s.selmer_basis.clone(),
            image_dim: s.image_dim,
            witnesses: if detail == Detail::Full {
                s.witnesses
                    .iter()
                    .map(|(c, p, w)| {
                        let (kind, u, v) = match w {
                            CubicWitness::Cube { u, v } => ("cube", u, v),
                            CubicWitness::Zero { u, v } => ("zero", u, v),
                        };
                        CubicWitnessView {
                            class: c.clone(),
                            prime: p.to_string(),
                            kind,
                            u: u.to_string(),
                            v: v.to_string(),
                        }
                    })
                    .collect()
            } else {
                Vec::new()
            },
            finds: s
                .finds
                .iter()
                .filter_map(|f| {
                    Some(CubicFindView {
                        class: f.class.clone(),
                        u: f.on_cubic.u.to_string(),
                        v: f.on_cubic.v.to_string(),
                        w: f.on_cubic.w.to_string(),
                        x: rational_text(f.point.x()?),
                        y: rational_text(f.point.y()?),
                    })
                })
                .collect(),
        })
        .collect();
    Isogeny3View {
        model_k: r.k.to_string(),
        model_change: ChangeView {
            u: rational_text(r.change.u()),
            r: rational_text(r.change.r()),
            s: rational_text(r.change.s()),
            t: rational_text(r.change.t()),
        },
        sides,
        cassels: r.tamagawa.as_ref().map(cassels_view),
        theorem: theorem_name(r.rank),
        sha_dim: r.sha_dim,
        saturation_at_3_from_descent: r.three_saturated_by_descent,
    }
}

/// The top-level fields of a 3-isogeny line: status, bounds, torsion, the
/// saturated generators when saturation ran (else the independent points
/// found), each with its canonical height, and the saturation; the caller
/// fills `isogeny3` or `isogeny3_general`.
fn line3<'a>(input: &'a str, l: &crate::descent3::Summary3<'_>, stop_reason: &str) -> LineView<'a> {
    let (status, stopped) = if l.cut.is_empty() {
        ("complete", None)
    } else {
        (
            "partial",
            Some(StopView {
                step: l.cut.join(", "),
                reason: stop_reason.to_string(),
            }),
        )
    };
    let (points, heights): (Vec<Point>, Vec<crate::height::Certified>) = match l.saturation {
        Some(s) => (s.generators.clone(), s.heights.clone()),
        None => l.independent.iter().cloned().unzip(),
    };
    let reg = l
        .saturation
        .map(|s| value_and_error(s.regulator.value(), s.regulator.error()));
    LineView {
        curve: Some(l.curve.to_string()),
        status,
        stopped,
        rank_lower: Some(l.bounds.0),
        rank_upper: Some(l.bounds.1),
        points: height_points_view(&points, &heights),
        points_from: (!points.is_empty()).then_some("search"),
        torsion: Some(torsion_view(l.torsion)),
        rank_settled_by: l.rank.map(|(_, p)| match p {
            crate::descent3::Rank3Proof::Descent => "descent",
            _ => "analytic",
        }),
        regulator: reg.clone().map(|r| r.0),
        regulator_error: reg.map(|r| r.1),
        points_generate: l.points_generate,
        saturation: l.saturation.map(saturation_view),
        ..LineView::blank(input, status)
    }
}

/// The one-line JSON object of a report of the descent via 3-isogeny.
pub(crate) fn isogeny3_line(
    input: &str,
    r: &crate::descent3::Isogeny3Report,
    detail: Detail,
) -> String {
    let mut line = line3(input, &r.summary(), "a budget or the clock");
    line.isogeny3 = Some(isogeny3_view(r, detail));
    to_line(&line)
}

/// The one-line JSON object of a report of the descent via a 3-isogeny
/// with α ≠ 0: the same top-level fields as [`isogeny3_line`] and the
/// evidence under `isogeny3_general`.
pub(crate) fn isogeny3_general_line(
    input: &str,
    r: &crate::descent3::Isogeny3GeneralReport,
    detail: Detail,
) -> String {
    let mut line = line3(
        input,
        &r.summary(),
        "a budget, the clock, or a height step that could not be certified",
    );
    line.isogeny3_general = Some(isogeny3_general_view(r, detail));
    to_line(&line)
}

/// The working model y² = x³ + D(αx + β)² of one side of a 3-isogeny, with
/// the change of model that reaches it.
#[derive(Serialize)]
struct FlexModelView {
    d: String,
    alpha: String,
    beta: String,
    change: ChangeView,
}

#[derive(Serialize)]
struct PlaneWitnessView {
    class: Vec<u8>,
    prime: String,
    u: String,
    v: String,
    w: String,
}

#[derive(Serialize)]
struct FlexSideView {
    d: String,
    alpha: String,
    beta: String,
    field: String,
    generators: Vec<String>,
    selmer_dim: usize,
    selmer_basis: Vec<Vec<u8>>,
    image_dim: usize,
    witnesses: Vec<PlaneWitnessView>,
    points: Vec<PointView>,
}

/// The part of a line of the descent via a 3-isogeny with α ≠ 0.
#[derive(Serialize)]
struct Isogeny3GeneralView {
    model: FlexModelView,
    isogenous_model: FlexModelView,
    primes: Vec<String>,
    sides: Vec<FlexSideView>,
    cassels: Option<CasselsView>,
    theorem: Option<&'static str>,
}

fn change_view(c: &crate::curve::ModelChange) -> ChangeView {
    ChangeView {
        u: rational_text(c.u()),
        r: rational_text(c.r()),
        s: rational_text(c.s()),
        t: rational_text(c.t()),
    }
}

fn flex_model_view(m: &crate::curve::Isogeny3Model) -> FlexModelView {
    FlexModelView {
        d: m.d.to_string(),
        alpha: m.alpha.to_string(),
        beta: m.beta.to_string(),
        change: change_view(&m.change),
    }
}

fn isogeny3_general_view(
    r: &crate::descent3::Isogeny3GeneralReport,
    detail: Detail,
) -> Isogeny3GeneralView {
    let sides = r
        .sides
        .iter()
        .map(|s| FlexSideView {
            d: s.d.to_string(),
            alpha: s.alpha.to_string(),
            beta: s.beta.to_string(),
            field: field_word(&s.field),
            generators: s.generators.iter().map(|g| g.to_string()).collect(),
            selmer_dim: s.selmer_dim(),
            selmer_basis: s.selmer_basis.clone(),
            image_dim: s.image_dim,
            witnesses: if detail == Detail::Full {
                s.witnesses
                    .iter()
                    .map(|(c, p, w)| {
                        let [u, v, w] = &w.point;
                        PlaneWitnessView {
                            class: c.clone(),
                            prime: p.to_string(),
                            u: u.to_string(),
                            v: v.to_string(),
                            w: w.to_string(),
                        }
                    })
                    .collect()
            } else {
                Vec::new()
            },
            points: points_view(&s.points),
        })
        .collect();
    Isogeny3GeneralView {
        model: flex_model_view(&r.model),
        isogenous_model: flex_model_view(&r.isogenous_model),
        primes: r.primes.iter().map(|p| p.to_string()).collect(),
        sides,
        cassels: r.tamagawa.as_ref().map(cassels_view),
        theorem: theorem_name(r.rank),
    }
}

/// Cassels' check of a 3-isogeny descent.
fn cassels_view(t: &crate::descent3::TamagawaRatio) -> CasselsView {
    CasselsView {
        selmer_ratio: rational_text(&t.selmer_ratio),
        tamagawa_side: rational_text(&t.formula),
        equal: t.holds(),
    }
}

/// The theorem that proved the rank of a 3-isogeny descent, when the
/// analytic side proved it.
fn theorem_name(rank: Option<(usize, crate::descent3::Rank3Proof)>) -> Option<&'static str> {
    match rank {
        Some((_, crate::descent3::Rank3Proof::Analytic(t))) => Some(t.name()),
        _ => None,
    }
}

fn kind_word(k: ReductionKind) -> &'static str {
    match k {
        ReductionKind::Good => "good",
        ReductionKind::SplitMultiplicative => "split_multiplicative",
        ReductionKind::NonSplitMultiplicative => "nonsplit_multiplicative",
        ReductionKind::Additive => "additive",
    }
}

fn space_point(p: &crate::quartic::search::QuarticPoint) -> SpacePointView {
    SpacePointView {
        m: p.x.to_string(),
        e: p.z.to_string(),
        n: p.y.to_string(),
    }
}

fn side_view(s: &SelmerSide, domain: bool, detail: Detail) -> SideView {
    let (sel, sha) = side_names(domain);
    let elements = s.elements.iter().map(class_view).collect();
    let evidence = (detail == Detail::Full).then(|| evidence_view(s));
    let dim = s.dimension();
    SideView {
        equation: reduced_equation_text(s.a(), s.b()),
        selmer_group: sel,
        sha_group: sha,
        dimension: dim,
        image_lower: s.image_lower(),
        image_upper: s.image_upper(),
        torsion_image_dimension: s.torsion_dim,
        sha_dimension_lower: dim - s.image_upper().min(dim),
        sha_dimension_upper: dim - s.image_lower(),
        elements,
        evidence_summary: evidence_summary(s),
        evidence,
    }
}

/// One element of the adapted basis with its status and what shows it.
fn class_view(e: &SelmerElement) -> ClassView {
    let (point, space, sp) = match &e.status {
        ClassStatus::TorsionImage { point } => (point_view(point), None, None),
        ClassStatus::PointImage {
            point,
            space,
            on_space,
        } => (
            point_view(point),
            Some(space.to_string()),
            Some(space_point(on_space)),
        ),
        ClassStatus::ProvenNotImage { space, .. } => (None, Some(space.to_string()), None),
        ClassStatus::Undecided => (None, None, None),
    };
    ClassView {
        class: e.class.to_string(),
        status: e.status.word(),
        point,
        space,
        space_point: sp,
    }
}

/// The full evidence of one side: local images, searches, 4-coverings.
fn evidence_view(s: &SelmerSide) -> EvidenceView {
    EvidenceView {
        local_images: s
            .local_images()
            .iter()
            .map(|w| {
                let reps = class_representatives(&w.place);
                LocalImageView {
                    place: w.place.to_string(),
                    classes: w
                        .members
                        .iter()
                        .filter_map(|&m| reps.get(m as usize).map(|r| r.to_string()))
                        .collect(),
                }
            })
            .collect(),
        spaces: s.searches.iter().map(space_view).collect(),
        four_coverings: s.elements.iter().filter_map(coverings_view).collect(),
    }
}

/// One space searched, with the outcome of its search.
fn space_view(r: &SearchRecord) -> SpaceView {
    let (outcome, height, point) = match &r.outcome {
        SearchOutcome::Found(p) => ("point", None, Some(space_point(p))),
        SearchOutcome::NoneUpTo { height } => ("none_up_to", Some(*height), None),
        SearchOutcome::GaveUp { completed_height } => {
            ("budget_ran_out", Some(*completed_height), None)
        }
    };
    SpaceView {
        class: r.class.to_string(),
        equation: quartic_text(&r.quartic),
        coefficients: r.quartic.iter().map(|c| c.to_string()).collect(),
        outcome,
        height,
        point,
    }
}

/// The 4-coverings of a class proven not to be an image, each with its
/// place of insolubility; `None` for the other classes.
fn coverings_view(e: &SelmerElement) -> Option<CoveringsView> {
    let ClassStatus::ProvenNotImage {
        space,
        obstructions,
        ..
    } = &e.status
    else {
        return None;
    };
    Some(CoveringsView {
        class: space.to_string(),
        coverings: obstructions.iter().map(covering_view).collect(),
    })
}

fn covering_view(o: &CoveringObstruction) -> CoveringView {
    match o {
        CoveringObstruction::Quartic { covering, place } => CoveringView::Quartic {
            quartic: covering.iter().map(|c| c.to_string()).collect(),
            insoluble_at: place.to_string(),
        },
        CoveringObstruction::Conic {
            scale,
            form,
            hilbert,
            place,
        } => CoveringView::Conic {
            conic: std::iter::once(scale)
                .chain(form.iter())
                .map(|c| c.to_string())
                .collect(),
            hilbert_symbol: hilbert.iter().map(|c| c.to_string()).collect(),
            insoluble_at: place.to_string(),
        },
    }
}

fn report_view<'a>(input: &'a str, r: &DescentReport, detail: Detail) -> LineView<'a> {
    let ld = r.tate_data();
    let (status, stopped) = match r.completion() {
        Completion::Partial { step, reason } => (
            "partial",
            Some(StopView {
                step: step.clone(),
                reason: reason.clone(),
            }),
        ),
        _ => ("complete", None),
    };
    LineView {
        format_version: FORMAT_VERSION,
        input: echoed_input(input),
        curve: Some(r.curve().to_string()),
        status,
        stopped,
        rank_lower: Some(r.rank_lower()),
        rank_upper: Some(r.rank_upper()),
        points: height_points_view(r.points(), r.point_heights()),
        points_from: (!r.points().is_empty()).then(|| r.points_origin().word()),
        heegner: r.heegner().map(heegner_view),
        torsion: Some(torsion_view(r.torsion())),
        selmer2_rank: r.selmer2_rank(),
        rank_settled_by: r.rank_settled_by().map(|p| p.word()),
        regulator: r
            .regulator()
            .map(|g| value_and_error(g.value(), g.error()).0),
        regulator_error: r
            .regulator()
            .map(|g| value_and_error(g.value(), g.error()).1),
        points_generate: r.points_generate(),
        saturation: r.saturation().map(saturation_view),
        root_number: r.analytic().and_then(|a| a.root_number()),
        analytic_order: r
            .analytic()
            .and_then(|a| a.analytic_order())
            .map(|o| OrderView {
                bound: if o.is_exact() { "exact" } else { "at_most" },
                order: o.order(),
            }),
        analytic: r.analytic().map(analytic_view),
        ledger: r.sha_ledger().map(|l| {
            let two = r.sha_two_part();
            LedgerView {
                sha: certified(l.value.value(), l.value.error()),
                nearest_square: l.nearest_square,
                square_within_error: l.is_square_within_error,
                sha2_dimension_from_descent: two.map(|t| t.descent_dimension),
                two_adic_valuation: two.and_then(|t| t.analytic_valuation),
            }
        }),
        conflict: r.conflict().map(str::to_string),
        conductor: ld.map(|ld| ld.conductor.to_string()),
        minimal_model: ld.map(|ld| {
            equation_text(
                &ld.minimal_model
                    .clone()
                    .map(num_rational::BigRational::from_integer),
            )
        }),
        reduction: ld
            .map(|ld| ld.primes.as_slice())
            .unwrap_or_default()
            .iter()
            .map(|p| {
                (
                    p.prime.to_string(),
                    ReductionView {
                        kind: kind_word(p.reduction),
                        kodaira: p.kodaira.to_string(),
                        conductor_exponent: p.conductor_exponent,
                        tamagawa: p.tamagawa,
                        disc_valuation: p.disc_valuation,
                    },
                )
            })
            .collect(),
        selmer: r
            .isogenies()
            .iter()
            .enumerate()
            .map(|(i, d)| IsogenyView {
                kernel_point: point_view(d.kernel_point()),
                decides_rank: r.deciding_isogeny() == Some(i),
                rank_lower: d.rank_lower(),
                rank_upper: d.rank_upper(),
                reduced_model: reduced_equation_text(d.domain().a(), d.domain().b()),
                curve: side_view(d.domain(), true, detail),
                isogenous: side_view(d.codomain(), false, detail),
            })
            .collect(),
        isogeny3: None,
        isogeny3_general: None,
        error: None,
    }
}

/// `(value, error)` strings of a certified number such that the printed
/// interval `value ± error` contains the certified one exactly: the error
/// is widened by the rounding of the value and rounded up
/// (`crate::arith::decimal`).
pub fn value_and_error(value: f64, error: f64) -> (String, String) {
    crate::arith::decimal::enclose(value, error)
}

fn analytic_view(a: &crate::analytic::AnalyticData) -> AnalyticView {
    use crate::analytic::{RootNumberRoute, Skip};
    AnalyticView {
        conductor: a.conductor().to_string(),
        root_number_route: a.root_number_route().map(|r| match r {
            RootNumberRoute::FunctionalEquationAndFormula => {
                "functional_equation_and_local_formulas"
            }
            RootNumberRoute::FunctionalEquation => "functional_equation",
            RootNumberRoute::Formula => "local_formulas",
        }),
        real_period: a.real_period().map(|c| certified(c.value(), c.error())),
        real_components: a.real_component_count(),
        l_values: a
            .l_values()
            .iter()
            .map(|(k, c)| {
                let (value, error) = value_and_error(c.value(), c.error());
                LValueView {
                    order: *k,
                    value,
                    error,
                }
            })
            .collect(),
        terms: a.evidence().terms_used,
        theorem: a.rank_proven().map(|(_, t)| t.name()),
        skipped: a.skipped().map(|s| match s {
            Skip::ConductorAboveLimit => "conductor_above_limit",
            Skip::RootNumberUndecided => "root_number_undecided",
            Skip::Inconsistent => "inconsistent",
        }),
    }
}

fn to_line<T: Serialize>(v: &T) -> String {
    serde_json::to_string(v).unwrap_or_else(|e| {
        // Serialising plain strings and integers cannot fail; keep the line
        // well-formed if it ever does.
        format!(
            "{{\"format_version\":{FORMAT_VERSION},\"error\":{}}}",
            serde_json::Value::String(format!("internal error while writing JSON: {e}"))
        )
    })
}

/// Longest input echoed whole in `input`: the longest text the curve
/// parser accepts (`5·(2·MAX_COEFFICIENT_DIGITS + 2) + 4096` bytes), so
/// every curve is echoed exactly.
pub const MAX_ECHOED_INPUT_BYTES: usize = 5 * (2 * crate::curve::MAX_COEFFICIENT_DIGITS + 2) + 4096;

/// Bytes kept of a longer input (cut at a character boundary).
const ECHO_HEAD_BYTES: usize = 256;

/// The input as echoed: whole up to [`MAX_ECHOED_INPUT_BYTES`], else its
/// first 256 bytes (at most), `…` and its length, as in
/// `"0 123… (104857600 bytes in all)"`.
pub(crate) fn echoed_input(input: &str) -> std::borrow::Cow<'_, str> {
    if input.len() <= MAX_ECHOED_INPUT_BYTES {
        return std::borrow::Cow::Borrowed(input);
    }
    let mut cut = ECHO_HEAD_BYTES;
    while !input.is_char_boundary(cut) {
        cut -= 1;
    }
    std::borrow::Cow::Owned(format!("{}… ({} bytes in all)", &input[..cut], input.len()))
}

/// The one-line JSON object of a report, with `input` echoed (whole up
/// to [`MAX_ECHOED_INPUT_BYTES`], else cut with its length stated).
pub fn report_line(input: &str, r: &DescentReport, detail: Detail) -> String {
    to_line(&report_view(input, r, detail))
}

/// The JSON object for an input that gave no report (the input is
/// echoed whole up to [`MAX_ECHOED_INPUT_BYTES`], else cut with its length
/// stated).
pub fn error_line(input: &str, message: &str) -> String {
    to_line(&LineView {
        error: Some(message),
        ..LineView::blank(input, "error")
    })
}

impl<'a> LineView<'a> {
    /// A line with only the input (echoed as [`error_line`] says) and the
    /// status: every other field empty, for the writers to fill.
    fn blank(input: &'a str, status: &'static str) -> LineView<'a> {
        LineView {
            format_version: FORMAT_VERSION,
            input: echoed_input(input),
            curve: None,
            status,
            stopped: None,
            rank_lower: None,
            rank_upper: None,
            points: Vec::new(),
            points_from: None,
            heegner: None,
            torsion: None,
            selmer2_rank: None,
            rank_settled_by: None,
            regulator: None,
            regulator_error: None,
            points_generate: false,
            saturation: None,
            root_number: None,
            analytic_order: None,
            analytic: None,
            ledger: None,
            conflict: None,
            conductor: None,
            minimal_model: None,
            reduction: BTreeMap::new(),
            selmer: Vec::new(),
            isogeny3: None,
            isogeny3_general: None,
            error: None,
        }
    }
}

/// The torsion subgroup: order, cyclic factors (the larger last) and
/// generators.
fn torsion_view(t: &crate::curve::TorsionGroup) -> TorsionView {
    let (n1, n2) = t.structure();
    TorsionView {
        order: t.order(),
        cyclic_factors: if n2 <= 1 { vec![n1] } else { vec![n2, n1] },
        generators: points_view(t.generators()),
    }
}

/// The saturation's indices, primes and height bound (6 decimals, rounded
/// down).
fn saturation_view(s: &crate::height::Saturation) -> SaturationView {
    SaturationView {
        index_bound: s.index_bound,
        index_found: s.index_found,
        primes_checked: s.primes_checked.clone(),
        unresolved: s.unresolved.clone(),
        height_lower_bound: s
            .height_lower_bound
            .map(|h| crate::arith::decimal::decimal_floor(h, 6)),
    }
}

impl Serialize for DescentReport {
    /// The JSON schema of [`report_line`] with the summary evidence; a
    /// report does not keep the caller's text, so `input` is the curve's
    /// equation (which parses back to the same curve).
    fn serialize<S: serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let input = self.curve().to_string();
        report_view(&input, self, Detail::Summary).serialize(serializer)
    }
}
