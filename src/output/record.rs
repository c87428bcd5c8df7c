//! A JSON line read back into typed values: what a caller of family scans
//! or of `--json` needs without walking a `serde_json::Value`.

use num_bigint::BigInt;
use num_rational::BigRational;
use serde::{Deserialize, Serialize};
use serde_json::{Map, Value};

use crate::curve::Point;
use crate::error::{Error, Result};

/// A point as written in a JSON line: exact rationals as strings, and the
/// canonical height where the line gives one.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct RecordPoint {
    /// x, as `"p/q"` or `"p"`.
    pub x: String,
    /// y, as `"p/q"` or `"p"`.
    pub y: String,
    /// ĥ as a decimal string within its error bound (points of `points`
    /// only; `None` when not computed or not written).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub height: Option<String>,
    /// Every other key of the point (such as the height's error bound), as
    /// JSON.
    #[serde(flatten)]
    pub rest: Map<String, Value>,
}

impl RecordPoint {
    /// The point with exact rational coordinates.
    ///
    /// # Errors
    /// [`Error::Parse`] when a coordinate is not `p/q` or `p`;
    /// [`Error::ZeroDenominator`] for `p/0`.
    pub fn to_point(&self) -> Result<Point> {
        Ok(Point::new(rational(&self.x)?, rational(&self.y)?))
    }
}

fn rational(s: &str) -> Result<BigRational> {
    let bad = || Error::Parse {
        input: s.chars().take(64).collect(),
        reason: "not a rational number p/q".to_string(),
    };
    let (n, d) = s.split_once('/').unwrap_or((s, "1"));
    let n: BigInt = n.parse().map_err(|_| bad())?;
    let d: BigInt = d.parse().map_err(|_| bad())?;
    if d == BigInt::from(0) {
        return Err(Error::ZeroDenominator {
            context: "coordinate of a point in a JSON line".to_string(),
        });
    }
    Ok(BigRational::new(n, d))
}

/// The torsion subgroup as written in a JSON line.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct RecordTorsion {
    /// |E(Q)_tors|.
    pub order: u32,
    /// `[n]` or `[2, n]`.
    pub cyclic_factors: Vec<u32>,
    /// Generators.
    pub generators: Vec<RecordPoint>,
}

/// One JSON line (format 3, `docs/report_format.md`) read back with
/// serde: the keys most callers read are typed fields; every other key is
/// kept in [`ReportRecord::rest`], so writing a record back gives the same
/// JSON object.
///
/// ```
/// use isodescent::descent::DescentOptions;
/// use isodescent::output::{json_for_line, ReportRecord};
///
/// let line = json_for_line("y^2 = x^3 - 36x", &DescentOptions::default());
/// let r: ReportRecord = line.parse().unwrap();
/// assert_eq!((r.rank_lower, r.rank_upper), (Some(1), Some(1)));
/// assert_eq!(r.torsion.as_ref().map(|t| t.order), Some(4));
/// assert!(r.points[0].height.is_some());
/// let back: serde_json::Value = serde_json::to_value(&r).unwrap();
/// assert_eq!(back, serde_json::from_str::<serde_json::Value>(&line).unwrap());
/// ```
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct ReportRecord {
    /// `family_index` (family scan lines only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub family_index: Option<u64>,
    /// `family_parameter` (family scan lines only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub family_parameter: Option<String>,
    /// `format_version`.
    pub format_version: u32,
    /// `input`: the line as given.
    pub input: String,
    /// `curve`: the curve as its equation (`None` on error).
    pub curve: Option<String>,
    /// `status`: `complete`, `partial` or `error`.
    pub status: String,
    /// `rank_lower` (`None` on error).
    pub rank_lower: Option<usize>,
    /// `rank_upper` (`None` on error).
    pub rank_upper: Option<usize>,
    /// `points`, with their heights.
    pub points: Vec<RecordPoint>,
    /// `torsion` (`None` on error).
    pub torsion: Option<RecordTorsion>,
    /// `selmer2_rank`.
    pub selmer2_rank: Option<usize>,
    /// `points_generate`.
    pub points_generate: bool,
    /// `conductor` as a decimal string.
    pub conductor: Option<String>,
    /// `error`, when the line gave no report.
    pub error: Option<String>,
    /// Every other key of the line, as JSON.
    #[serde(flatten)]
    pub rest: Map<String, Value>,
}

impl std::str::FromStr for ReportRecord {
    type Err = Error;

    /// Reads one JSON line.
    ///
    /// # Errors
    /// [`Error::Parse`] when the text is not a JSON object of this shape.
    fn from_str(line: &str) -> Result<ReportRecord> {
        serde_json::from_str(line.trim_end_matches(['\n', '\r'])).map_err(|e| Error::Parse {
            input: line.chars().take(64).collect(),
            reason: format!("not a report line: {e}"),
        })
    }
}

impl ReportRecord {
    /// True when the bounds meet (and the line is not an error).
    pub fn is_decided(&self) -> bool {
        self.error.is_none() && self.rank_lower.is_some() && self.rank_lower == self.rank_upper
    }
}
