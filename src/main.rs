//! The `ledgerate` binary: hands the command line to [`ledgerate::cli`].

// A month-end run makes and frees millions of small allocations across the
// pool's threads; this allocator keeps them cheaper and the resident set
// closer to what is live than the system one does.
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() -> std::process::ExitCode {
    ledgerate::panics::install_hook();
    ledgerate::cli::main_with(std::env::args_os())
}
