//! The command-line front end: argument types, commands, diagnostics.

/// Runs the command line; returns the process exit code (0 ok, 1
/// violations, 2 bad input or failure).
pub fn run() -> std::process::ExitCode {
    std::process::ExitCode::from(2)
}
