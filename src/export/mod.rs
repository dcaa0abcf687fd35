//! Exporters: translate a [`Layout`] (and the analysis) into files. They
//! never compute geometry; coordinates go through
//! [`crate::geometry::round`].

pub mod out_dir;

use crate::geometry::Layout;
use crate::physics::Analysis;
use crate::spec::Design;

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
    _design: &Design,
    _layout: &Layout,
    _analysis: &Analysis,
) -> Result<Vec<OutFile>, ExportError> {
    Ok(Vec::new())
}
