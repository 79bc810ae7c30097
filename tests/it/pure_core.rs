//! The computational core (`src/conventions/`, `src/engine/`) is pure: it
//! touches no file, clock, environment variable, process or terminal, and
//! knows nothing of the layers above it (books, batch, report, command line).
//! These tests read the core's source text and fail on the first line that
//! reaches outside it, naming the file and line.

use std::path::{Path, PathBuf};

/// What the core's code may not name, with the reason shown on a failure.
const FORBIDDEN: &[(&str, &str)] = &[
    ("std::fs", "files"),
    ("fs::", "files"),
    ("File::", "files"),
    ("std::env", "the environment"),
    ("env!(", "the environment"),
    ("option_env!(", "the environment"),
    ("include_str!(", "files"),
    ("include_bytes!(", "files"),
    ("std::io", "the terminal or files"),
    ("stdin", "the terminal"),
    ("stdout", "the terminal"),
    ("stderr", "the terminal"),
    ("print!(", "the terminal"),
    ("println!(", "the terminal"),
    ("eprint!(", "the terminal"),
    ("eprintln!(", "the terminal"),
    ("dbg!(", "the terminal"),
    ("std::process", "processes"),
    ("std::net", "the network"),
    ("std::time", "the clock"),
    ("SystemTime", "the clock"),
    ("Instant", "the clock"),
    ("::now(", "the clock"),
    ("Local::", "the clock"),
    ("Utc::", "the clock"),
    ("crate::book", "the book reader"),
    ("crate::batch", "the batch"),
    ("crate::report", "the report writer"),
    ("crate::cli", "the command line"),
    ("crate::sample", "the sample generator"),
];

/// The code of a line without its `//` comment and string contents, so that
/// documentation may speak of files and clocks.
fn code_of(line: &str) -> String {
    let mut out = String::new();
    let mut in_string = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '\\' if in_string => {
                chars.next();
            }
            '"' => {
                in_string = !in_string;
                out.push('"');
            }
            '/' if !in_string && chars.peek() == Some(&'/') => break,
            _ if in_string => {}
            _ => out.push(c),
        }
    }
    out
}

/// Every line of `text` that names something forbidden: (line number, reason, line).
fn violations(text: &str) -> Vec<(usize, &'static str, String)> {
    let mut found = Vec::new();
    for (i, line) in text.lines().enumerate() {
        let code = code_of(line);
        // `use std::{fs, io}` names them without the `std::fs` spelling.
        let grouped_std = code.contains("std::{")
            && ["fs", "env", "io", "process", "net", "time"]
                .iter()
                .any(|m| code.contains(&format!("{m},")) || code.contains(&format!("{m}}}")));
        if grouped_std {
            found.push((
                i + 1,
                "files, the environment, the terminal or the clock",
                line.to_string(),
            ));
        }
        for (needle, what) in FORBIDDEN {
            if code.contains(needle) {
                found.push((i + 1, *what, line.to_string()));
            }
        }
    }
    found
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.is_dir() {
            rust_files(&path, out);
        } else if path.extension().is_some_and(|e| e == "rs") {
            out.push(path);
        }
    }
}

#[test]
fn the_core_touches_no_file_clock_environment_or_terminal() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    for layer in ["conventions", "engine"] {
        rust_files(&root.join(layer), &mut files);
        files.push(root.join(format!("{layer}.rs")));
    }
    files.retain(|f| f.exists());
    files.sort();
    assert!(
        files.len() >= 10,
        "the core's files were not found: {files:?}"
    );
    let mut report = Vec::new();
    for file in &files {
        let text = std::fs::read_to_string(file).unwrap();
        for (line, what, code) in violations(&text) {
            report.push(format!(
                "{}:{line}: reaches {what}: {}",
                file.display(),
                code.trim()
            ));
        }
    }
    assert!(
        report.is_empty(),
        "the pure core must not reach outside itself:\n{}",
        report.join("\n")
    );
}

#[test]
fn the_scan_finds_what_it_looks_for_and_ignores_comments_and_strings() {
    let planted = "use std::fs::read;\nlet t = chrono::Utc::now();\nprintln!(\"x\");\nuse std::{collections::BTreeMap, io};\nuse crate::book::Book;\n";
    let found: Vec<usize> = violations(planted).iter().map(|v| v.0).collect();
    for line in 1..=5 {
        assert!(
            found.contains(&line),
            "line {line} of the planted text not found: {found:?}"
        );
    }
    let harmless = "/// Reads no file (std::fs) and prints nothing.\nlet s = \"std::env and println!(\";\nlet x = 1; // Instant\n";
    assert!(
        violations(harmless).is_empty(),
        "{:?}",
        violations(harmless)
    );
}
