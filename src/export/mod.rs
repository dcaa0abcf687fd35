//! Exporters: translate a [`Layout`] (and the analysis) into files. They
//! never compute geometry; coordinates go through
//! [`crate::geometry::round`].

pub mod out_dir;
pub mod svg;

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
    layout: &Layout,
    _analysis: &Analysis,
) -> Result<Vec<OutFile>, ExportError> {
    let mut out = Vec::new();
    out.extend(previews(layout, &[]));
    Ok(out)
}

/// The SVG previews: `preview/stack.svg` and `preview/layer-N.svg`, with
/// `violations` marked.
pub fn previews(layout: &Layout, violations: &[crate::rules::Violation]) -> Vec<OutFile> {
    let mut out = vec![OutFile {
        path: "preview/stack.svg".into(),
        role: "preview of all copper layers stacked".into(),
        bytes: svg::preview(layout, svg::View::Stack, violations).into_bytes(),
    }];
    for l in 1..=layout.layers {
        out.push(OutFile {
            path: format!("preview/layer-{l}.svg"),
            role: format!("preview of copper layer {l}"),
            bytes: svg::preview(layout, svg::View::Layer(l), violations).into_bytes(),
        });
    }
    out
}
