//! The `coilwright` command: parse the arguments, run the command, map the
//! result to an exit code (0 ok, 1 problems found, 2 bad input or failure).

mod cli;

use clap::Parser;

fn main() -> std::process::ExitCode {
    // COILWRIGHT_SIMD=plain: the same bits on every processor (the
    // output-digest test uses it); otherwise the widest vector path.
    if std::env::var_os("COILWRIGHT_SIMD").is_some_and(|v| v == "plain") {
        coilwright::physics::use_plain_arithmetic();
    }
    cli::run(cli::Cli::parse())
}
