//! The `tankwalk` binary: parse the command line, run, map errors to exit codes.

mod cli;

use std::process::ExitCode;

fn main() -> ExitCode {
    cli::main()
}
