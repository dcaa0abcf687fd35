//! Exporters: translate a [`Layout`] (and the analysis) into files. They
//! never compute geometry; coordinates go through
//! [`crate::geometry::round`].

use crate::geometry::Layout;
use crate::physics::Analysis;
use crate::spec::Design;

pub mod report;

/// One output file, not yet written.
#[derive(Debug, Clone, PartialEq)]
pub struct OutFile {
    /// Path relative to the output folder, with '/' separators.
    pub path: String,
    /// What the file is for (written to the manifest).
    pub role: String,
    /// Contents.
    pub bytes: Vec<u8>,
}

/// Errors while producing output files.
#[derive(Debug, thiserror::Error)]
pub enum ExportError {
    /// An exporter could not represent the layout.
    #[error("{0}")]
    Unrepresentable(String),
}

/// Everything `build` writes, in a fixed order.
pub fn bundle(
    design: &Design,
    _layout: &Layout,
    analysis: &Analysis,
) -> Result<Vec<OutFile>, ExportError> {
    let mut out = Vec::new();
    out.extend(report::files(design, analysis)?);
    Ok(out)
}
