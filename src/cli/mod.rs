//! The command-line front end: argument types, one file per command,
//! diagnostics rendering. The only part of coilwright (with
//! [`coilwright::export::out_dir`]) that touches the file system.
//!
//! Exit codes: 0 success, 1 rule violations found (nothing written),
//! 2 bad input or failure. A closed output pipe (`| head`) is not an error.

mod build;
mod check;
mod couple;
mod diagnostics;
mod init;
mod out_dir;
pub mod pipeline;
mod report;
mod serve;
mod sweep;

use clap::{Parser, Subcommand};
use std::io::{self, Write};
use std::path::PathBuf;
use std::process::ExitCode;

/// Design coils made of printed-circuit copper: from a design file to
/// fab-ready Gerber, drill and KiCad files, with a rule check and an
/// engineering report.
#[derive(Debug, Parser)]
#[command(
    name = "coilwright",
    version,
    about = "Design coils made of printed-circuit copper, check them against fab rules and write fab-ready files.",
    long_about = "Design coils made of printed-circuit copper.\n\n\
        Describe a coil in a TOML design file (start with `coilwright init coil.toml`), \
        check it against your board maker's rules with `coilwright check`, write the \
        fab files with `coilwright build`, and read the predicted resistance, \
        inductance, force and heating with `coilwright report`.",
    after_help = "Exit status: 0 ok, 1 problems found (rule violations, a design limit exceeded, no sweep candidate passes), 2 bad input or failure."
)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Write a commented starter design file to edit.
    #[command(
        after_help = "Examples:\n  coilwright init --list\n  coilwright init my-coil.toml\n  coilwright init --template pickup-coil tacho.toml"
    )]
    Init {
        /// Starter design to copy (see --list).
        #[arg(long, short, value_name = "NAME", default_value = "fin-actuator")]
        template: String,
        /// List the starter designs with a one-line description.
        #[arg(long, conflicts_with = "file")]
        list: bool,
        /// Replace FILE if it exists.
        #[arg(long)]
        force: bool,
        /// Design file to create, e.g. my-coil.toml.
        #[arg(required_unless_present = "list", value_name = "FILE")]
        file: Option<PathBuf>,
    },
    /// Validate a design file and check the generated copper against the
    /// fab rules.
    #[command(
        after_help = "Exit status: 0 no errors (warnings and advice may be printed), \
        1 rule violations or a limit of the design exceeded (max_temperature at the drive), \
        2 the design file has problems."
    )]
    Check {
        /// Design file (TOML).
        #[arg(value_name = "SPEC")]
        spec: PathBuf,
        /// Print the violations as JSON on standard output.
        #[arg(long)]
        json: bool,
        /// Also write a stacked SVG preview with every violation circled
        /// and labelled with its rule id.
        #[arg(long, value_name = "FILE.svg")]
        svg: Option<PathBuf>,
        /// Replace the SVG file if it exists.
        #[arg(long)]
        force: bool,
    },
    /// Check the design, then write every output file (Gerber, drill, job,
    /// KiCad, SVG previews, report, manifest) into a new folder.
    #[command(after_help = "Nothing is written if the design has problems or \
        rule violations. The folder is written completely or not at all.")]
    Build {
        /// Design file (TOML).
        #[arg(value_name = "SPEC")]
        spec: PathBuf,
        /// Output folder to create.
        #[arg(short = 'o', long = "out", value_name = "DIR")]
        out: PathBuf,
        /// Replace DIR if it exists (the old folder is removed only after
        /// the new one is complete).
        #[arg(long)]
        force: bool,
        /// Write the files even when the predicted temperature exceeds the
        /// design's own max_temperature (otherwise build refuses, exit 1).
        #[arg(long)]
        allow_over_limits: bool,
    },
    /// Predict resistance, inductance, field, force on the magnet, heating
    /// and bending of a design.
    Report {
        /// Design file (TOML).
        #[arg(value_name = "SPEC")]
        spec: PathBuf,
        /// Print the report as JSON (SI units in the key names).
        #[arg(long)]
        json: bool,
        /// Write the report to FILE instead of standard output.
        #[arg(short = 'o', long = "out", value_name = "FILE")]
        out: Option<PathBuf>,
        /// Replace FILE if it exists.
        #[arg(long)]
        force: bool,
    },
    /// Try many variants of a design and find the best one for a goal.
    #[command(after_help = "Examples:\n  \
        coilwright sweep fin.toml --vary layers=2,4,6 --vary turns=4..20 \\\n    \
        --vary trace_width=0.1mm..0.2mm:0.05mm --require \"temperature_c <= 80\" \\\n    \
        --require \"outer_diameter_mm <= 20\" --maximize force_per_sqrt_w_n -o sweep\n\n\
        Metrics are the report's JSON names (see `coilwright report SPEC --json`) plus \
        outer_diameter_mm, inner_diameter_mm, turns, total_turns, layers, trace_width_mm, \
        clearance_mm, ambient_c, max_temperature_c, board_width_mm, board_height_mm, \
        rule_errors, rule_warnings.\n\
        Every candidate goes through validation, the rule check and the analysis; \
        invalid and rule-breaking ones stay in the table with the reason. The design's \
        own max_temperature is always a requirement. Bounds may carry units \
        (\"inductance_h >= 1.5uH\", \"temperature_c <= 60C\").\n\
        Candidates are written to DIR/candidates.csv and candidates.jsonl as they are \
        evaluated (memory stays bounded); ranking.csv, front.csv, tradeoff.svg, best.toml and \
        sweep.json follow at the end. Split a large sweep over machines with --shard K/N \
        and join the folders with `coilwright sweep merge DIR... -o OUT`.\n\
        Exit status: 0 a candidate meets every requirement, 1 none does (the nearest \
        misses are listed), 2 bad arguments, 130 stopped by Ctrl-C (what was evaluated \
        is written and marked incomplete).")]
    #[command(args_conflicts_with_subcommands = true, subcommand_negates_reqs = true)]
    Sweep {
        /// Join shard folders.
        #[command(subcommand)]
        action: Option<SweepAction>,
        /// Base design file (TOML); it must be valid.
        #[arg(value_name = "SPEC", required = true)]
        spec: Option<PathBuf>,
        /// A design key and the values to try: a list (layers=2,4,6), a range
        /// with step 1 (turns=4..20) or a range with a step
        /// (trace_width=0.1mm..0.2mm:0.05mm). Repeat for more keys.
        #[arg(long, value_name = "KEY=VALUES", required = true)]
        vary: Vec<String>,
        /// A requirement on a metric, e.g. "temperature_c <= 80". Repeat for more.
        #[arg(long, value_name = "EXPR")]
        require: Vec<String>,
        /// Metric to maximize, e.g. force_per_sqrt_w_n.
        #[arg(
            long,
            value_name = "METRIC",
            conflicts_with = "minimize",
            required_unless_present = "minimize"
        )]
        maximize: Option<String>,
        /// Metric to minimize, e.g. resistance_ohm_20c.
        #[arg(long, value_name = "METRIC")]
        minimize: Option<String>,
        /// Second metric of the trade-off plot, with :max if larger is
        /// better (default: outer_diameter_mm, smaller is better; when that
        /// is the objective or the same for every candidate, the first of
        /// resistance_ohm_20c, power_w, current_a, trace_length_mm,
        /// thickness_mm that differs).
        #[arg(long, value_name = "METRIC[:max]")]
        versus: Option<String>,
        /// Evaluate only the K-th of N contiguous slices of the candidate
        /// list (1 <= K <= N), e.g. one task of a job array; join the
        /// folders with `sweep merge`.
        #[arg(long, value_name = "K/N")]
        shard: Option<String>,
        /// After the grid, refine the best 3 candidates over the continuous
        /// --vary keys (lengths, turns, drive values; whole-number keys stay
        /// on the grid) with the Nelder-Mead method, within the swept ranges
        /// and every requirement; best.toml then holds the refined design.
        #[arg(long, conflicts_with = "shard")]
        refine: bool,
        /// Folder for the candidate tables (CSV, JSON Lines), the ranking,
        /// the Pareto front, the trade-off plot and the best design file.
        #[arg(short = 'o', long = "out", value_name = "DIR")]
        out: Option<PathBuf>,
        /// Replace DIR if it exists.
        #[arg(long)]
        force: bool,
    },
    /// Couple two coils across a gap: mutual inductance, coupling
    /// coefficient, coupling against gap and offset, and at a frequency the
    /// best efficiency of a resonant link and its load.
    #[command(after_help = "Examples:\n  \
        coilwright couple examples/puck-transmit.toml examples/puck-receive.toml --gap 4mm\n  \
        coilwright couple tx.toml rx.toml --gap 3mm --offset 2mm --frequency 6.78MHz -o link\n\n\
        A is the lower coil as built, B sits above it with the gap between the facing copper \
        surfaces, its centre moved by --offset along x. B is turned over (its top layer faces \
        A's top layer) unless --same-facing. The same file may be given twice. With -o DIR: \
        couple.json, couple.md, coupling_gap.svg, coupling_offset.svg and a copy of each design \
        file (named after the design), written atomically.\n\
        Exit status: 0 ok, 2 bad input (nothing written).")]
    Couple {
        /// Lower coil's design file (TOML).
        #[arg(value_name = "A.toml")]
        a: PathBuf,
        /// Upper coil's design file (TOML); may be the same file.
        #[arg(value_name = "B.toml")]
        b: PathBuf,
        /// Gap between the facing copper surfaces, e.g. 3mm (a bare number is mm).
        #[arg(long, value_name = "LENGTH", allow_hyphen_values = true)]
        gap: String,
        /// Lateral offset of B's centre from A's, e.g. 1mm.
        #[arg(
            long,
            value_name = "LENGTH",
            default_value = "0",
            allow_hyphen_values = true
        )]
        offset: String,
        /// Frequency of the link, e.g. 6.78MHz: gives each coil's Q, the
        /// best link efficiency and its load.
        #[arg(long, value_name = "FREQ", allow_hyphen_values = true)]
        frequency: Option<String>,
        /// B the right way up like A (its bottom layer faces A's top layer)
        /// instead of turned over.
        #[arg(long)]
        same_facing: bool,
        /// Print the result as JSON (SI units in the key names).
        #[arg(long)]
        json: bool,
        /// Output folder to create with the results and plots.
        #[arg(short = 'o', long = "out", value_name = "DIR")]
        out: Option<PathBuf>,
        /// Replace DIR if it exists.
        #[arg(long)]
        force: bool,
    },
    /// Open a workbench page on this computer: edit a design and watch the
    /// copper, rule problems and predictions follow; sweep; write files.
    #[command(
        after_help = "Examples:\n  coilwright serve fin.toml -o fin-out\n  coilwright serve --port 0\n\n\
        The server listens on 127.0.0.1 only and answers only its own page. \
        \"Save design\" writes only the design file named here, \"Write files\" \
        only the -o folder (asking before replacing it). Stop it with Ctrl-C."
    )]
    Serve {
        /// Design file to open (and the only file "Save design" writes);
        /// if it does not exist yet the page starts from a template.
        #[arg(value_name = "DESIGN.toml")]
        design: Option<PathBuf>,
        /// Output folder for "Write files" (build's files, written
        /// atomically; an existing folder is replaced only after asking).
        #[arg(short = 'o', long = "out", value_name = "DIR")]
        out: Option<PathBuf>,
        /// Port on 127.0.0.1; 0 picks a free one.
        #[arg(long, value_name = "N", default_value_t = 8470)]
        port: u16,
    },
}

/// What `sweep` does instead of sweeping.
#[derive(Debug, Subcommand)]
pub enum SweepAction {
    /// Join the folders of a sweep's shards (`--shard K/N`, every K once)
    /// into the folder one unsharded run writes.
    Merge {
        /// Shard folders, in any order.
        #[arg(value_name = "DIR", required = true)]
        dirs: Vec<PathBuf>,
        /// Output folder.
        #[arg(short = 'o', long = "out", value_name = "OUT", required = true)]
        out: PathBuf,
        /// Replace OUT if it exists.
        #[arg(long)]
        force: bool,
    },
}

/// How a command ended.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Exit {
    /// Success.
    Ok,
    /// Rule violations found.
    Violations,
    /// A sweep in which no candidate meets every requirement.
    NothingPasses,
    /// A sweep stopped by Ctrl-C (its folder marked incomplete).
    Interrupted,
}

/// Why a command failed.
#[derive(Debug)]
pub enum Failure {
    /// The design file has problems.
    Spec {
        /// Path as the user gave it.
        path: PathBuf,
        /// Text of the file.
        text: String,
        /// The problems.
        errors: coilwright::design::DesignErrors,
    },
    /// Standard output was closed by the reader: stop quietly.
    BrokenPipe,
    /// Anything else (I/O, refused overwrite, exporter failure).
    Other(anyhow::Error),
}

impl<E: Into<anyhow::Error>> From<E> for Failure {
    fn from(e: E) -> Failure {
        Failure::Other(e.into())
    }
}

/// Maps an error writing to standard output: a closed pipe stops quietly.
pub(crate) fn out_err(e: io::Error) -> Failure {
    if e.kind() == io::ErrorKind::BrokenPipe {
        Failure::BrokenPipe
    } else {
        Failure::Other(anyhow::Error::new(e).context("cannot write to standard output"))
    }
}

/// Writes `text` to standard output.
pub(crate) fn print_out(text: &str) -> Result<(), Failure> {
    let mut out = io::stdout().lock();
    out.write_all(text.as_bytes()).map_err(out_err)?;
    out.flush().map_err(out_err)
}

/// Runs a parsed command line; returns the process exit code (0 ok, 1
/// violations, 2 bad input or failure).
pub fn run(cli: Cli) -> ExitCode {
    let result = match cli.command {
        Command::Init {
            template,
            list,
            force,
            file,
        } => init::run(&template, list, force, file.as_deref()),
        Command::Check {
            spec,
            json,
            svg,
            force,
        } => check::run(&spec, json, svg.as_deref(), force),
        Command::Build {
            spec,
            out,
            force,
            allow_over_limits,
        } => build::run(&spec, &out, force, allow_over_limits),
        Command::Report {
            spec,
            json,
            out,
            force,
        } => report::run(&spec, json, out.as_deref(), force),
        Command::Couple {
            a,
            b,
            gap,
            offset,
            frequency,
            same_facing,
            json,
            out,
            force,
        } => couple::run(couple::Args {
            a: &a,
            b: &b,
            gap: &gap,
            offset: &offset,
            frequency: frequency.as_deref(),
            same_facing,
            json,
            out: out.as_deref(),
            force,
        }),
        Command::Serve { design, out, port } => serve::run(serve::Args {
            design: design.as_deref(),
            out: out.as_deref(),
            port,
        }),
        Command::Sweep {
            action: Some(SweepAction::Merge { dirs, out, force }),
            ..
        } => sweep::merge(&dirs, &out, force),
        Command::Sweep {
            action: None,
            spec,
            vary,
            require,
            maximize,
            minimize,
            versus,
            out,
            force,
            shard,
            refine,
        } => sweep::run(sweep::Args {
            spec: spec.as_deref().unwrap_or(std::path::Path::new("")),
            vary: &vary,
            require: &require,
            objective: match (maximize, minimize) {
                (Some(m), _) => (m, true),
                (None, Some(m)) => (m, false),
                (None, None) => (String::new(), true),
            },
            versus: versus.as_deref(),
            shard: shard.as_deref(),
            refine,
            out: out.as_deref(),
            force,
        }),
    };
    match result {
        Ok(Exit::Ok) | Err(Failure::BrokenPipe) => ExitCode::SUCCESS,
        Ok(Exit::Violations | Exit::NothingPasses) => ExitCode::from(1),
        Ok(Exit::Interrupted) => ExitCode::from(130),
        Err(f) => {
            diagnostics::render_failure(&f);
            ExitCode::from(2)
        }
    }
}
