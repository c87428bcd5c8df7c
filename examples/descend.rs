//! Command-line front end for the descent.
//!
//! ```text
//! descend                          descent on the built-in demo curves, readable reports
//! descend "y^2 = x^3 - 30x^2 + 3x" readable report for one curve
//! descend --json                   one curve per stdin line -> one JSON object per line
//!
//! options (before or after the curve):
//!   --space-height H     search height on each homogeneous space   (default 128)
//!   --covering-height H  search height on the 4-coverings          (default 64)
//!   --skip-coverings     no 4-coverings (first descent and search only)
//!   --search-work N      work units per homogeneous-space search
//!   --local-work N       work units for the local tests of one side
//!   --factor-work N      work units for factoring per isogeny
//!   --seconds S          wall-clock limit per curve (results then depend on timing)
//!   --all-evidence       every local image, space searched and 4-covering, in text and JSON
//! ```
//! A curve is its equation (`y^2 + xy = x^3 - 2x + 1`, `^` or `**`, spaces
//! optional, rational coefficients) or its five coefficients a1 a2 a3 a4 a6.
//! In `--json` mode input is read as bytes, line by line: blank lines
//! (Unicode white space only, including U+2028/U+2029) and lines starting
//! with `#` are skipped; a bad line, including one that is not valid UTF-8,
//! gets an object with its `error` and the batch goes on. Exit status: 0
//! on success (also for `--json` batches with error lines, and for the
//! demo, one of whose curves is an error on purpose); 1 when the curve
//! given as an argument does not parse or its descent fails, or on an I/O
//! error; 2 on a usage error. `-h`/`--help` prints this help.

use std::io::{self, BufRead, Read, Write};
use std::process::ExitCode;

use isodescent::curve::Curve;
use isodescent::descent::{descend, DescentOptions};
use isodescent::descent3::{descend_3isogeny, descend_3isogeny_general, Isogeny3Options};
use isodescent::output::{error_line, json_for_bytes, Detail, MAX_ECHOED_INPUT_BYTES};

/// Demo scenario: a handful of curves a researcher might be checking while
/// studying y² = x³ + a x² + b x with small coefficients, given in assorted
/// Weierstrass models. Chosen for this crate; the numbers carry no outside
/// meaning.
const DEMO: &[(&str, &str)] = &[
    (
        "y^2 = x^3 - 30x^2 + 3x",
        "reduced form y^2 = x^3 + ax^2 + bx; two independent points",
    ),
    (
        "y^2 + 2xy + 2y = x^3 + 3x^2 - 10x + 2",
        "general model with a1, a3 nonzero; points come back on it",
    ),
    ("y^2 = x^3 - 7x^2 + (1/16)x", "rational coefficients"),
    (
        "y^2 = x^3 - 29x^2 - 30x",
        "three rational 2-torsion points; Selmer classes proven not images",
    ),
    ("y^2 = x^3 - 1154x", "a curve of higher rank"),
    (
        "y^2 = x^3 - 30x^2 - 8x",
        "the descent leaves [0, 2]; the analytic side proves rank 0 and names the theorem",
    ),
    (
        "0 1 1 -2 0",
        "no rational point of order 2 (five-coefficient input): a typed error, not a panic",
    ),
];

const USAGE: &str = "usage: descend [-h | --help] [--json | \"EQUATION\" | \"A1 A2 A3 A4 A6\"] [--space-height H] [--covering-height H] [--skip-coverings] [--search-work N] [--local-work N] [--factor-work N] [--seconds S] [--all-evidence]";

enum Mode {
    Demo,
    One(String),
    Json,
    Help,
}

fn parse_args() -> Result<(Mode, DescentOptions, Detail), String> {
    let mut options = DescentOptions::default();
    let mut detail = Detail::Summary;
    let mut mode = Mode::Demo;
    let mut args = std::env::args().skip(1);
    while let Some(a) = args.next() {
        let mut number = |name: &str| -> Result<u64, String> {
            let v = args.next().ok_or(format!("{name} needs a value"))?;
            v.parse::<u64>()
                .map_err(|_| format!("{name} needs a non-negative integer, got {v:?}"))
        };
        match a.as_str() {
            "--json" => mode = Mode::Json,
            "--space-height" => options.search_height = number("--space-height")?,
            "--covering-height" => options.covering_search_height = number("--covering-height")?,
            "--skip-coverings" => options.four_coverings = false,
            "--all-evidence" => detail = Detail::Full,
            "--search-work" => options.search_units = number("--search-work")?,
            "--local-work" => options.local_units = number("--local-work")?,
            "--factor-work" => options.factor_units = number("--factor-work")?,
            "--seconds" => {
                let v = args.next().ok_or("--seconds needs a value")?;
                let secs: f64 = v
                    .parse()
                    .ok()
                    .filter(|s: &f64| s.is_finite() && *s > 0.0 && *s < 1e9)
                    .ok_or(format!("--seconds needs a positive number, got {v:?}"))?;
                options.time_limit = Some(std::time::Duration::from_secs_f64(secs));
            }
            "-h" | "--help" => return Ok((Mode::Help, options, detail)),
            s if s.starts_with("--") => return Err(format!("unknown option {s}")),
            s => {
                if matches!(mode, Mode::One(_)) {
                    return Err("give the curve as one argument (quote the equation)".into());
                }
                mode = Mode::One(s.to_string());
            }
        }
    }
    if options.search_height > 1_000_000 {
        return Err("--space-height above 10^6 would take days; choose a smaller bound".into());
    }
    Ok((mode, options, detail))
}

/// Writes the report of one curve; `Ok(false)` when the curve did not
/// parse or its descent failed (the error is written instead).
fn report_one(
    text: &str,
    options: &DescentOptions,
    detail: Detail,
    out: &mut impl Write,
) -> io::Result<bool> {
    match text.parse::<Curve>() {
        Err(e) => writeln!(out, "{text}: {e}").map(|()| false),
        Ok(curve) => match descend(&curve, options) {
            Ok(r) => writeln!(out, "{}", r.text(detail)).map(|()| true),
            // No rational point of order 2: the descent via 3-isogeny
            // (y^2 = x^3 + k), with the same analytic side and clock.
            Err(isodescent::Error::NoTwoTorsion) => {
                let mut o = Isogeny3Options::default();
                o.analytic = options.analytic.clone();
                o.time_limit = options.time_limit;
                let done = if num_traits::Zero::is_zero(curve.j_invariant()) {
                    descend_3isogeny(&curve, &o).map(|r| r.to_string())
                } else {
                    descend_3isogeny_general(&curve, &o).map(|r| r.to_string())
                };
                match done {
                    Ok(r) => write!(out, "{r}").map(|()| true),
                    Err(e) => writeln!(out, "{text}: no rational point of order 2, and {e}")
                        .map(|()| false),
                }
            }
            Err(e) => writeln!(out, "{text}: {e}").map(|()| false),
        },
    }
}

const HELP: &str =
    "descend: descent via 2-isogeny (or 3-isogeny on curves without a rational point of order 2) on elliptic curves over Q

  descend                          descent on the built-in demo curves, readable reports
  descend \"y^2 = x^3 - 30x^2 + 3x\" readable report for one curve
  descend \"0 0 0 -36 0\"            the same with the five coefficients a1 a2 a3 a4 a6
  descend --json                   one curve per stdin line -> one JSON object per line

options (before or after the curve):
  --space-height H     search height on each homogeneous space   (default 128)
  --covering-height H  search height on the 4-coverings          (default 64)
  --skip-coverings     no 4-coverings (first descent and search only)
  --search-work N      work units per homogeneous-space search
  --local-work N       work units for the local tests of one side
  --factor-work N      work units for factoring per isogeny
  --seconds S          wall-clock limit per curve (results then depend on timing)
  --all-evidence       every local image, space searched and 4-covering, in text and JSON
  -h, --help           this help

Exit status: 0 on success (a --json batch with error lines included), 1 when
the curve given as an argument fails or on an I/O error, 2 on a usage error.
JSON lines follow docs/report.schema.json (format 4, docs/report_format.md).";

/// Runs `mode`; `Ok(false)` when the one curve given failed.
fn run(mode: Mode, options: &DescentOptions, detail: Detail) -> io::Result<bool> {
    let stdout = io::stdout();
    let mut out = stdout.lock();
    let mut ok = true;
    match mode {
        Mode::Help => writeln!(out, "{HELP}")?,
        Mode::Demo => {
            for (curve, note) in DEMO {
                writeln!(out, "── {note}")?;
                report_one(curve, options, detail, &mut out)?;
            }
        }
        Mode::One(text) => ok = report_one(&text, options, detail, &mut out)?,
        Mode::Json => {
            // Caught panics are reported in the JSON; keep stderr quiet.
            std::panic::set_hook(Box::new(|_| {}));
            let stdin = io::stdin();
            let mut input = stdin.lock();
            let mut line = Vec::new();
            // A line longer than any curve text is not kept in memory: its
            // first bytes and its length are enough for the error object.
            let cap = MAX_ECHOED_INPUT_BYTES + 2;
            loop {
                line.clear();
                if input
                    .by_ref()
                    .take(cap as u64)
                    .read_until(b'\n', &mut line)?
                    == 0
                {
                    break;
                }
                if line.len() == cap && line.last() != Some(&b'\n') {
                    let total = line.len() + skip_line(&mut input)?;
                    let head = String::from_utf8_lossy(&line[..256]);
                    let echo = format!("{head}… ({total} bytes in all)");
                    let msg = format!(
                        "line of {total} bytes; at most {MAX_ECHOED_INPUT_BYTES} are accepted"
                    );
                    writeln!(out, "{}", error_line(&echo, &msg))?;
                    out.flush()?;
                    continue;
                }
                if let Some(json) = json_for_bytes(&line, options, detail) {
                    writeln!(out, "{json}")?;
                    out.flush()?;
                }
            }
        }
    }
    out.flush()?;
    Ok(ok)
}

/// Consumes the rest of the current line (through its newline, if any)
/// without keeping it; returns the number of bytes consumed.
fn skip_line(input: &mut impl BufRead) -> io::Result<usize> {
    let mut total = 0;
    loop {
        let buf = input.fill_buf()?;
        if buf.is_empty() {
            return Ok(total);
        }
        match buf.iter().position(|&b| b == b'\n') {
            Some(i) => {
                input.consume(i + 1);
                return Ok(total + i + 1);
            }
            None => {
                let n = buf.len();
                input.consume(n);
                total += n;
            }
        }
    }
}

fn main() -> ExitCode {
    let (mode, options, detail) = match parse_args() {
        Ok(x) => x,
        Err(msg) => {
            if !msg.is_empty() {
                eprintln!("descend: {msg}");
            }
            eprintln!("{USAGE}");
            return ExitCode::from(2);
        }
    };
    match run(mode, &options, detail) {
        Ok(true) => ExitCode::SUCCESS,
        Ok(false) => ExitCode::from(1),
        Err(e) if e.kind() == io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("descend: I/O error: {e}");
            ExitCode::from(1)
        }
    }
}
