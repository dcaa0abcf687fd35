//! `coilwright build SPEC -o DIR [--force]`: check, then write every output
//! file into DIR, atomically.

use super::check::{plural, violations_table};
use super::out_dir;
use super::pipeline;
use super::{Exit, Failure, print_out};
use anyhow::anyhow;
use coilwright::export;
use std::path::Path;

/// Runs `build`.
pub fn run(spec: &Path, out: &Path, force: bool) -> Result<Exit, Failure> {
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
    // Limits exceeded at the drive (temperature, current) and other
    // cautions from the analysis: said here too, not only in report.md.
    for c in &analysis.cautions {
        eprintln!("warning: {c}");
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
        match design.coil.wiring {
            coilwright::design::Wiring::Series => "series",
            coilwright::design::Wiring::ParallelPairs => "parallel pairs",
        },
        design.coil.turns_text(),
        design.coil.outer_size_text(),
        design.coil.inner_diameter,
        l.track_length(),
    ));
    print_out(&s)?;
    Ok(Exit::Ok)
}
