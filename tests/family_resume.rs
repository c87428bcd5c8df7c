//! Resuming an interrupted output file and merging shard files: nothing
//! lost, nothing duplicated, problems reported.

use std::io::Cursor;

use isodescent::descent::DescentOptions;
use isodescent::family::{merge_shards, read_for_resume, scan, Family, ScanOptions, Shard};
use isodescent::Error;

/// The output file of shard `s` of `fam`, as bytes.
fn shard_file(fam: &Family, s: Shard) -> Vec<u8> {
    let mut out = Vec::new();
    for r in scan(
        fam.members().filter(move |m| s.contains(m.index)),
        &DescentOptions::default(),
        &ScanOptions::default(),
    )
    .unwrap()
    {
        out.extend_from_slice(r.to_line().as_bytes());
        out.push(b'\n');
    }
    out
}

/// What a resumed run appends after `state.last`.
fn resume_tail(fam: &Family, s: Shard, last: Option<u64>) -> Vec<u8> {
    let mut out = Vec::new();
    let src = fam
        .members()
        .filter(move |m| s.contains(m.index) && last.map_or(true, |l| m.index > l));
    for r in scan(src, &DescentOptions::default(), &ScanOptions::default()).unwrap() {
        out.extend_from_slice(r.to_line().as_bytes());
        out.push(b'\n');
    }
    out
}

#[test]
fn resuming_after_a_cut_anywhere_gives_the_uninterrupted_file() {
    let fam = Family::pair_box(2).unwrap();
    let s = Shard::new(2, 3).unwrap();
    let full = shard_file(&fam, s);
    let n_lines = full.iter().filter(|&&b| b == b'\n').count() as u64;
    assert_eq!(n_lines, 6); // members 1, 4, …, 16 of 18
                            // What a resumed run appends, for each possible last record (computed
                            // once each: the tail depends only on it).
    let mut tails = std::collections::HashMap::new();
    // Cut at every byte position, as a killed run might leave the file.
    for cut in 0..=full.len() {
        let existing = &full[..cut];
        let st = read_for_resume(Cursor::new(existing), "cut", &s).unwrap();
        let mut resumed = existing[..st.keep_bytes as usize].to_vec();
        assert_eq!(st.keep_bytes + st.partial_bytes, cut as u64);
        assert_eq!(st.tally.curves, st.records);
        let last = st.last.as_ref().map(|l| l.0);
        let tail = tails
            .entry(last)
            .or_insert_with(|| resume_tail(&fam, s, last));
        resumed.extend_from_slice(tail);
        assert_eq!(resumed, full, "cut at byte {cut}");
    }
    assert_eq!(tails.len() as u64, n_lines + 1);
}

#[test]
fn resuming_refuses_a_file_of_another_shard_or_a_garbled_line() {
    let fam = Family::pair_box(1).unwrap();
    let s1 = Shard::new(1, 2).unwrap();
    let s2 = Shard::new(2, 2).unwrap();
    let f1 = shard_file(&fam, s1);
    assert!(matches!(
        read_for_resume(Cursor::new(&f1), "f1", &s2),
        Err(Error::InvalidArgument { .. })
    ));
    let mut garbled = f1.clone();
    garbled.extend_from_slice(b"not json\n");
    assert!(matches!(
        read_for_resume(Cursor::new(&garbled), "g", &s1),
        Err(Error::Parse { .. })
    ));
    // The same records twice: out of order.
    let mut twice = f1.clone();
    twice.extend_from_slice(&f1);
    assert!(matches!(
        read_for_resume(Cursor::new(&twice), "t", &s1),
        Err(Error::InvalidArgument { .. })
    ));
}

fn names(n: usize) -> Vec<String> {
    (1..=n).map(|k| format!("shard{k}")).collect()
}

#[test]
fn merging_all_shards_gives_the_single_process_file_and_reports_completeness() {
    let fam = Family::congruent_numbers(1, 40).unwrap();
    let whole = shard_file(&fam, Shard::whole());
    let shards: Vec<Vec<u8>> = (1..=3)
        .map(|k| shard_file(&fam, Shard::new(k, 3).unwrap()))
        .collect();
    // Input order does not matter.
    let inputs: Vec<Cursor<&Vec<u8>>> = shards.iter().rev().map(Cursor::new).collect();
    let mut merged = Vec::new();
    let rep = merge_shards(inputs, &names(3), &fam, &mut merged).unwrap();
    assert!(rep.is_complete(), "{rep}");
    assert_eq!(rep.written, fam.count());
    assert_eq!(merged, whole);
    assert_eq!(rep.tally.curves, fam.count());
}

#[test]
fn merging_reports_a_missing_shard_duplicates_and_a_partial_line() {
    let fam = Family::congruent_numbers(1, 40).unwrap();
    assert_eq!(fam.count(), 26); // square-free n ≤ 40 (sympy 1.14 factorint)
    let s: Vec<Vec<u8>> = (1..=3)
        .map(|k| shard_file(&fam, Shard::new(k, 3).unwrap()))
        .collect();
    // Shard 3 missing, shard 1 given twice.
    let inputs = vec![Cursor::new(&s[0]), Cursor::new(&s[1]), Cursor::new(&s[0])];
    let mut out = Vec::new();
    let rep = merge_shards(inputs, &names(3), &fam, &mut out).unwrap();
    assert!(!rep.is_complete());
    // Indices 0..26: shard 1 holds 0, 3, …, 24 (9), shard 3 holds 2, 5, …, 23 (8).
    assert_eq!(rep.missing.count, 8);
    assert_eq!(rep.missing.first[..3], [2, 5, 8]);
    assert_eq!(rep.duplicates.count, 9);
    assert_eq!(rep.written, 18);
    // A partial last line is not taken for a record.
    let cut = s[2].len() - 5;
    let partial = s[2][..cut].to_vec();
    let inputs = vec![
        Cursor::new(&s[0]),
        Cursor::new(&s[1]),
        Cursor::new(&partial),
    ];
    let mut out = Vec::new();
    let rep = merge_shards(inputs, &names(3), &fam, &mut out).unwrap();
    assert_eq!(rep.malformed, 1);
    assert_eq!(rep.missing.first, vec![23]);
    assert_eq!(rep.written, 25);
}

#[test]
fn merging_against_the_wrong_family_is_reported_as_mismatched() {
    let fam = Family::congruent_numbers(1, 20).unwrap();
    let other = Family::congruent_numbers(2, 20).unwrap();
    let f = shard_file(&fam, Shard::whole());
    let mut out = Vec::new();
    let rep = merge_shards(vec![Cursor::new(&f)], &names(1), &other, &mut out).unwrap();
    assert!(!rep.is_complete());
    assert!(rep.mismatched.count > 0, "{rep}");
    // One member more in `fam` than in `other`: its last record is beyond the end.
    assert_eq!(rep.foreign.count, 1);
}
