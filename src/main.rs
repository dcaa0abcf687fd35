//! The `coilwright` command: parse the arguments, run the command, map the
//! result to an exit code (0 ok, 1 problems found, 2 bad input or failure).

mod cli;

use clap::Parser;

fn main() -> std::process::ExitCode {
    cli::run(cli::Cli::parse())
}
