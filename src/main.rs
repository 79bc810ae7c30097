//! The `ledgerate` binary: hands the command line to [`ledgerate::cli`].

fn main() -> std::process::ExitCode {
    ledgerate::cli::main_with(std::env::args_os())
}
