//! Family scans from the command line: run the descent over a family of
//! curves, stream one JSON line per curve to a file, resume interrupted
//! runs, split the family into shards, merge shard files, summarise and
//! plot.
//!
//! ```text
//! survey scan  FAMILY --out FILE [--shard k/N] [--threads T] [--height H]
//!              [--svg FILE] [--quiet]
//! survey merge FAMILY --out FILE [--svg FILE] SHARD-FILE...
//! survey count FAMILY [--shard k/N]
//!
//! FAMILY is one of
//!   --family congruent --from N1 --to N2      y^2 = x^3 - n^2 x, n square-free
//!   --family twists --curve "a1 a2 a3 a4 a6" --from D1 --to D2
//!                                             quadratic twists, d square-free, d != 0
//!   --family box --bound B                    y^2 = x^3 + a x^2 + b x, |a|, |b| <= B
//!   --family mordell --from K1 --to K2        y^2 = x^3 + k, k sixth-power free (3-isogeny)
//!   --family cube-sums --from N1 --to N2      x^3 + y^3 = n, n cube-free (3-isogeny)
//! ```
//!
//! `scan` on an existing output file goes on where it stopped (a partial
//! last line is cut away first); `merge` writes the members in family order
//! and exits with status 1 unless every member is present exactly once.
//! See docs/families.md.

use std::error::Error as StdError;
use std::fs::{File, OpenOptions};
use std::io::{BufReader, BufWriter, Write};
use std::path::Path;
use std::process::ExitCode;
use std::time::Instant;

use indicatif::{ProgressBar, ProgressStyle};
use isodescent::curve::Curve;
use isodescent::descent::DescentOptions;
use isodescent::family::{
    merge_shards, read_for_resume, scan, Family, RecordLine, ScanOptions, Shard, Tally,
};

type Res<T> = Result<T, Box<dyn StdError>>;

const USAGE: &str = "usage:
  survey scan  FAMILY --out FILE [--shard k/N] [--threads T] [--height H] [--svg FILE] [--quiet]
  survey merge FAMILY --out FILE [--svg FILE] SHARD-FILE...
  survey count FAMILY [--shard k/N]
  survey help | --help | -h
FAMILY:
  --family congruent --from N1 --to N2
  --family twists --curve \"a1 a2 a3 a4 a6\" --from D1 --to D2
  --family box --bound B
  --family mordell --from K1 --to K2
  --family cube-sums --from N1 --to N2
Resume: running the same scan again on an existing --out file goes on where
it stopped (a partial last line is cut away first; a file of another shard
or family is left alone). Shards: --shard k/N takes the members with index
= k - 1 (mod N); scan each shard into its own file, then merge them with
survey merge (exit status 1 unless every member is present exactly once).
See docs/families.md.";

#[derive(Default)]
struct Args {
    family: Option<String>,
    from: Option<String>,
    to: Option<String>,
    curve: Option<String>,
    bound: Option<String>,
    out: Option<String>,
    shard: Option<String>,
    threads: Option<String>,
    height: Option<String>,
    svg: Option<String>,
    quiet: bool,
    files: Vec<String>,
}

fn parse_args(v: &[String]) -> Res<Args> {
    let mut a = Args::default();
    let mut i = 0;
    while i < v.len() {
        let flag = v[i].as_str();
        let mut value = || -> Res<String> {
            i += 1;
            v.get(i)
                .cloned()
                .ok_or_else(|| format!("option {flag} needs a value").into())
        };
        match flag {
            "--family" => a.family = Some(value()?),
            "--from" => a.from = Some(value()?),
            "--to" => a.to = Some(value()?),
            "--curve" => a.curve = Some(value()?),
            "--bound" => a.bound = Some(value()?),
            "--out" => a.out = Some(value()?),
            "--shard" => a.shard = Some(value()?),
            "--threads" => a.threads = Some(value()?),
            "--height" => a.height = Some(value()?),
            "--svg" => a.svg = Some(value()?),
            "--quiet" => a.quiet = true,
            s if s.starts_with("--") => return Err(format!("unknown option {s}").into()),
            s => a.files.push(s.to_string()),
        }
        i += 1;
    }
    Ok(a)
}

fn need<'a>(v: &'a Option<String>, what: &str) -> Res<&'a str> {
    v.as_deref().ok_or_else(|| format!("missing {what}").into())
}

fn number<T: std::str::FromStr>(v: &Option<String>, what: &str) -> Res<T> {
    let s = need(v, what)?;
    s.trim()
        .parse()
        .map_err(|_| format!("{what}: {s:?} is not a valid number").into())
}

fn family_of(a: &Args) -> Res<Family> {
    let fam = match need(
        &a.family,
        "--family (congruent, twists, box, mordell or cube-sums)",
    )? {
        "congruent" => {
            Family::congruent_numbers(number(&a.from, "--from")?, number(&a.to, "--to")?)?
        }
        "twists" => {
            let curve: Curve = need(&a.curve, "--curve \"a1 a2 a3 a4 a6\"")?.parse()?;
            Family::quadratic_twists(&curve, number(&a.from, "--from")?, number(&a.to, "--to")?)?
        }
        "box" => Family::pair_box(number(&a.bound, "--bound")?)?,
        "mordell" => Family::mordell(number(&a.from, "--from")?, number(&a.to, "--to")?)?,
        "cube-sums" => Family::cube_sums(number(&a.from, "--from")?, number(&a.to, "--to")?)?,
        other => {
            return Err(format!(
                "unknown family {other:?} (congruent, twists, box, mordell or cube-sums)"
            )
            .into())
        }
    };
    Ok(fam)
}

fn shard_of(a: &Args) -> Res<Shard> {
    Ok(match &a.shard {
        Some(s) => s.parse()?,
        None => Shard::whole(),
    })
}

/// Members of `shard` among the first `total` members of a family.
fn shard_size(total: u64, shard: &Shard) -> u64 {
    let k0 = shard.number() - 1;
    if total > k0 {
        (total - k0).div_ceil(shard.count())
    } else {
        0
    }
}

/// Peak resident memory of this process in kB (Linux), if known.
fn peak_rss_kb() -> Option<u64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = s.lines().find(|l| l.starts_with("VmHWM:"))?;
    line.split_whitespace().nth(1)?.parse().ok()
}

fn progress(len: u64, quiet: bool) -> ProgressBar {
    if quiet {
        return ProgressBar::hidden();
    }
    let pb = ProgressBar::new(len);
    if let Ok(style) = ProgressStyle::with_template(
        "{elapsed_precise} [{wide_bar}] {pos}/{len} curves  {per_sec}  about {eta} left",
    ) {
        pb.set_style(style.progress_chars("=> "));
    }
    pb
}

fn cmd_scan(a: &Args) -> Res<()> {
    let family = family_of(a)?;
    let shard = shard_of(a)?;
    let out = need(&a.out, "--out FILE")?.to_string();
    let threads: usize = match &a.threads {
        Some(_) => number(&a.threads, "--threads")?,
        None => 0,
    };
    let mut options = DescentOptions::default();
    if a.height.is_some() {
        options.search_height = number(&a.height, "--height")?;
    }

    // Resume: read what is there, cut a partial last line away.
    let mut tally = Tally::new();
    let mut last: Option<(u64, String)> = None;
    let mut kept = 0u64;
    if Path::new(&out).exists() {
        let st = read_for_resume(BufReader::new(File::open(&out)?), &out, &shard)?;
        if st.partial_bytes > 0 {
            let f = OpenOptions::new().write(true).open(&out)?;
            f.set_len(st.keep_bytes)?;
            f.sync_all()?;
            eprintln!(
                "{out}: removed a partial last line of {} bytes",
                st.partial_bytes
            );
        }
        if st.records > 0 {
            eprintln!(
                "{out}: {} records already there, going on after them",
                st.records
            );
        }
        kept = st.records;
        tally = st.tally;
        last = st.last;
    }

    let total = shard_size(family.count(), &shard);
    let mut source = family.members().filter(move |m| shard.contains(m.index));
    if let Some((li, lp)) = &last {
        let mut seen = false;
        for m in source.by_ref() {
            if m.index == *li {
                if m.parameter.to_string() != *lp {
                    return Err(format!(
                        "{out} was written for another family: member {li} is {lp:?} there but {} here",
                        m.parameter
                    )
                    .into());
                }
                seen = true;
                break;
            }
            if m.index > *li {
                break;
            }
        }
        if !seen {
            return Err(format!(
                "{out} was written for another family or shard: it holds member {li}, \
                 which this family and shard do not have"
            )
            .into());
        }
    }

    let mut scan_opts = ScanOptions::default();
    scan_opts.threads = threads;
    let records = scan(source, &options, &scan_opts)?;
    let used = records.threads();
    if threads != 1 && used == 1 && !cfg!(feature = "parallel") {
        eprintln!("note: built without the `parallel` feature; scanning on one thread");
    }
    let mut file = OpenOptions::new().create(true).append(true).open(&out)?;
    let pb = progress(total.saturating_sub(kept), a.quiet);
    let start = Instant::now();
    let mut fresh = 0u64;
    let mut worker_seconds = 0.0;
    for r in records {
        let mut line = r.to_line();
        if let Some(rec) = RecordLine::parse(&line) {
            tally.add(&rec);
        }
        line.push('\n');
        file.write_all(line.as_bytes())?;
        fresh += 1;
        worker_seconds += r.seconds;
        pb.inc(1);
    }
    file.sync_all()?;
    pb.finish_and_clear();
    let wall = start.elapsed().as_secs_f64();

    println!("family   {}", family.describe());
    println!("shard    {shard}   output {out}");
    println!(
        "run      {fresh} curves computed on {used} thread(s) in {wall:.2} s ({:.1} curves/s); \
         {kept} kept from an earlier run",
        if wall > 0.0 { fresh as f64 / wall } else { 0.0 }
    );
    if fresh > 0 {
        println!(
            "time     {:.3} ms per curve (worker time), {:.3} ms per curve (wall)",
            1000.0 * worker_seconds / fresh as f64,
            1000.0 * wall / fresh as f64
        );
    }
    if let Some(kb) = peak_rss_kb() {
        println!("memory   peak resident {kb} kB");
    }
    print!("{tally}");
    print_limit_law(&tally, &family);
    if let Some(svg) = &a.svg {
        plot(&tally, svg, &family.describe())?;
        println!("plot     {svg}");
    }
    Ok(())
}

fn cmd_merge(a: &Args) -> Res<()> {
    let family = family_of(a)?;
    let out = need(&a.out, "--out FILE")?.to_string();
    if a.files.is_empty() {
        return Err("merge needs at least one shard file".into());
    }
    let mut inputs = Vec::new();
    for f in &a.files {
        inputs.push(BufReader::new(
            File::open(f).map_err(|e| format!("cannot open {f}: {e}"))?,
        ));
    }
    let tmp = format!("{out}.partial");
    let report = {
        let mut w = BufWriter::new(File::create(&tmp)?);
        let r = merge_shards(inputs, &a.files, &family, &mut w)?;
        w.into_inner().map_err(|e| e.into_error())?.sync_all()?;
        r
    };
    std::fs::rename(&tmp, &out)?;
    println!("family   {}", family.describe());
    println!("merged   {} files into {out}", a.files.len());
    print!("{report}");
    print!("{}", report.tally);
    if let Some(svg) = &a.svg {
        plot(&report.tally, svg, &family.describe())?;
        println!("plot     {svg}");
    }
    if report.is_complete() {
        Ok(())
    } else {
        Err("merge incomplete (see the counts above)".into())
    }
}

fn cmd_count(a: &Args) -> Res<()> {
    let family = family_of(a)?;
    let shard = shard_of(a)?;
    println!("{}", shard_size(family.count(), &shard));
    Ok(())
}

/// Two panels: the distribution of the Selmer rank bound (the 2-Selmer
/// rank for the congruent family; dim Sel^φ + dim Sel^φ̂ for the families
/// of the 3-isogeny descent), and the cumulative decided share against
/// the number of curves scanned.
fn plot(t: &Tally, path: &str, title: &str) -> Res<()> {
    use plotters::prelude::*;
    let root = SVGBackend::new(path, (1100, 480)).into_drawing_area();
    root.fill(&WHITE)?;
    let root = root.titled(title, ("sans-serif", 16))?;
    let (left, right) = root.split_horizontally(550);

    // Left: for the congruent-number family, the 2-Selmer rank beyond
    // E[2] with Heath-Brown's limit law as points (expected counts);
    // otherwise the Selmer rank bound.
    let congruent = title.contains("congruent") && !t.selmer2.is_empty();
    // Families of the descent via 3-isogeny: dim Sel^φ + dim Sel^φ̂.
    let mut three: std::collections::BTreeMap<u64, u64> = std::collections::BTreeMap::new();
    for (&(a, b), &n) in &t.selmer3_pairs {
        *three.entry(a + b).or_insert(0) += n;
    }
    let (counts, caption, x_desc) = if congruent {
        (
            &t.selmer2,
            "2-Selmer rank beyond E[2]; dots: Heath-Brown's limit law",
            "dim Sel^2(E) - 2",
        )
    } else if three.values().sum::<u64>() >= t.selmer_rank.values().sum::<u64>()
        && !three.is_empty()
    {
        // Families of the 3-isogeny descent (a few members with a point of
        // order 2 take the 2-isogeny descent and are left out here).
        (
            &three,
            "3-isogeny Selmer dimensions (sum >= dim Sel^3(E))",
            "dim Sel^phi(E) + dim Sel^phihat(E') over F3",
        )
    } else {
        (
            &t.selmer_rank,
            "Selmer rank bound (min over isogenies)",
            "dim Sel(E) + dim Sel(E') - 2",
        )
    };
    let total: u64 = counts.values().sum();
    let law = isodescent::family::congruent_selmer_limit_law(8);
    let max_s = counts.keys().copied().max().unwrap_or(0) as u32;
    let mut max_n = counts.values().copied().max().unwrap_or(0).max(1);
    if congruent {
        let top = law.iter().fold(0f64, |m, &d| m.max(d)) * total as f64;
        max_n = max_n.max(top.ceil() as u64);
    }
    let mut ch = ChartBuilder::on(&left)
        .caption(caption, ("sans-serif", 16))
        .margin(16)
        .x_label_area_size(40)
        .y_label_area_size(64)
        .build_cartesian_2d(
            (0u32..max_s + 1).into_segmented(),
            0u64..max_n + max_n / 10 + 1,
        )?;
    ch.configure_mesh()
        .disable_x_mesh()
        .x_desc(x_desc)
        .y_desc("curves")
        .draw()?;
    ch.draw_series(
        Histogram::vertical(&ch)
            .style(RGBColor(60, 110, 180).filled())
            .margin(6)
            .data(counts.iter().map(|(&s, &n)| (s as u32, n))),
    )?;
    if congruent {
        ch.draw_series((0..=max_s).map(|s| {
            let expected = law.get(s as usize).copied().unwrap_or(0.0) * total as f64;
            Circle::new(
                (SegmentValue::CenterOf(s), expected.round() as u64),
                5,
                RGBColor(190, 60, 40).filled(),
            )
        }))?;
    }

    let trace = t.trace();
    let max_x = trace.last().map(|p| p.0).unwrap_or(1).max(1);
    let mut ch = ChartBuilder::on(&right)
        .caption("Share decided (lower = upper) so far", ("sans-serif", 18))
        .margin(16)
        .x_label_area_size(40)
        .y_label_area_size(64)
        .build_cartesian_2d(0u64..max_x, 0f64..1.0)?;
    ch.configure_mesh()
        .x_desc("curves scanned, in family order")
        .y_desc("cumulative decided share")
        .draw()?;
    ch.draw_series(LineSeries::new(
        trace.iter().copied(),
        RGBColor(190, 60, 40).stroke_width(2),
    ))?;
    root.present()?;
    Ok(())
}

fn main() -> ExitCode {
    let argv: Vec<String> = std::env::args().skip(1).collect();
    let Some((cmd, rest)) = argv.split_first() else {
        eprintln!("{USAGE}");
        return ExitCode::from(2);
    };
    if matches!(cmd.as_str(), "help" | "--help" | "-h")
        || rest.iter().any(|a| a == "--help" || a == "-h")
    {
        println!("{USAGE}");
        return ExitCode::SUCCESS;
    }
    let run = || -> Res<()> {
        let a = parse_args(rest)?;
        match cmd.as_str() {
            "scan" => cmd_scan(&a),
            "merge" => cmd_merge(&a),
            "count" => cmd_count(&a),
            other => Err(format!("unknown command {other:?}\n{USAGE}").into()),
        }
    };
    match run() {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("survey: {e}");
            ExitCode::from(1)
        }
    }
}

/// For the congruent-number family: the observed 2-Selmer ranks beside
/// Heath-Brown's limit law, with their total variation distance (a
/// statistical comparison, not a test).
fn print_limit_law(tally: &Tally, family: &Family) {
    if !family.describe().contains("congruent") {
        return;
    }
    let law = isodescent::family::congruent_selmer_limit_law(8);
    if let Some((rows, tv)) = tally.selmer2_against(&law) {
        println!("2-Selmer rank beyond E[2] against Heath-Brown's limit law (Invent. Math. 118, 1994; from memory)");
        println!("                 s   observed   limit law");
        for (r, obs, exp) in rows {
            println!(
                "             {r:>5}   {:>7.2}%   {:>8.2}%",
                100.0 * obs,
                100.0 * exp
            );
        }
        println!("total variation distance {tv:.4}");
    }
}
