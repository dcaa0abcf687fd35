//! `coilwright build SPEC -o DIR [--force]`: check, then write every output
//! file into DIR, atomically.

use super::check::{limits_text, plural, violations_table};
use super::out_dir;
use super::pipeline::{self, Checked};
use super::{Exit, Failure, print_out};
use anyhow::anyhow;
use coilwright::export::{self, OutFile};
use coilwright::physics::Analysis;
use std::path::Path;

/// What `build` makes of a checked design: the files to write, or why it
/// writes nothing. The one decision shared by `build` and the workbench's
/// "Write files".
pub enum Verdict {
    /// Every output file, in `export::bundle`'s order, and the analysis.
    Files(Vec<OutFile>, Analysis),
    /// Rule violations of error severity block the build.
    RuleViolations,
    /// The prediction (given) exceeds the design's own limits, and that
    /// was not allowed.
    OverLimits(Analysis),
}

/// Decides and, when allowed, produces the files for `checked`.
pub fn produce(checked: &Checked, allow_over_limits: bool) -> Result<Verdict, Failure> {
    if checked.has_errors() {
        return Ok(Verdict::RuleViolations);
    }
    let analysis = pipeline::analysis(checked)?;
    if analysis.cautions.iter().any(|c| c.is_limit()) && !allow_over_limits {
        return Ok(Verdict::OverLimits(analysis));
    }
    let files = export::bundle(&checked.loaded.design, &checked.layout, &analysis)
        .map_err(|e| anyhow!("cannot produce the output files: {e}"))?;
    Ok(Verdict::Files(files, analysis))
}

/// Why nothing was written, as `build` says it.
pub fn refusal_text(verdict: &Verdict, checked: &Checked, out: &Path) -> String {
    match verdict {
        Verdict::Files(..) => String::new(),
        Verdict::RuleViolations => format!(
            "{}not built: fix the rule violations above (nothing was written to {})\n",
            violations_table(&checked.violations),
            out.display()
        ),
        Verdict::OverLimits(analysis) => format!(
            "{}not built: the prediction exceeds the design's own limits above; lower the drive or change the coil, \
             or pass --allow-over-limits to write the files anyway (nothing was written to {})\n",
            limits_text(analysis),
            out.display()
        ),
    }
}

/// The lines `build` prints after writing `files` files to `out`.
pub fn built_text(checked: &Checked, files: usize, out: &Path) -> String {
    let design = &checked.loaded.design;
    let l = &checked.layout;
    let mut s = violations_table(&checked.violations);
    s.push_str(&format!(
        "built {}: {} in {}\n  {} ({}), {} turns per layer, outer {}, inner {:.3} mm, trace length {:.1} mm\n",
        design.name,
        plural(files, "file"),
        out.display(),
        plural(l.layers as usize, "layer"),
        design.coil.wiring.words(),
        design.coil.turns_text(),
        design.coil.outer_size_text(),
        design.coil.inner_diameter,
        l.track_length(),
    ));
    s
}

/// Runs `build`; `allow_over_limits` writes the files even when the
/// prediction exceeds the design's own limits.
pub fn run(spec: &Path, out: &Path, force: bool, allow_over_limits: bool) -> Result<Exit, Failure> {
    if out.exists() && !force {
        return Err(anyhow!(
            "{} exists; pass --force to replace it (nothing was written)",
            out.display()
        )
        .into());
    }
    let checked = pipeline::check(spec)?;
    let verdict = produce(&checked, allow_over_limits)?;
    let Verdict::Files(files, analysis) = verdict else {
        print_out(&refusal_text(&verdict, &checked, out))?;
        return Ok(Exit::Violations);
    };
    // Limits exceeded (only with --allow-over-limits) and advice from the
    // analysis: said here too, not only in report.md.
    for c in &analysis.cautions {
        let what = if c.is_limit() {
            "limit exceeded"
        } else {
            "advice"
        };
        eprintln!("warning: {what}: {c}");
    }
    out_dir::write(out, &files, force)?;
    print_out(&built_text(&checked, files.len(), out))?;
    Ok(Exit::Ok)
}
