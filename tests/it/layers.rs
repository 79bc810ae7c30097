//! The crate's layers, read from its source text:
//!
//! - the computational core (`src/conventions/`, `src/engine/`) is pure: it
//!   touches no file, clock, environment variable, process or terminal, and
//!   knows nothing of the layers above it (books, batch, report, command
//!   line); a test fails on the first line that reaches outside it, naming the
//!   file and line;
//! - the top-level modules import one another without a cycle, so that data
//!   flows one way; a test names the modules of any cycle it finds.

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

/// The top-level modules of the crate: `src/NAME.rs` or `src/NAME/`.
fn top_modules(src: &Path) -> Vec<String> {
    let mut names: Vec<String> = std::fs::read_dir(src)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter_map(|p| {
            let stem = p.file_stem()?.to_str()?.to_string();
            (p.is_dir() || p.extension().is_some_and(|e| e == "rs")).then_some(stem)
        })
        .filter(|n| n != "lib" && n != "main")
        .collect();
    names.sort();
    names.dedup();
    names
}

/// Which top-level modules each one names in its code (`crate::OTHER`),
/// comments and strings left out.
fn imports(src: &Path, modules: &[String]) -> Vec<(String, Vec<String>)> {
    modules
        .iter()
        .map(|m| {
            let mut files = Vec::new();
            let dir = src.join(m);
            if dir.is_dir() {
                rust_files(&dir, &mut files);
            }
            let file = src.join(format!("{m}.rs"));
            if file.exists() {
                files.push(file);
            }
            let mut uses: Vec<String> = Vec::new();
            for f in files {
                let text = std::fs::read_to_string(&f).unwrap();
                for line in text.lines() {
                    let code = code_of(line);
                    for other in modules.iter().filter(|o| *o != m) {
                        let needle = format!("crate::{other}");
                        let named = code.match_indices(&needle).any(|(i, _)| {
                            let next = code[i + needle.len()..].chars().next();
                            !next.is_some_and(|c| c.is_alphanumeric() || c == '_')
                        });
                        if named && !uses.contains(other) {
                            uses.push(other.clone());
                        }
                    }
                }
            }
            uses.sort();
            (m.clone(), uses)
        })
        .collect()
}

/// A cycle in `graph`, as the list of its modules, if there is one.
fn cycle(graph: &[(String, Vec<String>)]) -> Option<Vec<String>> {
    fn visit(
        node: &str,
        graph: &[(String, Vec<String>)],
        path: &mut Vec<String>,
        done: &mut Vec<String>,
    ) -> Option<Vec<String>> {
        if let Some(at) = path.iter().position(|p| p == node) {
            let mut c = path[at..].to_vec();
            c.push(node.to_string());
            return Some(c);
        }
        if done.iter().any(|d| d == node) {
            return None;
        }
        path.push(node.to_string());
        let next = graph
            .iter()
            .find(|(m, _)| m == node)
            .map(|(_, u)| u.clone());
        for n in next.unwrap_or_default() {
            if let Some(c) = visit(&n, graph, path, done) {
                return Some(c);
            }
        }
        path.pop();
        done.push(node.to_string());
        None
    }
    let mut done = Vec::new();
    for (m, _) in graph {
        if let Some(c) = visit(m, graph, &mut Vec::new(), &mut done) {
            return Some(c);
        }
    }
    None
}

#[test]
fn the_top_level_modules_import_one_another_without_a_cycle() {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let modules = top_modules(&src);
    for expected in [
        "book",
        "cli",
        "conventions",
        "engine",
        "problem",
        "report",
        "schema",
    ] {
        assert!(
            modules.iter().any(|m| m == expected),
            "{expected} not found in {modules:?}"
        );
    }
    let graph = imports(&src, &modules);
    let core = graph
        .iter()
        .find(|(m, _)| m == "engine")
        .map(|(_, u)| u.clone());
    assert_eq!(core, Some(vec!["conventions".to_string()]), "{graph:?}");
    if let Some(c) = cycle(&graph) {
        panic!(
            "the modules import one another in a cycle: {}",
            c.join(" -> ")
        );
    }
}

#[test]
fn a_cycle_is_found_and_named() {
    let g = |pairs: &[(&str, &[&str])]| -> Vec<(String, Vec<String>)> {
        pairs
            .iter()
            .map(|(m, u)| (m.to_string(), u.iter().map(|s| s.to_string()).collect()))
            .collect()
    };
    let acyclic = g(&[("a", &["b", "c"]), ("b", &["c"]), ("c", &[])]);
    assert_eq!(cycle(&acyclic), None);
    let cyclic = g(&[("a", &["b"]), ("b", &["c"]), ("c", &["a"])]);
    assert_eq!(cycle(&cyclic).unwrap(), ["a", "b", "c", "a"]);
}
