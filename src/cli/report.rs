//! `coilwright report SPEC [--json] [-o FILE]`: the engineering analysis.

use super::pipeline;
use super::{Exit, Failure, print_out};
use anyhow::{Context, bail};
use std::io::Write;
use std::path::Path;

/// Runs `report`.
pub fn run(spec: &Path, json: bool, out: Option<&Path>, force: bool) -> Result<Exit, Failure> {
    if let Some(file) = out
        && file.exists()
        && !force
    {
        return Err(
            anyhow::anyhow!("{} exists; pass --force to replace it", file.display()).into(),
        );
    }
    let checked = pipeline::check(spec)?;
    let analysis = pipeline::analysis(&checked)?;
    let text = if json {
        format!("{}\n", serde_json::to_string_pretty(&analysis)?)
    } else {
        coilwright::export::report::markdown(&checked.loaded.design, &checked.layout, &analysis)
    };
    // When the report goes to a file, limits exceeded (temperature,
    // current) are also said on the terminal.
    if out.is_some() {
        for c in &analysis.cautions {
            eprintln!("warning: {c}");
        }
    }
    match out {
        None => print_out(&text)?,
        Some(file) => write_file(file, text.as_bytes(), force)?,
    }
    Ok(Exit::Ok)
}

/// Writes `bytes` to `file` through a temporary file in the same folder
/// and a rename, so a reader never sees half a file.
pub(crate) fn write_file(file: &Path, bytes: &[u8], force: bool) -> anyhow::Result<()> {
    if file.exists() && !force {
        bail!("{} exists; pass --force to replace it", file.display());
    }
    let parent = match file.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => std::path::PathBuf::from("."),
    };
    let name = file
        .file_name()
        .with_context(|| format!("{} is not a file name", file.display()))?;
    let tmp = parent.join(format!(
        ".{}.tmp-{}",
        name.to_string_lossy(),
        std::process::id()
    ));
    let result = (|| -> anyhow::Result<()> {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, file)?;
        Ok(())
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result.with_context(|| format!("cannot write {}", file.display()))
}
