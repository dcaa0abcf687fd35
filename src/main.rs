fn main() -> std::process::ExitCode {
    coilwright::cli::run()
}
