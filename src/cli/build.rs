//! `coilwright build SPEC -o DIR [--force]`: check, then write every output
//! file into DIR, atomically.

use super::check::{limits_text, plural, violations_table};
use super::out_dir;
use super::pipeline;
use super::{Exit, Failure, print_out};
use anyhow::anyhow;
use coilwright::export;
use std::path::Path;

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
    if checked.has_errors() {
        print_out(&violations_table(&checked.violations))?;
        print_out(&format!(
            "not built: fix the rule violations above (nothing was written to {})\n",
            out.display()
        ))?;
        return Ok(Exit::Violations);
    }
    let analysis = pipeline::analysis(&checked)?;
    let over_limits = analysis.cautions.iter().any(|c| c.is_limit());
    if over_limits && !allow_over_limits {
        print_out(&limits_text(&analysis))?;
        print_out(&format!(
            "not built: the prediction exceeds the design's own limits above; lower the drive or change the coil, \
             or pass --allow-over-limits to write the files anyway (nothing was written to {})\n",
            out.display()
        ))?;
        return Ok(Exit::Violations);
    }
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
    let design = &checked.loaded.design;
    let files = export::bundle(design, &checked.layout, &analysis)
        .map_err(|e| anyhow!("cannot produce the output files: {e}"))?;
    out_dir::write(out, &files, force)?;
    let l = &checked.layout;
    let mut s = violations_table(&checked.violations);
    s.push_str(&format!(
        "built {}: {} in {}\n  {} ({}), {} turns per layer, outer {}, inner {:.3} mm, trace length {:.1} mm\n",
        design.name,
        plural(files.len(), "file"),
        out.display(),
        plural(l.layers as usize, "layer"),
        design.coil.wiring.words(),
        design.coil.turns_text(),
        design.coil.outer_size_text(),
        design.coil.inner_diameter,
        l.track_length(),
    ));
    print_out(&s)?;
    Ok(Exit::Ok)
}
