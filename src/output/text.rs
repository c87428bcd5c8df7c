//! The text report: the answer first, then per isogeny the derivation of
//! the bounds, then local data, then evidence (summarised, or in full).

use std::fmt::{self, Write as _};

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::One;

use super::Detail;
use crate::analytic::{AnalyticData, AnalyticOrder};
use crate::curve::equation::{equation_text, quartic_text, reduced_equation_text};
use crate::curve::tate::ReductionKind;
use crate::curve::{ModelChange, Point};
use crate::descent::isogeny_side::{ClassStatus, CoveringObstruction, SelmerSide};
use crate::descent::report::{Completion, DescentReport};
use crate::descent::IsogenyDescent;
use crate::descent::RankProof;
use crate::local::class_representatives;
use crate::quartic::search::SearchOutcome;

/// A rational as "p/q" in lowest terms, or "p".
pub fn rational_text(x: &BigRational) -> String {
    if x.denom().is_one() {
        x.numer().to_string()
    } else {
        format!("{}/{}", x.numer(), x.denom())
    }
}

/// A point as "(x, y)" or "O".
pub fn point_text(p: &Point) -> String {
    match (p.x(), p.y()) {
        (Some(x), Some(y)) => format!("({}, {})", rational_text(x), rational_text(y)),
        _ => "O".to_string(),
    }
}

/// The words for a reduction type.
pub(crate) fn reduction_words(k: ReductionKind) -> &'static str {
    match k {
        ReductionKind::Good => "good",
        ReductionKind::SplitMultiplicative => "split multiplicative",
        ReductionKind::NonSplitMultiplicative => "non-split multiplicative",
        ReductionKind::Additive => "additive",
    }
}

/// The names of a side's Selmer group and of the part of Sha it measures.
///
/// For φ: E → E' with dual φ̂, the classes d of C_d over E (points of E)
/// form Sel^φ̂(E') ⊇ E(Q)/φ̂(E'(Q)), and Sel/image ≅ Ш(E')\[φ̂\]; the classes
/// over E' form Sel^φ(E) and measure Ш(E)\[φ\].
pub(crate) fn side_names(domain: bool) -> (&'static str, &'static str) {
    if domain {
        ("Sel^φ̂(E')", "Ш(E')[φ̂]")
    } else {
        ("Sel^φ(E)", "Ш(E)[φ]")
    }
}

/// How the reduced model comes from the input model.
fn model_relation(change: &ModelChange) -> String {
    if change.is_identity() {
        return "the input model itself".to_string();
    }
    format!(
        "from the input model by x = u^2x' + r, y = u^3y' + su^2x' + t with u = {}, r = {}, s = {}, t = {}",
        rational_text(change.u()),
        rational_text(change.r()),
        rational_text(change.s()),
        rational_text(change.t())
    )
}

fn classes_text(img: &crate::quartic::LocalImage) -> String {
    let reps = class_representatives(&img.place);
    let names: Vec<String> = img
        .members
        .iter()
        .map(|&m| {
            reps.get(m as usize)
                .map(BigInt::to_string)
                .unwrap_or_else(|| format!("#{m}"))
        })
        .collect();
    format!("{{{}}}", names.join(", "))
}

fn class_line(status: &ClassStatus) -> String {
    match status {
        ClassStatus::TorsionImage { point } => {
            format!("image of the torsion point {}", point_text(point))
        }
        ClassStatus::PointImage {
            point,
            space,
            on_space,
        } => format!(
            "image of {} from C_{space} at (M, e, N) = ({}, {}, {})",
            point_text(point),
            on_space.x,
            on_space.z,
            on_space.y
        ),
        ClassStatus::Undecided => "undecided: locally soluble everywhere, no point found".into(),
        ClassStatus::ProvenNotImage {
            obstructions,
            space,
            ..
        } => {
            let conics = obstructions
                .iter()
                .filter(|o| matches!(o, CoveringObstruction::Conic { .. }))
                .count();
            if conics == 0 {
                format!(
                    "not an image: each of the {} 4-coverings of C_{space} is locally insoluble",
                    obstructions.len()
                )
            } else {
                format!(
                    "not an image: each of the {} twists of C_{space} is locally insoluble ({} by a 4-covering, {conics} by a conic with no quartic model)",
                    obstructions.len(),
                    obstructions.len() - conics
                )
            }
        }
    }
}

/// "R: 2, 3: 1" from the places of a list of obstructions.
pub(crate) fn place_tally<'a>(places: impl Iterator<Item = &'a crate::local::Place>) -> String {
    let mut tally: Vec<(String, usize)> = Vec::new();
    for p in places {
        let name = p.to_string();
        match tally.iter_mut().find(|(n, _)| *n == name) {
            Some((_, k)) => *k += 1,
            None => tally.push((name, 1)),
        }
    }
    tally
        .iter()
        .map(|(n, k)| format!("{n}: {k}"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// One-line summary of a side's searches and second descent.
pub(crate) fn evidence_summary(s: &SelmerSide) -> String {
    let mut parts = Vec::new();
    if !s.searches.is_empty() {
        let heights: Vec<u64> = s
            .searches
            .iter()
            .filter_map(|r| match &r.outcome {
                SearchOutcome::NoneUpTo { height } => Some(*height),
                SearchOutcome::GaveUp { completed_height } => Some(*completed_height),
                SearchOutcome::Found(_) => None,
            })
            .collect();
        let found = s
            .searches
            .iter()
            .filter(|r| matches!(r.outcome, SearchOutcome::Found(_)))
            .count();
        let reach = match (heights.iter().min(), heights.iter().max()) {
            (Some(lo), Some(hi)) if lo == hi => format!(" to height {hi}"),
            (Some(lo), Some(hi)) => format!(" to heights {lo}..{hi}"),
            _ => String::new(),
        };
        let spaces = s.searches.len();
        parts.push(format!(
            "{spaces} space{} searched{reach}, {found} point{} found",
            if spaces == 1 { "" } else { "s" },
            if found == 1 { "" } else { "s" }
        ));
    }
    let proven: Vec<&ClassStatus> = s
        .elements
        .iter()
        .map(|e| &e.status)
        .filter(|st| matches!(st, ClassStatus::ProvenNotImage { .. }))
        .collect();
    if !proven.is_empty() {
        let mut count = 0;
        let places = proven.iter().flat_map(|st| match st {
            ClassStatus::ProvenNotImage { obstructions, .. } => {
                obstructions.iter().map(|o| o.place()).collect::<Vec<_>>()
            }
            _ => Vec::new(),
        });
        let places: Vec<&crate::local::Place> = places.collect();
        count += places.len();
        parts.push(format!(
            "all {count} 4-coverings of {} space{} locally insoluble ({})",
            proven.len(),
            if proven.len() == 1 { "" } else { "s" },
            place_tally(places.into_iter())
        ));
    }
    if parts.is_empty() {
        "no search (local conditions only)".to_string()
    } else {
        parts.join("; ")
    }
}

fn write_side(
    f: &mut fmt::Formatter<'_>,
    s: &SelmerSide,
    domain: bool,
    detail: Detail,
) -> fmt::Result {
    let (sel, _) = side_names(domain);
    writeln!(f, "  basis of {sel} in Q*/Q*^2:")?;
    for e in &s.elements {
        writeln!(
            f,
            "    {:>8}  {}",
            e.class.to_string(),
            class_line(&e.status)
        )?;
    }
    // Each homogeneous space once, with its equation.
    let mut shown: Vec<&BigInt> = Vec::new();
    let mut lines = Vec::new();
    for r in &s.searches {
        if shown.contains(&&r.class) {
            continue;
        }
        let with_point = matches!(r.outcome, SearchOutcome::Found(_));
        if detail == Detail::Full || with_point {
            shown.push(&r.class);
            let outcome = match &r.outcome {
                SearchOutcome::Found(p) => format!("point (M, e, N) = ({}, {}, {})", p.x, p.z, p.y),
                SearchOutcome::NoneUpTo { height } => format!("no point up to height {height}"),
                SearchOutcome::GaveUp { completed_height } => {
                    format!("budget ran out, no point up to height {completed_height}")
                }
            };
            lines.push(format!(
                "    C_{}: {}   {outcome}",
                r.class,
                quartic_text(&r.quartic)
            ));
        }
    }
    if !lines.is_empty() {
        writeln!(f, "  homogeneous spaces:")?;
        for l in lines {
            writeln!(f, "{l}")?;
        }
    }
    if detail == Detail::Full {
        let locals: Vec<String> = s
            .local_images()
            .iter()
            .map(|w| format!("{}: {}", w.place, classes_text(w)))
            .collect();
        writeln!(f, "  local images: {}", locals.join("; "))?;
        for e in &s.elements {
            if let ClassStatus::ProvenNotImage {
                obstructions,
                space,
                ..
            } = &e.status
            {
                writeln!(f, "  4-coverings of C_{space}:")?;
                for o in obstructions {
                    match o {
                        CoveringObstruction::Quartic { covering, place } => writeln!(
                            f,
                            "    y^2 = {}   insoluble at {place}",
                            quartic_text(covering)
                                .trim_start_matches("N^2 = ")
                                .replace('M', "u")
                                .replace('e', "v"),
                        )?,
                        CoveringObstruction::Conic {
                            scale,
                            form,
                            hilbert,
                            place,
                        } => writeln!(
                            f,
                            "    no quartic model (neither conic of the twist has a rational point); its conic {} = {} has no point at {place}: Hilbert symbol ({}, {})_{place} = -1",
                            form_text(std::slice::from_ref(scale), &["s^2"]),
                            form_text(form, &["u^2", "uv", "v^2"]),
                            hilbert[0],
                            hilbert[1],
                        )?,
                    }
                }
            }
        }
    }
    Ok(())
}

fn write_isogeny(
    f: &mut fmt::Formatter<'_>,
    i: usize,
    count: usize,
    d: &IsogenyDescent,
    deciding: bool,
    detail: Detail,
) -> fmt::Result {
    let (ka, kb) = (d.domain().image_lower(), d.codomain().image_lower());
    let (ua, ub) = (d.domain().image_upper(), d.codomain().image_upper());
    let head = format!(
        "isogeny {} of {count}: φ with kernel generated by {}",
        i + 1,
        point_text(d.kernel_point())
    );
    if !deciding && detail == Detail::Summary {
        return writeln!(
            f,
            "{head}: {} ≤ rank ≤ {} (dim Sel^φ̂(E') = {}, dim Sel^φ(E) = {})",
            d.rank_lower(),
            d.rank_upper(),
            d.domain().dimension(),
            d.codomain().dimension()
        );
    }
    writeln!(
        f,
        "{head}{}",
        if deciding { ", decides the rank" } else { "" }
    )?;
    writeln!(
        f,
        "  reduced model E: {} ({})",
        reduced_equation_text(d.domain().a(), d.domain().b()),
        model_relation(d.model().change())
    )?;
    writeln!(
        f,
        "  isogenous curve E': {}",
        reduced_equation_text(d.codomain().a(), d.codomain().b())
    )?;
    writeln!(
        f,
        "  dim Sel^φ̂(E') = {}, dim Sel^φ(E) = {}; images of E(Q) and E'(Q) have dimension in [{ka}, {ua}] and [{kb}, {ub}]",
        d.domain().dimension(),
        d.codomain().dimension()
    )?;
    writeln!(
        f,
        "  rank ≥ {ka} + {kb} − 2 = {}, rank ≤ {ua} + {ub} − 2 = {}",
        d.rank_lower(),
        d.rank_upper()
    )?;
    let ((sl, su), (tl, tu)) = d.sha_bounds();
    writeln!(
        f,
        "  dim Ш(E')[φ̂] in [{sl}, {su}], dim Ш(E)[φ] in [{tl}, {tu}]"
    )?;
    write_side(f, d.domain(), true, detail)?;
    write_side(f, d.codomain(), false, detail)
}

/// Writes `report` with the given detail: the headline with the rank and
/// its proof, the points, torsion and 2-Selmer rank, then each isogeny, the
/// analytic side, the local data and the evidence summary.
pub(crate) fn write_report(
    f: &mut fmt::Formatter<'_>,
    r: &DescentReport,
    detail: Detail,
) -> fmt::Result {
    writeln!(f, "{}", r.curve())?;
    write_rank_line(f, r)?;
    if let Some(c) = r.conflict() {
        writeln!(
            f,
            "CONFLICT (a bug in the descent or the analytic side; nothing was settled by it): {c}"
        )?;
    }
    write_points(f, r)?;
    write_torsion_and_selmer(f, r)?;
    if let Completion::Partial { step, reason } = r.completion() {
        writeln!(
            f,
            "partial: {step} stopped ({reason}); the bounds above are proven by the steps that ran"
        )?;
    }
    writeln!(f)?;
    let count = r.isogenies().len();
    for (i, d) in r.isogenies().iter().enumerate() {
        write_isogeny(f, i, count, d, r.deciding_isogeny() == Some(i), detail)?;
    }
    if let Some(a) = r.analytic() {
        write_analytic(f, r, a)?;
    }
    writeln!(f)?;
    write_local_data(f, r)?;
    writeln!(f)?;
    let mut ev = String::new();
    for (i, d) in r.isogenies().iter().enumerate() {
        let _ = writeln!(
            ev,
            "evidence, isogeny {}: on E {}; on E' {}",
            i + 1,
            evidence_summary(d.domain()),
            evidence_summary(d.codomain())
        );
    }
    f.write_str(&ev)
}

/// The headline: the rank or its interval, and which theorem or which
/// descent proves it.
fn write_rank_line(f: &mut fmt::Formatter<'_>, r: &DescentReport) -> fmt::Result {
    let b = r.rank_bounds();
    let n = r.descent_points().len();
    let lower_proof = if b.lower == 0 {
        "trivial".to_string()
    } else {
        format!(
            "{n} point{} independent modulo torsion (certified by their images under the connecting maps)",
            if n == 1 { "" } else { "s" }
        )
    };
    let upper_proof = match r
        .deciding_isogeny()
        .and_then(|i| r.isogenies().get(i).map(|d| (i, d)))
    {
        Some((i, d)) => {
            let second = d.domain().image_upper() < d.domain().dimension()
                || d.codomain().image_upper() < d.codomain().dimension();
            format!(
                "the Selmer groups of isogeny {}{}",
                i + 1,
                if second {
                    " and the second descent"
                } else {
                    ""
                }
            )
        }
        None => "the Selmer groups".to_string(),
    };
    let head = if b.is_decided() {
        format!("rank {}", b.lower)
    } else {
        format!("rank in [{}, {}]", b.lower, b.upper)
    };
    match (r.rank_settled_by(), r.analytic()) {
        (Some(RankProof::Analytic(theorem)), Some(a)) => {
            let d = r.descent_bounds();
            let (w, k) = (a.root_number().unwrap_or(0), b.lower);
            let value = a
                .l_value(k)
                .map(|c| plus_minus(c.value(), c.error()))
                .unwrap_or_default();
            writeln!(
                f,
                "{head} (proven by {}: w = {w:+}, L{}(E,1) = {value} ≠ 0; the descent alone gives [{}, {}])",
                theorem.name(),
                if k == 1 { "'" } else { "" },
                d.lower,
                d.upper
            )?;
        }
        _ => writeln!(
            f,
            "{head} (lower bound: {lower_proof}; upper bound: {upper_proof})"
        )?,
    }
    Ok(())
}

/// The points found, with their heights and what is proven about them
/// (generators by saturation, or independent only), and the regulator.
fn write_points(f: &mut fmt::Formatter<'_>, r: &DescentReport) -> fmt::Result {
    let b = r.rank_bounds();
    let returned = r.points();
    let heights = r.point_heights();
    let with_heights: Vec<String> = returned
        .iter()
        .enumerate()
        .map(|(i, p)| match heights.get(i) {
            Some(h) => format!(
                "{} (ĥ = {})",
                point_text(p),
                plus_minus(h.value(), h.error())
            ),
            None => point_text(p),
        })
        .collect();
    if r.points_generate() && !returned.is_empty() {
        let s = r.saturation();
        let certificate = s
            .map(|s| {
                let primes: Vec<String> = s.primes_checked.iter().map(u64::to_string).collect();
                let bound = s
                    .index_bound
                    .map(|b| b.to_string())
                    .unwrap_or_else(|| "-".into());
                if primes.is_empty() {
                    // An index bound below 2 leaves no prime to check.
                    format!("index bound {bound}, so no prime can divide the index")
                } else {
                    format!(
                        "index bound {bound}, p-saturated for p in {{{}}}",
                        primes.join(", ")
                    )
                }
            })
            .unwrap_or_default();
        writeln!(
            f,
            "generators of E(Q) modulo torsion: {} (proven by saturation: {certificate})",
            with_heights.join(", ")
        )?;
    } else if !returned.is_empty() {
        let index = r
            .saturation()
            .and_then(|s| s.index_bound)
            .map(|b| format!("; their span has index at most {b} in its saturation"))
            .unwrap_or_default();
        writeln!(
            f,
            "points: {} (independent; not shown to generate E(Q) modulo torsion{index})",
            with_heights.join(", ")
        )?;
    }
    if let Some(reg) = r.regulator() {
        writeln!(f, "regulator: {}", plus_minus(reg.value(), reg.error()))?;
    }
    if returned.len() < b.lower {
        writeln!(
            f,
            "points: {} of the {} independent points the rank requires were found",
            returned.len(),
            b.lower
        )?;
    }
    heegner_text(f, r)?;
    Ok(())
}

/// The torsion subgroup with its generators, and the 2-Selmer rank.
fn write_torsion_and_selmer(f: &mut fmt::Formatter<'_>, r: &DescentReport) -> fmt::Result {
    let t = r.torsion();
    let (n1, n2) = t.structure();
    let structure = if n2 <= 1 {
        format!("Z/{n1}")
    } else {
        format!("Z/{n2} x Z/{n1}")
    };
    let gens: Vec<String> = t.generators().iter().map(point_text).collect();
    writeln!(
        f,
        "torsion: {structure}, generated by {}",
        if gens.is_empty() {
            "O".to_string()
        } else {
            gens.join(", ")
        }
    )?;
    if let Some(s2) = r.selmer2_rank() {
        let t2 = if n2 <= 1 { 1 } else { 2 };
        writeln!(
            f,
            "2-Selmer group: dim Sel^2(E/Q) = {s2} (E(Q)[2] contributes {t2}, so rank ≤ {})",
            s2.saturating_sub(t2)
        )?;
    }
    Ok(())
}

/// The minimal model, the conductor and each bad prime's reduction data.
fn write_local_data(f: &mut fmt::Formatter<'_>, r: &DescentReport) -> fmt::Result {
    match r.tate_data() {
        Some(ld) => {
            let mm = ld.minimal_model.clone().map(BigRational::from_integer);
            writeln!(
                f,
                "minimal model {}, conductor {}",
                equation_text(&mm),
                ld.conductor
            )?;
            for p in &ld.primes {
                writeln!(
                    f,
                    "  p = {}: {} reduction, Kodaira type {}, f_p = {}, c_p = {}, v_p(Δ) = {}",
                    p.prime,
                    reduction_words(p.reduction),
                    p.kodaira,
                    p.conductor_exponent,
                    p.tamagawa,
                    p.disc_valuation
                )?;
            }
        }
        None => writeln!(
            f,
            "minimal model and conductor not computed (Tate's algorithm was stopped)"
        )?,
    }
    Ok(())
}

fn write_analytic(f: &mut fmt::Formatter<'_>, r: &DescentReport, a: &AnalyticData) -> fmt::Result {
    writeln!(f)?;
    if let Some(skip) = a.skipped() {
        return writeln!(f, "analytic side: not computed ({skip:?})");
    }
    let w = a
        .root_number()
        .map(|w| format!("{w:+}"))
        .unwrap_or_else(|| "undecided".into());
    let period = a
        .real_period()
        .map(|c| plus_minus(c.value(), c.error()))
        .unwrap_or_else(|| "-".into());
    writeln!(
        f,
        "analytic side: root number w = {w}, Ω = {period} ({} real component{}), {} terms",
        a.real_component_count().unwrap_or(0),
        if a.real_component_count() == Some(1) {
            ""
        } else {
            "s"
        },
        a.evidence().terms_used
    )?;
    let values: Vec<String> = a
        .l_values()
        .iter()
        .map(|(k, c)| {
            format!(
                "L{}(E,1) = {}",
                "'".repeat(*k),
                plus_minus(c.value(), c.error())
            )
        })
        .collect();
    if !values.is_empty() {
        writeln!(f, "  {}", values.join(", "))?;
    }
    match a.analytic_order() {
        Some(AnalyticOrder::Exact(k)) => {
            writeln!(f, "  analytic rank {k} (order of vanishing at s = 1, proven)")?
        }
        Some(o) => writeln!(
            f,
            "  analytic rank at most {} (smallest order with a certified non-zero value; lower orders not proven to vanish)",
            o.order()
        )?,
        None => writeln!(f, "  no L^(r)(E,1) with r ≤ 3 certified non-zero")?,
    }
    match r.sha_ledger() {
        Some(l) => {
            let square = match (l.nearest_square, l.is_square_within_error) {
                (Some(s), true) => format!("within its error of the square {s}"),
                _ => "not within its error of an integer square".to_string(),
            };
            writeln!(
                f,
                "  Birch–Swinnerton-Dyer: analytic order of Sha = {}, {square}",
                plus_minus(l.value.value(), l.value.error())
            )?;
            if let Some(t) = r.sha_two_part() {
                writeln!(
                    f,
                    "  dim Ш(E)[2] = {} (from dim Sel^2(E) and the rank){}",
                    t.descent_dimension,
                    match t.analytic_valuation {
                        Some(v) => format!(", 2-adic valuation of the square {v}: {}", if t.consistent { "consistent" } else { "INCONSISTENT" }),
                        None => String::new(),
                    }
                )?;
            }
        }
        None => writeln!(
            f,
            "  Birch–Swinnerton-Dyer: no ledger (it needs the rank decided, L^(r)(E,1) certified, and for rank ≥ 1 proven generators)"
        )?,
    }
    Ok(())
}

/// The line of the Heegner step, when it ran.
fn heegner_text(f: &mut fmt::Formatter<'_>, r: &DescentReport) -> fmt::Result {
    use crate::heegner::HeegnerOutcome as H;
    match r.heegner() {
        Some(H::Found(h)) if num_traits::Zero::is_zero(&h.n) => writeln!(
            f,
            "point from a Heegner point at the curve's own level {}: D = {}, h(D) = {}; trace point {} = {}·point (checked exactly), {}·trace = ±trace point + torsion to the working precision ({} bits, {} series terms)",
            h.level,
            h.discriminant,
            h.class_number,
            point_text(&h.trace_point),
            h.index,
            h.trace_factor,
            h.precision_bits,
            h.terms
        ),
        Some(H::Found(h)) => writeln!(
            f,
            "point from a Heegner point: D = {} (order of conductor {}), h(D) = {}, level {}; trace point {} = ±{}·point + torsion (checked exactly; {} bits, {} series terms)",
            h.discriminant,
            h.conductor,
            h.class_number,
            h.level,
            point_text(&h.trace_point),
            h.index,
            h.precision_bits,
            h.terms
        ),
        Some(H::Torsion {
            discriminant,
            class_number,
        }) => writeln!(
            f,
            "Heegner point: the trace for D = {discriminant}, h(D) = {class_number} is torsion"
        ),
        Some(H::NotRecognised {
            discriminant,
            class_number,
            bits,
        }) => writeln!(
            f,
            "Heegner point: D = {discriminant}, h(D) = {class_number}; no rational point recognised up to {bits} bits"
        ),
        Some(H::NotApplicable(why)) => writeln!(f, "Heegner point: not attempted ({why})"),
        None => Ok(()),
    }
}

/// `value ± error` with the printed interval containing the certified one
/// (see [`super::json::value_and_error`]).
fn plus_minus(value: f64, error: f64) -> String {
    let (v, e) = super::json::value_and_error(value, error);
    format!("{v} ± {e}")
}

/// `c₀·m₀ + c₁·m₁ + …` with the monomials `m_i`, zero terms left out.
fn form_text(coeffs: &[BigInt], monomials: &[&str]) -> String {
    use num_traits::{Signed, Zero};
    let mut out = String::new();
    for (c, m) in coeffs.iter().zip(monomials) {
        if c.is_zero() {
            continue;
        }
        if out.is_empty() {
            if c.is_negative() {
                out.push('-');
            }
        } else {
            out.push_str(if c.is_negative() { " - " } else { " + " });
        }
        if !c.abs().is_one() {
            out.push_str(&c.abs().to_string());
        }
        out.push_str(m);
    }
    if out.is_empty() {
        out.push('0');
    }
    out
}
