//! The conventions of a command-line tool, as a user meets them: shell
//! completions and manual pages that name every command, examples in each
//! `--help` that run as printed, the exit statuses in the long help, and
//! progress that never reaches standard output.

use std::path::Path;

use clap::{CommandFactory, Parser};
use ledgerate::cli::Cli;

use crate::common::{ledgerate, sample};

/// Every command, as `--help` lists them (without clap's own `help`).
fn commands() -> Vec<String> {
    Cli::command()
        .get_subcommands()
        .map(|c| c.get_name().to_string())
        .filter(|n| n != "help")
        .collect()
}

/// Every long option of a command, as `--name`.
fn long_options(command: &str) -> Vec<String> {
    let cli = Cli::command();
    let sub = cli.find_subcommand(command).unwrap();
    sub.get_arguments()
        .filter_map(|a| a.get_long())
        .map(|l| format!("--{l}"))
        .collect()
}

fn stdout_of(args: &[&str]) -> String {
    let out = ledgerate().args(args).output().unwrap();
    assert!(out.status.success(), "ledgerate {args:?}: {out:?}");
    String::from_utf8(out.stdout).unwrap()
}

#[test]
fn bash_completions_name_every_command_and_every_option_of_run() {
    let script = stdout_of(&["completions", "bash"]);
    let commands = commands();
    assert!(commands.len() >= 9, "{commands:?}");
    for name in &commands {
        assert!(
            script.contains(&format!("ledgerate,{name})")),
            "bash completions do not name {name}"
        );
    }
    for option in long_options("run") {
        assert!(
            script.contains(&format!(" {option} ")),
            "no {option} in the script"
        );
    }
}

/// What bash completes after `line` (ending in the word being completed),
/// with the script loaded as a user loads it.
fn bash_completes(line: &str) -> Vec<String> {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("ledgerate.bash");
    std::fs::write(&path, stdout_of(&["completions", "bash"])).unwrap();
    let words: Vec<&str> = line.split(' ').collect();
    let program = format!(
        "set -e; source '{}'; COMP_WORDS=({}); COMP_CWORD={}; COMP_LINE='{line}'; \
         COMP_POINT={}; _ledgerate ledgerate '{}' '{}'; printf '%s\\n' \"${{COMPREPLY[@]}}\"",
        path.display(),
        words
            .iter()
            .map(|w| format!("'{w}'"))
            .collect::<Vec<_>>()
            .join(" "),
        words.len() - 1,
        line.len(),
        words[words.len() - 1],
        words[words.len() - 2],
    );
    let out = std::process::Command::new("bash")
        .args(["-c", &program])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(str::to_string)
        .collect()
}

#[test]
fn bash_completes_the_commands_and_their_options() {
    let all = bash_completes("ledgerate ");
    for name in commands() {
        assert!(all.contains(&name), "{name} not offered: {all:?}");
    }
    assert_eq!(bash_completes("ledgerate mer"), ["merge"]);
    assert_eq!(
        bash_completes("ledgerate run --fail"),
        ["--fail-on-variance"]
    );
    assert_eq!(bash_completes("ledgerate completions p"), ["powershell"]);
    assert_eq!(bash_completes("ledgerate sample --format c"), ["csv"]);
}

#[test]
fn every_shell_gets_a_script_and_an_unknown_shell_is_a_usage_error() {
    for shell in ["bash", "zsh", "fish", "powershell", "elvish"] {
        let script = stdout_of(&["completions", shell]);
        // fish names options without their dashes (-l account).
        for word in [
            "ledgerate",
            "explain",
            "account",
            "cutoff",
            "fail-on-variance",
        ] {
            assert!(script.contains(word), "{shell}: no {word}");
        }
    }
    ledgerate()
        .args(["completions", "tcsh"])
        .assert()
        .code(2)
        .stdout("")
        .stderr(predicates::str::contains("possible values: bash"));
}

#[test]
fn the_manual_has_a_page_for_the_program_and_for_every_command() {
    let pages = stdout_of(&["manual"]);
    assert!(
        pages.starts_with(".ie \\n(.g"),
        "not roff: {}",
        &pages[..40]
    );
    assert!(
        pages.contains(".TH ledgerate 1 "),
        "no page for the program"
    );
    // The program's page lists every command in its SUBCOMMANDS section.
    let top = pages.split(".TH ledgerate-").next().unwrap();
    let subcommands = top.split(".SH SUBCOMMANDS").nth(1).unwrap();
    for name in commands() {
        assert!(
            pages.contains(&format!(".TH ledgerate-{name} 1 ")),
            "no page for {name}"
        );
        assert!(
            subcommands.contains(&format!("ledgerate\\-{name}(1)")),
            "the program's page does not list {name}"
        );
    }
    assert!(!pages.contains(".TH ledgerate-help"));
    // Each page: the examples of --help, then the exit statuses on the program's.
    assert_eq!(
        pages.matches(".SH EXAMPLES").count(),
        commands().len() + 1,
        "a page without examples"
    );
    assert!(top.contains(".SH \"EXIT STATUS\""));
    assert!(!top.contains(".SH EXTRA"));
}

#[test]
fn the_manual_pages_render_with_groff() {
    let pages = stdout_of(&["manual"]);
    let groff = std::process::Command::new("groff")
        .args(["-man", "-Tutf8", "-ww", "-rLL=120n"])
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn();
    let Ok(mut groff) = groff else {
        eprintln!("groff is not installed: the pages were checked as roff text only");
        return;
    };
    use std::io::Write;
    groff
        .stdin
        .take()
        .unwrap()
        .write_all(pages.as_bytes())
        .unwrap();
    let out = groff.wait_with_output().unwrap();
    assert!(out.status.success());
    let warnings = String::from_utf8_lossy(&out.stderr);
    assert!(warnings.is_empty(), "groff warns: {warnings}");
    let text = String::from_utf8_lossy(&out.stdout);
    // One example line, unbroken, as the user would type it.
    assert!(text.contains(
        "ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --out november.xlsx"
    ));
    for name in commands() {
        assert!(text.contains(&format!("ledgerate-{name}(1)")), "{name}");
    }
}

#[test]
fn manual_out_writes_the_printed_pages_into_a_folder_it_makes() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("man").join("man1");
    let listing = stdout_of(&["manual", "--out", target.to_str().unwrap()]);
    let mut names = vec!["ledgerate.1".to_string()];
    names.extend(commands().iter().map(|c| format!("ledgerate-{c}.1")));
    let mut joined = String::new();
    for name in &names {
        let path = target.join(name);
        assert!(listing.contains(&path.display().to_string()), "{listing}");
        joined.push_str(&std::fs::read_to_string(&path).unwrap());
    }
    assert_eq!(std::fs::read_dir(&target).unwrap().count(), names.len());
    assert_eq!(joined, stdout_of(&["manual"]));
}

/// The example command lines of a help text: the lines that start with
/// `ledgerate `, split into words as a shell would (double quotes group),
/// up to a redirection or a pipe.
fn examples(help: &str) -> Vec<Vec<String>> {
    help.lines()
        .map(str::trim_start)
        .filter(|l| l.starts_with("ledgerate "))
        .map(|line| {
            let mut words = Vec::new();
            let mut word = String::new();
            let mut quoted = false;
            let mut in_word = false;
            for ch in line.chars() {
                match ch {
                    '"' => {
                        quoted = !quoted;
                        in_word = true;
                    }
                    ' ' if !quoted => {
                        if in_word {
                            words.push(std::mem::take(&mut word));
                            in_word = false;
                        }
                    }
                    _ => {
                        word.push(ch);
                        in_word = true;
                    }
                }
            }
            if in_word {
                words.push(word);
            }
            assert!(!quoted, "unbalanced quotes: {line}");
            let end = words
                .iter()
                .position(|w| [">", ">>", "|"].contains(&w.as_str()))
                .unwrap_or(words.len());
            words.truncate(end);
            words
        })
        .collect()
}

/// Runs one example in `dir`, with the sample book's path made absolute.
fn run_example(words: &[String], dir: &Path) -> std::process::Output {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let args: Vec<std::ffi::OsString> = words[1..]
        .iter()
        .map(|w| {
            if w.starts_with("sample-books/") {
                root.join(w).into_os_string()
            } else {
                w.into()
            }
        })
        .collect();
    ledgerate().current_dir(dir).args(args).output().unwrap()
}

#[test]
fn every_help_has_examples_that_parse_and_run_as_printed() {
    let mut prefixes: Vec<Vec<String>> = vec![vec![]];
    prefixes.extend(commands().into_iter().map(|c| vec![c]));
    for prefix in prefixes {
        let name = prefix.join(" ");
        let with = |flag: &str| {
            let mut args: Vec<&str> = prefix.iter().map(String::as_str).collect();
            args.push(flag);
            stdout_of(&args)
        };
        let help = with("--help");
        let short = with("-h");
        let help_examples = examples(&help);
        assert!(
            !help_examples.is_empty(),
            "ledgerate {name} --help has no example"
        );
        assert_eq!(
            examples(&short),
            help_examples,
            "{name}: -h and --help differ"
        );
        // The examples of one help run in order in one folder: a merge
        // example uses the shards its run examples wrote.
        let dir = tempfile::tempdir().unwrap();
        for words in help_examples {
            assert_eq!(words[0], "ledgerate");
            if let Err(e) = Cli::try_parse_from(&words) {
                panic!("{name} --help: {words:?} does not parse:\n{e}");
            }
            let out = run_example(&words, dir.path());
            let expected = if words.iter().any(|w| w == "--fail-on-variance") {
                3 // the sample book has rows outside tolerance
            } else {
                0
            };
            assert_eq!(
                out.status.code(),
                Some(expected),
                "{words:?}\n{}",
                String::from_utf8_lossy(&out.stderr)
            );
            assert!(!out.stdout.is_empty(), "{words:?} printed nothing");
        }
    }
}

#[test]
fn the_examples_name_the_readme_sample_book_and_cutoff() {
    let help = stdout_of(&["run", "--help"]);
    assert!(help.contains(
        "ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --out november.xlsx"
    ));
    assert!(sample().ends_with("sample-books/harbourview-2026-11.xlsx"));
    let readme =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md")).unwrap();
    assert!(readme.contains("sample-books/harbourview-2026-11.xlsx"));
}

#[test]
fn the_readme_and_the_user_guide_list_every_command() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let readme = std::fs::read_to_string(root.join("README.md")).unwrap();
    let table = readme
        .split("## Commands")
        .nth(1)
        .and_then(|t| t.split("\n## ").next())
        .unwrap();
    let guide = std::fs::read_to_string(root.join("docs/user-guide.md")).unwrap();
    let synopsis = guide.split("## 4. Commands").nth(1).unwrap();
    let synopsis = synopsis.split("### 4.1").next().unwrap();
    for name in commands() {
        assert!(
            table.contains(&format!("`ledgerate {name}")),
            "README's Commands table does not list {name}"
        );
        assert!(
            synopsis.contains(&format!("ledgerate {name} ")),
            "the user guide's list of commands does not name {name}"
        );
    }
}

#[test]
fn the_long_help_lists_the_exit_statuses_and_the_short_one_does_not() {
    let long = stdout_of(&["--help"]);
    let statuses = long.split("Exit status:").nth(1).expect("no exit statuses");
    for line in [
        "  0  every account was computed",
        "  1  some account had an error",
        "  2  the command line or a file could not be used",
        "  3  run --fail-on-variance",
    ] {
        assert!(statuses.contains(line), "no {line:?} in:\n{statuses}");
    }
    assert!(!stdout_of(&["-h"]).contains("Exit status:"));
}

#[test]
fn progress_never_reaches_standard_output_off_a_terminal() {
    let dir = tempfile::tempdir().unwrap();
    let run = |name: &str, extra: &[&str]| {
        ledgerate()
            .arg("run")
            .arg(sample())
            .args([
                "--cutoff",
                "2026-11-30",
                "--fixed-time",
                "2026-12-01T08:00:00",
            ])
            .arg("--out")
            .arg(dir.path().join(name))
            .args(extra)
            .output()
            .unwrap()
    };
    let plain = run("plain.xlsx", &[]);
    assert!(plain.status.success());
    let stdout = String::from_utf8(plain.stdout.clone()).unwrap();
    // Spinners and bars redraw with carriage returns and escape sequences.
    assert!(
        !stdout.contains('\r') && !stdout.contains('\u{1b}'),
        "{stdout:?}"
    );
    for word in [
        "reading",
        "fingerprinting",
        "writing the workbook",
        "accruing",
    ] {
        assert!(!stdout.contains(word), "{word} on stdout: {stdout}");
    }
    assert!(stdout.starts_with("cut-off 2026-11-30"), "{stdout}");
    // Standard error is a pipe here: nothing at all is drawn on it.
    assert!(
        plain.stderr.is_empty(),
        "{:?}",
        String::from_utf8_lossy(&plain.stderr)
    );

    // --timings adds its lines on standard error and nothing else.
    let timed = run("timed.xlsx", &["--timings"]);
    assert!(timed.status.success());
    let stdout_timed = String::from_utf8(timed.stdout).unwrap();
    assert_eq!(
        stdout_timed.replace("timed.xlsx", "plain.xlsx"),
        stdout,
        "--timings changed standard output"
    );
    let stderr = String::from_utf8(timed.stderr).unwrap();
    let steps: Vec<&str> = stderr.lines().collect();
    assert_eq!(steps.len(), 5, "{stderr}");
    assert!(steps.iter().all(|l| l.starts_with("timings: ")), "{stderr}");
    assert!(!stderr.contains('\r'), "{stderr:?}");

    // And the workbook does not depend on it.
    assert_eq!(
        std::fs::read(dir.path().join("plain.xlsx")).unwrap(),
        std::fs::read(dir.path().join("timed.xlsx")).unwrap()
    );
}
