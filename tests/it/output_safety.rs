//! What a run does to files besides its own workbook: nothing. The inputs
//! read the same, byte for byte, after `run` and `check`; a run killed
//! while writing leaves the previous workbook at the target untouched, with
//! at most one leftover file that says what it is; the output may not be an
//! input. The books are Harbourview Mutual's (an invented credit union).

use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use sha2::{Digest, Sha256};

fn ledgerate() -> Command {
    Command::new(env!("CARGO_BIN_EXE_ledgerate"))
}

fn sample(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-books")
        .join(rel)
}

/// SHA-256 of every file under `root` (a file or a folder), by path.
fn hashes(root: &Path) -> BTreeMap<PathBuf, String> {
    let mut out = BTreeMap::new();
    let mut stack = vec![root.to_path_buf()];
    while let Some(p) = stack.pop() {
        if p.is_dir() {
            for e in std::fs::read_dir(&p).unwrap() {
                stack.push(e.unwrap().path());
            }
        } else {
            let digest = Sha256::digest(std::fs::read(&p).unwrap());
            let hex: String = digest.iter().map(|b| format!("{b:02x}")).collect();
            out.insert(p, hex);
        }
    }
    out
}

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let p = e.unwrap().path();
        std::fs::copy(&p, to.join(p.file_name().unwrap())).unwrap();
    }
}

#[test]
fn inputs_hash_the_same_after_a_run_and_after_a_check() {
    let dir = tempfile::tempdir().unwrap();
    let xlsx = dir.path().join("harbourview-2026-11.xlsx");
    std::fs::copy(sample("harbourview-2026-11.xlsx"), &xlsx).unwrap();
    let csv = dir.path().join("harbourview-csv");
    copy_dir(&sample("harbourview-2026-11-csv"), &csv);
    // The two copies hold the same accounts; a second book with the same ids
    // would be refused, so each form gets its own run.
    let before: Vec<_> = [&xlsx, &csv].iter().map(|p| hashes(p)).collect();
    assert!(before[1].len() > 3, "the CSV folder has its files");
    for book in [&xlsx, &csv] {
        let out = dir.path().join("out.xlsx");
        let status = ledgerate()
            .arg("run")
            .arg(book)
            .args(["--cutoff", "2026-11-30", "--daily", "--out"])
            .arg(&out)
            .stdout(Stdio::null())
            .status()
            .unwrap();
        assert!(status.success(), "run on {}", book.display());
        let status = ledgerate()
            .arg("check")
            .arg(book)
            .stdout(Stdio::null())
            .status()
            .unwrap();
        assert!(status.success(), "check on {}", book.display());
    }
    let after: Vec<_> = [&xlsx, &csv].iter().map(|p| hashes(p)).collect();
    assert_eq!(before, after, "an input changed");
}

/// A CSV book of `n` savers opened on 1 November, one shared rate.
fn big_book(dir: &Path, n: usize) {
    std::fs::create_dir_all(dir).unwrap();
    let mut accounts =
        std::io::BufWriter::new(std::fs::File::create(dir.join("accounts.csv")).unwrap());
    writeln!(
        accounts,
        "account,name,currency,day_count,open_date,opening_balance,rate_ref"
    )
    .unwrap();
    for i in 0..n {
        writeln!(
            accounts,
            "HM-BIG-{i:06},Harbourview saver {i},USD,ACT/365F,2026-11-01,{}.{:02},HM-STD",
            1_000 + i * 7,
            i % 100
        )
        .unwrap();
    }
    accounts.flush().unwrap();
    std::fs::write(
        dir.join("rates.csv"),
        "rate_ref,effective,rate_percent\nHM-STD,2026-01-01,2.25\n",
    )
    .unwrap();
}

#[cfg(unix)]
#[test]
fn a_run_killed_while_writing_leaves_the_previous_workbook_intact() {
    let dir = tempfile::tempdir().unwrap();
    let out_dir = dir.path().join("out");
    std::fs::create_dir_all(&out_dir).unwrap();
    let target = out_dir.join("accruals-2026-11-30.xlsx");

    // Last month's workbook, from the sample book.
    let status = ledgerate()
        .arg("run")
        .arg(sample("harbourview-2026-11.xlsx"))
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(&target)
        .stdout(Stdio::null())
        .status()
        .unwrap();
    assert!(status.success());
    let previous = std::fs::read(&target).unwrap();

    // 100,000 accounts with their Daily sheet: 3 million rows to write.
    let book = dir.path().join("big");
    big_book(&book, 100_000);
    let mut child = ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--daily", "--out"])
        .arg(&target)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap();

    // Kill it (SIGKILL) as soon as its temporary file appears beside the target.
    let start = Instant::now();
    let partial = loop {
        let found = std::fs::read_dir(&out_dir)
            .unwrap()
            .map(|e| e.unwrap().path())
            .find(|p| p != &target);
        if let Some(p) = found {
            break p;
        }
        if let Some(status) = child.try_wait().unwrap() {
            panic!("the run ended ({status}) before its temporary file was seen");
        }
        assert!(
            start.elapsed() < Duration::from_secs(600),
            "no temporary file in 10 minutes"
        );
        std::thread::sleep(Duration::from_millis(2));
    };
    child.kill().unwrap();
    let status = child.wait().unwrap();
    assert!(!status.success(), "the run was killed, not finished");

    assert!(
        std::fs::read(&target).unwrap() == previous,
        "the previous workbook changed"
    );
    // What is left besides it says what it is: a hidden, unfinished copy of
    // this target, never a file under the target's name.
    let left: Vec<String> = std::fs::read_dir(&out_dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n != "accruals-2026-11-30.xlsx")
        .collect();
    assert!(left.len() <= 1, "{left:?}");
    for name in &left {
        assert!(
            name.starts_with(".accruals-2026-11-30.xlsx.ledgerate-") && name.ends_with(".partial"),
            "unclear leftover {name} (the temporary file was {})",
            partial.display()
        );
    }
}

#[test]
fn the_output_may_not_be_inside_a_csv_book() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("book");
    copy_dir(&sample("harbourview-2026-11-csv"), &csv);
    let before = hashes(&csv);
    let out = ledgerate()
        .arg("run")
        .arg(&csv)
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(csv.join("accounts.csv"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("would overwrite the input"));
    assert_eq!(hashes(&csv), before);
}
