use clap::Parser;

fn main() -> std::process::ExitCode {
    coilwright::cli::run(coilwright::cli::Cli::parse())
}
