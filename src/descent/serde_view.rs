//! Serialisation of reports behind the `serde` cargo feature.
//!
//! A [`DescentReport`] serialises as a plain tree of strings and integers
//! (exact rationals as "p/q" or "p", square-free classes as decimal
//! strings), the same content as the JSON line of
//! [`DescentReport::to_json`] plus the local images and search records.

use serde::ser::{Serialize, Serializer};
use serde::Serialize as Derive;

use super::report::{rational_text, DescentReport};
use super::side::{ClassStatus, SelmerSide};
use crate::curve::Point;
use crate::quartic::search::SearchOutcome;

#[derive(Derive)]
struct PointView {
    x: Option<String>,
    y: Option<String>,
}

fn point_view(p: &Point) -> PointView {
    PointView {
        x: p.x().map(rational_text),
        y: p.y().map(rational_text),
    }
}

#[derive(Derive)]
struct ElementView {
    class: String,
    status: &'static str,
    point: Option<PointView>,
    obstructions: Vec<(Vec<String>, String)>,
}

#[derive(Derive)]
struct LocalImageView {
    place: String,
    members: Vec<u8>,
    dimension: usize,
}

#[derive(Derive)]
struct SearchView {
    class: String,
    outcome: String,
}

#[derive(Derive)]
struct SideView {
    a: String,
    b: String,
    primes: Vec<String>,
    dimension: usize,
    image_lower: usize,
    image_upper: usize,
    torsion_image_dimension: usize,
    elements: Vec<ElementView>,
    local_images: Vec<LocalImageView>,
    searches: Vec<SearchView>,
}

fn side_view(s: &SelmerSide) -> SideView {
    SideView {
        a: s.a.to_string(),
        b: s.b.to_string(),
        primes: s.qs2.primes().iter().map(|p| p.to_string()).collect(),
        dimension: s.dimension(),
        image_lower: s.image_lower(),
        image_upper: s.image_upper,
        torsion_image_dimension: s.torsion_dim,
        elements: s
            .elements
            .iter()
            .map(|e| ElementView {
                class: e.class.to_string(),
                status: e.status.word(),
                point: match &e.status {
                    ClassStatus::TorsionImage { point } | ClassStatus::PointImage { point, .. } => {
                        Some(point_view(point))
                    }
                    _ => None,
                },
                obstructions: match &e.status {
                    ClassStatus::ProvenNotImage { obstructions, .. } => obstructions
                        .iter()
                        .map(|o| {
                            (
                                o.covering.iter().map(|c| c.to_string()).collect(),
                                o.place.to_string(),
                            )
                        })
                        .collect(),
                    _ => Vec::new(),
                },
            })
            .collect(),
        local_images: s
            .local_images
            .iter()
            .map(|w| LocalImageView {
                place: w.place.to_string(),
                members: w.members.clone(),
                dimension: w.dimension,
            })
            .collect(),
        searches: s
            .searches
            .iter()
            .map(|r| SearchView {
                class: r.class.to_string(),
                outcome: match &r.outcome {
                    SearchOutcome::Found(p) => format!("found ({}, {}, {})", p.x, p.z, p.y),
                    SearchOutcome::NoneUpTo { height } => format!("none up to {height}"),
                    SearchOutcome::GaveUp { completed_height } => {
                        format!("gave up, complete to {completed_height}")
                    }
                },
            })
            .collect(),
    }
}

#[derive(Derive)]
struct IsogenyView {
    kernel_point: PointView,
    rank_lower: usize,
    rank_upper: usize,
    curve_side: SideView,
    isogenous_side: SideView,
}

#[derive(Derive)]
struct BadPrimeView {
    p: String,
    kodaira: String,
    conductor_exponent: u32,
    tamagawa: u64,
    disc_valuation: u64,
}

#[derive(Derive)]
struct ReportView {
    curve: String,
    minimal_model: Vec<String>,
    conductor: String,
    bad_primes: Vec<BadPrimeView>,
    torsion_order: u32,
    torsion_structure: (u32, u32),
    rank_lower: usize,
    rank_upper: usize,
    points: Vec<PointView>,
    isogenies: Vec<IsogenyView>,
}

impl Serialize for DescentReport {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let view = ReportView {
            curve: self.curve.to_string(),
            minimal_model: self
                .local_data
                .minimal_model
                .iter()
                .map(|c| c.to_string())
                .collect(),
            conductor: self.local_data.conductor.to_string(),
            bad_primes: self
                .local_data
                .primes
                .iter()
                .map(|r| BadPrimeView {
                    p: r.prime.to_string(),
                    kodaira: r.kodaira.to_string(),
                    conductor_exponent: r.conductor_exponent,
                    tamagawa: r.tamagawa,
                    disc_valuation: r.disc_valuation,
                })
                .collect(),
            torsion_order: self.torsion.order(),
            torsion_structure: self.torsion.structure(),
            rank_lower: self.rank_lower,
            rank_upper: self.rank_upper,
            points: self.points.iter().map(point_view).collect(),
            isogenies: self
                .isogenies
                .iter()
                .map(|d| IsogenyView {
                    kernel_point: point_view(&d.kernel_point),
                    rank_lower: d.rank_lower,
                    rank_upper: d.rank_upper,
                    curve_side: side_view(&d.domain),
                    isogenous_side: side_view(&d.codomain),
                })
                .collect(),
        };
        view.serialize(serializer)
    }
}
