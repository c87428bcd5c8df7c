//! A family scanned as several GNU parallel jobs (scripts/survey_parallel.sh)
//! and as emulated Slurm array tasks (scripts/survey_slurm.sh), each merged
//! and compared with the single-process result; and the command-line
//! resume after a run killed mid-line.
//!
//! GNU parallel must be installed (`apt-get install parallel`): without it
//! these tests fail, on purpose.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

const ROOT: &str = env!("CARGO_MANIFEST_DIR");

/// The survey example, built (or found up to date) by cargo in this test's
/// own target directory and profile, with this test's features.
fn survey() -> &'static Path {
    static BIN: OnceLock<PathBuf> = OnceLock::new();
    BIN.get_or_init(|| {
        // target/<profile>/deps/family_sharding-<hash>
        let exe = std::env::current_exe().unwrap();
        let profile_dir = exe.parent().unwrap().parent().unwrap().to_path_buf();
        let target_dir = profile_dir.parent().unwrap().to_path_buf();
        let profile = profile_dir
            .file_name()
            .unwrap()
            .to_str()
            .unwrap()
            .to_string();
        let cargo = std::env::var("CARGO").unwrap_or_else(|_| "cargo".into());
        let mut cmd = Command::new(cargo);
        cmd.current_dir(ROOT)
            .env("CARGO_TARGET_DIR", &target_dir)
            .args(["build", "--quiet", "--example", "survey"]);
        if profile == "release" {
            cmd.arg("--release");
        } else if profile != "debug" {
            cmd.args(["--profile", &profile]);
        }
        if cfg!(feature = "parallel") {
            cmd.args(["--features", "parallel"]);
        }
        let status = cmd
            .status()
            .expect("cannot run cargo to build the survey example");
        assert!(status.success(), "building the survey example failed");
        let bin = profile_dir.join("examples").join("survey");
        assert!(
            bin.exists(),
            "survey example not found at {}",
            bin.display()
        );
        bin
    })
}

/// Whether GNU parallel is on PATH. Without it the GNU parallel test is
/// skipped with a printed note (the Slurm emulation below covers the same
/// merge without it); `.ci/run` installs it so that CI runs both.
fn gnu_parallel_available() -> bool {
    let out = Command::new("parallel").arg("--version").output();
    match out {
        Ok(o) if String::from_utf8_lossy(&o.stdout).contains("GNU parallel") => true,
        _ => {
            eprintln!(
                "note: GNU parallel not found on PATH; skipping the GNU parallel \
                 shard test (Debian/Ubuntu: apt-get install parallel)"
            );
            false
        }
    }
}

fn scratch(name: &str) -> PathBuf {
    let exe = std::env::current_exe().unwrap();
    let d = exe
        .parent()
        .unwrap()
        .join(format!("family-sharding-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run_ok(cmd: &mut Command) -> String {
    let out = cmd.output().unwrap();
    assert!(
        out.status.success(),
        "{cmd:?} failed:\nstdout:\n{}\nstderr:\n{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

fn single(dir: &Path, family: &[&str]) -> Vec<u8> {
    let out = dir.join("single.jsonl");
    run_ok(
        Command::new(survey())
            .arg("scan")
            .args(family)
            .args(["--quiet", "--out"])
            .arg(&out),
    );
    std::fs::read(out).unwrap()
}

// A family with a blank-separated --curve argument, so quoting through
// the shell is exercised too: twists of y² + xy = x³ − x ((0, 0) has order 2).
const TWISTS: [&str; 8] = [
    "--family",
    "twists",
    "--curve",
    "1 0 0 -1 0",
    "--from",
    "-40",
    "--to",
    "40",
];
const CONGRUENT: [&str; 6] = ["--family", "congruent", "--from", "1", "--to", "120"];

#[test]
fn gnu_parallel_shards_merge_to_the_single_process_result() {
    if !gnu_parallel_available() {
        return;
    }
    for (name, family) in [("twists", &TWISTS[..]), ("congruent", &CONGRUENT[..])] {
        let dir = scratch(name);
        let want = single(&dir, family);
        assert!(!want.is_empty());
        let outdir = dir.join("par");
        let report = run_ok(
            Command::new("bash")
                .arg(Path::new(ROOT).join("scripts/survey_parallel.sh"))
                .args(["-n", "3", "-j", "3", "-b"])
                .arg(survey())
                .arg("-o")
                .arg(&outdir)
                .arg("--")
                .args(family),
        );
        assert!(
            report.contains("complete: every member exactly once"),
            "{report}"
        );
        let got = std::fs::read(outdir.join("merged.jsonl")).unwrap();
        assert_eq!(
            got, want,
            "{name}: merged shards differ from the single run"
        );
        for k in 1..=3 {
            assert!(outdir.join(format!("shard-{k}-of-3.jsonl")).exists());
        }
        // Rerunning resumes every (finished) shard and changes nothing.
        run_ok(
            Command::new("bash")
                .arg(Path::new(ROOT).join("scripts/survey_parallel.sh"))
                .args(["-n", "3", "-b"])
                .arg(survey())
                .arg("-o")
                .arg(&outdir)
                .arg("--")
                .args(family),
        );
        assert_eq!(std::fs::read(outdir.join("merged.jsonl")).unwrap(), want);
        let _ = std::fs::remove_dir_all(&dir);
    }
}

#[test]
fn slurm_array_tasks_emulated_by_hand_merge_to_the_single_process_result() {
    let dir = scratch("slurm");
    let want = single(&dir, &CONGRUENT);
    let outdir = dir.join("slurm");
    let script = Path::new(ROOT).join("scripts/survey_slurm.sh");
    for k in 1..=4 {
        run_ok(
            Command::new("bash")
                .arg(&script)
                .arg(&outdir)
                .args(CONGRUENT)
                .env("SLURM_ARRAY_TASK_ID", k.to_string())
                .env("SLURM_ARRAY_TASK_COUNT", "4")
                .env("SURVEY", survey()),
        );
    }
    let report = run_ok(
        Command::new("bash")
            .arg(&script)
            .arg(&outdir)
            .args(CONGRUENT)
            .env("SURVEY_MERGE", "1")
            .env("SURVEY_SHARDS", "4")
            .env("SURVEY", survey()),
    );
    assert!(report.contains("complete"), "{report}");
    assert_eq!(std::fs::read(outdir.join("merged.jsonl")).unwrap(), want);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_run_killed_mid_line_is_resumed_by_the_command_without_loss_or_duplicates() {
    let dir = scratch("resume");
    let want = single(&dir, &CONGRUENT);
    let out = dir.join("resumed.jsonl");
    // As if killed while writing line 31: 30 lines and part of the next.
    let mut upto = 0;
    for _ in 0..30 {
        upto += want[upto..].iter().position(|&b| b == b'\n').unwrap() + 1;
    }
    std::fs::write(&out, &want[..upto + 17]).unwrap();
    let svg = dir.join("plot.svg");
    let summary = run_ok(
        Command::new(survey())
            .arg("scan")
            .args(CONGRUENT)
            .args(["--quiet", "--out"])
            .arg(&out)
            .arg("--svg")
            .arg(&svg),
    );
    assert_eq!(std::fs::read(&out).unwrap(), want);
    assert!(summary.contains("30 kept from an earlier run"), "{summary}");
    // The plot is an SVG document drawn by plotters with both panels; for
    // the congruent family the left one shows the 2-Selmer ranks with the
    // limit law as dots.
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.trim_start().starts_with("<svg") && text.trim_end().ends_with("</svg>"));
    assert!(text.contains("2-Selmer rank") && text.contains("decided"));
    assert!(text.contains("<circle"));
    // A different family refuses to resume this file.
    let other = Command::new(survey())
        .arg("scan")
        .args([
            "--family",
            "congruent",
            "--from",
            "2",
            "--to",
            "120",
            "--quiet",
            "--out",
        ])
        .arg(&out)
        .output()
        .unwrap();
    assert!(!other.status.success());
    assert!(String::from_utf8_lossy(&other.stderr).contains("another family"));
    let _ = std::fs::remove_dir_all(&dir);
}
