//! The report of a descent: a readable `Display` layout and a one-line JSON
//! object (the contract of the `descend --json` front end).

use std::fmt::{self, Write as _};

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::One;

use super::side::{ClassStatus, SelmerSide};
use super::IsogenyDescent;
use crate::curve::tate::{GlobalLocalData, ReductionKind};
use crate::curve::{Curve, Point, TorsionGroup};
use crate::local::class_representatives;
use crate::quartic::search::SearchOutcome;

/// Everything a descent found about one curve.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct DescentReport {
    /// The curve as given.
    pub curve: Curve,
    /// Its torsion subgroup.
    pub torsion: TorsionGroup,
    /// Global minimal model, conductor and Tate's algorithm at every bad
    /// prime.
    pub local_data: GlobalLocalData,
    /// One descent per rational 2-torsion point.
    pub isogenies: Vec<IsogenyDescent>,
    /// Proven lower bound for the rank of E(Q).
    pub rank_lower: usize,
    /// Proven upper bound for the rank of E(Q).
    pub rank_upper: usize,
    /// Independent points of infinite order on the input model
    /// (`rank_lower` of them).
    pub points: Vec<Point>,
}

impl DescentReport {
    /// Combines the descents for the rational 2-torsion points.
    pub fn new(
        curve: Curve,
        torsion: TorsionGroup,
        local_data: GlobalLocalData,
        isogenies: Vec<IsogenyDescent>,
    ) -> Self {
        let best = isogenies
            .iter()
            .enumerate()
            .max_by_key(|(i, d)| (d.rank_lower, std::cmp::Reverse(*i)))
            .map(|(i, _)| i);
        let rank_lower = isogenies.iter().map(|d| d.rank_lower).max().unwrap_or(0);
        let rank_upper = isogenies
            .iter()
            .map(|d| d.rank_upper)
            .min()
            .unwrap_or(rank_lower);
        let points = best
            .and_then(|i| isogenies.get(i))
            .map(|d| d.points.clone())
            .unwrap_or_default();
        DescentReport {
            curve,
            torsion,
            local_data,
            isogenies,
            rank_lower,
            rank_upper,
            points,
        }
    }

    /// True when the bounds meet.
    pub fn is_decided(&self) -> bool {
        self.rank_lower == self.rank_upper
    }

    /// The one-line JSON object of the `descend --json` contract for this
    /// report, with `input` echoed.
    pub fn to_json(&self, input: &str) -> String {
        let mut s = String::new();
        s.push('{');
        let _ = write!(s, "\"input\":{}", json_string(input));
        let _ = write!(s, ",\"rank_lower\":{}", self.rank_lower);
        let _ = write!(s, ",\"rank_upper\":{}", self.rank_upper);
        s.push_str(",\"points\":");
        s.push_str(&points_json(&self.points));
        let _ = write!(s, ",\"torsion_order\":{}", self.torsion.order());
        let (n1, n2) = self.torsion.structure();
        if n2 <= 1 {
            let _ = write!(s, ",\"torsion_structure\":[{n1}]");
        } else {
            let _ = write!(s, ",\"torsion_structure\":[{n2},{n1}]");
        }
        let _ = write!(s, ",\"conductor\":\"{}\"", self.local_data.conductor);
        let mm: Vec<String> = self
            .local_data
            .minimal_model
            .iter()
            .map(|c| format!("\"{c}\""))
            .collect();
        let _ = write!(s, ",\"minimal_model\":[{}]", mm.join(","));
        let bad: Vec<String> = self
            .local_data
            .primes
            .iter()
            .map(|r| {
                format!(
                    "{{\"p\":\"{}\",\"kodaira\":\"{}\",\"conductor_exponent\":{},\"tamagawa\":{},\"reduction\":\"{}\",\"disc_valuation\":{}}}",
                    r.prime,
                    r.kodaira,
                    r.conductor_exponent,
                    r.tamagawa,
                    reduction_word(r.reduction),
                    r.disc_valuation
                )
            })
            .collect();
        let _ = write!(s, ",\"bad_primes\":[{}]", bad.join(","));
        s.push_str(",\"selmer\":[");
        for (i, d) in self.isogenies.iter().enumerate() {
            if i > 0 {
                s.push(',');
            }
            s.push_str(&isogeny_json(d));
        }
        s.push(']');
        s.push_str(",\"error\":null}");
        s
    }

    /// The JSON object for a line that could not be processed.
    pub fn error_json(input: &str, message: &str) -> String {
        format!(
            "{{\"input\":{},\"rank_lower\":null,\"rank_upper\":null,\"points\":[],\"torsion_order\":null,\"torsion_structure\":null,\"conductor\":null,\"minimal_model\":null,\"bad_primes\":[],\"selmer\":[],\"error\":{}}}",
            json_string(input),
            json_string(message)
        )
    }
}

fn reduction_word(k: ReductionKind) -> &'static str {
    match k {
        ReductionKind::Good => "good",
        ReductionKind::SplitMultiplicative => "split_multiplicative",
        ReductionKind::NonSplitMultiplicative => "nonsplit_multiplicative",
        ReductionKind::Additive => "additive",
    }
}

/// A rational as "p/q" in lowest terms, or "p".
pub fn rational_text(x: &BigRational) -> String {
    if x.denom().is_one() {
        x.numer().to_string()
    } else {
        format!("{}/{}", x.numer(), x.denom())
    }
}

/// A JSON string literal with the required escapes.
pub fn json_string(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for c in s.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if (c as u32) < 0x20 => {
                let _ = write!(out, "\\u{:04x}", c as u32);
            }
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

fn point_json(p: &Point) -> String {
    match (p.x(), p.y()) {
        (Some(x), Some(y)) => format!(
            "{{\"x\":\"{}\",\"y\":\"{}\"}}",
            rational_text(x),
            rational_text(y)
        ),
        _ => "{\"x\":null,\"y\":null}".to_string(),
    }
}

fn points_json(ps: &[Point]) -> String {
    let inner: Vec<String> = ps.iter().map(point_json).collect();
    format!("[{}]", inner.join(","))
}

fn side_json(s: &SelmerSide) -> String {
    let elements: Vec<String> = s
        .elements
        .iter()
        .map(|e| {
            format!(
                "{{\"class\":\"{}\",\"status\":\"{}\"}}",
                e.class,
                e.status.word()
            )
        })
        .collect();
    format!(
        "{{\"a\":\"{}\",\"b\":\"{}\",\"dimension\":{},\"image_lower\":{},\"image_upper\":{},\"torsion_image_dimension\":{},\"elements\":[{}]}}",
        s.a,
        s.b,
        s.dimension(),
        s.image_lower(),
        s.image_upper,
        s.torsion_dim,
        elements.join(",")
    )
}

fn isogeny_json(d: &IsogenyDescent) -> String {
    let ((sl, su), (tl, tu)) = d.sha_bounds();
    format!(
        "{{\"kernel_point\":{},\"rank_lower\":{},\"rank_upper\":{},\"curve\":{},\"isogenous\":{},\"sha_curve_side\":[{sl},{su}],\"sha_isogenous_side\":[{tl},{tu}]}}",
        point_json(&d.kernel_point),
        d.rank_lower,
        d.rank_upper,
        side_json(&d.domain),
        side_json(&d.codomain)
    )
}

fn point_text(p: &Point) -> String {
    match (p.x(), p.y()) {
        (Some(x), Some(y)) => format!("({}, {})", rational_text(x), rational_text(y)),
        _ => "O".to_string(),
    }
}

fn masks_text(img: &crate::quartic::LocalImage) -> String {
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

fn write_side(f: &mut fmt::Formatter<'_>, label: &str, s: &SelmerSide) -> fmt::Result {
    writeln!(f, "  {label}: y^2 = x^3 + ({}) x^2 + ({}) x", s.a, s.b)?;
    writeln!(
        f,
        "    Selmer dimension {} · known image {} (torsion {}) · image at most {}",
        s.dimension(),
        s.image_lower(),
        s.torsion_dim,
        s.image_upper
    )?;
    for e in &s.elements {
        let what = match &e.status {
            ClassStatus::TorsionImage { point } => {
                format!("image of torsion point {}", point_text(point))
            }
            ClassStatus::PointImage {
                point,
                space,
                on_space,
            } => format!(
                "image of {} from C_{} at (M, e, N) = ({}, {}, {})",
                point_text(point),
                space,
                on_space.x,
                on_space.z,
                on_space.y
            ),
            ClassStatus::Undecided => {
                "undecided: everywhere locally soluble, no point found".into()
            }
            ClassStatus::ProvenNotImage {
                obstructions,
                space,
                ..
            } => {
                let places: Vec<String> =
                    obstructions.iter().map(|o| o.place.to_string()).collect();
                format!(
                    "not an image: C_{space} has {} 4-coverings, insoluble at {} respectively",
                    obstructions.len(),
                    places.join(", ")
                )
            }
        };
        writeln!(f, "    class {:>8}  {what}", e.class.to_string())?;
    }
    let locals: Vec<String> = s
        .local_images
        .iter()
        .map(|w| format!("{}: {}", w.place, masks_text(w)))
        .collect();
    writeln!(f, "    local images  {}", locals.join("; "))?;
    let searched: Vec<String> = s
        .searches
        .iter()
        .map(|r| match &r.outcome {
            SearchOutcome::Found(_) => format!("C_{} found", r.class),
            SearchOutcome::NoneUpTo { height } => format!("C_{} none up to {height}", r.class),
            SearchOutcome::GaveUp { completed_height } => {
                format!("C_{} gave up after height {completed_height}", r.class)
            }
        })
        .collect();
    if !searched.is_empty() {
        writeln!(f, "    searched      {}", searched.join("; "))?;
    }
    Ok(())
}

impl fmt::Display for DescentReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(f, "E: [a1, a2, a3, a4, a6] = [{}]", self.curve)?;
        let (n1, n2) = self.torsion.structure();
        let structure = if n2 <= 1 {
            format!("Z/{n1}")
        } else {
            format!("Z/{n2} x Z/{n1}")
        };
        writeln!(f, "torsion: {structure} (order {})", self.torsion.order())?;
        let mm: Vec<String> = self
            .local_data
            .minimal_model
            .iter()
            .map(|c| c.to_string())
            .collect();
        writeln!(
            f,
            "minimal model [{}], conductor {}",
            mm.join(", "),
            self.local_data.conductor
        )?;
        for r in &self.local_data.primes {
            writeln!(
                f,
                "  p = {}: {} reduction, type {}, f_p = {}, c_p = {}, v_p(disc) = {}",
                r.prime,
                reduction_word(r.reduction).replace('_', " "),
                r.kodaira,
                r.conductor_exponent,
                r.tamagawa,
                r.disc_valuation
            )?;
        }
        let verdict = if self.is_decided() {
            format!("rank = {}", self.rank_lower)
        } else {
            format!("{} <= rank <= {}", self.rank_lower, self.rank_upper)
        };
        writeln!(f, "{verdict}")?;
        for p in &self.points {
            writeln!(f, "  point of infinite order {}", point_text(p))?;
        }
        for (i, d) in self.isogenies.iter().enumerate() {
            writeln!(
                f,
                "isogeny {} (kernel generated by {}): {} <= rank <= {}",
                i + 1,
                point_text(&d.kernel_point),
                d.rank_lower,
                d.rank_upper
            )?;
            write_side(f, "E ", &d.domain)?;
            write_side(f, "E'", &d.codomain)?;
            let ((sl, su), (tl, tu)) = d.sha_bounds();
            writeln!(
                f,
                "  Sha 2-rank seen on E's side in [{sl}, {su}], on E''s side in [{tl}, {tu}]"
            )?;
        }
        Ok(())
    }
}
