//! Output records of a family scan: reading them back, summing them up,
//! resuming an interrupted output file and merging shard files.
//!
//! # File format
//! One line per member, `\n`-terminated, in family order: the object of
//! [`crate::output::json_for_line`] with `"family_index"` and
//! `"family_parameter"` put in front ([`super::ScanRecord::to_line`]). A
//! file holds one shard (possibly the whole family, shard 1/1), indices
//! strictly increasing. A last line without its `\n` is a line that was
//! being written when the run stopped: it does not count, and resuming
//! cuts it away (common practice for append-only logs).

use std::collections::BTreeMap;
use std::fmt;
use std::io::{BufRead, Write};

use serde_json::Value;

use super::members::Family;
use super::scan::Shard;
use crate::error::{Error, Result};

/// The fields of an output record that summaries, resumes and merges use.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct RecordLine {
    /// `family_index`.
    pub index: u64,
    /// `family_parameter`.
    pub parameter: String,
    /// `rank_lower` (`None` on an error line).
    pub rank_lower: Option<u64>,
    /// `rank_upper` (`None` on an error line).
    pub rank_upper: Option<u64>,
    /// `error`, if not null.
    pub error: Option<String>,
    /// For each isogeny of `selmer`, the dimensions of the Selmer groups on
    /// the curve's side and on the isogenous side.
    pub selmer: Vec<(u64, u64)>,
    /// `selmer2_rank` minus dim E(Q)\[2\] (the number of even cyclic factors
    /// of the torsion): the 2-Selmer rank beyond the 2-torsion.
    pub selmer2_excess: Option<u64>,
    /// On a line of the descent via 3-isogeny (`isogeny3`): the
    /// dimensions over F3 of the Selmer groups of the two sides
    /// (y² = x³ + k, then y² = x³ − 27k).
    pub selmer3: Option<(u64, u64)>,
}

impl RecordLine {
    /// Reads a record line (trailing `\n` allowed); `None` if it is not a
    /// JSON object with a numeric `family_index` and a string
    /// `family_parameter`.
    pub fn parse(line: &str) -> Option<RecordLine> {
        let v: Value = serde_json::from_str(line.trim_end_matches(['\n', '\r'])).ok()?;
        let index = v.get("family_index")?.as_u64()?;
        let parameter = v.get("family_parameter")?.as_str()?.to_string();
        let num = |k: &str| v.get(k).and_then(Value::as_u64);
        let error = v.get("error").and_then(Value::as_str).map(str::to_string);
        let selmer = v
            .get("selmer")
            .and_then(Value::as_array)
            .map(Vec::as_slice)
            .unwrap_or(&[])
            .iter()
            .filter_map(|iso| {
                let d = |side: &str| iso.get(side)?.get("dimension")?.as_u64();
                Some((d("curve")?, d("isogenous")?))
            })
            .collect();
        let two_torsion_dim = v
            .get("torsion")
            .and_then(|t| t.get("cyclic_factors"))
            .and_then(Value::as_array)
            .map(|fs| {
                fs.iter()
                    .filter(|f| f.as_u64().is_some_and(|n| n % 2 == 0))
                    .count() as u64
            });
        let selmer2_excess = v
            .get("selmer2_rank")
            .and_then(Value::as_u64)
            .zip(two_torsion_dim)
            .and_then(|(s, t)| s.checked_sub(t));
        let selmer3 = v
            .get("isogeny3")
            .and_then(|i| i.get("sides"))
            .and_then(Value::as_array)
            .and_then(|sides| {
                let d = |i: usize| sides.get(i)?.get("selmer_dim")?.as_u64();
                Some((d(0)?, d(1)?))
            });
        Some(RecordLine {
            selmer3,
            selmer2_excess,
            index,
            parameter,
            rank_lower: num("rank_lower"),
            rank_upper: num("rank_upper"),
            error,
            selmer,
        })
    }

    /// True when the rank is decided (lower bound = upper bound).
    pub fn is_decided(&self) -> bool {
        self.error.is_none() && self.rank_lower.is_some() && self.rank_lower == self.rank_upper
    }

    /// The 2-isogeny Selmer rank bound min over isogenies of
    /// dim Sel^φ(E) + dim Sel^φ̂(E') − 2, an upper bound for the rank
    /// [Sil09, X.4, Remark 4.7]; `None` on an error line.
    pub(crate) fn selmer_rank_bound(&self) -> Option<u64> {
        self.selmer
            .iter()
            .map(|&(a, b)| (a + b).saturating_sub(2))
            .min()
    }
}

/// Most points kept in [`Tally::trace`]; when more accumulate, every other
/// one is dropped and the sampling step doubles.
const MAX_TRACE: usize = 512;

/// Counts over the records of a scan, in O(1) memory in the number of
/// records (the maps are keyed by small dimensions).
#[derive(Clone, Debug, Default, PartialEq)]
#[non_exhaustive]
pub struct Tally {
    /// Records counted.
    pub curves: u64,
    /// Records with an error.
    pub errors: u64,
    /// Records with lower bound = upper bound.
    pub decided: u64,
    /// Count of each (rank_lower, rank_upper) pair (error lines excluded).
    pub bounds: BTreeMap<(u64, u64), u64>,
    /// Count of each (dim Sel^φ(E), dim Sel^φ̂(E')) of the first isogeny
    /// listed in a record.
    pub selmer_pairs: BTreeMap<(u64, u64), u64>,
    /// Count of each value of the 2-isogeny Selmer rank bound
    /// min over isogenies of dim Sel^φ(E) + dim Sel^φ̂(E') − 2.
    pub selmer_rank: BTreeMap<u64, u64>,
    /// Count of each value of [`RecordLine::selmer2_excess`].
    pub selmer2: BTreeMap<u64, u64>,
    /// Count of each pair [`RecordLine::selmer3`] (lines of the descent via
    /// 3-isogeny).
    pub selmer3_pairs: BTreeMap<(u64, u64), u64>,
    trace: Vec<(u64, f64)>,
    stride: u64,
}

impl Tally {
    /// An empty tally.
    pub fn new() -> Tally {
        Tally::default()
    }

    /// The distribution of dim Sel^φ(E) + dim Sel^φ̂(E′) over the lines of
    /// the descent via 3-isogeny. By the exact sequence
    /// 0 → E′(Q)\[φ̂\]/φ(E(Q)\[3\]) → Sel^φ(E) → Sel^3(E) → Sel^φ̂(E′)
    /// (Schaefer–Stoll, Trans. AMS 356 (2004), §3 — from memory) the sum
    /// bounds dim Sel^3(E) from above.
    fn selmer3_sums(&self) -> BTreeMap<u64, u64> {
        let mut sums = BTreeMap::new();
        for (&(a, b), &n) in &self.selmer3_pairs {
            *sums.entry(a + b).or_insert(0) += n;
        }
        sums
    }

    /// Counts one record.
    pub fn add(&mut self, r: &RecordLine) {
        self.curves += 1;
        if r.error.is_some() {
            self.errors += 1;
        } else if let (Some(lo), Some(hi)) = (r.rank_lower, r.rank_upper) {
            *self.bounds.entry((lo, hi)).or_insert(0) += 1;
        }
        if r.is_decided() {
            self.decided += 1;
        }
        if let Some(&p) = r.selmer.first() {
            *self.selmer_pairs.entry(p).or_insert(0) += 1;
        }
        if let Some(s) = r.selmer_rank_bound() {
            *self.selmer_rank.entry(s).or_insert(0) += 1;
        }
        if let Some(s) = r.selmer2_excess {
            *self.selmer2.entry(s).or_insert(0) += 1;
        }
        if let Some(p) = r.selmer3 {
            *self.selmer3_pairs.entry(p).or_insert(0) += 1;
        }
        if self.stride == 0 {
            self.stride = 1;
        }
        if self.curves % self.stride == 0 {
            self.trace.push((self.curves, self.decided_share()));
            if self.trace.len() > MAX_TRACE {
                let kept: Vec<(u64, f64)> = self
                    .trace
                    .iter()
                    .copied()
                    .filter(|(n, _)| n % (2 * self.stride) == 0)
                    .collect();
                self.trace = kept;
                self.stride *= 2;
            }
        }
    }

    /// Decided records over all records (error lines count as undecided);
    /// 0 for an empty tally.
    pub(crate) fn decided_share(&self) -> f64 {
        if self.curves == 0 {
            0.0
        } else {
            self.decided as f64 / self.curves as f64
        }
    }

    /// The cumulative decided share as the scan proceeded: points
    /// (records so far, share of them decided), sampled at most
    /// a few hundred times, ending with the current total.
    pub fn trace(&self) -> Vec<(u64, f64)> {
        let mut t = self.trace.clone();
        if self.curves > 0 && t.last().map(|p| p.0) != Some(self.curves) {
            t.push((self.curves, self.decided_share()));
        }
        t
    }
}

/// Heath-Brown's limit law for the congruent-number curves: the share of
/// square-free n with s(n) = dim Sel²(E_n) − 2 equal to r is
/// `d_r = α · 2^r / ∏_{j=1..r} (2^j − 1)`, with
/// `α = ∏_{j≥0} (1 + 2^(−j))^(−1)`
/// (Heath-Brown, "The size of Selmer groups for the congruent number
/// problem II", Invent. Math. 118 (1994), Theorem 1; from memory). Returns
/// `d_0, …, d_{r_max}`.
pub fn congruent_selmer_limit_law(r_max: usize) -> Vec<f64> {
    let alpha: f64 = (0..64).map(|j| 1.0 / (1.0 + 0.5f64.powi(j))).product();
    let mut out = Vec::with_capacity(r_max + 1);
    let mut d = alpha;
    for r in 0..=r_max {
        if r > 0 {
            d *= 2.0 / (2f64.powi(r as i32) - 1.0);
        }
        out.push(d);
    }
    out
}

/// Rows (s, observed share, share under the law) and the total variation
/// distance, from [`Tally::selmer2_against`].
pub type LawComparison = (Vec<(u64, f64, f64)>, f64);

impl Tally {
    /// The observed distribution of [`RecordLine::selmer2_excess`] beside
    /// `law`, and their total variation distance (half the sum of the
    /// absolute differences, the mass of the law beyond the table
    /// included). `None` when no record carried a 2-Selmer rank.
    pub fn selmer2_against(&self, law: &[f64]) -> Option<LawComparison> {
        let total: u64 = self.selmer2.values().sum();
        if total == 0 {
            return None;
        }
        let top = self
            .selmer2
            .keys()
            .copied()
            .max()
            .unwrap_or(0)
            .max(law.len() as u64);
        let mut rows = Vec::new();
        let mut tv = 0.0;
        for r in 0..=top {
            let obs = *self.selmer2.get(&r).unwrap_or(&0) as f64 / total as f64;
            let exp = law.get(r as usize).copied().unwrap_or(0.0);
            tv += (obs - exp).abs();
            rows.push((r, obs, exp));
        }
        let beyond: f64 = 1.0 - law.iter().sum::<f64>();
        Some((rows, 0.5 * (tv + beyond.max(0.0))))
    }
}

impl fmt::Display for Tally {
    /// A plain-text summary: totals, the (lower, upper) table, the Selmer
    /// dimensions.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let pct = |n: u64| {
            if self.curves == 0 {
                0.0
            } else {
                100.0 * n as f64 / self.curves as f64
            }
        };
        writeln!(
            f,
            "curves {:>9}   decided {:>9} ({:.2}%)   errors {:>7} ({:.2}%)",
            self.curves,
            self.decided,
            pct(self.decided),
            self.errors,
            pct(self.errors)
        )?;
        writeln!(f, "rank bounds      lower  upper      count   share")?;
        for (&(lo, hi), &n) in &self.bounds {
            let mark = if lo == hi { "decided" } else { "" };
            writeln!(
                f,
                "                 {lo:>5}  {hi:>5}  {n:>9}  {:>5.2}%  {mark}",
                pct(n)
            )?;
        }
        writeln!(
            f,
            "Selmer dimensions (first isogeny)  Sel(E)  Sel(E')      count   share"
        )?;
        for (&(a, b), &n) in &self.selmer_pairs {
            writeln!(
                f,
                "                                   {a:>6}  {b:>7}  {n:>9}  {:>5.2}%",
                pct(n)
            )?;
        }
        writeln!(
            f,
            "Selmer rank bound (min over isogenies of dims - 2)      count   share"
        )?;
        for (&s, &n) in &self.selmer_rank {
            writeln!(f, "                 {s:>5}  {n:>36}  {:>5.2}%", pct(n))?;
        }
        if !self.selmer2.is_empty() {
            writeln!(
                f,
                "2-Selmer rank beyond E(Q)[2] (dim Sel^2 - dim E(Q)[2])      count   share"
            )?;
            for (&s, &n) in &self.selmer2 {
                writeln!(f, "                 {s:>5}  {n:>36}  {:>5.2}%", pct(n))?;
            }
        }
        if !self.selmer3_pairs.is_empty() {
            writeln!(
                f,
                "3-isogeny Selmer dimensions over F3  y^2=x^3+k  y^2=x^3-27k      count   share"
            )?;
            for (&(a, b), &n) in &self.selmer3_pairs {
                writeln!(
                    f,
                    "                                   {a:>10}  {b:>11}  {n:>9}  {:>5.2}%",
                    pct(n)
                )?;
            }
            writeln!(
                f,
                "3-isogeny Selmer sum dim Sel^phi + dim Sel^phihat (>= dim Sel^3(E))      count   share"
            )?;
            for (s, n) in self.selmer3_sums() {
                writeln!(f, "                 {s:>5}  {n:>54}  {:>5.2}%", pct(n))?;
            }
        }
        Ok(())
    }
}

fn io_err(action: &str, target: &str, e: &std::io::Error) -> Error {
    Error::Io {
        action: action.into(),
        target: target.into(),
        reason: e.to_string(),
    }
}

/// What an existing output file holds, for resuming a scan.
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct ResumeState {
    /// Bytes of complete lines at the start of the file: the file is to be
    /// truncated to this length before appending.
    pub keep_bytes: u64,
    /// Bytes of a partial last line after them (0 if none).
    pub partial_bytes: u64,
    /// Complete records read.
    pub records: u64,
    /// Index and parameter text of the last complete record; the scan goes
    /// on with the shard's members after this index.
    pub last: Option<(u64, String)>,
    /// Counts over the complete records.
    pub tally: Tally,
}

/// Reads an existing output file of shard `shard` for resuming (O(1)
/// memory in its length).
///
/// Checks that every complete line is a record of this shard and that
/// indices increase strictly. The caller truncates the file to
/// `keep_bytes` and appends the records of the members after `last`.
///
/// # Errors
/// [`Error::Io`] on a read failure; [`Error::Parse`] for a
/// complete line that is not a record (the file is then left alone);
/// [`Error::InvalidArgument`] for a record outside `shard` or out of
/// order (a file of another shard, or a merged file).
pub fn read_for_resume<R: BufRead>(mut input: R, name: &str, shard: &Shard) -> Result<ResumeState> {
    let mut st = ResumeState {
        keep_bytes: 0,
        partial_bytes: 0,
        records: 0,
        last: None,
        tally: Tally::new(),
    };
    let mut buf = Vec::new();
    loop {
        buf.clear();
        let n = input
            .read_until(b'\n', &mut buf)
            .map_err(|e| io_err("read", name, &e))?;
        if n == 0 {
            break;
        }
        if buf.last() != Some(&b'\n') {
            st.partial_bytes = n as u64;
            break;
        }
        let line_no = st.records + 1;
        let text = std::str::from_utf8(&buf).ok();
        let rec = text
            .and_then(RecordLine::parse)
            .ok_or_else(|| Error::Parse {
                input: format!("{name}, line {line_no}"),
                reason: "not a family-scan record".into(),
            })?;
        if !shard.contains(rec.index) {
            return Err(Error::InvalidArgument {
                reason: format!(
                    "{name}, line {line_no}: member {} does not belong to shard {shard}",
                    rec.index
                ),
            });
        }
        if let Some((prev, _)) = &st.last {
            if rec.index <= *prev {
                return Err(Error::InvalidArgument {
                    reason: format!(
                        "{name}, line {line_no}: member {} comes after member {prev}; \
                         the file is not one scan's output in family order",
                        rec.index
                    ),
                });
            }
        }
        st.tally.add(&rec);
        st.keep_bytes += n as u64;
        st.records += 1;
        st.last = Some((rec.index, rec.parameter));
    }
    Ok(st)
}

/// Up to 20 example indices and the total count.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
#[non_exhaustive]
pub struct IndexList {
    /// How many.
    pub count: u64,
    /// The first few.
    pub first: Vec<u64>,
}

impl IndexList {
    /// Examples kept.
    pub(crate) const KEEP: usize = 20;

    fn push(&mut self, i: u64) {
        self.count += 1;
        if self.first.len() < Self::KEEP {
            self.first.push(i);
        }
    }
}

impl fmt::Display for IndexList {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let shown: Vec<String> = self.first.iter().map(u64::to_string).collect();
        write!(f, "{}", self.count)?;
        if self.count > 0 {
            write!(f, " (members {}", shown.join(", "))?;
            if self.count > self.first.len() as u64 {
                write!(f, ", …")?;
            }
            write!(f, ")")?;
        }
        Ok(())
    }
}

/// The outcome of [`merge_shards`].
#[derive(Clone, Debug, Default, PartialEq)]
#[non_exhaustive]
pub struct MergeReport {
    /// Records written (one per member found).
    pub written: u64,
    /// Members of the family found in no input.
    pub missing: IndexList,
    /// Members found more than once (the extra copies are not written).
    pub duplicates: IndexList,
    /// Records whose parameter is not the family's parameter at that index
    /// (a file of another family); not written.
    pub mismatched: IndexList,
    /// Records whose index is not larger than the previous one of the same
    /// input; not written.
    pub out_of_order: IndexList,
    /// Lines that are not records, or a partial last line; not written.
    pub malformed: u64,
    /// Records with an index beyond the family's last member; not written.
    pub foreign: IndexList,
    /// Counts over the written records.
    pub tally: Tally,
}

impl MergeReport {
    /// True iff every member was found exactly once and nothing else was
    /// in the inputs.
    pub fn is_complete(&self) -> bool {
        self.missing.count == 0
            && self.duplicates.count == 0
            && self.mismatched.count == 0
            && self.out_of_order.count == 0
            && self.malformed == 0
            && self.foreign.count == 0
    }
}

impl fmt::Display for MergeReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(f, "written      {}", self.written)?;
        writeln!(f, "missing      {}", self.missing)?;
        writeln!(f, "duplicates   {}", self.duplicates)?;
        writeln!(f, "mismatched   {}", self.mismatched)?;
        writeln!(f, "out of order {}", self.out_of_order)?;
        writeln!(f, "malformed    {}", self.malformed)?;
        writeln!(f, "beyond end   {}", self.foreign)?;
        let verdict = if self.is_complete() {
            "complete: every member exactly once"
        } else {
            "INCOMPLETE"
        };
        writeln!(f, "{verdict}")
    }
}

struct Head<R> {
    input: R,
    name: String,
    current: Option<(RecordLine, Vec<u8>)>,
    previous: Option<u64>,
}

impl<R: BufRead> Head<R> {
    /// Moves to the next usable record of this input.
    fn advance(&mut self, report: &mut MergeReport) -> Result<()> {
        self.current = None;
        loop {
            let mut buf = Vec::new();
            let n = self
                .input
                .read_until(b'\n', &mut buf)
                .map_err(|e| io_err("read", &self.name, &e))?;
            if n == 0 {
                return Ok(());
            }
            if buf.last() != Some(&b'\n') {
                report.malformed += 1; // partial last line
                continue;
            }
            let Some(rec) = std::str::from_utf8(&buf).ok().and_then(RecordLine::parse) else {
                report.malformed += 1;
                continue;
            };
            if self.previous.is_some_and(|p| rec.index <= p) {
                report.out_of_order.push(rec.index);
                continue;
            }
            self.previous = Some(rec.index);
            self.current = Some((rec, buf));
            return Ok(());
        }
    }
}

/// Merges shard output files of `family` into one file in family order,
/// checking that every member is present exactly once.
///
/// Each input is read once, front to back (memory O(number of inputs));
/// the family is enumerated alongside. For member i, the records with
/// index i and the member's parameter are collected from all inputs: the
/// first is written, further ones are duplicates; if there is none, i is
/// missing. Records of another family, out of order, malformed or beyond
/// the family's end are counted and left out. `names` label the inputs in
/// error messages.
///
/// # Errors
/// [`Error::Io`] when an input cannot be read or the output
/// cannot be written; [`Error::InvalidArgument`] if `names` and `inputs`
/// differ in length.
pub fn merge_shards<R: BufRead, W: Write>(
    inputs: Vec<R>,
    names: &[String],
    family: &Family,
    out: &mut W,
) -> Result<MergeReport> {
    if names.len() != inputs.len() {
        return Err(Error::InvalidArgument {
            reason: format!("{} inputs but {} names", inputs.len(), names.len()),
        });
    }
    let mut report = MergeReport::default();
    let mut heads: Vec<Head<R>> = Vec::with_capacity(inputs.len());
    for (input, name) in inputs.into_iter().zip(names) {
        let mut h = Head {
            input,
            name: name.clone(),
            current: None,
            previous: None,
        };
        h.advance(&mut report)?;
        heads.push(h);
    }
    for member in family.members() {
        let i = member.index;
        let param = member.parameter.to_string();
        let mut found = false;
        for h in heads.iter_mut() {
            while let Some((rec, raw)) = &h.current {
                if rec.index > i {
                    break;
                }
                if rec.index == i {
                    if rec.parameter != param {
                        report.mismatched.push(i);
                    } else if found {
                        report.duplicates.push(i);
                    } else {
                        out.write_all(raw)
                            .map_err(|e| io_err("write", "merged output", &e))?;
                        report.written += 1;
                        report.tally.add(rec);
                        found = true;
                    }
                }
                // rec.index < i cannot happen: earlier members were
                // consumed in earlier rounds, and each input increases.
                h.advance(&mut report)?;
            }
        }
        if !found {
            report.missing.push(i);
        }
    }
    for h in heads.iter_mut() {
        while let Some((rec, _)) = &h.current {
            report.foreign.push(rec.index);
            h.advance(&mut report)?;
        }
    }
    out.flush()
        .map_err(|e| io_err("write", "merged output", &e))?;
    Ok(report)
}
