//! Command-line front end for the descent.
//!
//! ```text
//! descend                       descent on the built-in demo curves, readable reports
//! descend "A1 A2 A3 A4 A6"      readable report for one curve
//! descend --json                one curve per stdin line -> one JSON object per line
//!
//! options (before or after the curve):
//!   --height H           search height on each homogeneous space   (default 128)
//!   --second-height H    search height on the 4-coverings          (default 64)
//!   --no-second          skip the second descent
//!   --search-work N      work units per homogeneous-space search
//!   --local-work N       work units for the local tests of one side
//!   --factor-work N      work units for factoring per isogeny
//!   --seconds S          wall-clock limit per curve (results then depend on timing)
//! ```
//! Coefficients are integers or fractions p/q separated by spaces and/or
//! commas. In `--json` mode blank lines and lines starting with `#` are
//! skipped; a bad line gets an object with its `error` and the batch goes
//! on. The exit status is non-zero only for usage or I/O errors.

use std::io::{self, BufRead, Write};
use std::process::ExitCode;

use isodescent::curve::Curve;
use isodescent::descent::{descend, is_skipped_line, json_for_line, DescentOptions};

/// Demo scenario: a handful of curves a researcher might be checking while
/// studying y² = x³ + a x² + b x with small coefficients, given in assorted
/// Weierstrass models. Chosen for this crate; the numbers carry no outside
/// meaning.
const DEMO: &[(&str, &str)] = &[
    (
        "0 -30 0 3 0",
        "reduced form y^2 = x^3 + a x^2 + b x; two independent points",
    ),
    (
        "2 3 2 -10 2",
        "general model with a1, a3 nonzero; points come back on it",
    ),
    ("0 -7 0 1/16 0", "rational coefficients"),
    (
        "0 -29 0 -30 0",
        "three rational 2-torsion points; Selmer classes proven not images",
    ),
    ("0 0 0 -1154 0", "a curve of higher rank"),
    (
        "0 -30 0 -8 0",
        "the bounds stay apart: reported honestly as an interval",
    ),
    (
        "0 1 1 -2 0",
        "no rational point of order 2: a typed error, not a panic",
    ),
];

const USAGE: &str = "usage: descend [--json | \"A1 A2 A3 A4 A6\"] [--height H] [--second-height H] [--no-second] [--search-work N] [--local-work N] [--factor-work N] [--seconds S]";

enum Mode {
    Demo,
    One(String),
    Json,
}

fn parse_args() -> Result<(Mode, DescentOptions), String> {
    let mut options = DescentOptions::default();
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
            "--height" => options.search_height = number("--height")?,
            "--second-height" => options.second_search_height = number("--second-height")?,
            "--no-second" => options.second_descent = false,
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
            "-h" | "--help" => return Err(String::new()),
            s if s.starts_with("--") => return Err(format!("unknown option {s}")),
            s => {
                if matches!(mode, Mode::One(_)) {
                    return Err("give the five coefficients as one argument".into());
                }
                mode = Mode::One(s.to_string());
            }
        }
    }
    if options.search_height > 1_000_000 {
        return Err("--height above 10^6 would take days; choose a smaller bound".into());
    }
    Ok((mode, options))
}

fn report_one(text: &str, options: &DescentOptions, out: &mut impl Write) -> io::Result<()> {
    match text.parse::<Curve>() {
        Err(e) => writeln!(out, "{text}: {e}"),
        Ok(curve) => match descend(&curve, options) {
            Ok(r) => writeln!(out, "{r}"),
            Err(e) => writeln!(out, "{text}: {e}"),
        },
    }
}

fn run(mode: Mode, options: &DescentOptions) -> io::Result<()> {
    let stdout = io::stdout();
    let mut out = stdout.lock();
    match mode {
        Mode::Demo => {
            for (curve, note) in DEMO {
                writeln!(out, "── {curve}   ({note})")?;
                report_one(curve, options, &mut out)?;
            }
        }
        Mode::One(text) => report_one(&text, options, &mut out)?,
        Mode::Json => {
            // Caught panics are reported in the JSON; keep stderr quiet.
            std::panic::set_hook(Box::new(|_| {}));
            let stdin = io::stdin();
            for line in stdin.lock().lines() {
                let line = line?;
                if is_skipped_line(&line) {
                    continue;
                }
                writeln!(out, "{}", json_for_line(&line, options))?;
                out.flush()?;
            }
        }
    }
    out.flush()
}

fn main() -> ExitCode {
    let (mode, options) = match parse_args() {
        Ok(x) => x,
        Err(msg) => {
            if !msg.is_empty() {
                eprintln!("descend: {msg}");
            }
            eprintln!("{USAGE}");
            return ExitCode::from(2);
        }
    };
    match run(mode, &options) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) if e.kind() == io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("descend: I/O error: {e}");
            ExitCode::from(1)
        }
    }
}
