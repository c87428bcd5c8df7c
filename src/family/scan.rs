//! Streaming scans: the descent on every member of a family, on all cores
//! (with the `parallel` feature), results handed out in family order.
//!
//! # Order and memory
//! Members are taken from the enumeration one at a time and handed to a
//! pool of worker threads; at most `window` members are between "taken"
//! and "handed back". Finished results wait in a reorder buffer until all
//! earlier members are done, so the output order is the enumeration order
//! whatever the number of threads, and memory is O(window), independent of
//! the family size. Unlike processing fixed chunks one after the other,
//! the workers never wait for the slowest member of a chunk: they stop
//! only when the window is full (common practice for ordered parallel
//! pipelines).

#[cfg(feature = "parallel")]
use std::collections::BTreeMap;
use std::fmt;
use std::str::FromStr;
use std::sync::Arc;
use std::time::Instant;

use super::members::{Member, Parameter};
use crate::descent::DescentOptions;
use crate::error::{Error, Result};
use crate::output::{error_line, Detail};

/// The k-th of N shards of a family: the members whose index i has
/// i mod N = k − 1 (k from 1 to N). Shards 1/N, …, N/N partition every
/// family, and each takes every N-th member, so they get similar mixes
/// of small and large parameters.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Shard {
    k: u64,
    n: u64,
}

impl Shard {
    /// Shard `k` of `n` (1 ≤ k ≤ n).
    ///
    /// # Errors
    /// [`Error::InvalidArgument`] unless 1 ≤ k ≤ n.
    ///
    /// Example: `Shard::new(2, 3)` holds the members 1, 4, 7, ….
    pub fn new(k: u64, n: u64) -> Result<Shard> {
        if n == 0 || k == 0 || k > n {
            return Err(Error::InvalidArgument {
                reason: format!("shard {k}/{n}: need 1 <= k <= N"),
            });
        }
        Ok(Shard { k, n })
    }

    /// The whole family, 1/1.
    pub fn whole() -> Shard {
        Shard { k: 1, n: 1 }
    }

    /// k, from 1.
    pub fn number(&self) -> u64 {
        self.k
    }

    /// N.
    pub fn count(&self) -> u64 {
        self.n
    }

    /// True iff member `index` belongs to this shard.
    pub fn contains(&self, index: u64) -> bool {
        index % self.n == self.k - 1
    }
}

impl Default for Shard {
    fn default() -> Self {
        Shard::whole()
    }
}

impl fmt::Display for Shard {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}/{}", self.k, self.n)
    }
}

impl FromStr for Shard {
    type Err = Error;

    /// Parses `k/N`.
    ///
    /// # Errors
    /// [`Error::Parse`] if the text is not two positive integers
    /// separated by `/`; [`Error::InvalidArgument`] unless 1 ≤ k ≤ N.
    fn from_str(s: &str) -> Result<Shard> {
        let bad = || Error::Parse {
            input: s.to_string(),
            reason: "a shard is written k/N with 1 <= k <= N".into(),
        };
        let (k, n) = s.trim().split_once('/').ok_or_else(bad)?;
        let k: u64 = k.trim().parse().map_err(|_| bad())?;
        let n: u64 = n.trim().parse().map_err(|_| bad())?;
        Shard::new(k, n)
    }
}

/// One member's result.
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct ScanRecord {
    /// The member's index in the family.
    pub index: u64,
    /// Its parameter.
    pub parameter: Parameter,
    /// The object of [`crate::output::json_for_line`] for the member's curve line.
    pub json: String,
    /// Wall-clock seconds the worker spent on this member.
    pub seconds: f64,
}

impl ScanRecord {
    /// The member's report as typed values (the line of
    /// [`ScanRecord::to_line`] read back).
    ///
    /// # Errors
    /// [`Error::Parse`] if the stored object is not a report line (it
    /// always is when made by [`scan`] or [`scan_member`]).
    pub fn record(&self) -> Result<crate::output::ReportRecord> {
        self.to_line().parse()
    }

    /// The output line (without newline): the [`crate::output::json_for_line`] object with
    /// two keys put in front, `"family_index"` and `"family_parameter"`;
    /// the keys of the descent contract are unchanged.
    ///
    /// Example: for n = 5 of the congruent family the line starts
    /// `{"family_index":3,"family_parameter":"n=5","format_version":4,"input":"y^2 = x^3 - 25x",`:
    ///
    /// ```
    /// use isodescent::descent::DescentOptions;
    /// use isodescent::family::{scan_member, Family};
    ///
    /// let fam = Family::congruent_numbers(1, 5).unwrap();
    /// let n5 = fam.members().find(|m| m.line() == "y^2 = x^3 - 25x").unwrap();
    /// let line = scan_member(&n5, &DescentOptions::default()).to_line();
    /// assert!(line.starts_with(
    ///     r#"{"family_index":3,"family_parameter":"n=5","format_version":4,"input":"y^2 = x^3 - 25x","#
    /// ));
    /// assert!(line.contains(r#""rank_lower":1,"rank_upper":1"#));
    /// ```
    pub fn to_line(&self) -> String {
        let head = format!(
            "{{\"family_index\":{},\"family_parameter\":{}",
            self.index,
            json_string(&self.parameter.to_string())
        );
        match self.json.strip_prefix('{') {
            Some(rest) if rest.trim_start().starts_with('}') => format!("{head}}}"),
            Some(rest) => format!("{head},{rest}"),
            // json_for_line always returns an object; anything else is
            // kept whole under a key of its own rather than lost.
            None => format!("{head},\"raw\":{}}}", json_string(&self.json)),
        }
    }
}

/// Runs the descent on one member (never panics: see [`crate::output::json_for_line`]).
pub fn scan_member(member: &Member, options: &DescentOptions) -> ScanRecord {
    let t = Instant::now();
    let json = report_for_curve(&member.curve, &member.line(), options);
    ScanRecord {
        index: member.index,
        parameter: member.parameter,
        json,
        seconds: t.elapsed().as_secs_f64(),
    }
}

/// How a scan runs.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
#[non_exhaustive]
pub struct ScanOptions {
    /// Worker threads; 0 means one per core. Without the `parallel` feature
    /// the scan runs on the calling thread and this is ignored.
    pub threads: usize,
    /// Most members in flight (taken but not yet handed back); 0 means
    /// 32 per thread.
    pub window: usize,
}

/// The iterator of [`scan`]: one [`ScanRecord`] per member of the source,
/// in the source's order.
pub struct Scan<I: Iterator<Item = Member>> {
    source: I,
    options: Arc<DescentOptions>,
    engine: Engine,
}

enum Engine {
    Sequential,
    #[cfg(feature = "parallel")]
    Pool(PoolEngine),
}

#[cfg(feature = "parallel")]
struct PoolEngine {
    pool: rayon::ThreadPool,
    window: usize,
    sender: std::sync::mpsc::Sender<(u64, ScanRecord)>,
    receiver: std::sync::mpsc::Receiver<(u64, ScanRecord)>,
    /// Results finished out of turn, by sequence number.
    ready: BTreeMap<u64, ScanRecord>,
    next_spawn: u64,
    next_emit: u64,
    exhausted: bool,
}

/// Scans `members` with the descent `options`, streaming: see the module
/// docs for the order and memory guarantees.
///
/// With the `parallel` feature and `scan_options.threads != 1` the members
/// run on a rayon pool of that many threads (0: one per core); otherwise
/// on the calling thread as the iterator is pulled. The records are the
/// same in both cases: each is [`crate::output::json_for_line`] of the member's curve,
/// which depends only on the curve and `options` (deterministic budgets).
///
/// # Errors
/// [`Error::InvalidArgument`] if the thread pool cannot be
/// started.
///
/// Example: `scan(Family::congruent_numbers(1, 10)?.members(), &opts,
/// &ScanOptions::default())?` yields 7 records, for n = 1, 2, 3, 5, 6, 7,
/// 10 in that order.
pub fn scan<I: Iterator<Item = Member>>(
    members: I,
    options: &DescentOptions,
    scan_options: &ScanOptions,
) -> Result<Scan<I>> {
    let options = Arc::new(options.clone());
    let engine = make_engine(scan_options)?;
    Ok(Scan {
        source: members,
        options,
        engine,
    })
}

#[cfg(not(feature = "parallel"))]
fn make_engine(_: &ScanOptions) -> Result<Engine> {
    Ok(Engine::Sequential)
}

#[cfg(feature = "parallel")]
fn make_engine(o: &ScanOptions) -> Result<Engine> {
    if o.threads == 1 {
        return Ok(Engine::Sequential);
    }
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(o.threads)
        .thread_name(|i| format!("family-scan-{i}"))
        .build()
        .map_err(|e| Error::InvalidArgument {
            reason: format!("cannot start {} scan threads: {e}", o.threads),
        })?;
    let window = if o.window == 0 {
        32 * pool.current_num_threads().max(1)
    } else {
        o.window
    };
    let (sender, receiver) = std::sync::mpsc::channel();
    Ok(Engine::Pool(PoolEngine {
        pool,
        window,
        sender,
        receiver,
        ready: BTreeMap::new(),
        next_spawn: 0,
        next_emit: 0,
        exhausted: false,
    }))
}

impl<I: Iterator<Item = Member>> Scan<I> {
    /// The number of worker threads (1 for a sequential scan).
    pub fn threads(&self) -> usize {
        match &self.engine {
            Engine::Sequential => 1,
            #[cfg(feature = "parallel")]
            Engine::Pool(p) => p.pool.current_num_threads(),
        }
    }
}

impl<I: Iterator<Item = Member>> Iterator for Scan<I> {
    type Item = ScanRecord;

    fn next(&mut self) -> Option<ScanRecord> {
        match &mut self.engine {
            Engine::Sequential => {
                let m = self.source.next()?;
                Some(scan_member(&m, &self.options))
            }
            #[cfg(feature = "parallel")]
            Engine::Pool(p) => p.next(&mut self.source, &self.options),
        }
    }
}

#[cfg(feature = "parallel")]
impl PoolEngine {
    fn next<I: Iterator<Item = Member>>(
        &mut self,
        source: &mut I,
        options: &Arc<DescentOptions>,
    ) -> Option<ScanRecord> {
        loop {
            // Keep the window full.
            while !self.exhausted && self.next_spawn - self.next_emit < self.window as u64 {
                match source.next() {
                    Some(m) => {
                        let seq = self.next_spawn;
                        self.next_spawn += 1;
                        let tx = self.sender.clone();
                        let opts = Arc::clone(options);
                        self.pool.spawn(move || {
                            let r = scan_member(&m, &opts);
                            // The receiver is gone only if the scan was
                            // dropped; the result is then not wanted.
                            let _ = tx.send((seq, r));
                        });
                    }
                    None => self.exhausted = true,
                }
            }
            if let Some(r) = self.ready.remove(&self.next_emit) {
                self.next_emit += 1;
                return Some(r);
            }
            if self.next_emit == self.next_spawn {
                return None; // exhausted and everything handed back
            }
            // Wait for any result; the sender half kept in `self` means
            // recv can only fail if a worker died without sending, which
            // json_for_line's panic guard rules out.
            match self.receiver.recv() {
                Ok((seq, r)) => {
                    self.ready.insert(seq, r);
                }
                Err(_) => return None,
            }
        }
    }
}

/// A JSON string literal.
fn json_string(s: &str) -> String {
    serde_json::Value::String(s.to_string()).to_string()
}

/// The JSON object for one member: [`crate::descent::descend`] on the
/// member's curve (a typed value, never re-parsed), written once at the
/// edge. A panic inside the descent becomes the line's error, as in
/// [`crate::output::json_for_line`].
fn report_for_curve(curve: &crate::curve::Curve, input: &str, options: &DescentOptions) -> String {
    let run = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
        crate::output::batch::line_for_curve(curve, input, options, Detail::Summary)
    }));
    match run {
        Ok(line) => line,
        Err(_) => error_line(input, "internal error (panic) during the descent"),
    }
}
